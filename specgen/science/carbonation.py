"""Carbonation of a lime-rich mortar: depth growing with the square root of time.

``x = K·√t`` is the diffusion-controlled form used for carbonation depth; K is fitted to
measured depths by least squares through the origin (``K = Σ x_i √t_i / Σ t_i``), and the
time to carbonate a depth d follows as ``t = (d / K)²``.  SI inside: m, s, m/s^0.5.
"""
from __future__ import annotations

import math
from collections.abc import Sequence


def fit_coefficient(ages: Sequence[float], depths: Sequence[float]) -> float:
    """K (m/s^0.5) of ``x = K√t`` through the origin, from ages (s) and depths (m)."""
    if len(ages) != len(depths) or not ages:
        raise ValueError("give as many depths as ages, at least one")
    if any(t <= 0 for t in ages) or any(x < 0 for x in depths):
        raise ValueError("ages must be positive and depths not negative")
    return sum(x * math.sqrt(t) for t, x in zip(ages, depths)) / sum(ages)


def time_to_depth(depth: float, k: float) -> float:
    """Time (s) for the carbonation front to reach ``depth`` (m) at coefficient ``k``."""
    if k <= 0:
        raise ValueError("the carbonation coefficient must be positive")
    return (depth / k) ** 2
