"""Figures of the compatibility chapter: grading curves with the envelope, colour swatches
beside ΔE00, and the moisture bar chart.

Every figure takes prepared numbers (the chapter gathers them from the check results and
the science functions); nothing is computed here but the drawing.  matplotlib is imported
inside :func:`specgen.report.figures._pyplot`, so ``specgen check`` never loads it.
"""
from __future__ import annotations

from specgen.cache import figure
from specgen.report.figures import _pyplot, to_svg

INK, ENVELOPE, HISTORIC = "#1f3a5f", "#e7dcc7", "#8a4f7d"
CURVES = ["#1f77b4", "#2ca02c", "#d62728", "#9467bd", "#8c564b", "#17becf"]
UNIT_C, HIST_C, REPAIR_C = "#8a7250", "#8a4f7d", "#1f3a5f"


@figure
def grading_curves(curves: list[dict], envelope: dict | None, historic: dict | None) -> bytes:
    """Cumulative % passing against sieve aperture (log axis): each candidate's sand, the
    historic aggregate (dashed) and the chosen envelope shaded.

    ``curves``: [{label, sieves_mm, passing}]; ``envelope``: {title, sieves_mm, low, high};
    ``historic``: {label, sieves_mm, passing} or None.
    """
    plt = _pyplot()
    fig, ax = plt.subplots(figsize=(6.4, 3.6))
    if envelope:
        ax.fill_between(envelope["sieves_mm"], envelope["low"], envelope["high"], color=ENVELOPE,
                        lw=0, label=f"envelope: {envelope['title']}", step=None)
    if historic:
        ax.plot(historic["sieves_mm"], historic["passing"], color=HISTORIC, lw=2.2, ls="--",
                marker="s", ms=4, label=historic["label"])
    for i, c in enumerate(curves):
        ax.plot(c["sieves_mm"], c["passing"], color=CURVES[i % len(CURVES)], lw=1.4, marker="o",
                ms=3, label=c["label"])
    ax.set_xscale("log")
    ax.set_xlabel("sieve aperture (mm, log scale)")
    ax.set_ylabel("cumulative passing (%)")
    ax.set_ylim(0, 102)
    ax.xaxis.set_major_formatter(plt.FuncFormatter(lambda v, _: f"{v:g}"))
    ax.grid(True, which="both", lw=0.3, alpha=0.5)
    ax.legend(fontsize=7, loc="upper center", bbox_to_anchor=(0.5, -0.16), ncol=2, frameon=False)
    return to_svg(fig)


@figure
def colour_swatches(rows: list[dict]) -> bytes:
    """One row per candidate: the historic mortar's mean colour beside the panel's, with ΔE00.

    ``rows``: [{label, historic_label, historic_hex, panel_hex, delta_e, clipped}].
    """
    plt = _pyplot()
    from matplotlib.patches import Rectangle
    fig, ax = plt.subplots(figsize=(6.4, 0.75 * len(rows) + 0.5))
    for i, r in enumerate(rows):
        y = len(rows) - 1 - i
        ax.add_patch(Rectangle((0.0, y + 0.1), 1.0, 0.8, color=r["historic_hex"], ec="#555", lw=0.5))
        ax.add_patch(Rectangle((1.05, y + 0.1), 1.0, 0.8, color=r["panel_hex"], ec="#555", lw=0.5))
        ax.text(-0.05, y + 0.5, r["historic_label"], ha="right", va="center", fontsize=8)
        ax.text(2.15, y + 0.5, f"{r['label']}   ΔE00 = {r['delta_e']}"
                + ("  (display colour clipped)" if r["clipped"] else ""), va="center", fontsize=8)
    ax.text(0.5, len(rows) + 0.05, "historic", ha="center", va="bottom", fontsize=7, color="#555")
    ax.text(1.55, len(rows) + 0.05, "trial panel", ha="center", va="bottom", fontsize=7,
            color="#555")
    ax.set_xlim(-1.6, 5.2)
    ax.set_ylim(0, len(rows) + 0.4)
    ax.axis("off")
    return to_svg(fig)


@figure
def moisture_bars(bars: list[dict]) -> bytes:
    """Capillary absorption coefficient (higher is more open) and vapour resistance factor μ
    (lower is more open) of the units, the historic mortar and each candidate.

    ``bars``: [{label, role (unit|historic|repair), capillary or None, mu or None}].
    """
    plt = _pyplot()
    fig, (a1, a2) = plt.subplots(1, 2, figsize=(6.4, 0.45 * len(bars) + 1.2), sharey=True)
    labels = [b["label"] for b in bars]
    colours = [{"unit": UNIT_C, "historic": HIST_C}.get(b["role"], REPAIR_C) for b in bars]
    ys = list(range(len(bars)))[::-1]
    for ax, key, title in ((a1, "capillary", "capillary coefficient\nkg/(m²·min$^{1/2}$) — higher is more open"),
                           (a2, "mu", "vapour resistance factor μ\n— lower is more open")):
        vals = [b[key] if b[key] is not None else 0.0 for b in bars]
        ax.barh(ys, vals, color=colours, height=0.6)
        for y, b, v in zip(ys, bars, vals):
            ax.text(v, y, f" {b[key]:.3g}" if b[key] is not None else " not given", va="center",
                    fontsize=7)
        ax.set_title(title, fontsize=8)
        ax.margins(x=0.25)
    a1.set_yticks(ys)
    a1.set_yticklabels(labels, fontsize=8)
    fig.tight_layout()
    return to_svg(fig)
