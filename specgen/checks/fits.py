"""Each strength fit once per build.

A build evaluates the current revision, the issued revision it is compared with, and any
archived revision it publishes; their strength records are mostly the same series.  The fits
are pure functions of their inputs, so one made for a series is kept (by its exact inputs)
and given to every evaluation that asks for the same series.  The render stage fits nothing:
it draws the curves the checks recorded (``strength_curve``).
"""
from __future__ import annotations

import numpy as np

from specgen.science import strength_inference as si
from specgen.science import strength_models as sm

_KEPT: dict[tuple, object] = {}
_LIMIT = 512  # distinct series kept (a project has tens); beyond it, start again


def _once(key: tuple, make):
    found = _KEPT.get(key)
    if found is None:
        if len(_KEPT) >= _LIMIT:
            _KEPT.clear()
        found = _KEPT[key] = make()  # a refusal (an exception) is not kept: it is cheap
    return found


def selection(ages_s, values_pa) -> sm.Selection:
    """:func:`~specgen.science.strength_models.fit_all` of a series (SI), made once."""
    t, y = tuple(map(float, ages_s)), tuple(map(float, values_pa))
    return _once(("models", t, y), lambda: sm.fit_all(np.array(t), np.array(y)))


def inference(ages_d, values_mpa, prior: si.Prior) -> si.Inference:
    """:func:`~specgen.science.strength_inference.fit` of a series with a prior, made once."""
    t, y = tuple(map(float, ages_d)), tuple(map(float, values_mpa))
    return _once(("inference", t, y, repr(prior)), lambda: si.fit(list(t), list(y), prior))


def forget() -> None:
    """Drop every kept fit (tests that count fits start from nothing)."""
    _KEPT.clear()
