"""Figures of the composition chapter: phase estimate bars and hydration-volume bars.

Values arrive computed (from the check results); these functions only draw them.
matplotlib is imported inside :func:`specgen.report.figures._pyplot`.
"""
from __future__ import annotations

from specgen.cache import figure
from specgen.report.figures import _pyplot, to_svg
from specgen.report.wording import formula_label

PHASE_COLOURS = {
    "C2S": "#1f3a5f", "C3S": "#12263f", "C3A": "#8c4a2f", "C4AF": "#a8643f", "C2AS": "#b9855a",
    "C2F": "#c99f75", "amorphous A+F": "#d8c3a5", "free lime": "#e9e2d0", "periclase": "#9aa89a",
    "CaSO4": "#c7c0d8", "calcite": "#f3ede2", "MgCO3": "#e4dccb", "uncombined SiO2": "#b0b7bf",
    "other": "#d0d0d0",
}
VOLUME_COLOURS = {"C2S": "#1f3a5f", "H": "#8fb3d9", "C1.7SH4": "#b9855a", "CH": "#e9e2d0",
                  "shrinkage": "#ffffff"}
VOLUME_LABELS = {"C2S": "belite", "H": "water", "C1.7SH4": "C-S-H", "CH": "CH",
                 "shrinkage": "chemical shrinkage (empty)"}


@figure
def phase_bars(rows: list[tuple[str, dict[str, float]]]) -> bytes:
    """One stacked horizontal bar per binder: potential phases in mass %."""
    plt = _pyplot()
    fig, ax = plt.subplots(figsize=(7.0, 0.9 + 0.55 * max(1, len(rows))))
    seen: dict[str, object] = {}
    for y, (label, phases) in enumerate(reversed(rows)):
        left = 0.0
        for name, value in phases.items():
            bar = ax.barh(y, value, left=left, color=PHASE_COLOURS.get(name, "#cccccc"),
                          edgecolor="#3b2f22", linewidth=0.4, height=0.6)
            if value >= 6:
                dark = name in ("C2S", "C3S", "C3A", "C4AF")
                ax.text(left + value / 2, y, f"{value:.0f}", ha="center", va="center",
                        fontsize=7, color="white" if dark else "#1a1a1a")
            seen.setdefault(name, bar)
            left += value
    ax.set_yticks(range(len(rows)), [r[0] for r in reversed(rows)])
    ax.set_xlim(0, 100)
    ax.set_xlabel("potential phases, mass % of the binder as analysed (losses not assigned)")
    ax.legend(seen.values(), [formula_label(k) for k in seen], ncol=5, fontsize=7, frameon=False,
              loc="upper center", bbox_to_anchor=(0.5, -0.28))
    return to_svg(fig)


@figure
def hydration_bars(cases: list[tuple[str, dict[str, float]]]) -> bytes:
    """Before/after volume bars of belite hydration for each density set.

    ``cases``: (set name, relative volumes {C2S: 1, H, C1.7SH4, CH}) — volumes per
    volume of belite.  The gap between the bars' tops is the chemical shrinkage.
    """
    plt = _pyplot()
    fig, ax = plt.subplots(figsize=(7.0, 3.0))
    ticks, labels, seen = [], [], {}
    for i, (name, rel) in enumerate(cases):
        x0 = i * 3.0
        before = [("C2S", rel["C2S"]), ("H", rel["H"])]
        after = [("C1.7SH4", rel["C1.7SH4"]), ("CH", rel["CH"])]
        shrink = sum(v for _, v in before) - sum(v for _, v in after)
        for x, stack in ((x0, before), (x0 + 1.1, after + [("shrinkage", shrink)])):
            bottom = 0.0
            for key, v in stack:
                bar = ax.bar(x, v, bottom=bottom, width=0.9, color=VOLUME_COLOURS[key],
                             edgecolor="#3b2f22", linewidth=0.5,
                             hatch="///" if key == "shrinkage" else None)
                if v >= 0.15:  # smaller segments: the value is in the table beside
                    ax.text(x, bottom + v / 2, f"{v:.2f}", ha="center", va="center",
                            fontsize=7, color="white" if key == "C2S" else "#1a1a1a")
                seen.setdefault(VOLUME_LABELS[key], bar)
                bottom += v
        ticks += [x0, x0 + 1.1]
        labels += [f"before\n{name}", f"after\n{name}"]
    ax.set_xticks(ticks, labels, fontsize=7.5)
    ax.set_ylabel("volume per volume of belite")
    ax.legend(seen.values(), seen.keys(), fontsize=7, frameon=False, loc="upper left",
              bbox_to_anchor=(1.0, 1.0))
    return to_svg(fig)
