"""The one overlay of the dossier: zones of work and sample points drawn on a drawing from
their coordinates (the drawing's own units, origin at its bottom-left corner)."""
from __future__ import annotations

from specgen.cache import figure
from specgen.report.figures import _pyplot, to_svg

ZONE_COLOURS = ["#1f3a5f", "#8a3b12", "#2e6b3a", "#6b2e6b", "#7a6a12"]


@figure
def overlay(width: float, height: float, units: str, zones: list[tuple[str, float, float, float,
                                                                        float]],
            points: list[tuple[str, float, float]], note: str = "",
            sheet: bytes | None = None) -> bytes:
    """Drawing extent ``width`` × ``height`` (``units``), zone rectangles ``(label, x, y, w,
    h)`` and sample points ``(label, x, y)``, with a legend and the orientation ``note``;
    ``sheet`` (JPEG or PNG bytes, already upright) is drawn under them over the extent."""
    plt = _pyplot()
    from matplotlib.colors import to_rgba
    from matplotlib.patches import Rectangle
    aspect = height / width
    fig, ax = plt.subplots(figsize=(7.0, max(1.8, min(6.0, 7.0 * aspect + 0.9))))
    if sheet is not None:
        import io

        import numpy as np
        from PIL import Image
        with Image.open(io.BytesIO(sheet)) as im:
            ax.imshow(np.asarray(im.convert("RGB")), extent=(0, width, 0, height), zorder=0,
                      interpolation="antialiased")
    ax.add_patch(Rectangle((0, 0), width, height, fill=False, edgecolor="#555555", lw=0.8))
    for i, (label, x, y, w, h) in enumerate(zones):
        colour = ZONE_COLOURS[i % len(ZONE_COLOURS)]
        ax.add_patch(Rectangle((x, y), w, h, facecolor=to_rgba(colour, 0.12), edgecolor=colour,
                               lw=1.2, ls="--", label=f"zone {label}"))
        ax.text(x + 0.01 * width, y + h - 0.02 * height, f"zone {label}", fontsize=7.5,
                color=colour, va="top")
    if points:
        ax.plot([p[1] for p in points], [p[2] for p in points], "o", color="#b3261e",
                markersize=5, label="sample point", zorder=3)
        for label, x, y in points:
            ax.annotate(label, (x, y), xytext=(4, 4), textcoords="offset points", fontsize=7,
                        color="#3b2f22", zorder=4)
    ax.set_xlim(-0.02 * width, width * 1.02)
    ax.set_ylim(-0.04 * height, height * 1.08)
    ax.set_aspect("equal" if 0.05 <= aspect <= 20 else "auto")
    ax.set_xlabel(f"x ({units}) from the drawing's left edge")
    ax.set_ylabel(f"y ({units})")
    ax.legend(loc="upper center", bbox_to_anchor=(0.5, -0.25 if aspect < 0.5 else -0.12),
              fontsize=7, frameon=False, ncol=3)
    if note:
        ax.set_title(note, fontsize=7.5, loc="left", color="#555555")
    return to_svg(fig)
