"""Moisture transport: capillary absorption coefficient and vapour diffusion resistance.

SI inside: time in s, water uptake per area in kg/m², capillary coefficient in
kg/(m²·s^0.5), thicknesses in m.  The trade quotes the coefficient in kg/(m²·min^0.5)
(EN 1015-18) or kg/(m²·h^0.5) (EN ISO 15148): 1 kg/(m²·min^0.5) = 1/√60 kg/(m²·s^0.5).

* Capillary coefficient: the slope of the water uptake per area against √t, by least
  squares with an intercept (the early points of a sorption test lie on a straight line in
  √t; an intercept absorbs surface wetting) [EN 1015-18 takes the slope between the 10 and
  90 min readings; EN ISO 15148 fits the linear part].
* Two-point coefficient [EN 1015-18]: C = (W(90 min) − W(10 min)) / (√90 − √10) in
  kg/(m²·min^0.5), here in SI from the readings at 600 s and 5400 s.  (On a 40 mm × 40 mm
  face with masses in g the standard writes it C = 0.1·(M2 − M1), the factor 0.1 rounding
  1/(1000 · 0.0016 · (√90 − √10)) = 0.0988.)
* Water-vapour diffusion-equivalent air layer thickness: sd = μ·d [EN ISO 12572].
"""
from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from specgen.errors import ScienceInputError


class MoistureInputError(ScienceInputError):
    """Readings the moisture functions cannot use."""


@dataclass(frozen=True)
class CapillaryFit:
    """Least-squares line of uptake (kg/m²) against √t (s^0.5)."""

    slope: float              # kg/(m²·s^0.5)
    intercept: float          # kg/m²
    r2: float
    stderr: float             # standard error of the slope
    n: int


def capillary_coefficient(times_s: Sequence[float], uptake: Sequence[float]) -> CapillaryFit:
    """Slope of uptake per area against √time by ordinary least squares (with intercept)."""
    t = np.asarray(times_s, float)
    w = np.asarray(uptake, float)
    if t.size != w.size:
        raise MoistureInputError(f"{t.size} times but {w.size} uptake readings")
    if t.size < 3:
        raise MoistureInputError("a capillary coefficient needs at least three readings")
    if np.any(t < 0) or not np.all(np.isfinite(t)) or not np.all(np.isfinite(w)):
        raise MoistureInputError("times must be finite and not negative; uptakes finite")
    x = np.sqrt(t)
    if np.ptp(x) == 0:
        raise MoistureInputError("the readings are all at the same time")
    xm, wm = x.mean(), w.mean()
    sxx = float(np.sum((x - xm) ** 2))
    slope = float(np.sum((x - xm) * (w - wm)) / sxx)
    if slope <= 0:
        raise MoistureInputError("the uptake does not rise with √t: check the readings' order "
                                 "and units")
    intercept = float(wm - slope * xm)
    resid = w - (intercept + slope * x)
    sst = float(np.sum((w - wm) ** 2))
    r2 = 1.0 - float(np.sum(resid ** 2)) / sst if sst > 0 else 1.0
    se = float(np.sqrt(np.sum(resid ** 2) / (t.size - 2) / sxx))
    return CapillaryFit(slope, intercept, r2, se, int(t.size))


TWO_POINT_TIMES = (600.0, 5400.0)   # s: the 10 and 90 min readings of EN 1015-18
SAME_TIME = 1.0                      # s: a reading this close to 10 or 90 min is that reading


def two_point_coefficient(times_s: Sequence[float], uptake: Sequence[float],
                          t1: float = TWO_POINT_TIMES[0], t2: float = TWO_POINT_TIMES[1]) -> float:
    """EN 1015-18 coefficient from the readings at ``t1`` and ``t2`` (s), kg/(m²·s^0.5).

    Raises :class:`MoistureInputError` when either reading is missing or the uptake falls.
    """
    pts = dict(zip((float(t) for t in times_s), (float(w) for w in uptake)))
    w = []
    for target in (t1, t2):
        near = [v for t, v in pts.items() if abs(t - target) <= SAME_TIME]
        if not near:
            raise MoistureInputError(f"no reading at {target / 60:g} min (the two-point "
                                     "coefficient uses the 10 and 90 min readings)")
        w.append(near[0])
    if w[1] <= w[0]:
        raise MoistureInputError("the uptake at 90 min is not above the uptake at 10 min")
    return (w[1] - w[0]) / (np.sqrt(t2) - np.sqrt(t1))


def sd_value(mu: float, thickness_m: float) -> float:
    """Diffusion-equivalent air layer thickness sd = μ·d (m)."""
    if mu <= 0 or thickness_m <= 0:
        raise MoistureInputError("μ and the thickness must be greater than zero")
    return mu * thickness_m
