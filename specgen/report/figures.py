"""Figures drawn with matplotlib as SVG, reproducibly (fixed hash salt, no date metadata).

matplotlib is imported inside the functions so that ``specgen check`` never loads it.
"""
from __future__ import annotations

import io

from specgen.cache import figure


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
    return buf.getvalue()


BAND_COLOURS = ["#f3ede2", "#e7dcc7", "#d9c8a7", "#c8b087", "#a98f64", "#8a7250"]


@figure
def band_chart(points: list[tuple[str, float]], bands: list[dict], title: str) -> bytes:
    """Place each analysis's index on the band scale (one row per analysis)."""
    import textwrap
    plt = _pyplot()
    fig, ax = plt.subplots(figsize=(7.0, 1.1 + 0.42 * max(1, len(points))))
    top = max([float(b["high"]) for b in bands] + [v for _, v in points]) * 1.05
    for i, b in enumerate(bands):
        lo, hi = float(b["low"]), float(b["high"])
        ax.axvspan(lo, hi, color=BAND_COLOURS[i % len(BAND_COLOURS)], zorder=0)
        # Names wrapped to the band's width so that neighbouring names never overlap.
        width = max(6, int(14 * (hi - lo) / (0.2 * top / 1.8)))
        ax.text((lo + hi) / 2, len(points) - 0.45, "\n".join(textwrap.wrap(b["name"], width)),
                ha="center", va="bottom", fontsize=6.5, color="#3b2f22", linespacing=1.1)
    for y, (label, value) in enumerate(reversed(points)):
        ax.plot([value], [y], marker="D", color="#1f3a5f", markersize=7, zorder=3)
        ax.text(value, y + 0.18, f"{value:.3f}", ha="center", fontsize=7.5, color="#1f3a5f")
    ax.set_yticks(range(len(points)), [p[0] for p in reversed(points)])
    ax.set_ylim(-0.6, len(points) + 0.45)
    ax.set_xlim(0, top)
    ax.set_xlabel(title)
    return to_svg(fig)
