"""Mix design: volume proportions → mass proportions → kg per m³ of fresh mortar.

SI units: volumes in m³, masses in kg, densities in kg/m³; ratios (water/binder,
air content, admixture dose) as plain fractions.

The trade batches by volume of loose, dry material ("1 : 2.5").  A loose volume
becomes a mass through the material's loose *bulk* density; the space the mass
then fills in the mortar is its *absolute* volume, mass / *particle* density
(the voids between sand grains are filled by binder paste and water).  The
absolute-volume method [common practice; the method of ACI 211.1 for concrete]:

    V_solid+water = Σ m_i / ρ_p,i + m_w / ρ_w
    V_fresh       = V_solid+water / (1 − a)         (a: air content of the fresh mortar)
    c_i           = m_i / V_fresh                   (kg of constituent i per m³ of fresh mortar)

Admixture doses are fractions of the binder mass (e.g. a retarder at 0.2 %); their
volume is neglected (a few grams per kilogram of binder, dissolved in the water).
"""
from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass

from specgen.errors import ScienceInputError


class MixDesignError(ScienceInputError):
    """Proportions the mix-design calculation cannot use."""


@dataclass(frozen=True)
class Constituent:
    """One dry constituent of a mix: parts by loose volume and its two densities (kg/m³)."""

    name: str
    kind: str               # "binder" or "sand"
    parts: float            # parts by loose volume
    bulk_density: float     # loose bulk density, kg/m³
    particle_density: float  # particle (absolute) density, kg/m³


@dataclass(frozen=True)
class MixYield:
    """The absolute-volume calculation for one batch of ``parts`` m³ of loose material."""

    masses: dict[str, float]            # kg of each dry constituent in the batch
    water: float                        # kg of water in the batch
    admixtures: dict[str, float]        # kg of each admixture in the batch
    absolute_volumes: dict[str, float]  # m³ of each constituent (water under "water")
    solid_water_volume: float           # m³, Σ absolute volumes
    fresh_volume: float                 # m³ of fresh mortar the batch yields
    per_m3: dict[str, float]            # kg per m³ of fresh mortar (dry, "water", admixtures)
    fresh_density: float                # kg/m³ of fresh mortar (admixtures included)
    binder_mass_per_m3: float           # kg of all binders per m³
    loose_volume: float                 # m³ of loose dry material in the batch (Σ parts)


def _checked(items: list[Constituent]) -> None:
    if not items or not any(c.kind == "binder" for c in items):
        raise MixDesignError("a mix needs at least one binder")
    for c in items:
        if c.parts <= 0 or c.bulk_density <= 0 or c.particle_density <= 0:
            raise MixDesignError(f"{c.name}: parts and densities must be greater than zero")
        if c.bulk_density >= c.particle_density:
            raise MixDesignError(f"{c.name}: the loose bulk density ({c.bulk_density:g} kg/m³) "
                                 f"must be below the particle density ({c.particle_density:g})")


def mass_proportions(items: list[Constituent]) -> dict[str, float]:
    """Mass of each constituent per unit mass of all binders: ``parts × ρ_bulk / Σ binder``."""
    _checked(items)
    masses = {c.name: c.parts * c.bulk_density for c in items}
    binder = sum(masses[c.name] for c in items if c.kind == "binder")
    return {k: v / binder for k, v in masses.items()}


def volume_ratio(items: list[Constituent]) -> float:
    """Aggregate : binder by loose volume (Σ sand parts / Σ binder parts)."""
    _checked(items)
    b = sum(c.parts for c in items if c.kind == "binder")
    return sum(c.parts for c in items if c.kind == "sand") / b


def absolute_volume_yield(items: list[Constituent], water_binder: float, air: float,
                          water_density: float,
                          admixture_doses: Mapping[str, float] | None = None) -> MixYield:
    """kg of each constituent per m³ of fresh mortar by the absolute-volume method.

    One batch is ``parts`` m³ of each loose constituent.  ``water_binder`` is by mass
    (water / Σ binder mass), ``air`` the air content as a fraction of the fresh
    volume (0 ≤ a < 1), ``admixture_doses`` fractions of the binder mass.
    """
    _checked(items)
    if not water_binder > 0:
        raise MixDesignError("the water/binder ratio must be greater than zero")
    if not 0 <= air < 0.5:
        raise MixDesignError("the air content must lie between 0 and 50 %")
    if water_density <= 0:
        raise MixDesignError("the water density must be greater than zero")
    masses = {c.name: c.parts * c.bulk_density for c in items}
    binder = sum(masses[c.name] for c in items if c.kind == "binder")
    water = water_binder * binder
    adm = {k: d * binder for k, d in (admixture_doses or {}).items()}
    vols = {c.name: masses[c.name] / c.particle_density for c in items}
    vols["water"] = water / water_density
    v_sw = sum(vols.values())
    v_fresh = v_sw / (1.0 - air)
    per = {k: m / v_fresh for k, m in masses.items()}
    per["water"] = water / v_fresh
    per.update({k: m / v_fresh for k, m in adm.items()})
    total = sum(masses.values()) + water + sum(adm.values())
    return MixYield(masses, water, adm, vols, v_sw, v_fresh, per, total / v_fresh,
                    binder / v_fresh, sum(c.parts for c in items))
