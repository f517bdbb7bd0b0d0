"""Descriptive strength classes and the acceptance decision (pass / fail / hold).

SI units: strengths Pa, ages s.  The class tables come from
``content/data/strength_classes.yaml`` (written in MPa and days, as the standards
print them) and are converted here by :func:`classes_from_table`.

* EN 459-1 lime classes: a compressive-strength range at 28 d, for class 5 also a
  minimum at 7 d.  The ranges overlap, so a result may sit in more than one.
* ASTM C270 mortar types: a minimum at 28 d; the strongest type whose minimum is met.

Both comparisons are descriptive: the binder is not tested to those standards' methods
unless the laboratory says so.

Acceptance: a prediction band either clears a limit (``pass``), lies wholly on the wrong
side (``fail``) or straddles it (``hold``).  For a hold, the later test age that would
decide is named by the strength checks (``checks/strength_prior_common.hold_age``).
"""
from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import numpy as np

from specgen.science.strength_models import (
    DAY,
)

from specgen.errors import ScienceInputError

_MPA = 1e6

class ClassInputError(ScienceInputError):
    """A class table, limit or prediction the comparison cannot use."""


@dataclass(frozen=True)
class StrengthClass:
    """One class or type: range [lower, upper] (Pa) at ``age`` (s), optional early minimum."""

    name: str
    lower: float
    upper: float | None
    age: float
    early_age: float | None = None
    early_lower: float | None = None


@dataclass(frozen=True)
class ClassComparison:
    """Which classes a result meets, with one line of explanation per class."""

    standard: str
    matches: tuple[str, ...]
    lines: tuple[str, ...]
    source: str


def classes_from_table(table: Mapping) -> tuple[StrengthClass, ...]:
    """Convert one table of ``strength_classes.yaml`` (MPa, days) to SI classes."""
    try:
        age = float(table["age_days"]) * DAY
        out = []
        for row in table["classes"]:
            early = row.get("early") or {}
            out.append(StrengthClass(
                name=str(row["name"]), lower=float(row["lower_mpa"]) * _MPA,
                upper=float(row["upper_mpa"]) * _MPA if row.get("upper_mpa") is not None else None,
                age=age,
                early_age=float(early["age_days"]) * DAY if early else None,
                early_lower=float(early["lower_mpa"]) * _MPA if early else None))
    except (KeyError, TypeError, ValueError) as exc:
        raise ClassInputError(f"strength class table is malformed: {exc!r}") from None
    return tuple(out)


def _mpa(v: float) -> str:
    return f"{v / _MPA:.3g} MPa"


def compare_ranges(strength_pa: float, classes: Sequence[StrengthClass], *, standard: str,
                   source: str, early_pa: float | None = None) -> ClassComparison:
    """Classes (EN 459-1 style ranges) whose 28-d range holds ``strength_pa`` (Pa).

    A class with an early-age minimum is met only if ``early_pa`` (Pa) is given and meets it.
    """
    _positive(strength_pa, "strength")
    matches, lines = [], []
    for c in classes:
        in_range = strength_pa >= c.lower and (c.upper is None or strength_pa <= c.upper)
        rng = f"{_mpa(c.lower)} to {_mpa(c.upper)}" if c.upper else f">= {_mpa(c.lower)}"
        line = f"{c.name}: {rng} at {c.age / DAY:g} d -> {'within' if in_range else 'outside'}"
        ok = in_range
        if in_range and c.early_lower is not None:
            if early_pa is None:
                ok = False
                line += (f"; the {c.early_age / DAY:g}-d minimum {_mpa(c.early_lower)} is not "
                         "checked (no result at that age)")
            else:
                ok = early_pa >= c.early_lower
                line += (f"; {c.early_age / DAY:g}-d {_mpa(early_pa)} "
                         f"{'meets' if ok else 'is below'} {_mpa(c.early_lower)}")
        if ok:
            matches.append(c.name)
        lines.append(line)
    return ClassComparison(standard, tuple(matches), tuple(lines), source)


def strongest_minimum(strength_pa: float, types: Sequence[StrengthClass], *, standard: str,
                      source: str) -> ClassComparison:
    """ASTM C270-style types: the one with the highest minimum that ``strength_pa`` meets."""
    _positive(strength_pa, "strength")
    met = [c for c in types if strength_pa >= c.lower]
    best = max(met, key=lambda c: c.lower) if met else None
    lines = tuple(f"{c.name}: min {_mpa(c.lower)} at {c.age / DAY:g} d -> "
                  f"{'met' if strength_pa >= c.lower else 'not met'}" for c in types)
    return ClassComparison(standard, (best.name,) if best else (), lines, source)


def _positive(v: float, what: str) -> None:
    if not isinstance(v, (int, float)) or not math.isfinite(v) or v <= 0:
        raise ClassInputError(f"{what} must be a positive number of Pa; got {v!r}")


def accept(value: float, lower: float, upper: float, limit: float, kind: str) -> str:
    """'pass', 'fail' or 'hold' for a prediction band [lower, upper] (Pa) against a limit.

    ``kind`` 'min': pass if lower >= limit, fail if upper < limit; 'max': pass if
    upper <= limit, fail if lower > limit; otherwise the band straddles: 'hold'.
    """
    vals = (value, lower, upper, limit)
    if not all(isinstance(v, (int, float)) and math.isfinite(v) for v in vals):
        raise ClassInputError(f"value, band and limit must be finite numbers; got {vals}")
    if not lower <= value <= upper:
        raise ClassInputError(f"the band [{lower:g}, {upper:g}] Pa must contain the value "
                              f"{value:g}")
    if kind == "min":
        return "pass" if lower >= limit else "fail" if upper < limit else "hold"
    if kind == "max":
        return "pass" if upper <= limit else "fail" if lower > limit else "hold"
    raise ClassInputError(f"limit kind must be 'min' or 'max'; got {kind!r}")


def pooled_cv(cvs: Sequence[float], ns: Sequence[int]) -> float:
    """Pooled replicate CV ``sqrt(Σ (n_i - 1)·CV_i² / Σ (n_i - 1))``, groups with n >= 2."""
    c, n = np.asarray(cvs, float), np.asarray(ns, float)
    keep = n >= 2
    if c.size != n.size or not keep.any() or not np.all(np.isfinite(c[keep])):
        raise ClassInputError("pooled CV needs at least one group with two or more results")
    return float(np.sqrt(np.sum((n[keep] - 1) * c[keep] ** 2) / np.sum(n[keep] - 1)))
