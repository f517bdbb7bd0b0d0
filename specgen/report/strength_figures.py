"""Strength-development figures (matplotlib, SVG via :func:`specgen.report.figures.to_svg`).

The numbers drawn are prepared by the chapter from ``specgen.checks.strength_common``
and the science; these functions only draw.  Ages in days, strengths in MPa.
matplotlib is imported inside the functions so that ``specgen check`` never loads it.
"""
from __future__ import annotations

from specgen.cache import figure
from specgen.report.figures import _pyplot, age_axis, to_svg

INK, BAND, WIDE = "#1f3a5f", "#c9d6e6", "#eadfcb"
ALUMINATE, SILICATE, WALL, LIMIT = "#e3c48f", "#a9c5a0", "#8a4f7d", "#a23b2a"


@figure
def strength_age(data: dict) -> bytes:
    """Strength against log age: specimens, means ± SD, fitted curve and band, components,
    requirement lines and the in-wall curve.

    ``data`` keys: ``title``; ``specimens`` [(age, MPa)]; ``means`` [(age, mean, sd)];
    ``curve`` the ``strength_curve`` record of Results or None; ``components`` {name: values}
    on the curve's ages; ``limits`` [(age or None, MPa, label, kind)]; ``wall`` {ages,
    value} or None; ``model`` label of the fitted model.
    """
    plt = _pyplot()
    fig, ax = plt.subplots(figsize=(7.0, 4.2))
    c = data.get("curve")
    if c:
        _stacked_components(ax, c["ages_d"], data.get("components") or {})
        _band(ax, c)
        ax.plot(c["ages_d"], c["value"], color=INK, lw=1.6, label=f"fit: {data['model']}")
    if data.get("wall"):
        w = data["wall"]
        ax.plot(w["ages"], w["value"], color=WALL, lw=1.3, ls="-.",
                label="in the wall (site temperature)")
    xs, ys = zip(*data["specimens"]) if data["specimens"] else ((), ())
    ax.plot(xs, ys, "o", ms=3.2, mfc="white", mec="#555555", mew=0.8, ls="none",
            label="specimens")
    ages, means, sds = zip(*data["means"]) if data["means"] else ((), (), ())
    ax.errorbar(ages, means, yerr=sds, fmt="s", ms=4.5, color=INK, capsize=3, lw=1,
                label="mean ± SD")
    for age, value, label, kind in data.get("limits", []):
        _limit(ax, age, value, label, kind)
    drawn = [*xs, *ages, *(c["ages_d"] if c else ()),
             *((data["wall"] or {}).get("ages", ()) if data.get("wall") else ())]
    age_axis(ax, drawn)
    ax.set_xlabel("age (days, log scale; equivalent age at 20 °C for the fit)")
    ax.set_ylabel(f"{data['test']} strength (MPa)")
    ax.set_ylim(bottom=0)
    ax.set_title(data["title"], fontsize=9.5, loc="left")
    ax.grid(True, which="major", color="#e5e5e5", lw=0.6)
    ax.legend(fontsize=7, loc="upper center", bbox_to_anchor=(0.5, -0.16), ncol=3,
              frameon=False)
    return to_svg(fig)


def _stacked_components(ax, ages, parts: dict) -> None:
    """The two stages shaded separately: aluminate from 0, silicate stacked on top."""
    if "aluminate" not in parts:
        return
    al, si = parts["aluminate"], parts["silicate"]
    ax.fill_between(ages, 0, al, color=ALUMINATE, alpha=0.55, lw=0,
                    label="aluminate stage (fast)")
    ax.fill_between(ages, al, [a + s for a, s in zip(al, si)], color=SILICATE, alpha=0.45,
                    lw=0, label="silicate stage (slow)")


def _band(ax, c: dict) -> None:
    """Interval for the next set (light), band for the mean (darker); beyond the
    extrapolation limit both are hatched: indicative only.  Nothing is clipped."""
    import numpy as np
    ages = np.asarray(c["ages_d"], float)
    far = ages > float(c["indicative_from_d"])
    level = f"{100 * c['level']:.0f} %"
    for lo, hi, colour, label in (
            ("pred_lo", "pred_hi", WIDE, f"{level} interval, next set of {c['n']} prisms"),
            ("mean_lo", "mean_hi", BAND, f"{level} band for the mean curve")):
        lo_, hi_ = np.asarray(c[lo], float), np.asarray(c[hi], float)
        ax.fill_between(ages, lo_, hi_, color=colour, alpha=0.55, lw=0, label=label)
        for edge in (lo_, hi_):
            ax.plot(ages, edge, color=INK, lw=0.5, ls=(0, (2, 2)), alpha=0.7)
    if far.any():
        ax.fill_between(ages, np.asarray(c["pred_lo"], float), np.asarray(c["pred_hi"], float),
                        where=far, facecolor="none", hatch="///", edgecolor="#b9a27a", lw=0,
                        label=f"indicative (beyond {float(c['indicative_from_d']):g} d)")


def _limit(ax, age, value, label, kind) -> None:
    ax.axhline(value, color=LIMIT, lw=0.8, ls="--" if kind == "min" else ":")
    if age is not None:
        ax.plot([age], [value], marker="^" if kind == "min" else "v", color=LIMIT, ms=6)
    ax.annotate(label, xy=(0.01, value), xycoords=("axes fraction", "data"), ha="left",
                va="bottom", fontsize=7, color=LIMIT)


@figure
def residuals(panels: list[dict]) -> bytes:
    """Relative residuals (observed/fitted − 1, %) against log age, one panel per test kind."""
    plt = _pyplot()
    fig, axes = plt.subplots(1, len(panels), figsize=(7.0, 2.6), squeeze=False)
    for ax, p in zip(axes[0], panels):
        ax.axhline(0, color="#777777", lw=0.8)
        ax.plot(p["ages"], p["residuals"], "o", ms=3.5, color=INK, mfc="white")
        age_axis(ax, p["ages"])
        ax.set_xlabel("equivalent age (days)")
        ax.set_ylabel("residual (%)")
        ax.set_title(f"{p['test']}: {p['model']}", fontsize=8.5, loc="left")
        ax.grid(True, color="#eeeeee", lw=0.6)
    fig.tight_layout()
    return to_svg(fig)
