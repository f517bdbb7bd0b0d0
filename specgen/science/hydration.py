"""Hydration volume bookkeeping and the Powers model of paste porosity.

SI units: densities kg/m³, molar volumes m³/mol, specific volumes m³/kg, masses
kg.  Molar masses come from atomic weights (g/mol, converted here to kg/mol).
Densities are a selectable, cited set passed in (``content/data/cement_densities.yaml``):
the results are sensitive to the C-S-H density, so always show the set used.
"""
from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

from specgen.science.calcination import molar_mass, parse_formula
from specgen.science.oxides import ChemistryInputError

#: Formulas of the species named in reactions and density sets (cement notation keys).
SPECIES = {
    "C2S": "(CaO)2(SiO2)",
    "H": "H2O",
    "CH": "Ca(OH)2",
    "C1.7SH4": "(CaO)1.7(SiO2)(H2O)4",
    "S": "SiO2",
}

#: The one liquid species; everything else is counted as solid.
WATER = "H"

_G_PER_KG = 1000.0  # atomic weights are tabulated in g/mol


@dataclass(frozen=True)
class Reaction:
    """A balanced reaction in cement notation; the first reactant is the reference phase."""

    text: str
    reactants: tuple[tuple[str, float], ...]
    products: tuple[tuple[str, float], ...]


#: Belite hydration written with a lime-rich C-S-H (Ca/Si 1.7, 4 H).
BELITE_HYDRATION = Reaction("C2S + 4.3 H -> C1.7-S-H4 + 0.3 CH",
                            (("C2S", 1.0), ("H", 4.3)), (("C1.7SH4", 1.0), ("CH", 0.3)))

#: Lime-pozzolan reaction written to the same C-S-H, so the two compare on one basis.
POZZOLANIC = Reaction("1.7 CH + S + 2.3 H -> C1.7-S-H4",
                      (("CH", 1.7), ("S", 1.0), ("H", 2.3)), (("C1.7SH4", 1.0),))


@dataclass(frozen=True)
class VolumeBalance:
    """Volumes of one reaction, per mole of reaction and per kg of the reference phase.

    ``relative`` gives each species' volume over the reference phase's volume;
    shrinkage and solid-volume increase are fractions (0.096 = 9.6 %).
    """

    reaction: str
    volumes: dict[str, float]            # m3 per mol of reaction (signed: products > 0)
    relative: dict[str, float]           # volume / volume of the reference phase
    chemical_shrinkage: float            # (V reactants - V products) / V reactants
    solid_volume_increase: float         # (V solid out - V solid in) / V solid in
    water_per_kg: float                  # kg water consumed per kg reference phase
    ch_per_kg: float                     # kg CH formed (negative: consumed) per kg reference phase
    product_volume_per_kg: float         # m3 of solid products per kg reference phase
    densities: dict[str, float]          # the set used, kg/m3


def check_balanced(reaction: Reaction, atomic_weights: Mapping[str, float]) -> None:
    """Refuse a reaction whose elements do not balance (a mistyped formula shows here)."""
    totals: dict[str, float] = {}
    for side, sign in ((reaction.reactants, 1.0), (reaction.products, -1.0)):
        for species, n in side:
            for element, count in parse_formula(_formula(species)).items():
                totals[element] = totals.get(element, 0.0) + sign * n * count
    off = {el: v for el, v in totals.items() if abs(v) > 1e-9}
    if off:
        raise ChemistryInputError(f"reaction '{reaction.text}' does not balance: {off}")


def _formula(species: str) -> str:
    """Formula of a species key."""
    if species not in SPECIES:
        raise ChemistryInputError(f"unknown species {species!r}: known are {', '.join(SPECIES)}")
    return SPECIES[species]


def _molar_kg(species: str, aw: Mapping[str, float]) -> float:
    """Molar mass in kg/mol."""
    return molar_mass(_formula(species), aw) / _G_PER_KG


def _density(species: str, densities: Mapping[str, float]) -> float:
    """Density of a species (kg/m3), checked."""
    rho = densities.get(species)
    if rho is None or not math.isfinite(rho) or rho <= 0:
        raise ChemistryInputError(f"the density set needs a positive density for {species!r}")
    return float(rho)


def reaction_balance(reaction: Reaction, atomic_weights: Mapping[str, float],
                     densities: Mapping[str, float]) -> VolumeBalance:
    """Volume bookkeeping of a reaction: molar volume = molar mass / density."""
    check_balanced(reaction, atomic_weights)
    aw = atomic_weights
    vol = {s: n * _molar_kg(s, aw) / _density(s, densities) for s, n in reaction.products}
    vol.update({s: -n * _molar_kg(s, aw) / _density(s, densities) for s, n in reaction.reactants})
    ref, n_ref = reaction.reactants[0]
    v_in = -sum(v for v in vol.values() if v < 0)
    v_out = sum(v for v in vol.values() if v > 0)
    solid_in = -sum(v for s, v in vol.items() if v < 0 and s != WATER)
    solid_out = sum(v for s, v in vol.items() if v > 0 and s != WATER)
    m_ref = n_ref * _molar_kg(ref, aw)
    coeff = dict(reaction.reactants)
    ch = dict(reaction.products).get("CH", 0.0) - coeff.get("CH", 0.0)
    return VolumeBalance(
        reaction=reaction.text, volumes=vol,
        relative={s: abs(v) / -vol[ref] for s, v in vol.items()},
        chemical_shrinkage=(v_in - v_out) / v_in,
        solid_volume_increase=(solid_out - solid_in) / solid_in,
        water_per_kg=coeff.get(WATER, 0.0) * _molar_kg(WATER, aw) / m_ref,
        ch_per_kg=ch * _molar_kg("CH", aw) / m_ref,
        product_volume_per_kg=solid_out / m_ref,
        densities={s: float(densities[s]) for s in vol})


def water_for_full_hydration(contents: Mapping[str, float],
                             balances: Mapping[str, VolumeBalance]) -> float:
    """Water (kg per kg binder) to hydrate every reactive phase fully.

    ``contents`` gives each phase's mass fraction of the binder (0-1); ``balances``
    the reaction balance of each phase.  Phases without a balance are taken as inert.
    """
    total = 0.0
    for phase, fraction in contents.items():
        if not math.isfinite(fraction) or not 0.0 <= fraction <= 1.0:
            raise ChemistryInputError(f"{phase} must be a mass fraction 0-1, got {fraction!r}")
        if phase in balances:
            total += fraction * balances[phase].water_per_kg
    return total


@dataclass(frozen=True)
class DensityCase:
    """Shrinkage and solid-volume increase for one C-S-H density (kg/m3)."""

    csh_density: float
    chemical_shrinkage: float
    solid_volume_increase: float


def csh_density_sensitivity(reaction: Reaction, atomic_weights: Mapping[str, float],
                            densities: Mapping[str, float],
                            csh_densities: Sequence[float]) -> tuple[DensityCase, ...]:
    """Repeat the bookkeeping with each C-S-H density (kg/m3), other densities kept."""
    cases = []
    for rho in csh_densities:
        bal = reaction_balance(reaction, atomic_weights, with_csh_density(densities, rho))
        cases.append(DensityCase(float(rho), bal.chemical_shrinkage, bal.solid_volume_increase))
    return tuple(cases)


# --- Powers' model -----------------------------------------------------------------

@dataclass(frozen=True)
class PowersState:
    """Paste volumes after hydration (fractions of the initial paste volume)."""

    capillary_porosity: float
    gel_space_ratio: float
    max_degree: float          # degree at which capillary space runs out (<= 1)
    space_limited: bool        # the requested degree exceeds max_degree


def powers(w_b: float, degree: float, binder_density: float, product_volume_per_kg: float,
           water_density: float) -> PowersState:
    """Powers' model generalised to any binder: capillary porosity and gel-space ratio.

    Per kg binder the paste starts at V0 = 1/ρb + (w/b)/ρw.  Hydrating a fraction α
    leaves (1−α)/ρb of binder and α·vp of products (``product_volume_per_kg``, m3/kg,
    gel pores included); the rest of V0 is capillary space (water-filled or emptied
    by chemical shrinkage).  Gel-space ratio X = α·vp / (α·vp + capillary space).
    With ρb = 3150 kg/m3 and vp = 0.68e-3 m3/kg this is Powers' Portland-cement form
    p = (w/c − 0.36α)/(w/c + 0.32), X = 0.68α/(0.32α + w/c).
    """
    for name, v in (("w/b", w_b), ("binder density", binder_density),
                    ("product volume", product_volume_per_kg), ("water density", water_density)):
        if not math.isfinite(v) or v <= 0:
            raise ChemistryInputError(f"{name} must be a positive number, got {v!r}")
    if not math.isfinite(degree) or not 0.0 <= degree <= 1.0:
        raise ChemistryInputError(f"degree of hydration must lie in 0-1, got {degree!r}")
    v_b, v_w = 1.0 / binder_density, w_b / water_density
    growth = product_volume_per_kg - v_b  # extra volume each kg reacted takes up
    max_degree = 1.0 if growth <= 0 else min(1.0, v_w / growth)
    alpha = min(degree, max_degree)
    gel = alpha * product_volume_per_kg
    capillary = v_b + v_w - (1.0 - alpha) * v_b - gel
    capillary = max(capillary, 0.0)  # rounding at the space limit
    return PowersState(capillary_porosity=capillary / (v_b + v_w),
                       gel_space_ratio=gel / (gel + capillary) if gel + capillary > 0 else 0.0,
                       max_degree=max_degree, space_limited=degree > max_degree)


def with_csh_density(densities: Mapping[str, float], rho: float) -> dict[str, float]:
    """A copy of a density set (kg/m3) with another C-S-H density."""
    return {**densities, "C1.7SH4": float(rho)}

