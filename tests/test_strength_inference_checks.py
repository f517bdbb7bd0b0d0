"""Strength inference on copies of the demo: prior and data on the sheet, intervals that match
the decision, characteristic values under both variance assumptions, the narrowing from R1 to
R2, hold ages picked up by the site regime, and the bad records of the issue."""
from __future__ import annotations

import math

import pytest
from scipy import stats

from specgen.build import check
from tests.helpers import by_check, edit
from specgen.errors import InputErrors

HEADER = "specimen,mix,age [d],test,value [MPa],curing_temperature [degC]\n"



def _write(project, rows):
    (project / "lab" / "strength.csv").write_text(HEADER + "\n".join(rows) + "\n")



def _rows(mix, ages_values):
    return [f"{mix}-{a}-{i},{mix},{a},compressive,{v},20" for a, vs in ages_values
            for i, v in enumerate(vs)]


def _no_nan(r):
    for c in r.checks:
        assert not (isinstance(c.value, float) and math.isnan(c.value)), c.key


def test_prior_and_data_side_by_side_on_the_sheet(demo_copy):
    _, r = check(demo_copy)
    inf = by_check(r)[("STR-INF-C", "M1")]
    step = inf.steps[0]
    names = [i.name for i in step.inputs]
    for term in ("fast-stage time constant", "slow-stage time constant",
                 "one-year over 28-day strength"):
        assert f"{term}: prior" in names and f"{term}: prior and data" in names
    prior = next(i for i in step.inputs if i.name == "one-year over 28-day strength: prior")
    assert prior.value == "1.3 to 3.5" and prior.source.startswith("common practice")
    rec = r.quantities["M1"]["strength_inference"].value["compressive"]
    assert rec["family"] == "natural_cement" and not rec["widest"]
    assert rec["lack_of_fit"]["p"] is not None and rec["misfit"] == []
    curve = r.quantities["M1"]["strength_curve"].value["compressive"]
    assert len(curve["ages_d"]) == len(curve["pred_lo"]) == len(curve["mean_hi"])
    assert all(lo <= v <= hi for lo, v, hi in zip(curve["pred_lo"], curve["value"],
                                                     curve["pred_hi"]))


def test_band_narrows_from_r1_to_r2(demo_copy):
    _, r1 = check(demo_copy / "issued" / "R1")      # 1/3/7/28-day record
    _, r2 = check(demo_copy / "issued" / "R2")      # 90 days added
    for age in ("90 d", "365 d"):
        a = r1.quantities["M1"]["predicted_strength"].value["compressive"][age]
        b = r2.quantities["M1"]["predicted_strength"].value["compressive"][age]
        assert b["upper"] / b["lower"] < a["upper"] / a["lower"]
    # R1's band at 90 d covers what R2 then measured (demo data: mean 7.62 MPa at 90 d)
    a90 = r1.quantities["M1"]["predicted_strength"].value["compressive"]["90 d"]
    assert a90["lower"] < 7.62 < a90["upper"]


def test_characteristic_value_under_both_variance_assumptions(demo_copy):
    _, r = check(demo_copy)
    m3 = by_check(r)[("STR-MIN", "M3")]
    step = next(s for s in m3.steps if s.title.startswith("measured at 28 d"))
    vals = {i.symbol: i for i in step.inputs}
    x = [2.80, 2.28, 2.37]                       # demo M3 28 d compressive (MPa)
    mean, sd = sum(x) / 3, stats.tstd(x)         # scipy.stats sample SD
    k_unknown = stats.t.ppf(0.95, 2) * math.sqrt(4 / 3)   # EN 1990 D7.2; Table D1: 3.37
    k_known = stats.norm.ppf(0.95) * math.sqrt(4 / 3)     # EN 1990 D7.2; Table D1: 1.89
    cv = vals["V"].value / 100
    assert vals["f_k,unknown"].value == pytest.approx(mean - k_unknown * sd, abs=1e-3)
    assert vals["f_k,known"].value == pytest.approx(mean * (1 - k_known * cv), abs=1e-3)
    assert vals["f̄"].value == pytest.approx(mean, abs=1e-3)
    assert "prior of the binder family" in vals["V"].source
    # the prior's CV is common practice: it never decides; variance unknown decides (fail)
    assert m3.status == "fail" and "variance unknown decides" in m3.message
    assert "it would be" in m3.message and "rests on the variance assumption" in m3.message


def test_hold_age_is_in_the_site_regime(demo_copy):
    _, r = check(demo_copy)
    acc = r.quantities["M2"]["acceptance"].value["max 365 d"]
    assert acc["status"] == "hold" and acc["hold_age_d"] == 180
    assert 180.0 in r.quantities["Z1"]["sample_sets"].value["ages_d"]   # Z1 chose M2


def test_fewer_than_three_ages_is_not_assessed(demo_copy):
    _write(demo_copy, _rows("M1", [(7, [2.1, 2.2, 2.3]), (28, [4.6, 4.7, 4.9])]))
    _, r = check(demo_copy)
    by = by_check(r)
    inf = by[("STR-INF-C", "M1")]
    assert inf.status == "not_assessed"
    assert inf.message == ("not assessed: results at 2 age(s) (7 d, 28 d); the two-stage law is "
                           "fitted to three or more ages: test at 7, 28 and 90 days")
    assert by[("STR-MIN", "M1")].status == "not_assessed"   # 90 d cannot be predicted
    _no_nan(r)


def test_later_age_weaker_is_held_with_the_reason(demo_copy):
    _write(demo_copy, _rows("M1", [(1, [1.2, 1.2, 1.3]), (7, [2.2, 2.3, 2.4]),
                                   (28, [4.6, 4.8, 4.9]), (90, [2.4, 2.5, 2.6])]))
    _, r = check(demo_copy)
    by = by_check(r)
    inf = by[("STR-INF-C", "M1")]
    assert inf.status == "hold"
    assert "the mean falls from 28 d to 90 d" in inf.message
    assert "check the specimens, their curing and the copying of the results" in inf.message
    assert by[("STR-PRED-C", "M1")].status == "not_assessed"
    assert by[("STR-MAX", "M1")].status == "not_assessed"
    _no_nan(r)


def test_family_without_prior_uses_the_widest(demo_copy):
    edit(demo_copy / "materials.yaml", "    type: natural_cement\n", "    type: portland\n")
    _, r = check(demo_copy)
    inf = by_check(r)[("STR-INF-C", "M1")]
    assert inf.status == "attention"
    assert "no prior for this binder family: the widest prior is used" in inf.notes
    assert r.quantities["M1"]["strength_inference"].value["compressive"]["widest"] is True


def test_carbonating_binder_is_outside_the_maturity_method(demo_copy):
    edit(demo_copy / "materials.yaml", "    type: nhl\n    declared_class: NHL 3.5\n",
          "    type: air_lime\n")
    _, r = check(demo_copy)
    site = by_check(r)[("STR-SITE", "M3")]
    assert site.status == "not_assessed"
    assert "lies outside the maturity method (ASTM C1074)" in site.message
    assert "site-cured companions" in site.message


def test_site_temperature_out_of_range_is_refused_with_its_place(demo_copy):
    edit(demo_copy / "dossier.yaml", "site_temperature: lab/site-temperature.csv",
          'site_temperature: "65 degC"')
    with pytest.raises(InputErrors) as exc:
        check(demo_copy)
    # the line of the demo dossier.yaml that holds site_temperature, found here by reading it
    line = next(i for i, text in enumerate((demo_copy / "dossier.yaml").read_text(
        encoding="utf-8").splitlines(), 1) if text.startswith("site_temperature:"))
    assert str(exc.value) == (f"dossier.yaml, line {line}: site_temperature: temperature 65.0 °C is "
                              "above the "
                              "range -10 to 60 °C in which the maturity method is applied. Fix: "
                              "check the unit (°C, °F or K).")
