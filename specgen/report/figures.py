"""Figures drawn with matplotlib as SVG, reproducibly (fixed hash salt, no date metadata).

matplotlib is imported inside the functions so that ``specgen check`` never loads it.
"""
from __future__ import annotations

import hashlib
import io
import re

from specgen.cache import figure
from specgen.report.fmt import num


def _pyplot():
    import matplotlib
    matplotlib.use("Agg")
    import matplotlib.pyplot as plt
    matplotlib.rcParams.update({
        "svg.hashsalt": "specgen", "svg.fonttype": "path", "font.family": "DejaVu Sans",
        "font.size": 9, "axes.spines.top": False, "axes.spines.right": False,
    })
    return plt


def to_svg(fig) -> bytes:
    """Serialise a figure to SVG bytes without a creation date (reproducible output)."""
    buf = io.BytesIO()
    fig.savefig(buf, format="svg", metadata={"Date": None, "Creator": "specgen"},
                bbox_inches="tight")
    _pyplot().close(fig)
    return stable_ids(buf.getvalue())


#: a clip path or hatch pattern matplotlib defines in an SVG, with its whole definition
_DEFINED = re.compile(rb'<(clipPath|pattern) id="([ph][0-9a-f]{10})"(.*?)</\1>', re.S)


def stable_ids(svg: bytes) -> bytes:
    """The SVG with each clip path and hatch pattern named by a hash of its definition as
    written.  matplotlib names them by a hash of the unrounded numbers behind them (and their
    printed form), which varied between processes for the same drawing: the same figure came
    out with other ids and so other bytes, breaking "same inputs, same bytes"."""
    names = {}
    for m in _DEFINED.finditer(svg):
        body, n = m.group(1) + m.group(3), 0
        while True:    # two definitions written alike keep two names (in drawing order)
            name = m.group(2)[:1] + hashlib.sha256(body + b"#%d" % n).hexdigest()[:10].encode()
            if name not in names.values():
                break
            n += 1
        names[m.group(2)] = name
    if not names:
        return svg
    old = re.compile(rb'(id="|url\(#)(' + b"|".join(map(re.escape, names)) + rb')\b')
    return old.sub(lambda m: m.group(1) + names[m.group(2)], svg)


#: what a placeholder says while its figure is drawn, and once the drawing failed
BEING_DRAWN = ("is being drawn", "It takes its place here when it is ready.")
NOT_DRAWN = ("could not be drawn", "The notice at the top of the page says why.")


def not_drawn(placeholder_svg: bytes) -> bytes:
    """The placeholder of a figure whose drawing failed: it says so instead."""
    text = placeholder_svg.decode("utf-8")
    for now, then in zip(BEING_DRAWN, NOT_DRAWN):
        text = text.replace(now, then)
    return text.encode("utf-8")


def formula_placeholder() -> bytes:
    """What stands for a formula until it is drawn: a line of text in a dashed frame."""
    return ('<svg xmlns="http://www.w3.org/2000/svg" width="230" height="26" '
            f'viewBox="0 0 230 26"><title>This formula {BEING_DRAWN[0]}</title>'
            '<rect x="1" y="1" width="228" height="24" fill="#f4f1ea" stroke="#8a7250" '
            'stroke-dasharray="5 4"/><text x="10" y="18" font-family="DejaVu Sans, sans-serif" '
            f'font-size="12" fill="#3b2f22">This formula {BEING_DRAWN[0]}</text></svg>'
            ).encode("utf-8")


def placeholder(n: int = 0, label: str = "") -> bytes:
    """What stands in a page for figure ``n`` (or the image ``label`` names) until it is
    drawn (the live preview shows its pages first): a framed box saying so (the caption
    stands under it already); plain SVG, no matplotlib; small, so that its words stay
    legible on a phone's width."""
    lines = [f"{label or f'Figure {n}'} {BEING_DRAWN[0]}", BEING_DRAWN[1]]
    return ('<svg xmlns="http://www.w3.org/2000/svg" width="420" height="84" '
            f'viewBox="0 0 420 84"><title>{lines[0]}</title>'
            '<rect x="1" y="1" width="418" height="82" fill="#f4f1ea" stroke="#8a7250" '
            'stroke-width="2" stroke-dasharray="8 6"/>'
            '<g font-family="DejaVu Sans, sans-serif" fill="#3b2f22">'
            f'<text x="20" y="36" font-size="16" font-weight="bold">{lines[0]}</text>'
            f'<text x="20" y="60" font-size="13">{lines[1]}</text></g></svg>').encode("utf-8")


#: the ages a strength record is read at (test ages of EN 1015-11 and the later ages a
#: natural cement needs, DOMAIN.md §1), used as the ticks of every age axis
AGE_TICKS_D = (1, 3, 7, 14, 28, 56, 90, 180, 365, 730, 1825, 3650)


def age_axis(ax, ages) -> None:
    """A log axis of age in days ticked at the test ages (1, 3, 7, 28, 90, 365 …) written
    as plain numbers of days, never as powers of ten."""
    from matplotlib.ticker import FixedLocator, FuncFormatter, NullLocator
    ax.set_xscale("log")
    ages = [float(a) for a in ages if a and float(a) > 0]
    lo, hi = (min(ages), max(ages)) if ages else (1.0, 365.0)
    ticks = [t for t in AGE_TICKS_D if lo / 1.5 <= t <= hi * 1.5]
    if len(ticks) > 7:  # keep the axis legible: drop the in-between ages first
        ticks = [t for t in ticks if t not in (14, 56, 180, 730)]
    ax.xaxis.set_major_locator(FixedLocator(ticks or [lo, hi]))
    ax.xaxis.set_major_formatter(FuncFormatter(lambda v, _: f"{v:g}"))
    ax.xaxis.set_minor_locator(NullLocator())


BAND_COLOURS = ["#f3ede2", "#e7dcc7", "#d9c8a7", "#c8b087", "#a98f64", "#8a7250"]


@figure
def band_chart(points: list[tuple[str, float]], bands: list[dict], title: str) -> bytes:
    """Place each analysis's index on the band scale (one row per analysis)."""
    import textwrap
    plt = _pyplot()
    fig, ax = plt.subplots(figsize=(7.0, 1.1 + 0.42 * max(1, len(points))))
    top = max([float(b["high"]) for b in bands] + [v for _, v in points]) * 1.05
    # the band's width in points, from the axes' share of the figure (7 in wide)
    pt_per_unit = ax.get_position().width * fig.get_figwidth() * 72 / top
    for i, b in enumerate(bands):
        lo, hi = float(b["low"]), float(b["high"])
        ax.axvspan(lo, hi, color=BAND_COLOURS[i % len(BAND_COLOURS)], zorder=0)
        # Names wrapped to the characters that fit the band (DejaVu Sans averages about
        # 0.6 em a character), so that neighbouring names never run into each other.
        size = 6.5
        chars = max(1, int((hi - lo) * pt_per_unit * 0.92 / (0.6 * size)))
        lines = textwrap.wrap(b["name"], chars, break_long_words=False)
        longest = max(len(x) for x in lines)
        if longest > chars:          # a word longer than the band: a smaller face
            size = max(4.5, size * chars / longest)
        ax.text((lo + hi) / 2, len(points) - 0.45, "\n".join(lines),
                ha="center", va="bottom", fontsize=size, color="#3b2f22", linespacing=1.1)
    for y, (label, value) in enumerate(reversed(points)):
        ax.plot([value], [y], marker="D", color="#1f3a5f", markersize=7, zorder=3)
        # three figures, as the table of indices beside the figure gives them
        ax.text(value, y + 0.18, num(value, 3), ha="center", fontsize=7.5, color="#1f3a5f")
    ax.set_yticks(range(len(points)), [p[0] for p in reversed(points)])
    ax.set_ylim(-0.6, len(points) + 0.45)
    ax.set_xlim(0, top)
    ax.set_xlabel(title)
    return to_svg(fig)
