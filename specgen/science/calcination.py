"""Raw stone and firing: molar masses, carbonate and clay content, fired composition, kiln stages.

Analyses are mass %; molar masses g/mol (as atomic weights are tabulated).  **Temperatures
are kelvin** throughout; :func:`stages_to_kelvin` converts a stage table kept in °C.
Atomic weights are an argument (``content/data/atomic_weights.yaml``), never built in.
"""
from __future__ import annotations

import math
import re
from collections.abc import Mapping
from dataclasses import dataclass

from specgen.science.oxides import (ChemistryInputError, combined_water, loss_free,
                                    loss_on_ignition, validate)

_TOKEN = re.compile(r"([A-Z][a-z]?)|(\d+(?:\.\d+)?)|([()])|([·*])")

#: Oxide each element is reported as in an analysis (the laboratory convention).
OXIDE_OF = {"Ca": "CaO", "Mg": "MgO", "Si": "SiO2", "Al": "Al2O3", "Fe": "Fe2O3",
            "C": "CO2", "H": "H2O", "S": "SO3", "K": "K2O", "Na": "Na2O", "Ti": "TiO2",
            "Mn": "MnO", "P": "P2O5", "Sr": "SrO"}


def parse_formula(formula: str) -> dict[str, float]:
    """Element counts of a formula: ``"Al2Si2O5(OH)4"``, ``"(CaO)1.7(SiO2)(H2O)4"``,
    ``"CaSO4·2H2O"`` (``·`` or ``*`` joins a hydrate; a leading number multiplies)."""
    tokens = _tokenise(formula)
    counts, pos = _parse_group(tokens, 0, formula)
    if pos != len(tokens):
        raise ChemistryInputError(f"unbalanced ')' in formula {formula!r}")
    if not counts:
        raise ChemistryInputError(f"formula {formula!r} names no element")
    return counts


def _tokenise(formula: str) -> list[str]:
    """Split a formula into element, number, bracket and hydrate-dot tokens."""
    text = formula.replace(" ", "")
    tokens, pos = [], 0
    while pos < len(text):
        m = _TOKEN.match(text, pos)
        if not m:
            raise ChemistryInputError(f"cannot read formula {formula!r} at {text[pos:]!r}")
        tokens.append(m.group(0))
        pos = m.end()
    return tokens


def _parse_group(tokens: list[str], pos: int, formula: str) -> tuple[dict[str, float], int]:
    """Parse until ')' or the end; return counts and the position reached."""
    counts: dict[str, float] = {}
    factor = 1.0  # multiplier of the current hydrate part ("2H2O" after "·")
    while pos < len(tokens) and tokens[pos] != ")":
        tok = tokens[pos]
        if tok in "·*":
            factor, pos = _number(tokens, pos + 1)
            continue
        if tok[0].isdigit():
            if pos != 0:
                raise ChemistryInputError(f"misplaced number {tok!r} in formula {formula!r}")
            factor, pos = float(tok), pos + 1
            continue
        if tok == "(":
            inner, pos = _parse_group(tokens, pos + 1, formula)
            if pos >= len(tokens):
                raise ChemistryInputError(f"missing ')' in formula {formula!r}")
            pos += 1
        else:
            inner, pos = {tok: 1.0}, pos + 1
        mult, pos = _number(tokens, pos)
        for el, n in inner.items():
            counts[el] = counts.get(el, 0.0) + n * mult * factor
    return counts, pos


def _number(tokens: list[str], pos: int) -> tuple[float, int]:  # subscript, else 1
    if pos < len(tokens) and tokens[pos][0].isdigit():
        return float(tokens[pos]), pos + 1
    return 1.0, pos


def molar_mass(formula: str, atomic_weights: Mapping[str, float]) -> float:
    """Molar mass in g/mol from tabulated atomic weights (g/mol)."""
    total = 0.0
    for element, n in parse_formula(formula).items():
        if element not in atomic_weights:
            raise ChemistryInputError(f"no atomic weight for {element!r} (formula {formula!r})")
        total += n * float(atomic_weights[element])
    return total


def loss_fraction(parent: str, residue: str, atomic_weights: Mapping[str, float]) -> float:
    """Mass fraction (0-1) lost when ``parent`` decomposes to ``residue``.

    E.g. CaCO3 → CaO loses 0.4397 as CO2; Al2Si2O5(OH)4 → Al2Si2O7 loses 0.1396 as water.
    """
    m_parent = molar_mass(parent, atomic_weights)
    return (m_parent - molar_mass(residue, atomic_weights)) / m_parent


def oxides_from_minerals(minerals: Mapping[str, float],
                         atomic_weights: Mapping[str, float]) -> dict[str, float]:
    """Oxide analysis (mass %, with ``CO2`` and ``H2O``) of a mix of minerals in mass %.

    Each element is reported as its usual oxide (:data:`OXIDE_OF`); the oxygen the
    oxides need must equal the mineral's oxygen, else the mineral cannot be written
    as oxides (a sulfide, a metal) and is refused.
    """
    out: dict[str, float] = {}
    for formula, mass in minerals.items():
        if not math.isfinite(mass) or mass < 0:
            raise ChemistryInputError(f"{formula} must be a finite, non-negative mass %")
        counts = parse_formula(formula)
        m_mineral = molar_mass(formula, atomic_weights)
        oxygen_needed = 0.0
        for element, n in counts.items():
            if element == "O":
                continue
            oxide = OXIDE_OF.get(element)
            if oxide is None:
                raise ChemistryInputError(f"no reporting oxide for {element!r} in {formula}")
            ox_counts = parse_formula(oxide)
            moles_oxide = n / ox_counts[element]
            oxygen_needed += moles_oxide * ox_counts["O"]
            share = mass * moles_oxide * molar_mass(oxide, atomic_weights) / m_mineral
            out[oxide] = out.get(oxide, 0.0) + share
        if abs(oxygen_needed - counts.get("O", 0.0)) > 1e-9:
            raise ChemistryInputError(
                f"{formula} cannot be written as oxides: oxygen does not balance")
    return out


def co2_per_oxide(oxide: str, atomic_weights: Mapping[str, float]) -> float:
    """Mass of CO2 one mass unit of ``CaO`` or ``MgO`` carries as carbonate (g/g)."""
    return molar_mass("CO2", atomic_weights) / molar_mass(oxide, atomic_weights)


@dataclass(frozen=True)
class CO2Balance:
    """CO2 the CaO and MgO could carry as carbonate vs CO2 measured (mass %)."""

    measured: float
    capacity: float
    gap: float  # capacity - measured
    flagged: bool
    message: str


def co2_balance(ox: Mapping[str, float], atomic_weights: Mapping[str, float],
                tolerance: float) -> CO2Balance:
    """Compare measured CO2 with the CO2-carrying capacity of CaO + MgO (mass %).

    ``tolerance`` (mass %, absolute) is the gap beyond which the analysis is flagged;
    CO2 above the capacity is always flagged (no cation could carry it).
    """
    validate(ox, required=("CaO", "CO2"))
    if not tolerance >= 0:  # also refuses NaN
        raise ChemistryInputError(f"CO2 tolerance must be >= 0 mass %, got {tolerance!r}")
    capacity = (ox["CaO"] * co2_per_oxide("CaO", atomic_weights)
                + ox.get("MgO", 0.0) * co2_per_oxide("MgO", atomic_weights))
    gap = capacity - ox["CO2"]
    flagged = gap < -tolerance or gap > tolerance
    if gap < -tolerance:
        message = f"CO2 measured exceeds what CaO and MgO could carry by {-gap:.2f} %"
    elif flagged:
        message = (f"CaO and MgO could carry {gap:.2f} % more CO2 than measured: part of the "
                   "lime and magnesia is not carbonate, or the analysis is inconsistent")
    else:
        message = f"CO2 measured agrees with CaO + MgO within {tolerance:.2f} %"
    return CO2Balance(ox["CO2"], capacity, gap, flagged, message)


@dataclass(frozen=True)
class Carbonates:
    """Carbonate content from CO2 (mass % of the stone) and the method used."""

    caco3: float
    mgco3: float
    unassigned_co2: float
    method: str
    co2_to_cao: float = 0.0   # mass % of the stone: the CO2 given to CaO (calcite)
    co2_to_mgo: float = 0.0   # and to MgO (magnesite), the rest


def carbonate_content(ox: Mapping[str, float], atomic_weights: Mapping[str, float]) -> Carbonates:
    """Carbonates from measured CO2: CO2 goes to CaO first (calcite), the rest to MgO.

    Mass % of the stone; CO2 beyond both capacities is returned as unassigned.
    """
    validate(ox, required=("CaO", "CO2"))
    aw = atomic_weights
    co2_ca = min(ox["CO2"], ox["CaO"] * co2_per_oxide("CaO", aw))
    co2_mg = min(ox["CO2"] - co2_ca, ox.get("MgO", 0.0) * co2_per_oxide("MgO", aw))
    m_co2 = molar_mass("CO2", aw)
    return Carbonates(
        caco3=co2_ca * molar_mass("CaCO3", aw) / m_co2,
        mgco3=co2_mg * molar_mass("MgCO3", aw) / m_co2,
        unassigned_co2=ox["CO2"] - co2_ca - co2_mg,
        method="CO2 assigned to CaO as calcite first, the remainder to MgO as MgCO3",
        co2_to_cao=co2_ca, co2_to_mgo=co2_mg)


@dataclass(frozen=True)
class ClayEstimate:
    """Clay fraction of a raw stone (mass %) and the method behind it."""

    fraction: float
    method: str


def clay_fraction(ox: Mapping[str, float], atomic_weights: Mapping[str, float],
                  method: str = "oxide_sum") -> ClayEstimate:
    """Estimate the clay fraction of a raw stone, mass %.

    ``"oxide_sum"``: SiO2 + Al2O3 + Fe2O3 + combined water (LOI − CO2, or ``H2O``).
    ``"residue"``: 100 − carbonates (CaCO3 + MgCO3 from CO2) − SO3, the non-carbonate residue.
    """
    validate(ox, required=("SiO2", "CO2"))
    if method == "oxide_sum":
        water = combined_water(ox)
        if water < 0:
            raise ChemistryInputError("CO2 (with the moisture and organic matter reported) "
                                      "exceeds LOI: combined water would be negative")
        value = ox["SiO2"] + ox.get("Al2O3", 0.0) + ox.get("Fe2O3", 0.0) + water
        text = ("SiO2 + Al2O3 + Fe2O3 + combined water ("
                + ("H2O+ as reported" if "H2O" in ox else "LOI - CO2 - moisture - organic matter")
                + ")")
    elif method == "residue":
        carb = carbonate_content(ox, atomic_weights)
        value = 100.0 - carb.caco3 - carb.mgco3 - ox.get("SO3", 0.0)
        text = "non-carbonate residue: 100 - CaCO3 - MgCO3 (from CO2) - SO3"
    else:
        raise ChemistryInputError(f"unknown clay method {method!r}: use 'oxide_sum' or 'residue'")
    return ClayEstimate(fraction=value, method=text)


@dataclass(frozen=True)
class RangeCheck:
    """A value against a [low, high] range, with the verdict in words."""

    value: float
    low: float
    high: float
    inside: bool
    message: str


def clay_range_check(clay: float, low: float, high: float) -> RangeCheck:
    """Is a clay fraction (mass %) inside the natural-cement range [low, high]?"""
    if not (low < high and math.isfinite(clay)):
        raise ChemistryInputError(f"need a finite clay % and low < high: {clay}, {low}-{high}")
    inside = low <= clay <= high
    where = "lies in" if inside else ("is below" if clay < low else "is above")
    text = f"clay {clay:.1f} % {where} the natural-cement range {low:g}-{high:g} %"
    return RangeCheck(clay, low, high, inside, text)


def expected_fired(raw: Mapping[str, float]) -> dict[str, float]:
    """Fired composition (mass %, loss-free) expected from a raw-stone analysis.

    Every loss (CO2, combined water) leaves: oxide × 100 / (100 − LOI).  For a
    mineral composition first use :func:`oxides_from_minerals`, whose losses come
    from atomic weights.
    """
    return loss_free(raw)


@dataclass(frozen=True)
class FiredComparison:
    """Expected vs measured fired oxides (loss-free mass %), per oxide."""

    differences: dict[str, float]  # measured - expected
    largest: str
    largest_difference: float


def compare_fired(expected: Mapping[str, float], measured: Mapping[str, float]) -> FiredComparison:
    """Compare expected fired oxides with a measured binder analysis, both loss-free."""
    measured_lf = loss_free(measured)
    keys = sorted(set(expected) | set(measured_lf))
    if not keys:
        raise ChemistryInputError("nothing to compare: both analyses are empty")
    diffs = {k: measured_lf.get(k, 0.0) - expected.get(k, 0.0) for k in keys}
    worst = max(keys, key=lambda k: abs(diffs[k]))
    return FiredComparison(diffs, worst, diffs[worst])


@dataclass(frozen=True)
class ResidualCarbonate:
    """Carbonate left in a binder (under-burning), mass % of the binder."""

    co2: float
    caco3: float
    decarbonation: float | None  # 0-1, when the raw stone's CO2 is known


def residual_carbonate(binder: Mapping[str, float], atomic_weights: Mapping[str, float],
                       raw: Mapping[str, float] | None = None) -> ResidualCarbonate:
    """CO2 left in a binder read as calcite, and the degree of decarbonation.

    Degree = 1 − (CO2/non-volatile of binder) / (CO2/non-volatile of raw stone).
    """
    validate(binder, required=("CO2",))
    caco3 = binder["CO2"] * molar_mass("CaCO3", atomic_weights) / molar_mass("CO2", atomic_weights)
    degree = None
    if raw is not None:
        validate(raw, required=("CO2",))
        if raw["CO2"] <= 0:
            raise ChemistryInputError("the raw stone reports no CO2: decarbonation undefined")
        per_nv = [a["CO2"] / (100.0 - loss_on_ignition(a)) for a in (binder, raw)]
        degree = 1.0 - per_nv[0] / per_nv[1]
    return ResidualCarbonate(binder["CO2"], caco3, degree)


# the firing record against the kiln stages, importable from here as before
from specgen.science.kiln import (REQUIRED_STAGES, FiringFinding,  # noqa: E402,F401
                                  check_firing, stages_to_kelvin)
