"""Arithmetic of the site test regime and of the options appraisal (SI floats in, plain out).

Sampling: one set of prisms per ``area_per_set`` of wall, and — where the works
are long — at least one set per day's work; never fewer than ``min_sets``.
"""
from __future__ import annotations

import math
from dataclasses import dataclass


@dataclass(frozen=True)
class SampleSets:
    """Sets of prisms for a zone: by area, by days of work, and the number required."""

    by_area: int | None
    working_days: int | None
    sets: int


def sets_by_area(area: float, area_per_set: float) -> int:
    """⌈A / a⌉: one set for each ``area_per_set`` (m²) of the zone's ``area`` (m²)."""
    if area <= 0 or area_per_set <= 0:
        raise ValueError("area and area per set must be positive")
    # round first: 150 m² / 50 m² must give 3, not 4 through a floating-point excess
    return math.ceil(round(area / area_per_set, 9))


def working_days(volume: float, rate: float, day: float) -> int:
    """⌈V / (q T)⌉: days of work to place ``volume`` (m³) at ``rate`` (m³/s) for ``day`` (s)."""
    if volume <= 0 or rate <= 0 or day <= 0:
        raise ValueError("volume, placing rate and working day must be positive")
    return math.ceil(round(volume / (rate * day), 9))


def sample_sets(min_sets: int, area: float | None = None, area_per_set: float | None = None,
                volume: float | None = None, rate: float | None = None,
                day: float | None = None) -> SampleSets:
    """n = max(n_min, ⌈A/a⌉, ⌈V/(qT)⌉) with whichever terms are known."""
    by_area = sets_by_area(area, area_per_set) if area and area_per_set else None
    days = working_days(volume, rate, day) if volume and rate and day else None
    return SampleSets(by_area, days, max([min_sets] + [n for n in (by_area, days) if n]))


def prisms(sets: int, per_set: int, ages: int) -> int:
    """Prisms to make: sets × prisms per set × test ages."""
    return sets * per_set * ages


def cost_per_area(price: float, per: float, volume: float, area: float) -> float:
    """Cost per m² of wall: (price / per) × V / A, with ``per`` and ``volume`` in m³."""
    if per <= 0 or area <= 0:
        raise ValueError("the priced quantity and the area must be positive")
    return price / per * volume / area
