"""Which prior a mix's strength record is read with (``strength_prior_common.family``), the age
a hold names (``hold_age``), the curve ages of the figures (``curve_ages``) and the set size
(``set_size``), on hand-made projects built in memory.

The rows a family may take are the keys of ``content/data/strength_priors.yaml`` (its ``data``
table); the words a family is written in are the dossier's names of the binder families
(``specgen.views.FAMILIES``: the trade's names, EN 459-1's notation for the limes).  The set
size default is the rule ``specification.prisms_per_set`` (three prisms per age, EN 1015-11,
common practice).
"""
from __future__ import annotations

from types import SimpleNamespace as NS

import numpy as np
import pytest

from specgen import refdata
from specgen.checks import strength_prior_common as spc

WIDEST = (": no prior for this binder family in content/data/strength_priors.yaml, so the "
          "widest prior is used (the band is as wide as the families allow)")


def _family(*binders):
    """``family`` of a mix of ``binders`` ((type, declared class) pairs, ids B0, B1, ...)."""
    found = {f"B{i}": NS(id=f"B{i}", type=t, declared_class=c)
             for i, (t, c) in enumerate(binders)}
    mix = NS(binders=[NS(binder=b) for b in found] + [NS(binder="ABSENT")])
    return spc.family(NS(binders=found), mix)


@pytest.mark.parametrize("binders, row, reason", [
    ([("natural_cement", "")], "natural_cement", "binder family natural cement"),
    ([("nhl", "NHL 3.5")], "nhl_3_5",
     "binder family natural hydraulic lime, declared NHL 3.5"),
    ([("nhl", "nhl  2")], "nhl_2", "binder family natural hydraulic lime, declared nhl  2"),
    ([("nhl", "NHL 5"), ("nhl", "NHL 5")], "nhl_5",
     "binder family natural hydraulic lime, declared NHL 5"),
    # two classes, a class EN 459-1 does not have, or none: the family's own row
    ([("nhl", "NHL 2"), ("nhl", "NHL 5")], "nhl",
     "binder family natural hydraulic lime (no single declared class)"),
    ([("nhl", "NHL 4")], "nhl", "binder family natural hydraulic lime (no single declared class)"),
    ([("nhl", "")], "nhl", "binder family natural hydraulic lime (no single declared class)"),
    ([("fl", "FL B 3.5")], "formulated_lime", "binder family formulated lime (FL)"),
    ([("hl", "HL 5"), ("fl", "")], "formulated_lime",
     "binder family formulated lime (FL) + hydraulic lime (HL)"),
    ([("pozzolan", ""), ("air_lime", "CL 90")], "lime_pozzolan",
     "binder family hydrated (air) lime with pozzolan"),
    ([("portland", ""), ("air_lime", "")], "cement_lime",
     "binder family cement-lime (air lime + Portland cement)"),
    ([("portland", ""), ("nhl", "NHL 2"), ("pozzolan", "")], "cement_lime",
     "binder family cement-lime (natural hydraulic lime (NHL) + Portland cement + pozzolan)"),
    ([("air_lime", "")], "air_lime", "binder family air lime (hardens by carbonation)"),
])
def test_family_row_and_reason(binders, row, reason):
    assert row in refdata.load("strength_priors").data        # a row of the table
    fam = _family(*binders)
    assert (fam.prior.family, fam.reason, fam.widest) == (row, reason, False)


@pytest.mark.parametrize("binders, reason", [
    # Portland with pozzolan only is no cement-lime; a cement with a formulated lime and a
    # mix with no binder in the project have no row: the widest prior, and the sheet says so
    ([("portland", ""), ("pozzolan", "")], "binder family Portland cement + pozzolan"),
    ([("portland", ""), ("fl", "")], "binder family formulated lime (FL) + Portland cement"),
    ([("portland", "")], "binder family Portland cement"),
    ([("natural_cement", ""), ("nhl", "NHL 5")],
     "binder family natural cement + natural hydraulic lime (NHL)"),
    ([], "binder family no binder"),
])
def test_a_family_without_a_row_takes_the_widest_prior(binders, reason):
    fam = _family(*binders)
    assert (fam.prior.family, fam.reason, fam.widest) == ("widest", reason + WIDEST, True)


@pytest.mark.parametrize("target, last, limit, ages, expected", [
    # the earliest test age after the last one tested (strictly after) that brings the
    # target within ``limit`` times it: 365 d from a 28-d record with a limit of 4 needs a
    # test at 91.25 d or later; 90 d gives 360 < 365, 180 d gives 720 >= 365
    (365.0, 28.0, 4.0, [7, 28, 90, 180, 365], 180.0),
    (360.0, 28.0, 4.0, [365, 90, 28], 90.0),        # 90 x 4 = 360: on the limit, enough
    (100.0, 90.0, 4.0, [56, 90], 100.0),            # 90 is no later than the last: the target
    (60.0, 28.0, 4.0, [90], 60.0),                  # a candidate beyond the target: the target
    (80.0, 28.0, 2.5, [], 80.0),                    # no candidate: the target itself
])
def test_hold_age(target, last, limit, ages, expected):
    got = spc.hold_age(target, last, limit, ages)
    assert (got, type(got)) == (expected, float)


def test_curve_ages_span_and_28_days():
    # 90 geometrically spaced ages from 0.25 d to the larger of the top and the last age,
    # plus 28 d (numpy.geomspace: a constant ratio (top/0.25)^(1/89))
    ages = spc.curve_ages(200.0, 365.0)
    assert (ages[0], ages[-1], ages.size) == (0.25, pytest.approx(365.0), 91)
    assert 28.0 in ages and np.all(np.diff(ages) > 0)
    ratio = (365.0 / 0.25) ** (1 / 89)
    geo = ages[ages != 28.0]
    assert geo[1:] / geo[:-1] == pytest.approx(np.full(89, ratio))
    assert spc.curve_ages(400.0, 90.0)[-1] == pytest.approx(400.0)     # the last age governs


def test_set_size_from_the_specification_else_the_rule():
    rules = {"specification.prisms_per_set": NS(value=3)}      # rule: three prisms per age
    spec = NS(doc=NS(site_tests=NS(prisms_per_set=6)))
    assert (spc.set_size(NS(specification=spec), rules), spc.set_size(NS(), rules)) == (6, 3)
    none_given = NS(doc=NS(site_tests=NS(prisms_per_set=None)))
    got = spc.set_size(NS(specification=none_given), {"specification.prisms_per_set":
                                                      NS(value=3.0)})
    assert (got, type(got)) == (3, int)


# ------------------------------------------------------------------ the fit judged (infer)
def _record(means, spread):
    """A compressive record of mix M1, three prisms per age at mean·(1 − spread, 1, 1 + spread)
    (MPa), cured at 20 °C, with the demo project's binders (NC1: natural cement)."""
    from specgen.checks import strength_common as sc
    from specgen.checks.rules import RuleBook
    from specgen.project import load_project
    from tests.conftest import DEMO
    project = load_project(DEMO)
    rules = RuleBook()
    rows = [NS(specimen=f"R{a}-{k}", mix="M1", age=a * 86400.0, test="compressive",
               value=m * (1 + k * spread) * 1e6, curing_temperature=None, row=2, file="x.csv")
            for a, m in means for k in (-1, 0, 1)]
    series = sc._series(("M1", "compressive"), rows, sc.settings(project), rules,
                        {"low_mpa": 0.05, "high_mpa": 100.0}, project)
    fam = spc.family(project, project.mixes["M1"])
    return series, fam, rules


def test_infer_names_a_mean_the_band_misses_and_a_set_interval_that_misses():
    # a bump at 7 d (3.5 MPa between 1.8 at 3 d and 4.8 at 28 d), tight replicates (±1 %): the
    # band for the mean curve misses the 7-d mean, the interval for a set does not — a
    # batch-to-batch scatter, not a misfit
    series, fam, rules = _record([(1, 1.2), (3, 1.8), (7, 3.5), (28, 4.8), (90, 7.6)], 0.01)
    run = spc.infer(series, fam, rules)
    assert (run.mean_misses, run.outside, run.misfit, run.falls, run.error) == (
        (7.0,), (), (), (), "")
    assert run.ok
    # a record no two-stage law follows (0.3 MPa at 1 d, 4 MPa at 3 d, flat to 28 d, 12 at
    # 90 d; ±0.5 %): lack of fit even with the prior's largest batch scatter (12 %, the
    # natural-cement row of strength_priors.yaml), and set intervals missing measured means
    series, fam, rules = _record([(1, 0.3), (3, 4.0), (7, 4.2), (28, 4.3), (90, 12.0)], 0.005)
    run = spc.infer(series, fam, rules)
    assert not run.ok and run.falls == ()
    lof, miss = run.misfit
    assert lof.startswith("lack of fit: p = ") and lof.endswith(
        " below 0.05 even allowing the prior's largest batch-to-batch scatter (12 %)")
    assert float(lof.split("p = ")[1].split()[0]) < 0.05
    assert [a for a, *_ in run.outside] == [1.0, 3.0]
    for age, mean, lo, hi in run.outside:              # each measured mean outside its interval
        assert not lo <= mean <= hi
    assert miss == "the interval for a set misses the measured mean at " + ", ".join(
        f"{a:.4g} d ({m:.3g} MPa outside [{lo:.3g}, {hi:.3g}])" for a, m, lo, hi in run.outside)
    assert miss.startswith("the interval for a set misses the measured mean at 1 d (0.3 MPa "
                           "outside [")


def test_infer_holds_two_falls_and_refuses_implausible_values():
    # the mean falls from 7 to 28 d and from 56 to 90 d to half its value: both named, one
    # sentence each, and the record is not used
    series, fam, rules = _record([(1, 1.2), (7, 4.0), (28, 2.0), (56, 5.0), (90, 2.5)], 0.01)
    run = spc.infer(series, fam, rules)
    assert [(a, b) for a, b, _ in run.falls] == [(7.0, 28.0), (56.0, 90.0)]
    assert run.error == (
        "the mean falls from 7 d to 28 d to 50 % of its value, more than the scatter explains; "
        "the mean falls from 56 d to 90 d to 50 % of its value, more than the scatter explains"
        ": check the specimens, their curing and the copying of the results, and retest; the "
        "record is not used to predict")
    assert not run.ok and run.misfit == ()
    series.implausible = ["R7-0 (row 2): 4e+06 Pa"]
    run = spc.infer(series, fam, rules)
    assert (run.inference, run.ok) == (None, False)
    assert run.error == ("results of implausible magnitude (see the aggregation check): correct "
                         "the unit or the values before the strength can be inferred")
