"""Priors of the strength inference: one binder family's ranges, read from
``content/data/strength_priors.yaml`` by the caller (:func:`prior_from_table`), as log-normal
(logit-normal for a fraction) terms centred on their printed 95 % range.
"""
from __future__ import annotations

import math
from collections.abc import Callable, Mapping
from dataclasses import dataclass

from scipy import stats

from specgen.errors import ScienceInputError

PRIOR_KEYS = ("early_fraction", "tau_fast_d", "tau_slow_d", "shape_b", "gain_365_28")
_Z95 = float(stats.norm.ppf(0.975))


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


def prior_from_table(family: str, row: Mapping) -> Prior:
    """A :class:`Prior` from one family row of ``strength_priors.yaml`` (ranges as printed)."""
    def term(k):
        lo, hi = (float(v) for v in row[k]["range"])
        if not 0 < lo < hi or (k == "early_fraction" and hi >= 1):
            raise InferenceError(f"prior '{family}.{k}': range must satisfy 0 < low < high")
        return PriorTerm(k, lo, hi, str(row[k]["source"]))
    return Prior(family, str(row.get("label", family)), {k: term(k) for k in PRIOR_KEYS},
                 term("batch_cv"), term("within_cv"), bool(row.get("carbonating", False)))


def _central_cv(term: PriorTerm) -> float:
    return math.sqrt(term.low * term.high)          # geometric middle of the range
