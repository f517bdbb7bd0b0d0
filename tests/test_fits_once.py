"""Each expensive computation runs once per build: the strength fits are made by the checks,
once per distinct series, and the render stage draws what they recorded.

The render stage cannot fit: it may not import ``specgen.science`` (the import contract
"Render never imports the science", tests/test_architecture.py).  Here the fits the check
stage makes are counted while the demo is checked — the current revision and the issued one
it is compared with, whose strength records are the same series."""
from __future__ import annotations

from collections import Counter

import pytest

from specgen import build
from specgen.checks import fits as kept_fits
from specgen.science import strength_inference as si
from specgen.science import strength_models as sm
from tests.conftest import DEMO



@pytest.fixture
def made(monkeypatch) -> Counter:
    """Counter of the fits made, by (kind, ages, values); starts with no fit kept."""
    counter: Counter = Counter()

    def counting(kind, fn):
        def wrapper(t, y, *args, **kwargs):
            counter[(kind, tuple(map(float, t)), tuple(map(float, y)))] += 1
            return fn(t, y, *args, **kwargs)
        return wrapper

    def counting_many(fn):
        # the inference fits records together (``si.fit`` is one record of ``si.fit_many``)
        def wrapper(records):
            for t, y, *_ in records:
                counter[("inference", tuple(map(float, t)), tuple(map(float, y)))] += 1
            return fn(records)
        return wrapper

    monkeypatch.setattr(sm, "fit_all", counting("models", sm.fit_all))
    monkeypatch.setattr(si, "fit_many", counting_many(si.fit_many))
    yield counter


def test_each_strength_fit_runs_once_per_check(made):
    project, results = build.check(DEMO)
    # the demo's series: (mix, test kind) with results, each fitted by the model selection
    # and by the inference with its family's prior
    series = {(r.mix, r.test) for r in project.strength}
    assert len(series) == 6
    assert sorted(Counter(kind for kind, _, _ in made).items()) == [
        ("inference", 6), ("models", 6)]
    assert [k for k, n in made.items() if n > 1] == []
    # and what they gave is in the results the render stage reads
    curves = [q for by in results.quantities.values() for name, q in by.items()
              if name == "strength_curve"]
    assert curves, "no strength curve recorded for the render stage"


def test_fits_are_kept_within_one_call_only(made):
    # inside one pipeline call a second evaluation fits nothing again ...
    with kept_fits.kept():
        build.check(DEMO)
        first = sum(made.values())
        build.check(DEMO)
        assert sum(made.values()) == first == 12
    # ... and a later call starts afresh (nothing kept between builds or tests)
    build.check(DEMO)
    assert sum(made.values()) == 2 * first


def test_capillary_fits_and_colour_summaries_once_per_sample(monkeypatch, demo_copy):
    """M2's capillary readings and each sample's colour readings serve every zone that has
    the mix as a candidate (demo: M2 in all three zones, HM1/HM2 beside several candidates):
    each distinct set of readings is fitted or summarised once per check.  (American practice
    here: it fits the regression line; European practice takes EN 1015-18's two points.)"""
    from specgen.science import colour, moisture
    from tests.helpers import edit
    edit(demo_copy / "dossier.yaml", "  follows: european", "  follows: american")
    made: Counter = Counter()

    def counting(kind, fn):
        def wrapper(*args):
            made[(kind, repr(args))] += 1
            return fn(*args)
        return wrapper
    monkeypatch.setattr(moisture, "capillary_coefficient",
                        counting("capillary", moisture.capillary_coefficient))
    monkeypatch.setattr(colour, "summarise", counting("colour", colour.summarise))
    build.check(demo_copy)
    kinds = Counter(kind for kind, _ in made)
    # demo lab/capillary.csv: one sample (M2); lab/colour.csv: HM1, HM2, M1, M2, M3
    assert kinds["capillary"] == 1 and kinds["colour"] == 5, kinds
    assert [k for k, n in made.items() if n > 1] == []


def test_site_equivalent_age_once_per_method_and_record(monkeypatch, demo_copy):
    """The wall's equivalent age along the site record is the same for every mix: it is worked
    out once per maturity method in a check (demo: Arrhenius, compared with Nurse-Saul), and a
    changed record is worked out again, never taken from the old one."""
    from specgen.science import maturity
    from tests.helpers import edit
    calls: Counter = Counter()

    def counting(t, temp, **kw):
        calls[(kw["method"], tuple(map(float, temp)))] += 1
        return maturity_equivalent_age(t, temp, **kw)
    maturity_equivalent_age = maturity.equivalent_age
    monkeypatch.setattr(maturity, "equivalent_age", counting)
    _, before = build.check(demo_copy)
    assert sorted(m for m, _ in calls) == ["arrhenius", "nurse_saul"], calls
    assert set(calls.values()) == {1}
    # a warmer first day: a new record, so new equivalent ages (the key is the record itself)
    csv = demo_copy / "lab" / "site-temperature.csv"
    edit(csv, "\n0,10.4\n", "\n0,14.4\n")
    calls.clear()
    _, after = build.check(demo_copy)
    assert len(calls) == 2 and set(calls.values()) == {1}
    te = [res.quantities["M2"]["equivalent_age"].value["wall"] for res in (before, after)]
    assert te[0] != te[1] and all(b >= a for a, b in zip(te[0].values(), te[1].values()))


def test_kept_results_follow_their_key():
    """:func:`fits.once` keeps a result by every input in its key: the same key gives the kept
    result, another key is computed, and outside a pipeline call nothing is kept."""
    made = []

    def make(v):
        made.append(v)
        return v * 2
    with kept_fits.kept():
        assert kept_fits.once(("x", 1.0), lambda: make(1.0)) == 2.0
        assert kept_fits.once(("x", 1.0), lambda: make(99.0)) == 2.0   # kept: not made again
        assert kept_fits.once(("x", 1.5), lambda: make(1.5)) == 3.0    # another input: made
    assert kept_fits.once(("x", 1.0), lambda: make(4.0)) == 8.0        # outside: afresh
    assert made == [1.0, 1.5, 4.0]
