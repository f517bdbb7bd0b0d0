"""The one overlay of the dossier: zones of work and sample points drawn on a drawing from
their coordinates (the drawing's own units, origin at its bottom-left corner)."""
from __future__ import annotations

from specgen.cache import figure
from specgen.report.figures import _pyplot, to_svg

MIN_ASPECT = 0.22
ZONE_COLOURS = ["#1f3a5f", "#8a3b12", "#2e6b3a", "#6b2e6b", "#7a6a12"]
# where a point's label may go, in points from the point, nearest first: beside it on either
# side, above and below; then further out, stacked in rows, with a leader line to the point
LABEL_OFFSETS = [(4, 4, "left"), (4, -11, "left"), (-4, 4, "right"), (-4, -11, "right"),
                 (0, 9, "center"), (0, -16, "center")] + [
    (dx, sign * dy, "left" if dx > 0 else "right" if dx < 0 else "center")
    for dy in (18, 28, 38, 48, 58) for dx in (0, 14, -14, 34, -34, 54, -54) for sign in (1, -1)]
LEADER_FROM = 11      # |dy| beyond which a label gets its leader line (pt)


@figure
def overlay(width: float, height: float, units: str, zones: list[tuple[str, float, float, float,
                                                                        float]],
            points: list[tuple[str, float, float]], note: str = "",
            sheet: tuple[bytes, str, int | None] | None = None) -> bytes:
    """Drawing extent ``width`` × ``height`` (``units``), zone rectangles ``(label, x, y, w,
    h)`` and sample points ``(label, x, y)``, with a legend and the orientation ``note``;
    ``sheet`` (the survey sheet as placed: its bytes, file name and PDF page) is drawn under
    them over the extent, upright and at print size (made here, so that a figure left for
    later leaves that work for later too)."""
    if sheet is not None:
        from specgen.report.evidence_images import normalise
        sheet = normalise(sheet[0], sheet[1], page=sheet[2])[0]
    return to_svg(overlay_figure(width, height, units, zones, points, note, sheet))


def overlay_figure(width, height, units, zones, points, note="", sheet=None):
    """The matplotlib figure of :func:`overlay`, laid out, its labels placed apart (the test
    measures their boxes on it)."""
    plt = _pyplot()
    from matplotlib.colors import to_rgba
    from matplotlib.patches import Rectangle
    # a long, low elevation gets a band of room above and below it (at least MIN_ASPECT of
    # its width shown) so that the point labels have somewhere to go
    pad = max(0.0, MIN_ASPECT * width - 1.12 * height) / 2
    aspect = (1.12 * height + 2 * pad) / width
    fig, ax = plt.subplots(figsize=(7.0, max(1.8, min(6.0, 7.0 * aspect + 1.1))),
                           layout="constrained")
    if sheet is not None:
        _sheet(ax, sheet, width, height)
    ax.add_patch(Rectangle((0, 0), width, height, fill=False, edgecolor="#555555", lw=0.8))
    fixed = []
    for i, (label, x, y, w, h) in enumerate(zones):
        colour = ZONE_COLOURS[i % len(ZONE_COLOURS)]
        ax.add_patch(Rectangle((x, y), w, h, facecolor=to_rgba(colour, 0.12), edgecolor=colour,
                               lw=1.2, ls="--", label=f"zone {label}"))
        fixed.append(ax.text(x + 0.01 * width, y + h - 0.02 * height, f"zone {label}",
                             fontsize=7.5, color=colour, va="top",
                             bbox={"facecolor": "white", "alpha": 0.7, "lw": 0, "pad": 1}))
    if points:
        ax.plot([p[1] for p in points], [p[2] for p in points], "o", color="#b3261e",
                markersize=5, label="sample point", zorder=3)
    ax.set_xlim(-0.02 * width, width * 1.02)
    ax.set_ylim(-0.04 * height - pad, height * 1.08 + pad)
    ax.set_aspect("equal" if aspect <= 20 else "auto")
    ax.set_xlabel(f"x ({units}) from the drawing's left edge")
    ax.set_ylabel(f"y ({units})")
    if note:
        ax.set_title(note, fontsize=7.5, loc="left", color="#555555")
    fig.canvas.draw()                  # lay out once, then keep that layout for the labels
    fig.set_layout_engine("none")
    # the legend just below the axis label, measured (the cropped figure keeps no gap)
    below = ax.xaxis.label.get_window_extent(fig.canvas.get_renderer()).y0
    fig.legend(loc="upper center", bbox_to_anchor=(0.5, below / fig.bbox.height - 0.01),
               bbox_transform=fig.transFigure, fontsize=7, frameon=False, ncol=3)
    _place_labels(fig, ax, points, fixed)
    return fig


def _sheet(ax, sheet: bytes, width: float, height: float) -> None:
    import io

    import numpy as np
    from PIL import Image
    with Image.open(io.BytesIO(sheet)) as im:
        ax.imshow(np.asarray(im.convert("RGB")), extent=(0, width, 0, height), zorder=0,
                  interpolation="antialiased")


def _place_labels(fig, ax, points, fixed) -> None:
    """Each point's label at the first of ``LABEL_OFFSETS`` whose box (measured by the
    renderer) meets no label placed before, no zone label, no marker, the legend or the axis
    labels, and stays on the axes; when none is free, the one that overlaps least."""
    from matplotlib.text import Text
    renderer = fig.canvas.get_renderer()
    taken = [t.get_window_extent(renderer) for t in fixed + [ax.xaxis.label, ax.yaxis.label]
             + ax.get_xticklabels() + ax.get_yticklabels()]
    taken += [lg.get_window_extent(renderer) for lg in fig.legends]
    markers = [ax.transData.transform((x, y)) for _, x, y in points]
    inside = ax.get_window_extent(renderer)
    for label, x, y in points:
        best = None
        for dx, dy, ha in LABEL_OFFSETS:
            far = abs(dy) > LEADER_FROM
            text = ax.annotate(label, (x, y), xytext=(dx, dy), textcoords="offset points",
                               fontsize=7, color="#3b2f22", zorder=4, ha=ha,
                               bbox={"facecolor": "white", "alpha": 0.75, "lw": 0, "pad": 0.8},
                               arrowprops={"arrowstyle": "-", "color": "#3b2f22", "lw": 0.5,
                                           "shrinkA": 0, "shrinkB": 3} if far else None)
            text.update_positions(renderer)
            box = Text.get_window_extent(text, renderer)    # the words, not the leader
            clash = sum(_overlap(box, b) for b in taken) + sum(
                _overlap(box, _marker_box(m)) for m in markers) + 10 * _outside(box, inside) + \
                (0 if far else _ambiguous(box, ax.transData.transform((x, y)), markers))
            if best is None or clash < best[0]:
                if best is not None:
                    best[1].remove()
                best = (clash, text, box)
            else:
                text.remove()
            if clash == 0:
                break
        taken.append(best[2])


def _ambiguous(box, own, markers) -> float:
    """A penalty when another marker is nearer the label than its own: a reader would take
    the label for the other point's."""
    import math
    cx, cy = (box.x0 + box.x1) / 2, (box.y0 + box.y1) / 2
    mine = math.dist((cx, cy), own)
    return 1000.0 if any(math.dist((cx, cy), m) < mine - 0.5 for m in markers) else 0.0


def _marker_box(centre, r: float = 4.0):
    from matplotlib.transforms import Bbox
    return Bbox.from_extents(centre[0] - r, centre[1] - r, centre[0] + r, centre[1] + r)


def _overlap(a, b) -> float:
    """Area (display px²) shared by two boxes."""
    w = min(a.x1, b.x1) - max(a.x0, b.x0)
    h = min(a.y1, b.y1) - max(a.y0, b.y0)
    return w * h if w > 0 and h > 0 else 0.0


def _outside(box, inside) -> float:
    """Area of ``box`` outside the axes."""
    return box.width * box.height - _overlap(box, inside)
