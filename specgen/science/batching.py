"""Site batching: the largest gauging a crew can place in time, and what goes into it.

SI units: times in s, volumes in m³, volume rates in m³/s, masses in kg.

A gauging must be placed before the mortar stiffens [common practice; natural
cements can stiffen within minutes]:

    V_max = t_w · q / γ            (workable life t_w, placing rate of the crew q,
                                    safety factor γ ≥ 1 for mixing, carrying, stoppages)

The gauging actually mixed is a whole number of binder measures (a measure is the
tool of volume V_m the binder is gauged in; sands are gauged in the same measure in
the mix's proportions), so that the card can be followed without arithmetic:

    Y_b = V_fresh / V_binder,loose       (fresh mortar per m³ of loose binder, from the yield)
    N   = ⌊V_max / (V_m · Y_b)⌋          binder measures per gauging (V_m the largest of the
                                         site's real measures, up to the one named, with N ≥ 1)
    V_g = N · V_m · Y_b                  fresh volume of the gauging
    n   = ⌈q · T / V_g⌉                  gaugings per working day of length T

Water and admixtures per gauging are ``c_i · V_g`` (kg per m³ times volume).
"""
from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass

from specgen.errors import ScienceInputError


class BatchingInputError(ScienceInputError):
    """Site rates or times the batching calculation cannot use."""


def _positive(**values: float) -> None:
    for name, v in values.items():
        if not (isinstance(v, (int, float)) and math.isfinite(v) and v > 0):
            raise BatchingInputError(f"{name} must be greater than zero; found {v!r}")


def max_gauging_volume(workable_life: float, placing_rate: float, safety_factor: float) -> float:
    """V_max = t_w · q / γ (m³), the largest gauging placed within its workable life."""
    _positive(workable_life=workable_life, placing_rate=placing_rate)
    if not safety_factor >= 1:
        raise BatchingInputError(f"the safety factor must be at least 1; found {safety_factor!r}")
    return workable_life * placing_rate / safety_factor


def binder_measures(v_max: float, measure: float, fresh_per_loose_binder: float) -> int:
    """N = ⌊V_max / (V_m · Y_b)⌋: whole binder measures per gauging (0: the measure is too big)."""
    _positive(v_max=v_max, measure=measure, fresh_per_loose_binder=fresh_per_loose_binder)
    return math.floor(v_max / (measure * fresh_per_loose_binder) + 1e-9)


def fitting_measure(v_max: float, measure: float, fresh_per_loose_binder: float,
                    measures) -> tuple[float, int]:
    """(V_m, N): the largest of the site's real ``measures`` (m³), not above ``measure``,
    of which one binder measure fits in V_max.

    A crew gauging a quick-setting binder reaches for a smaller scoop rather than a
    fraction of a measure.  N is 0 when even the smallest measure makes too much mortar
    (V_m is then the smallest).
    """
    kept = sorted((m for m in measures if m <= measure * (1 + 1e-9)), reverse=True) or [measure]
    for m in kept:
        _positive(measure=m)
        n = binder_measures(v_max, m, fresh_per_loose_binder)
        if n >= 1:
            return m, n
    return kept[-1], 0


def gaugings_per_day(placing_rate: float, working_day: float, gauging_volume: float) -> int:
    """n = ⌈q · T / V_g⌉ gaugings to keep the crew supplied for a working day."""
    _positive(placing_rate=placing_rate, working_day=working_day, gauging_volume=gauging_volume)
    return math.ceil(placing_rate * working_day / gauging_volume - 1e-9)


@dataclass(frozen=True)
class Gauging:
    """One gauging: measures of each dry constituent, and masses of everything (kg)."""

    binder_measures: int
    volume: float                     # m³ of fresh mortar
    measures: dict[str, float]        # measures of each dry constituent (binders and sands)
    masses: dict[str, float]          # kg of every constituent (water and admixtures too)


def gauging(n_binder: int, measure: float, parts: Mapping[str, float], binder_parts: float,
            fresh_per_loose_binder: float, per_m3: Mapping[str, float]) -> Gauging:
    """The gauging of ``n_binder`` binder measures: sand measures in proportion, masses c_i·V_g.

    ``parts`` are the loose-volume parts of every dry constituent, ``binder_parts`` their
    sum over the binders; ``per_m3`` the kg per m³ of fresh mortar of every constituent.
    """
    if n_binder < 1:
        raise BatchingInputError("a gauging needs at least one binder measure")
    _positive(measure=measure, binder_parts=binder_parts,
              fresh_per_loose_binder=fresh_per_loose_binder)
    volume = n_binder * measure * fresh_per_loose_binder
    measures = {k: n_binder * p / binder_parts for k, p in parts.items()}
    return Gauging(n_binder, volume, measures, {k: c * volume for k, c in per_m3.items()})
