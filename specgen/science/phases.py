"""Potential phases of a binder: below sintering (no alite) and standard Bogue for clinker.

Analyses in mass %; phase contents returned in mass % of the analysed material.
Stoichiometric factors of the unsintered calculation come from molar masses
(atomic weights are an argument), so ``C2S = 2.867 S`` and the lime-limited
``C2S = 1.536 C`` follow from the formulas rather than being typed in.
"""
from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass

from specgen.science.calcination import molar_mass
from specgen.science.oxides import LOSS_KEYS, ChemistryInputError, validate

#: Phase formulas written as oxide sums, for their molar masses.
FORMULAS = {
    "C2S": "(CaO)2(SiO2)", "C3S": "(CaO)3(SiO2)", "C3A": "(CaO)3(Al2O3)",
    "C4AF": "(CaO)4(Al2O3)(Fe2O3)", "C2F": "(CaO)2(Fe2O3)", "C2AS": "(CaO)2(Al2O3)(SiO2)",
    "calcite": "CaCO3", "MgCO3": "MgCO3", "CaSO4": "CaSO4",
}

#: Aluminate/ferrite assignments a caller may declare, with the assumption in words.
ASSIGNMENTS = {
    "C4AF+C3A": "Fe2O3 as C4AF, the remaining Al2O3 as C3A (Al2O3 short: the rest of Fe2O3 as C2F)",
    "C2AS gehlenite": "Al2O3 as gehlenite C2AS (taking its SiO2), Fe2O3 as C2F",
    "amorphous": "Al2O3 and Fe2O3 in an amorphous aluminosilicate, no lime bound to them",
}

#: Oxides the calculation consumes; the rest of the analysis is "other".  Losses other
#: than CO2 (LOI, combined water) are not assigned to any phase.
CONSUMED_OXIDES = frozenset({"CaO", "SiO2", "Al2O3", "Fe2O3", "MgO", "SO3"}) | frozenset(LOSS_KEYS)

#: Phases counted as crystalline in the crystalline/amorphous split.
CRYSTALLINE = frozenset({"C2S", "C3A", "C4AF", "C2F", "C2AS", "free lime", "periclase",
                         "CaSO4", "calcite", "MgCO3"})


@dataclass(frozen=True)
class PhaseAssemblage:
    """Potential phases (mass %), their crystalline share (0-1) and the assumptions."""

    phases: dict[str, float]
    crystalline: float
    amorphous: float
    lime_limited: bool
    assumptions: tuple[str, ...]


def factor(phase: str, oxide: str, atomic_weights: Mapping[str, float],
           moles: float = 1.0) -> float:
    """Mass of ``phase`` per mass of ``oxide`` it holds ``moles`` of (g/g), e.g. C2S/S = 2.867."""
    aw = atomic_weights
    return molar_mass(FORMULAS.get(phase, phase), aw) / (moles * molar_mass(oxide, aw))


def unsintered_phases(ox: Mapping[str, float], assignment: str,
                      atomic_weights: Mapping[str, float]) -> PhaseAssemblage:
    """Potential phases of a binder fired below sintering (C3S = 0).

    Order (each takes its lime first): CO2 as calcite (excess as MgCO3), SO3 as
    CaSO4, the declared aluminate/ferrite ``assignment`` (see :data:`ASSIGNMENTS`),
    silica to C2S while lime suffices (else C2S = 1.536 C and the rest of the silica
    uncombined), what lime remains as free lime; MgO as periclase.  Others
    (alkalis, TiO2 ...) are reported together as amorphous ``other``.
    """
    validate(ox)
    if assignment not in ASSIGNMENTS:
        raise ChemistryInputError(f"unknown aluminate assignment {assignment!r}: "
                                  f"choose one of {', '.join(ASSIGNMENTS)}")
    aw = atomic_weights
    pool = {k: float(ox.get(k, 0.0))
            for k in ("CaO", "SiO2", "Al2O3", "Fe2O3", "MgO", "SO3", "CO2")}
    phases: dict[str, float] = {}
    _carbonates(pool, phases, aw)
    _take(pool, phases, "CaSO4", {"CaO": 1, "SO3": 1}, _moles(pool, "SO3", aw), aw)
    _ALUMINATE_STEPS[assignment](pool, phases, aw)
    lime_limited = _silicates(pool, phases, aw)
    phases["free lime"] = pool.pop("CaO")
    phases["periclase"] = pool.pop("MgO")
    phases["other"] = (sum(float(v) for k, v in ox.items() if k not in CONSUMED_OXIDES)
                       + sum(pool.values()))
    phases = {k: v for k, v in phases.items() if v > 1e-12}
    return _assemble(phases, lime_limited, assignment)


def _take(pool: dict[str, float], phases: dict[str, float], name: str,
          recipe: Mapping[str, float], moles: float, aw: Mapping[str, float]) -> None:
    """Form ``moles`` (per 100 g of analysis) of phase ``name`` from the pool by ``recipe``."""
    if moles <= 0:
        return
    mass = 0.0
    for oxide, n in recipe.items():
        taken = n * moles * molar_mass(oxide, aw)
        if pool[oxide] - taken < -1e-9:
            raise ChemistryInputError(f"not enough {oxide} to form {name}: the analysis "
                                      "cannot be assigned this way")
        pool[oxide] = max(pool[oxide] - taken, 0.0)
        mass += taken
    # The phase weighs what its oxides weigh: the mass balance closes by construction.
    phases[name] = phases.get(name, 0.0) + mass


def _moles(pool: Mapping[str, float], oxide: str, aw: Mapping[str, float]) -> float:
    """Moles (per 100 g of analysis) of an oxide left in the pool."""
    return pool[oxide] / molar_mass(oxide, aw)


def _carbonates(pool: dict[str, float], phases: dict[str, float], aw: Mapping[str, float]) -> None:
    """Residual CO2 as calcite first, any excess as MgCO3 (under-burnt stone)."""
    n_cc = min(_moles(pool, "CO2", aw), _moles(pool, "CaO", aw))
    _take(pool, phases, "calcite", {"CaO": 1, "CO2": 1}, n_cc, aw)
    n_mg = min(_moles(pool, "CO2", aw), _moles(pool, "MgO", aw))
    _take(pool, phases, "MgCO3", {"MgO": 1, "CO2": 1}, n_mg, aw)
    if pool["CO2"] > 1e-9:
        raise ChemistryInputError(f"CO2 exceeds what CaO and MgO can carry by {pool['CO2']:.2f} %")


def _c4af_c3a(pool, phases, aw) -> None:
    """C4AF from Fe2O3 (limited by Al2O3), then C3A from the rest of Al2O3, then C2F."""
    n_af = min(_moles(pool, "Fe2O3", aw), _moles(pool, "Al2O3", aw))
    _take(pool, phases, "C4AF", {"CaO": 4, "Al2O3": 1, "Fe2O3": 1}, n_af, aw)
    _take(pool, phases, "C3A", {"CaO": 3, "Al2O3": 1}, _moles(pool, "Al2O3", aw), aw)
    _take(pool, phases, "C2F", {"CaO": 2, "Fe2O3": 1}, _moles(pool, "Fe2O3", aw), aw)


def _gehlenite(pool, phases, aw) -> None:
    """Al2O3 as C2AS (limited by SiO2), Fe2O3 as C2F."""
    n = min(_moles(pool, "Al2O3", aw), _moles(pool, "SiO2", aw))
    _take(pool, phases, "C2AS", {"CaO": 2, "Al2O3": 1, "SiO2": 1}, n, aw)
    _take(pool, phases, "C2F", {"CaO": 2, "Fe2O3": 1}, _moles(pool, "Fe2O3", aw), aw)


def _amorphous(pool, phases, aw) -> None:
    """Al2O3 and Fe2O3 stay in the amorphous fraction without lime."""
    phases["amorphous A+F"] = pool["Al2O3"] + pool["Fe2O3"]
    pool["Al2O3"] = pool["Fe2O3"] = 0.0


_ALUMINATE_STEPS = {"C4AF+C3A": _c4af_c3a, "C2AS gehlenite": _gehlenite, "amorphous": _amorphous}


def _silicates(pool: dict[str, float], phases: dict[str, float], aw: Mapping[str, float]) -> bool:
    """Silica to C2S while lime suffices; return True when lime runs short."""
    n_s, n_c = _moles(pool, "SiO2", aw), _moles(pool, "CaO", aw)
    limited = n_c < 2 * n_s
    _take(pool, phases, "C2S", {"CaO": 2, "SiO2": 1}, min(n_s, n_c / 2), aw)
    phases["uncombined SiO2"] = pool.pop("SiO2")
    return limited


def _assemble(phases: dict[str, float], lime_limited: bool, assignment: str) -> PhaseAssemblage:
    """Totals, crystalline share and the stated assumptions."""
    total = sum(phases.values())
    if total <= 0:
        raise ChemistryInputError("the analysis holds no oxides to assign to phases")
    crystalline = sum(v for k, v in phases.items() if k in CRYSTALLINE) / total
    notes = ["C3S = 0: fired below sintering, no melt, no alite",
             f"aluminate/ferrite assignment: {ASSIGNMENTS[assignment]}"]
    if lime_limited:
        notes.append("lime-limited: not all silica finds lime for C2S (C2S = 1.536 C available)")
    return PhaseAssemblage(phases, crystalline, 1.0 - crystalline, lime_limited, tuple(notes))


# --- standard Bogue calculation (Portland clinker) --------------------------------

#: Smallest A/F for which the C3A + C4AF form of the Bogue equations applies (ASTM C150).
BOGUE_MIN_AF = 0.64


@dataclass(frozen=True)
class Bogue:
    """Bogue potential phases (mass %), A/F and whether the equations apply."""

    c3s: float
    c2s: float
    c3a: float
    c4af: float
    af_ratio: float
    valid: bool
    note: str


def bogue(ox: Mapping[str, float]) -> Bogue:
    """Standard Bogue potential composition of Portland clinker, ASTM C150 (annex).

    C3S = 4.071C − 7.600S − 6.718A − 1.430F − 2.852S̄; C2S = 2.867S − 0.7544·C3S;
    C3A = 2.650A − 1.692F; C4AF = 3.043F — valid for A/F >= 0.64.  Mass % in and out.
    """
    validate(ox, required=("CaO", "SiO2", "Al2O3", "Fe2O3"))
    c, s, a, f = (float(ox[k]) for k in ("CaO", "SiO2", "Al2O3", "Fe2O3"))
    s_bar = float(ox.get("SO3", 0.0))
    if f <= 0:
        raise ChemistryInputError("Bogue needs Fe2O3 above zero (A/F undefined)")
    # Coefficients as printed in ASTM C150 (4-digit values, see module tests).
    c3s = 4.071 * c - 7.600 * s - 6.718 * a - 1.430 * f - 2.852 * s_bar
    c2s = 2.867 * s - 0.7544 * c3s
    c3a = 2.650 * a - 1.692 * f
    c4af = 3.043 * f
    af = a / f
    valid = af >= BOGUE_MIN_AF and min(c3s, c2s, c3a) >= 0
    note = ("A/F >= 0.64: C3A + C4AF form applies" if af >= BOGUE_MIN_AF else
            "A/F < 0.64: ferrite solid solution (C4AF + C2F) form needed; results not valid")
    if af >= BOGUE_MIN_AF and not valid:
        note = "a potential phase came out negative: the analysis is not a Portland clinker"
    return Bogue(c3s, c2s, c3a, c4af, af, valid, note)
