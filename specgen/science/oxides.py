"""Oxide analyses: closure, lumped oxides, loss-free basis and indices of hydraulicity.

All inputs are mass % of the named oxides (the basis a laboratory reports), as
plain floats in a mapping keyed by formula (``CaO``, ``SiO2``, ``Al2O3``, ``Fe2O3``,
``MgO``, ``SO3``, ``LOI`` ...).  Missing oxides count as zero where a formula allows.
Cement chemistry notation in docstrings: C = CaO, S = SiO2, A = Al2O3, F = Fe2O3,
M = MgO, S̄ = SO3.
"""
from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

from specgen.errors import ScienceInputError


class ChemistryInputError(ScienceInputError):
    """An analysis (or a reference table) the chemistry functions cannot use."""


#: Constituents that leave on ignition (content/data/constituents.yaml, kind 'loss').
#: ``LOI`` is the measured total; ``CO2``, ``H2O`` (combined water, H2O+), ``H2O-``
#: (moisture) and ``organic`` (organic matter) are its parts when reported, never added to
#: it a second time.
LOSS_KEYS = ("LOI", "CO2", "H2O", "H2O-", "organic")

#: Scheme behind :func:`hydraulic_index` (say it whenever the index is shown).
HYDRAULIC_INDEX_SCHEME = "Vicat hydraulic index HI = (S + A + F) / (C + M)"

#: Upper bound for a loss on ignition (mass %): pure MgCO3 loses 52.2 %, CaCO3 44.0 %,
#: dolomite 47.7 %; above 50 % no carbonate rock or binder analysis is plausible.
MAX_LOI = 50.0


@dataclass(frozen=True)
class Closure:
    """Sum of the reported constituents (mass %) and its gap to 100 %."""

    total: float
    deviation: float  # total - 100, mass %


def closure(analysis: Mapping[str, float]) -> Closure:
    """Sum every reported constituent, LOI included (mass %).

    When both ``LOI`` and its parts (``CO2``, ``H2O``) are reported, only ``LOI``
    is counted, so the parts are not added twice.
    """
    validate(analysis, required=(), allow_lumped=True)
    parts = {k: v for k, v in analysis.items() if not ("LOI" in analysis and k in LOSS_KEYS[1:])}
    total = float(sum(parts.values()))
    return Closure(total=total, deviation=total - 100.0)


def validate(ox: Mapping[str, float], required: Sequence[str] = ("CaO", "SiO2"),
             allow_lumped: bool = False) -> None:
    """Refuse an analysis with missing, negative or non-finite values, or LOI > 50 %.

    Lumped keys (``"Al2O3+Fe2O3"``) are refused unless ``allow_lumped``: split them
    first with :func:`split_lumped`, which states the assumption.
    """
    for key, value in ox.items():
        if "+" in key and not allow_lumped:
            raise ChemistryInputError(
                f"'{key}' is a lumped oxide: split it with a declared fraction before use")
        if not isinstance(value, (int, float)) or not math.isfinite(value):
            raise ChemistryInputError(f"{key} must be a finite number of mass %, got {value!r}")
        if value < 0:
            raise ChemistryInputError(f"{key} must not be negative, got {value} mass %")
    missing = [k for k in required if k not in ox]
    if missing:
        raise ChemistryInputError(f"the analysis lacks {', '.join(missing)} (mass %)")
    if loss_on_ignition(ox) > MAX_LOI:
        raise ChemistryInputError(
            f"loss on ignition {loss_on_ignition(ox):.2f} % exceeds {MAX_LOI:.0f} %: "
            "no carbonate rock or binder loses that much; check the analysis")


def loss_on_ignition(ox: Mapping[str, float]) -> float:
    """LOI in mass %: the reported ``LOI``, else the sum of its reported parts (CO2,
    combined water, moisture, organic matter), else 0."""
    if "LOI" in ox:
        return float(ox["LOI"])
    return float(sum(ox.get(k, 0.0) for k in LOSS_KEYS[1:]))


def combined_water(ox: Mapping[str, float]) -> float:
    """Combined water (H2O+) in mass %: as reported, else LOI less the other losses
    reported (CO2, moisture, organic matter)."""
    if "H2O" in ox:
        return float(ox["H2O"])
    return loss_on_ignition(ox) - sum(float(ox.get(k, 0.0)) for k in ("CO2", "H2O-", "organic"))


@dataclass(frozen=True)
class SplitAnalysis:
    """An analysis with lumped oxides split, and the assumption stated in words."""

    analysis: dict[str, float]
    assumptions: tuple[str, ...]


def split_lumped(ox: Mapping[str, float],
                 splits: Mapping[str, Mapping[str, float]]) -> SplitAnalysis:
    """Split lumped keys such as ``"Al2O3+Fe2O3"`` by declared mass fractions.

    ``splits`` maps a lumped key to ``{oxide: fraction}``; the fractions must name
    exactly the oxides of the key and sum to 1.  A separately reported part is added
    to.  Values stay in mass %.
    """
    out: dict[str, float] = {k: float(v) for k, v in ox.items() if "+" not in k}
    notes: list[str] = []
    for key, value in ox.items():
        if "+" not in key:
            continue
        fractions = _checked_split(key, value, splits)
        for oxide, frac in fractions.items():
            out[oxide] = out.get(oxide, 0.0) + value * frac
        shares = ", ".join(f"{100 * frac:.0f} % {oxide}" for oxide, frac in fractions.items())
        notes.append(f"{key} = {value:.2f} % reported together; split assumed as {shares}")
    return SplitAnalysis(analysis=out, assumptions=tuple(notes))


def _checked_split(key: str, value: float,
                   splits: Mapping[str, Mapping[str, float]]) -> dict[str, float]:
    """The declared fractions for one lumped key, after checking them."""
    if key not in splits:
        raise ChemistryInputError(
            f"'{key}' is reported lumped but no split fraction is declared for it")
    if not math.isfinite(value) or value < 0:
        raise ChemistryInputError(f"{key} must be a finite, non-negative mass %, got {value!r}")
    fractions = {k: float(v) for k, v in splits[key].items()}
    if set(fractions) != set(key.split("+")):
        raise ChemistryInputError(
            f"the split for '{key}' names {sorted(fractions)}, expected {sorted(key.split('+'))}")
    if any(f < 0 or not math.isfinite(f) for f in fractions.values()) or \
            abs(sum(fractions.values()) - 1.0) > 1e-9:
        raise ChemistryInputError(f"the split fractions for '{key}' must be >= 0 and sum to 1")
    return fractions


def loss_free(ox: Mapping[str, float]) -> dict[str, float]:
    """Renormalise to the loss-free (ignited) basis: oxide × 100 / (100 − LOI), mass %.

    The loss constituents (``LOSS_KEYS``) are dropped.
    """
    validate(ox, required=())
    factor = 100.0 / (100.0 - loss_on_ignition(ox))
    return {k: float(v) * factor for k, v in ox.items() if k not in LOSS_KEYS}


def _csafm(ox: Mapping[str, float]) -> tuple[float, float, float, float, float]:
    """Validated (C, S, A, F, M) in mass %; CaO and SiO2 are required."""
    validate(ox)
    return (float(ox["CaO"]), float(ox["SiO2"]), float(ox.get("Al2O3", 0.0)),
            float(ox.get("Fe2O3", 0.0)), float(ox.get("MgO", 0.0)))


def cementation_index(ox: Mapping[str, float]) -> float:
    """Eckel's cementation index CI = (2.8 S + 1.1 A + 0.7 F) / (C + 1.4 M).

    Source: E. C. Eckel, *Cements, Limes and Plasters* (as reproduced in Boynton,
    *Chemistry and Technology of Lime and Limestone*).  Inputs in mass %; a ratio,
    so it does not change when the analysis is renormalised for LOI.
    """
    c, s, a, f, m = _csafm(ox)
    denominator = c + 1.4 * m
    if denominator <= 0:
        raise ChemistryInputError("cementation index needs CaO or MgO above zero")
    return (2.8 * s + 1.1 * a + 0.7 * f) / denominator


def hydraulic_index(ox: Mapping[str, float]) -> float:
    """Hydraulic index, Vicat form: HI = (S + A + F) / (C + M) (see HYDRAULIC_INDEX_SCHEME).

    Inputs in mass %; dimensionless ratio.
    """
    c, s, a, f, m = _csafm(ox)
    if c + m <= 0:
        raise ChemistryInputError("hydraulic index needs CaO or MgO above zero")
    return (s + a + f) / (c + m)


def lime_saturation_factor(ox: Mapping[str, float]) -> float:
    """LSF = (C − 0.7 S̄) / (2.8 S + 1.18 A + 0.65 F) (Taylor, *Cement Chemistry*).

    A clinker concept: for an unsintered binder report it as descriptive only.
    Inputs in mass %.
    """
    c, s, a, f, _ = _csafm(ox)
    denominator = 2.8 * s + 1.18 * a + 0.65 * f
    if denominator <= 0:
        raise ChemistryInputError("lime saturation factor needs SiO2, Al2O3 or Fe2O3 above zero")
    return (c - 0.7 * float(ox.get("SO3", 0.0))) / denominator


def silica_ratio(ox: Mapping[str, float]) -> float:
    """Silica ratio SR = S / (A + F), mass % basis."""
    _, s, a, f, _ = _csafm(ox)
    if a + f <= 0:
        raise ChemistryInputError("silica ratio needs Al2O3 or Fe2O3 above zero")
    return s / (a + f)


def alumina_ratio(ox: Mapping[str, float]) -> float:
    """Alumina ratio AR = A / F, mass % basis."""
    _, _, a, f, _ = _csafm(ox)
    if f <= 0:
        raise ChemistryInputError("alumina ratio needs Fe2O3 above zero")
    return a / f


@dataclass(frozen=True)
class BandClass:
    """Where an index falls in a band table.

    ``lower``/``upper`` are the band edges (``None`` beyond the table's ends);
    ``neighbour`` is the class across the nearest edge when borderline (it may be
    :data:`BELOW_TABLE` or :data:`ABOVE_TABLE`), else ``None``.
    """

    name: str
    lower: float | None
    upper: float | None
    borderline: bool
    neighbour: str | None
    in_table: bool


BELOW_TABLE = "below the lowest band"
ABOVE_TABLE = "above the highest band"


def classify(value: float, bands: Sequence[Mapping[str, object]], margin: float) -> BandClass:
    """Place ``value`` in a table of contiguous bands ``[{name, lower, upper}, ...]``.

    Bands include their lower edge.  Within ``margin`` of any edge the result is
    borderline and names the class across that edge.  Values outside the table
    get ``in_table=False``.
    """
    rows = _checked_bands(bands)
    if not math.isfinite(value):
        raise ChemistryInputError(f"cannot classify a non-finite index {value!r}")
    edges = [rows[0][1]] + [r[2] for r in rows]
    names = [BELOW_TABLE] + [r[0] for r in rows] + [ABOVE_TABLE]
    slot = sum(1 for e in edges if value >= e)  # 0 below table, len(rows)+1 above
    nearest = min(range(len(edges)), key=lambda i: abs(value - edges[i]))
    borderline = abs(value - edges[nearest]) <= margin
    neighbour = None
    if borderline:
        neighbour = names[nearest] if slot > nearest else names[nearest + 1]
    inside = 0 < slot <= len(rows)
    lower = edges[slot - 1] if slot > 0 else None
    upper = edges[slot] if slot < len(edges) else None
    return BandClass(name=names[slot], lower=lower, upper=upper, borderline=borderline,
                     neighbour=neighbour, in_table=inside)


def _checked_bands(bands: Sequence[Mapping[str, object]]) -> list[tuple[str, float, float]]:
    """Band rows as (name, lower, upper), checked ascending and contiguous."""
    try:
        rows = [(str(b["name"]), float(b["lower"]), float(b["upper"])) for b in bands]
    except (KeyError, TypeError, ValueError) as exc:
        raise ChemistryInputError(f"a band needs name, lower and upper: {exc}") from None
    if not rows:
        raise ChemistryInputError("the band table is empty")
    for (n1, lo1, up1), (n2, lo2, _) in zip(rows, rows[1:] + [("", math.inf, 0.0)]):
        if not lo1 < up1 or (lo2 != math.inf and abs(up1 - lo2) > 1e-12):
            raise ChemistryInputError(
                f"bands must ascend without gaps: '{n1}' {lo1}-{up1} then '{n2}' from {lo2}")
    return rows
