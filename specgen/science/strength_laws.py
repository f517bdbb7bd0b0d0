"""Strength-versus-age laws: the model registry (formulas, Jacobians, bounds, units) that
:mod:`specgen.science.strength_models` fits and compares.

Ages in the laws are days and strengths MPa (parameters of order one); ``si`` gives each
parameter's factor to SI.

Models (``MODELS``):

* ``two_component`` -- natural cement's two stages: an aluminate part saturating within
  hours plus a silicate (belite) part growing over weeks to months,
  ``f = fA·(1 - exp(-t/tauA)) + fS·(1 - exp(-(t/tauS)^b))``.  ``tauA`` (bounded to
  1 min - 12 h) is fitted only when at least two distinct ages are under half a day;
  otherwise it is held at ``tau_a_s`` (common practice: the aluminate fraction sets in
  minutes and its strength is in place within hours), and the fit says so.
* ``en1992_age`` -- EN 1992-1-1 eq. 3.2 age function with fitted ``f28`` and ``s``:
  ``f = f28·exp{s[1 - (28 d/t)^0.5]}``.
* ``hyperbolic`` -- ``f = f_inf·t/(k + t)``.
"""
from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass

import numpy as np

from specgen.errors import ScienceInputError

DAY = 86400.0                 # s
_MPA = 1e6                    # Pa per MPa (internal working unit)
TAU_A_DEFAULT_S = 3600.0      # common practice: aluminate strength in place within hours
TAU_A_BOUNDS_S = (60.0, 12 * 3600.0)   # "minutes to hours"
EARLY_AGE_S = 0.5 * DAY       # ages below this resolve the aluminate time constant
_COND_LIMIT = 1e12            # JᵀJ condition number above which parameters are not separable


class StrengthFitError(ScienceInputError):
    """The data cannot support the fit; the message says what is needed."""


@dataclass(frozen=True)
class _Spec:
    key: str
    title: str
    formula: str
    names: tuple[str, ...]
    si: tuple[float, ...]          # internal -> SI factor per parameter
    units: tuple[str, ...]
    f: Callable
    jac: Callable
    bounds: Callable               # ymax (MPa), ages (d) -> (lower, upper)


def _two(x, t):
    fa, ta, fs, ts, b = x
    return fa * -np.expm1(-t / ta) + fs * -np.expm1(-(t / ts) ** b)


def _two_jac(x, t):
    fa, ta, fs, ts, b = x
    ea, u = np.exp(-t / ta), (t / ts) ** b
    es = np.exp(-u)
    return np.column_stack([1.0 - ea, -fa * ea * t / ta ** 2, 1.0 - es,
                            -fs * es * b * u / ts, fs * es * u * np.log(t / ts)])


def age_function_en1992(age_s, s: float):
    """EN 1992-1-1 eq. 3.2 ``βcc(t) = exp{s[1 - (28 d/t)^0.5]}``; age in s, s dimensionless."""
    t = np.asarray(age_s, dtype=float) / DAY
    if np.any(t <= 0) or not np.all(np.isfinite(t)) or not math.isfinite(s):
        raise StrengthFitError("the age function needs positive finite ages and a finite s")
    return np.exp(s * (1.0 - np.sqrt(28.0 / t)))


def _ec(x, t):
    f28, s = x
    return f28 * np.exp(s * (1.0 - np.sqrt(28.0 / t)))


def _ec_jac(x, t):
    f28, s = x
    g = 1.0 - np.sqrt(28.0 / t)
    e = np.exp(s * g)
    return np.column_stack([e, f28 * e * g])


def _hyp(x, t):
    finf, k = x
    return finf * t / (k + t)


def _hyp_jac(x, t):
    finf, k = x
    return np.column_stack([t / (k + t), -finf * t / (k + t) ** 2])


# Physical bounds (internal units MPa, d): strengths non-negative and within a generous
# multiple of the largest result; time constants from a minute to ten years.
MODELS: dict[str, _Spec] = {s.key: s for s in (
    _Spec("two_component", "two-component model (aluminate + silicate)",
          "f = fA·(1 - exp(-t/tauA)) + fS·(1 - exp(-(t/tauS)^b))",
          ("f_A", "tau_A", "f_S", "tau_S", "b"), (_MPA, DAY, _MPA, DAY, 1.0),
          ("Pa", "s", "Pa", "s", "1"), _two, _two_jac,
          lambda ym, t: ([0.0, TAU_A_BOUNDS_S[0] / DAY, 0.0, 1.0, 0.3],
                         [2.0 * ym, TAU_A_BOUNDS_S[1] / DAY, 20.0 * ym, 3650.0, 3.0])),
    _Spec("en1992_age", "EN 1992-1-1 age function (fitted s, f28)",
          "f = f28·exp{s[1 - (28 d/t)^0.5]}", ("f28", "s"), (_MPA, 1.0), ("Pa", "1"),
          _ec, _ec_jac, lambda ym, t: ([1e-3, 0.01], [20.0 * ym, 3.0])),
    _Spec("hyperbolic", "hyperbolic law", "f = f_inf·t/(k + t)", ("f_inf", "k"),
          (_MPA, DAY), ("Pa", "s"), _hyp, _hyp_jac,
          lambda ym, t: ([1e-3, 1e-3], [50.0 * ym, 3650.0])),
)}


def n_parameters(model: str, ages_s: Sequence[float]) -> int:
    """Number of fitted parameters of ``model`` for these ages (tauA free or held)."""
    a = np.asarray(ages_s, float)
    held = model == "two_component" and np.unique(a[a < EARLY_AGE_S]).size < 2
    return len(MODELS[model].names) - int(held)
