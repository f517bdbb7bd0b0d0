"""Priors of the strength inference: one binder family's ranges, read from
``content/data/strength_priors.yaml`` by the caller (:func:`prior_from_table`), as log-normal
(logit-normal for a fraction) terms centred on their printed 95 % range.

The one-year gain f(365 d)/f(28 d) is not a parameter of the law but a function of the shape
terms (φ, τA, τS, b), which already imply a gain range of their own.  Multiplying the gain
row's density into the prior as if it were separate evidence would count that knowledge twice
and make the prior narrower than any of its printed rows (natural cement: f365/f28 1.40-3.00
where the row prints 1.3-3.5 and the shape rows alone imply 1.24-4.17).  The gain row is
therefore melded in (Poole & Raftery 2000, J. Am. Stat. Assoc. 95, Bayesian melding,
logarithmic pooling with all weight on the printed row): the prior is
``p(shape)·q_row(g)/q_shape(g)``, ``q_shape`` the gain density the shape rows imply, so that
the gain's marginal under the prior is the printed row.  The ratio is written as one
log-normal term in ``g`` (:attr:`Prior.gain_penalty`) whose centre and SD are chosen so that
the prior's own central 95 % range of f365/f28 is the printed range (:func:`melded_gain`;
``q_shape`` is skewed, so a ratio of two log-normal densities would miss it).
"""
from __future__ import annotations

import math
from collections.abc import Callable, Mapping
from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from specgen.errors import ScienceInputError
from specgen.science.distributions import norm_ppf
from specgen.science.two_stage_law import log_f

MELD_DRAWS, MELD_RNG_STATE = 20000, 365   # draws of the shape rows for the implied gain

PRIOR_KEYS = ("early_fraction", "tau_fast_d", "tau_slow_d", "shape_b", "gain_365_28")
_Z95 = float(norm_ppf(0.975))


class InferenceError(ScienceInputError):
    """The record cannot be assessed; the message says why and what to test."""


@dataclass(frozen=True)
class PriorTerm:
    """A log-normal (logit-normal for a fraction) prior read from a central 95 % range."""

    name: str
    low: float
    high: float
    source: str

    @property
    def transform(self) -> Callable[[float], float]:
        return _logit if self.name == "early_fraction" else math.log

    @property
    def mu(self) -> float:
        return 0.5 * (self.transform(self.low) + self.transform(self.high))

    @property
    def sd(self) -> float:
        return (self.transform(self.high) - self.transform(self.low)) / (2 * _Z95)


def _logit(p: float) -> float:
    return math.log(p / (1.0 - p))


@dataclass(frozen=True)
class Prior:
    """One binder family's prior (``terms`` by key of ``PRIOR_KEYS``) and scatter ranges."""

    family: str
    label: str
    terms: dict[str, PriorTerm]
    batch_cv: PriorTerm
    within_cv: PriorTerm
    carbonating: bool
    gain_penalty: tuple[float, float] = (0.0, math.inf)   # (centre, SD) of ln f365/f28

    def penalty(self, key: str) -> tuple[float, float]:
        """(centre, SD) of the fit's prior term ``key`` on its transformed scale: the printed
        range's, except the one-year gain's, which is melded (module docstring)."""
        if key == "gain_365_28":
            return self.gain_penalty
        return self.terms[key].mu, self.terms[key].sd


def prior_from_table(family: str, row: Mapping) -> Prior:
    """A :class:`Prior` from one family row of ``strength_priors.yaml`` (ranges as printed)."""
    def term(k):
        lo, hi = (float(v) for v in row[k]["range"])
        if not 0 < lo < hi or (k == "early_fraction" and hi >= 1):
            raise InferenceError(f"prior '{family}.{k}': range must satisfy 0 < low < high")
        return PriorTerm(k, lo, hi, str(row[k]["source"]))
    terms = {k: term(k) for k in PRIOR_KEYS}
    shape = tuple((terms[k].mu, terms[k].sd) for k in PRIOR_KEYS[:4])
    gain = terms["gain_365_28"]
    return Prior(family, str(row.get("label", family)), terms, term("batch_cv"),
                 term("within_cv"), bool(row.get("carbonating", False)),
                 melded_gain(shape, gain.low, gain.high))


@lru_cache(maxsize=64)
def _implied_log_gains(shape: tuple) -> np.ndarray:
    """ln f(365 d)/f(28 d) over ``MELD_DRAWS`` draws of the shape terms ``((centre, SD), ...)``
    for φ (logit), τA, τS, b (logs), with a fixed random state."""
    rng = np.random.default_rng(MELD_RNG_STATE)
    z = np.column_stack([np.zeros(MELD_DRAWS)] + [rng.normal(m, sd, MELD_DRAWS) for m, sd in shape])
    lf = log_f(z.T[:, :, None], np.array([28.0, 365.0])[None, :])
    g = lf[:, 1] - lf[:, 0]
    g.flags.writeable = False
    return g


def weighted_quantiles(x: np.ndarray, w: np.ndarray, q) -> np.ndarray:
    """Quantiles ``q`` of ``x`` under weights ``w`` (linear between the mid-points of the
    cumulative weights, so they move smoothly with the weights)."""
    order = np.argsort(x)
    return _sorted_weighted_quantiles(x[order], w[order], q)


def _sorted_weighted_quantiles(x: np.ndarray, w: np.ndarray, q) -> np.ndarray:
    """:func:`weighted_quantiles` of ``x`` already in ascending order (``w`` in that order)."""
    c = np.cumsum(w)
    return np.interp(q, (c - 0.5 * w) / c[-1], x)


@lru_cache(maxsize=64)
def melded_gain(shape: tuple, low: float, high: float) -> tuple[float, float]:
    """(centre, SD) of the log-normal gain term that makes the prior's own central 95 % range
    of f365/f28 the printed ``low``-``high``: the ratio ``q_row/q_shape`` of the module
    docstring, found by matching the range (``scipy.optimize.least_squares`` over the centre and
    ln SD) on draws of the shape terms weighted by the term.  When the shape rows cannot be
    narrowed to the row (the row is the wider), the closest match is kept."""
    # sorted once: the weights follow the draws, so the order is the same at every step
    return match_gain_term(np.sort(_implied_log_gains(shape)), low, high)


def match_gain_term(g: np.ndarray, low: float, high: float) -> tuple[float, float]:
    """(centre, SD) of the log-normal gain term under which the draws ``g`` (ln f365/f28 of
    draws of the shape terms, ascending) have the central 95 % range ``low``-``high``: the
    matching :func:`melded_gain` does, on any set of shape draws."""
    target = np.log([low, high])
    scale = (target[1] - target[0]) / (2 * _Z95)

    def mismatch(x):
        w = np.exp(-0.5 * ((g - x[0]) / math.exp(x[1])) ** 2) + 1e-300   # never all zero
        return (_sorted_weighted_quantiles(g, w, [0.025, 0.975]) - target) / scale
    start = [float(target.mean()), math.log(scale)]
    from scipy import optimize   # only when a prior is matched
    sol = optimize.least_squares(mismatch, start, diff_step=1e-3,
                                 bounds=([-10.0, math.log(0.01)], [10.0, math.log(50.0)]))
    return float(sol.x[0]), math.exp(float(sol.x[1]))


def _central_cv(term: PriorTerm) -> float:
    return math.sqrt(term.low * term.high)          # geometric middle of the range
