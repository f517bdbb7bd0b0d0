"""Each strength fit (and each capillary fit and colour summary) once per build.

A build evaluates the current revision, the issued revision it is compared with, and any
archived revision it publishes; their strength records are mostly the same series.  The fits
are pure functions of their inputs, so inside one pipeline call (:func:`kept`, opened by
``specgen.build``) a fit made for a series is kept by its exact inputs and given to every
evaluation that asks for the same series.  The capillary fits and colour summaries of a
sample are asked for once per zone and candidate: they are kept the same way.  Outside one, every fit is made afresh.  The
render stage fits nothing: it draws the curves the checks recorded (``strength_curve``).

``kept(persist=...)`` also keeps the strength fits between runs: ``persist`` (the pipeline's
``specgen.fit_cache.FitStore``; this module touches no file) is asked for a fit before it is
made, and given at the end of a complete run each fit made in it (or whose bands grew).
"""
from __future__ import annotations

import contextlib
import contextvars
import os

import numpy as np

from specgen.science import colour, moisture
from specgen.science import strength_inference as si
from specgen.science import strength_models as sm

_KEPT: contextvars.ContextVar[dict | None] = contextvars.ContextVar("specgen_fits", default=None)
# (the store kept between runs, {key: size of the fit's band memo when it was read})
_PERSIST: contextvars.ContextVar[tuple | None] = contextvars.ContextVar("specgen_fits_persist",
                                                                       default=None)


@contextlib.contextmanager
def kept(persist=None):
    """Keep the fits made inside (one build or check); a nested call shares the outer one's.
    ``persist``: a store with ``get(key)``/``put(key, fit)`` kept between runs (or None)."""
    if _KEPT.get() is not None:
        yield
        return
    store: dict = {}
    token = _KEPT.set(store)
    token_p = _PERSIST.set((persist, {}) if persist is not None else None)
    try:
        yield
        if persist is not None:
            _hand_over(store, persist, _PERSIST.get()[1])
    finally:
        _KEPT.reset(token)
        _PERSIST.reset(token_p)


def _memo_size(fit) -> int:
    return len(getattr(fit, "memo", ()))


def _hand_over(store: dict, persist, read: dict) -> None:
    """Give ``persist`` each fit made in the run, and each read from it whose bands grew."""
    for key, fit in store.items():
        if key not in read or _memo_size(fit) > read[key]:
            persist.put(key, fit)


def _from_persist(key: tuple):
    """The fit kept between runs for ``key`` (None: none, or no store in use)."""
    kept_p = _PERSIST.get()
    if kept_p is None:
        return None
    found = kept_p[0].get(key)
    if found is not None:
        kept_p[1][key] = _memo_size(found)
    return found


def once(key: tuple, make):
    """``make()`` once per key inside :func:`kept` (afresh outside one): for a pure result
    whose ``key`` holds every input it depends on (hashable), shared read-only."""
    store = _KEPT.get()
    if store is None:
        return make()
    if key not in store:
        found = _from_persist(key)
        # a refusal (an exception) is not kept: it is cheap
        store[key] = found if found is not None else make()
    return store[key]


def selection(ages_s, values_pa) -> sm.Selection:
    """:func:`~specgen.science.strength_models.fit_all` of a series (SI), made once."""
    t, y = tuple(map(float, ages_s)), tuple(map(float, values_pa))
    return once(("models", t, y), lambda: _models(t, y))


def _models(t: tuple, y: tuple) -> sm.Selection:
    """The model comparison of one series, as :func:`selection` and :func:`_make` make it."""
    return sm.fit_all(np.array(t), np.array(y))


def inference(ages_d, values_mpa, prior: si.Prior) -> si.Inference:
    """:func:`~specgen.science.strength_inference.fit` of a series with a prior, made once."""
    t, y = tuple(map(float, ages_d)), tuple(map(float, values_mpa))
    return once(("inference", t, y, repr(prior)), lambda: si.fit(list(t), list(y), prior))


def made_together(records, series) -> None:
    """Make, before they are asked for, the fits not yet kept: the inference of each
    ``(ages_d, values_mpa, prior)`` record (:func:`inference`; their solves batched by
    :func:`~specgen.science.strength_inference.fit_many`) and the model comparison of
    each ``(ages_s, values_pa)`` series (:func:`selection`).  When there are at least
    ``BESIDE_MIN`` of them, a second process (``fork``) makes the back half of each kind
    while this one makes the front: every fit is a pure function of its own inputs, made by the same code
    either way, so the results are those of one process, kept in the same order.  A fit that
    cannot be made is left for :func:`inference` / :func:`selection` to refuse."""
    store = _KEPT.get()
    if store is None:
        return
    todo: dict[tuple, tuple] = {}
    for ages_d, values_mpa, prior in records:
        t, y = tuple(map(float, ages_d)), tuple(map(float, values_mpa))
        todo.setdefault(("inference", t, y, repr(prior)), (list(t), list(y), prior))
    for ages_s, values_pa in series:
        t, y = tuple(map(float, ages_s)), tuple(map(float, values_pa))
        todo.setdefault(("models", t, y), (t, y))
    for key in list(todo):
        if key not in store and (found := _from_persist(key)) is not None:
            store[key] = found
        if key in store:
            del todo[key]
    if todo:
        store.update(_made_beside(todo))


def _make(todo: dict[tuple, tuple]) -> dict[tuple, object]:
    """The fits of ``todo`` (key: arguments) that could be made, by key (in one process)."""
    out: dict[tuple, object] = {}
    inf = [k for k in todo if k[0] == "inference"]
    for key, made in zip(inf, si.fit_many([todo[k] for k in inf])):
        if isinstance(made, si.Inference):
            out[key] = made
    for key in (k for k in todo if k[0] == "models"):
        t, y = todo[key]
        try:
            out[key] = _models(t, y)
        except sm.StrengthFitError:
            pass    # refused again, with its message, when the check asks
    return out


BESIDE_MIN = 40   # fits to make before a second process pays for its start (about 0.05 s)


def _made_beside(todo: dict[tuple, tuple]) -> dict[tuple, object]:
    """:func:`_make` of ``todo``, the back half in a second process when two cores are free
    to this one and there is enough to make (else all here)."""
    import multiprocessing
    if (len(todo) < BESIDE_MIN or _cores() < 2
            or "fork" not in multiprocessing.get_all_start_methods()):
        return _make(todo)
    keys = list(todo)
    front, back = [], []
    for kind in ("inference", "models"):   # half of each kind each: their costs differ
        of = [k for k in keys if k[0] == kind]
        front += of[:len(of) // 2]
        back += of[len(of) // 2:]
    from concurrent.futures import ProcessPoolExecutor
    with ProcessPoolExecutor(1, mp_context=multiprocessing.get_context("fork"),
                             initializer=_die_with_parent) as pool:
        other = pool.submit(_make, {k: todo[k] for k in back})
        out = _make({k: todo[k] for k in front})
        try:
            out.update(other.result())
        except Exception:  # noqa: BLE001 - the other process failed: its half made here
            # (an error of the fits themselves is raised again here, where it belongs)
            out.update(_make({k: todo[k] for k in back}))
    return {k: out[k] for k in keys if k in out}


def _cores() -> int:
    try:
        return len(os.sched_getaffinity(0))
    except AttributeError:    # not Linux
        return os.cpu_count() or 1


def _die_with_parent() -> None:
    # Linux: the second process ends when this one ends, even by SIGKILL (PR_SET_PDEATHSIG),
    # as the math drawing's (``report/mathsvg.py``)
    try:
        import ctypes
        import signal
        ctypes.CDLL("libc.so.6", use_errno=True).prctl(1, signal.SIGKILL)
    except (OSError, AttributeError):
        pass


def capillary(times_s, uptakes) -> moisture.CapillaryFit:
    """:func:`~specgen.science.moisture.capillary_coefficient` of a sample's readings, made once."""
    t, w = tuple(map(float, times_s)), tuple(map(float, uptakes))
    return once(("capillary", t, w), lambda: moisture.capillary_coefficient(list(t), list(w)))


def colour_summary(readings) -> colour.LabSummary:
    """:func:`~specgen.science.colour.summarise` of a sample's L*, a*, b* readings, made once."""
    lab = tuple(tuple(map(float, r)) for r in readings)
    return once(("colour", lab), lambda: colour.summarise([list(r) for r in lab]))
