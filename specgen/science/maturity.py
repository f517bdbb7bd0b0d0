"""Maturity: equivalent age from a temperature history, and strength in the wall.

SI units: times in s, temperatures in K, activation energy in J/mol, the Nurse-Saul
temperature-time factor in K·s, strengths in Pa.

* Arrhenius equivalent age [ASTM C1074]: ``te = Σ exp[-(E/R)(1/Ta - 1/Tref)]·Δt`` with Ta
  the average temperature of each interval (mean of its two end readings).
* Nurse-Saul [ASTM C1074]: ``M = Σ (Ta - T0)·Δt`` (intervals below the datum T0 add
  nothing) and its equivalent age ``te = M / (Tref - T0)``.

The activation energy of lime and natural-cement binders must be measured (ASTM C1074
annex method); a cement default (``content/data/maturity_defaults.yaml``) is only a
placeholder and the dossier must say so.  Temperatures outside ``VALID_RANGE_K``
(-10 °C to 60 °C, project requirement) are refused: the method is not applied there.
A history starts at placement of the mortar: age 0 is ``times_s[0]``.
"""
from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from scipy import constants, optimize

from specgen.errors import ScienceInputError
from specgen.science.strength_models import DAY, MAX_EXTRAPOLATION, FitResult, curve

R = constants.R                       # J/(mol·K), CODATA via scipy
_ZERO_C = constants.zero_Celsius      # 273.15 K
VALID_RANGE_K = (_ZERO_C - 10.0, _ZERO_C + 60.0)


class MaturityInputError(ScienceInputError):
    """A temperature history or parameter the maturity method cannot use."""


@dataclass(frozen=True)
class EarliestTime:
    """When a target strength is first reached in the wall (None: not reached)."""

    time: float | None               # s, on the axis of the given history
    equivalent_age: float | None     # s at the reference temperature
    reached: bool
    reason: str
    basis: str


def _history(times_s, temps_k, valid_range) -> tuple[np.ndarray, np.ndarray]:
    """Validated (times s, temperatures K); a scalar temperature means constant."""
    t = np.asarray(times_s, dtype=float).ravel()
    if t.size < 2:
        raise MaturityInputError("a temperature history needs at least two times")
    raw = np.asarray(temps_k, dtype=float).ravel()
    if raw.size not in (1, t.size):
        raise MaturityInputError(f"{t.size} times but {raw.size} temperatures")
    temp = np.broadcast_to(raw, t.shape).astype(float)
    if not (np.all(np.isfinite(t)) and np.all(np.isfinite(temp))):
        raise MaturityInputError("times and temperatures must be finite numbers")
    steps = np.diff(t)
    if np.any(steps <= 0):
        i = int(np.argmax(steps <= 0)) + 1
        raise MaturityInputError(f"times must increase; reading {i + 1} ({t[i]:g} s) does not "
                                 f"follow reading {i} ({t[i - 1]:g} s)")
    lo, hi = valid_range
    for i, v in enumerate(temp):
        if not lo <= v <= hi:
            side = "below" if v < lo else "above"
            raise MaturityInputError(
                f"temperature {v - _ZERO_C:.1f} °C at reading {i + 1} is {side} the range "
                f"{lo - _ZERO_C:g} to {hi - _ZERO_C:g} °C in which the maturity method is "
                "applied; treat that period as not assessed (was it entered in °F or K?)")
    return t, temp


def arrhenius_factor(temp_k, activation_energy, t_ref_k: float):
    """Age conversion factor ``exp[-(E/R)(1/T - 1/Tref)]`` (ASTM C1074); T, Tref in K.

    ``activation_energy`` (J/mol) is one value, one per temperature, or a function of
    temperature (K) giving it, e.g. :func:`fhp_energy` for the temperature-dependent form."""
    if callable(activation_energy):
        activation_energy = np.asarray(activation_energy(np.asarray(temp_k, float)), float)
    e = np.asarray(activation_energy, float)
    if not np.all(np.isfinite(e)) or np.any(e <= 0):
        raise MaturityInputError(f"activation energy must be > 0 J/mol; got {activation_energy}")
    if not math.isfinite(t_ref_k) or t_ref_k <= 0:
        raise MaturityInputError(f"reference temperature must be > 0 K; got {t_ref_k}")
    return np.exp(-(e / R) * (1.0 / np.asarray(temp_k, float) - 1.0 / t_ref_k))


def equivalent_age_arrhenius(times_s: Sequence[float], temps_k, *, activation_energy,
                             t_ref_k: float, valid_range=VALID_RANGE_K) -> np.ndarray:
    """Cumulative Arrhenius equivalent age (s at Tref) at each time of the history.

    ``activation_energy`` is a constant (J/mol) or a function of the temperature (K), e.g.
    :func:`activation_energy_fhp`, applied to each interval's average temperature."""
    t, temp = _history(times_s, temps_k, valid_range)
    ta = 0.5 * (temp[1:] + temp[:-1])           # ASTM C1074: average temperature of interval
    if callable(activation_energy):
        activation_energy = np.array([activation_energy(float(x)) for x in ta])
    rate = arrhenius_factor(ta, activation_energy, t_ref_k)
    return np.concatenate([[0.0], np.cumsum(rate * np.diff(t))])


def temperature_time_factor(times_s: Sequence[float], temps_k, *, datum_k: float,
                            valid_range=VALID_RANGE_K) -> np.ndarray:
    """Cumulative Nurse-Saul factor ``Σ (Ta - T0)·Δt`` in K·s (ASTM C1074)."""
    t, temp = _history(times_s, temps_k, valid_range)
    ta = 0.5 * (temp[1:] + temp[:-1])
    # Below the datum the mortar is taken to gain nothing (not to lose strength).
    return np.concatenate([[0.0], np.cumsum(np.clip(ta - datum_k, 0.0, None) * np.diff(t))])


def equivalent_age_nurse_saul(times_s: Sequence[float], temps_k, *, datum_k: float,
                              t_ref_k: float, valid_range=VALID_RANGE_K) -> np.ndarray:
    """Nurse-Saul equivalent age (s at Tref): ``M / (Tref - T0)``."""
    if t_ref_k <= datum_k:
        raise MaturityInputError("the reference temperature must lie above the datum temperature")
    return temperature_time_factor(times_s, temps_k, datum_k=datum_k,
                                   valid_range=valid_range) / (t_ref_k - datum_k)


def equivalent_age(times_s, temps_k, *, method: str, activation_energy=None,
                   datum_k: float | None = None, t_ref_k: float,
                   valid_range=VALID_RANGE_K) -> np.ndarray:
    """Equivalent age (s) by ``method`` 'arrhenius' (needs E) or 'nurse_saul' (needs T0)."""
    if method == "arrhenius" and activation_energy is not None:
        return equivalent_age_arrhenius(times_s, temps_k, activation_energy=activation_energy,
                                        t_ref_k=t_ref_k, valid_range=valid_range)
    if method == "nurse_saul" and datum_k is not None:
        return equivalent_age_nurse_saul(times_s, temps_k, datum_k=datum_k, t_ref_k=t_ref_k,
                                         valid_range=valid_range)
    if method == "arrhenius":
        raise MaturityInputError("the Arrhenius method needs an activation energy (J/mol)")
    if method == "nurse_saul":
        raise MaturityInputError("the Nurse-Saul method needs a datum temperature (K)")
    raise MaturityInputError(f"unknown method '{method}'; use 'arrhenius' or 'nurse_saul'")


def in_wall_strength(fit: FitResult, te_s: np.ndarray, level: float = 0.95,
                     max_factor: float = MAX_EXTRAPOLATION):
    """(value, lower, upper, assessed) arrays in Pa at equivalent ages ``te_s`` (s).

    The fit's ages are read as equivalent ages at Tref (lab curing at Tref).  Points the
    model cannot speak for (te = 0 or outside ``max_factor`` of the tested ages) are not
    assessed: their values are 0 and ``assessed`` is False there.
    """
    te = np.asarray(te_s, float).ravel()
    ok = (te >= fit.age_min / max_factor) & (te <= fit.age_max * max_factor)
    out = [np.zeros(te.size) for _ in range(3)]
    if ok.any():
        for arr, part in zip(out, curve(fit, te[ok], level, max_factor)):
            arr[ok] = part
    return out[0], out[1], out[2], ok


def earliest_time(fit: FitResult, target_pa: float, times_s: Sequence[float],
                  te_s: Sequence[float], *, conservative: bool = True, level: float = 0.95,
                  max_factor: float = MAX_EXTRAPOLATION) -> EarliestTime:
    """First time on the history at which ``target_pa`` is reached in the wall.

    ``te_s`` is the equivalent age at each of ``times_s`` (from :func:`equivalent_age`).
    Conservative (default): the lower edge of the ``level`` band must reach the target;
    otherwise the central estimate.  Solved by scanning equivalent age for the first sign
    change and refining with Brent's method; time follows by linear interpolation, exact
    because the rate is constant within each interval.
    """
    t, te = np.asarray(times_s, float).ravel(), np.asarray(te_s, float).ravel()
    if t.size != te.size or t.size < 2 or np.any(np.diff(te) < 0):
        raise MaturityInputError("times and equivalent ages must pair up and not decrease")
    if not math.isfinite(target_pa) or target_pa <= 0:
        raise MaturityInputError(f"target strength must be > 0 Pa; got {target_pa}")
    which = "lower band edge" if conservative else "central estimate"
    basis = (f"{fit.title}; {which} ({level:.0%} delta-method band) at the equivalent age")
    lo_te, hi_te = fit.age_min / max_factor, min(te[-1], fit.age_max * max_factor)
    if hi_te <= lo_te:
        return EarliestTime(None, None, False, "the history is too short for the model to "
                            "speak for (equivalent age below the allowed range)", basis)

    def gap(a: float) -> float:
        v, lo, _ = curve(fit, [a], level, max_factor)
        return float((lo if conservative else v)[0]) - target_pa

    grid = np.geomspace(lo_te, hi_te, 120)
    v, lo, _ = curve(fit, grid, level, max_factor)      # one vectorised scan
    g = (lo if conservative else v) - target_pa
    if g[0] >= 0:
        return _at(t, te, grid[0], basis, "reached at or before the earliest age the model "
                   f"speaks for ({grid[0] / DAY:.3g} d equivalent)")
    up = np.flatnonzero(g >= 0)
    if up.size == 0:
        lim = "end of the history" if hi_te == te[-1] else f"{max_factor:g}x the last test age"
        return EarliestTime(None, None, False, f"not reached by the {lim} (equivalent age "
                            f"{hi_te / DAY:.3g} d, {which} {(g[-1] + target_pa) / 1e6:.3g} MPa)",
                            basis)
    k = int(up[0])
    root = optimize.brentq(gap, grid[k - 1], grid[k], xtol=1.0)
    return _at(t, te, root, basis, "reached")


def _at(t, te, a, basis, reason) -> EarliestTime:
    i = int(np.searchsorted(te, a, side="left"))
    i = min(max(i, 1), te.size - 1)
    frac = (a - te[i - 1]) / (te[i] - te[i - 1]) if te[i] > te[i - 1] else 0.0
    time = float(t[i - 1] + frac * (t[i] - t[i - 1]))
    return EarliestTime(time, float(a), True, reason, basis)


def activation_energy_fhp(temp_k: float, e_ref: float, slope: float, t_split_k: float) -> float:
    """Freiesleben Hansen & Pedersen temperature-dependent activation energy (J/mol).

    ``E = e_ref`` for T >= t_split, ``e_ref + slope·(t_split - T)`` below (values from
    ``maturity_defaults.yaml``: 33.5 kJ/mol and 1.47 kJ/(mol·K) below 20 °C, from memory).
    """
    return float(e_ref if temp_k >= t_split_k else e_ref + slope * (t_split_k - temp_k))


def arrhenius_energy(activation_energy, temp_k):
    """E (J/mol) at ``temp_k`` (K) from a number or a function of temperature."""
    return activation_energy(temp_k) if callable(activation_energy) else activation_energy


def fhp_energy(e_ref: float, slope: float, t_split_k: float):
    """The temperature-dependent activation energy as a function of T (K, array) -> J/mol."""
    def energy(temp_k):
        t = np.asarray(temp_k, float)
        return np.where(t >= t_split_k, e_ref, e_ref + slope * (t_split_k - t))
    return energy
