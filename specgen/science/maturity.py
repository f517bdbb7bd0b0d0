"""Maturity: equivalent age from a temperature history (the strength in the wall at that
age is read from the strength inference, :mod:`specgen.science.strength_inference`).

SI units: times in s, temperatures in K, activation energy in J/mol, the Nurse-Saul
temperature-time factor in K·s.

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

import numpy as np
from scipy import constants

from specgen.errors import ScienceInputError

R = constants.R                       # J/(mol·K), CODATA via scipy
_ZERO_C = constants.zero_Celsius      # 273.15 K
VALID_RANGE_K = (_ZERO_C - 10.0, _ZERO_C + 60.0)


class MaturityInputError(ScienceInputError):
    """A temperature history or parameter the maturity method cannot use."""


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
