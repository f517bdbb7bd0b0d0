"""Statistics of one group of strength results (one mix, test kind and age).

SI units throughout: strengths in Pa in and Pa out; the coefficient of variation is a
ratio (0.05 = 5 %).  Three jobs:

* :func:`summarise` -- n, mean, sample standard deviation, CV;
* :func:`characteristic_value` -- the 5 % fractile per EN 1990 Annex D (D7.2), normal
  distribution, variance unknown (``k_n = t(1-p, n-1)·sqrt(1 + 1/n)``) or known
  (``k_n = u(1-p)·sqrt(1 + 1/n)`` with sigma given);
* :func:`grubbs_screen` -- Grubbs' two-sided outlier test.  Nothing is ever dropped
  silently: the screen returns the kept and the flagged values, each with its reason,
  the statistic and the critical value, so the dossier can show why.

Magnitudes are checked for plausibility (:func:`check_plausible`) against a range passed
in by the caller, so a result typed in psi under an MPa heading shows up as implausible.
"""
from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from specgen.errors import ScienceInputError
from specgen.science.distributions import norm_ppf, t_isf, t_ppf


class StrengthInputError(ScienceInputError):
    """Strength results the statistics cannot handle (empty, non-positive, non-finite)."""


@dataclass(frozen=True)
class Summary:
    """One group of results: count, mean and sample SD in Pa, CV as a ratio."""

    n: int
    mean: float
    sd: float          # sample standard deviation (n - 1); 0.0 when n == 1
    cv: float          # sd / mean; 0.0 when n == 1
    minimum: float
    maximum: float


@dataclass(frozen=True)
class Characteristic:
    """Characteristic value per EN 1990 Annex D: ``value = mean - k_n·s``."""

    value: float       # Pa
    mean: float        # Pa
    s: float           # the SD used: sample SD (unknown variance) or given sigma (known)
    k_n: float
    n: int
    variance: str      # 'unknown' or 'known'
    fractile: float    # e.g. 0.05
    basis: str


@dataclass(frozen=True)
class Flag:
    """One value examined by the outlier screen and what was decided about it."""

    index: int         # position in the input sequence
    value: float       # Pa
    reason: str


@dataclass(frozen=True)
class OutlierScreen:
    """Result of Grubbs' test: kept and flagged values, each with a reason."""

    method: str
    alpha: float
    n: int
    statistic: float          # G of the last round examined (0.0 if not applicable)
    critical: float           # G critical of that round (0.0 if not applicable)
    kept: tuple[Flag, ...]
    flagged: tuple[Flag, ...]
    assessed: bool            # False when the test cannot be applied (n < 3)
    message: str


def _values(values: Sequence[float]) -> np.ndarray:
    """Validated 1-D array of strengths (Pa): finite and strictly positive."""
    x = np.asarray(values, dtype=float).ravel()
    if x.size == 0:
        raise StrengthInputError("no strength results given")
    if not np.all(np.isfinite(x)):
        raise StrengthInputError("strength results must be finite numbers (found NaN or inf)")
    if np.any(x <= 0.0):
        bad = ", ".join(f"{v:g}" for v in x[x <= 0.0])
        raise StrengthInputError(f"strength results must be greater than zero; found {bad} Pa")
    return x


def summarise(values: Sequence[float]) -> Summary:
    """n, mean, sample SD (Pa) and CV (ratio) of one group of results in Pa."""
    x = _values(values)
    n = int(x.size)
    mean = float(x.mean())
    sd = float(x.std(ddof=1)) if n > 1 else 0.0
    return Summary(n=n, mean=mean, sd=sd, cv=sd / mean, minimum=float(x.min()),
                   maximum=float(x.max()))


# The distribution quantiles depend only on (probability, degrees of freedom), which repeat for
# every group of a project: each is computed once per process (pure, so the same number).
@lru_cache(maxsize=1024)
def _norm_ppf(p: float) -> float:
    return float(norm_ppf(p))


@lru_cache(maxsize=1024)
def _t_ppf(p: float, dof: float) -> float:
    return float(t_ppf(p, dof))


@lru_cache(maxsize=1024)
def _t_isf(p: float, dof: float) -> float:
    return float(t_isf(p, dof))


def kn_factor(n: int, known_variance: bool, fractile: float = 0.05) -> float:
    """EN 1990 Annex D (D7.2) factor k_n for the ``fractile`` characteristic value.

    Unknown variance: ``t(1-p, n-1)·sqrt(1+1/n)`` (Student t, needs n >= 2);
    known variance: ``u(1-p)·sqrt(1+1/n)`` (standard normal).  Table D1 rounds u to 1.64.
    """
    if int(n) != n or n < 1:
        raise StrengthInputError(f"the number of results must be a whole number >= 1; got {n}")
    if not 0.0 < fractile < 0.5:
        raise StrengthInputError(f"fractile must lie between 0 and 0.5; got {fractile}")
    if known_variance:
        q = _norm_ppf(1.0 - fractile)
    else:
        if n < 2:
            raise StrengthInputError("a characteristic value with unknown variance needs at "
                                     "least 2 results (EN 1990 Table D1 starts at n = 3)")
        q = _t_ppf(1.0 - fractile, n - 1)
    return q * math.sqrt(1.0 + 1.0 / n)


def kn_from_table(n: int, table: Mapping, known_variance: bool) -> float:
    """k_n read from EN 1990 Table D1 data (``content/data/en1990_kn.yaml``).

    Linear interpolation in 1/n between tabulated n (the table's infinity row is 1/n = 0).
    """
    row = table["vx_known" if known_variance else "vx_unknown"]
    pairs = [(1.0 / float(m), float(k)) for m, k in zip(table["n"], row) if k is not None]
    pairs.sort()
    inv = 1.0 / float(n)
    xs, ks = zip(*pairs)
    if inv > xs[-1] + 1e-12:
        raise StrengthInputError(f"EN 1990 Table D1 gives no k_n for n = {n} "
                                 f"({'known' if known_variance else 'unknown'} variance)")
    return float(np.interp(inv, xs, ks))


def characteristic_value(values: Sequence[float], *, sigma: float | None = None,
                         fractile: float = 0.05, k_n: float | None = None) -> Characteristic:
    """5 % characteristic value (Pa) per EN 1990 Annex D, normal distribution.

    ``sigma`` (Pa) given: variance known, ``fk = mean - k_n·sigma``; otherwise the sample SD
    is used with the Student-t factor.  ``k_n`` may be passed (e.g. from Table D1) to
    override the formula.  A characteristic value at or below zero is reported as such.
    """
    summ = summarise(values)
    known = sigma is not None
    if known and (not math.isfinite(sigma) or sigma < 0.0):
        raise StrengthInputError(f"a known standard deviation must be finite and >= 0; got {sigma}")
    k = kn_factor(summ.n, known, fractile) if k_n is None else float(k_n)
    s = float(sigma) if known else summ.sd
    basis = ("EN 1990 Annex D (D7.2), normal distribution, variance "
             + ("known: k_n = u(1-p)·sqrt(1+1/n)" if known
                else "unknown: k_n = t(1-p, n-1)·sqrt(1+1/n)"))
    return Characteristic(value=summ.mean - k * s, mean=summ.mean, s=s, k_n=k, n=summ.n,
                          variance="known" if known else "unknown", fractile=fractile,
                          basis=basis)


def grubbs_critical(n: int, alpha: float = 0.05) -> float:
    """Two-sided Grubbs critical value G_crit for n values at significance ``alpha``.

    ``G_crit = (n-1)/sqrt(n) · sqrt(t² / (n - 2 + t²))`` with t the upper ``alpha/(2n)``
    point of Student's t with n-2 degrees of freedom (Grubbs 1969; ASTM E178).
    """
    if n < 3:
        raise StrengthInputError(f"Grubbs' test needs at least 3 values; got {n}")
    if not 0.0 < alpha < 1.0:
        raise StrengthInputError(f"alpha must lie between 0 and 1; got {alpha}")
    t = _t_isf(alpha / (2.0 * n), n - 2)
    return (n - 1) / math.sqrt(n) * math.sqrt(t * t / (n - 2 + t * t))


def grubbs_screen(values: Sequence[float], alpha: float = 0.05,
                  iterate: bool = False) -> OutlierScreen:
    """Grubbs' two-sided test for one outlier (repeated while ``iterate`` and n >= 3).

    Returns every value as kept or flagged with the reason; the caller decides whether a
    flagged value is excluded, and the dossier shows the decision.
    """
    x = _values(values)
    method = f"Grubbs two-sided test, alpha = {alpha:g}" + (" (repeated)" if iterate else "")
    idx = list(range(x.size))
    flagged: list[Flag] = []
    g = gc = 0.0
    if x.size < 3:
        return _screen(method, alpha, x, idx, flagged, g, gc, False,
                       f"not assessed: Grubbs' test needs at least 3 values; got {x.size}")
    while len(idx) >= 3:
        sub = x[idx]
        gc = grubbs_critical(len(idx), alpha)
        sd = float(sub.std(ddof=1))
        if sd == 0.0:
            g = 0.0
            break
        dev = np.abs(sub - sub.mean()) / sd
        j = int(np.argmax(dev))
        g = float(dev[j])
        if g <= gc:
            break
        flagged.append(Flag(idx[j], float(sub[j]),
                            f"G = {g:.3f} > G_crit = {gc:.3f} (n = {len(idx)}, "
                            f"alpha = {alpha:g})"))
        del idx[j]
        if not iterate:
            break
    msg = (f"{len(flagged)} value(s) flagged" if flagged
           else f"no outlier: G = {g:.3f} <= G_crit = {gc:.3f}")
    return _screen(method, alpha, x, idx, flagged, g, gc, True, msg)


def _screen(method, alpha, x, idx, flagged, g, gc, assessed, msg) -> OutlierScreen:
    reason = "not tested" if not assessed else "within the Grubbs limit"
    kept = tuple(Flag(i, float(x[i]), reason) for i in idx)
    return OutlierScreen(method=method, alpha=alpha, n=int(x.size), statistic=g, critical=gc,
                         kept=kept, flagged=tuple(flagged), assessed=assessed, message=msg)


def check_plausible(values: Sequence[float], low: float, high: float,
                    unit_label: str = "MPa", unit_factor: float = 1e6) -> list[str]:
    """Messages for results (Pa) outside a plausible range ``[low, high]`` (Pa).

    A value far above the range is often a unit mix-up (psi entered under an MPa heading:
    1 MPa = 145 psi), so the message says so.  Empty list: all plausible.
    """
    x = np.asarray(values, dtype=float).ravel()
    msgs = []
    for i, v in enumerate(x):
        if not math.isfinite(v):
            msgs.append(f"result {i + 1}: {v} is not a number")
        elif v > high:
            msgs.append(f"result {i + 1}: {v / unit_factor:g} {unit_label} is above the "
                        f"plausible {high / unit_factor:g} {unit_label}; was it entered in psi "
                        f"or kPa under an {unit_label} heading?")
        elif v < low:
            msgs.append(f"result {i + 1}: {v / unit_factor:g} {unit_label} is below the "
                        f"plausible {low / unit_factor:g} {unit_label}; was it entered in the "
                        f"wrong unit (e.g. GPa or N/m² scaled)?")
    return msgs
