"""Check results pinned to values worked out by hand from the demo's input files (never to the
checks' own output): SPEC-COST, SPEC-PANEL, SITE-WEATHER, CHEM-RATIOS, CHEM-PASTE and the
density-set switch."""
from __future__ import annotations

import csv

import periodictable
import pytest

from specgen.build import check
from tests.conftest import shared_scope

M = lambda f: periodictable.formula(f).mass  # noqa: E731  reference library molar masses


def edit(path, old: str, new: str) -> None:
    text = path.read_text(encoding="utf-8")
    assert old in text, f"test setup: {old!r} not in {path.name}"
    path.write_text(text.replace(old, new, 1), encoding="utf-8")


def by(results):
    return {(c.code, c.subject): c for c in results.checks}


@pytest.fixture(scope=shared_scope("module"))
def demo(demo_checked):
    return demo_checked


# ---------------------------------------------------------------- SPEC-COST
# Mortar volumes by hand (test_works_checks): Z1 0.85235 m³ on 240 m², Z2 1.87 m³ on 85 m²;
# prices per m³ from demo specification.yaml unit_prices: M1 1650, M2 1480, M3 1320.
@pytest.mark.parametrize("subject, cost", [
    ("Z1/M1", 5.86),    # 1650 x 0.85235 / 240 = 5.8599
    ("Z1/M2", 5.26),    # 1480 x 0.85235 / 240 = 5.2562
    ("Z1/M3", 4.69),    # 1320 x 0.85235 / 240 = 4.6879
    ("Z2/M1", 36.30),   # 1650 x 1.87 / 85 = 36.300
    ("Z2/M2", 32.56),   # 1480 x 1.87 / 85 = 32.560
])
def test_cost_per_m2_by_hand(demo, subject, cost):
    _, r = demo
    c = by(r)[("SPEC-COST", subject)]
    assert (c.status, c.value, c.unit) == ("info", cost, "GBP/m²")
    assert r.quantities[subject]["cost_per_m2"].value == cost


def test_cost_not_assessed_without_an_area_and_priced_per_other_quantity(demo, demo_copy):
    _, r = demo
    for subject in ("Z3/M2", "Z3/M3"):       # Z3 is bedding by masonry volume: no wall area
        c = by(r)[("SPEC-COST", subject)]
        assert (c.status, c.message) == ("not_assessed", "not assessed: no wall area for the zone")
    # priced per 0.5 m³ instead of 1 m³: 1650/0.5 x 0.85235/240 = 11.7198 -> 11.72
    edit(demo_copy / "specification.yaml", '{mix: M1, price: 1650, per: "1 m^3"',
         '{mix: M1, price: 1650, per: "0.5 m^3"')
    _, r2 = check(demo_copy)
    assert by(r2)[("SPEC-COST", "Z1/M1")].value == 11.72
    assert by(r2)[("SPEC-COST", "Z1/M1")].message == \
        "11.72 GBP/m² (1650 GBP per 0.5 m³ × 0.852 m³ / 240 m²)"


# ---------------------------------------------------------------- SPEC-PANEL
TP2 = ("    judgement: accepted\n    judged_dry: true\n    judged_on: 2026-10-20\n"
       "    remarks: Slightly lighter")


@pytest.mark.parametrize("new, status, value, message", [
    # the verdict table of the check (common practice: panels judged dry decide):
    (TP2, "pass", 1, "TP2 of M2 accepted, judged dry"),
    (TP2.replace("judged_dry: true", "judged_dry: false"), "attention", 0,
     "no panel of M2 accepted when dry yet (TP2 accepted, judged before it was dry)"),
    (TP2.replace("accepted", "rejected"), "fail", 0,
     "every trial panel of M2 was rejected: choose again or build a new panel"),
    (TP2.replace("judgement: accepted\n    judged_dry: true\n    judged_on: 2026-10-20\n",
                 "judgement: pending\n"), "attention", 0,
     "no panel of M2 accepted when dry yet (TP2 pending)"),
])
def test_trial_panel_verdicts(demo_copy, new, status, value, message):
    # Z1's chosen mix is M2 (demo specification.yaml); TP2 is its only panel there.
    edit(demo_copy / "specification.yaml", TP2, new)
    _, r = check(demo_copy)
    c = by(r)[("SPEC-PANEL", "Z1")]
    assert (c.status, c.value, c.message) == (status, value, message)


TP4 = "    mix: M2\n    zone: Z2\n    date: 2026-11-10\n"
TP4_NOZONE = "    mix: M2\n    date: 2026-11-10\n"


@pytest.mark.parametrize("tp2, tp4, status, value, message", [
    # Two panels of M2 for Z1 (TP4's zone left out: a panel for no zone counts in every zone
    # that chose its mix).  The verdict table (common practice): any panel accepted when dry
    # passes, naming every such panel; every panel rejected fails; otherwise attention, naming
    # each panel with its state, in the order of specification.yaml.
    (TP2, "judgement: pending", "pass", 1, "TP2 of M2 accepted, judged dry"),
    (TP2, "judgement: accepted\n    judged_dry: true", "pass", 2,
     "TP2 and TP4 of M2 accepted, judged dry"),
    (TP2.replace("accepted", "rejected"), "judgement: pending", "attention", 0,
     "no panel of M2 accepted when dry yet (TP2 rejected, judged dry; TP4 pending)"),
    (TP2.replace("accepted", "rejected"), "judgement: rejected\n    judged_dry: false",
     "fail", 0, "every trial panel of M2 was rejected: choose again or build a new panel"),
])
def test_trial_panel_verdicts_over_two_panels(demo_copy, tp2, tp4, status, value, message):
    spec = demo_copy / "specification.yaml"
    edit(spec, TP2, tp2)
    edit(spec, TP4, TP4_NOZONE)
    edit(spec, "location: parapet, coping band beside the lamp standard\n    reviewer: reviewer\n"
         "    judgement: pending", "location: parapet, coping band beside the lamp standard\n"
         "    reviewer: reviewer\n    " + tp4)
    _, r = check(demo_copy)
    c = by(r)[("SPEC-PANEL", "Z1")]
    assert (c.status, c.value, c.message) == (status, value, message)
    assert set(r.quantities["Z1"]["trial_panel"].value) == {"TP2", "TP4"}
    # TP1 (M1) is of another mix: never counted for Z1's M2


def test_trial_panel_missing_for_the_zone(demo, demo_copy):
    _, r = demo
    assert by(r)[("SPEC-PANEL", "Z3")].status == "attention"     # TP3 pending (demo)
    edit(demo_copy / "specification.yaml", "    mix: M2\n    zone: Z1\n", "    mix: M2\n    zone: Z2\n")
    _, r2 = check(demo_copy)
    c = by(r2)[("SPEC-PANEL", "Z1")]
    assert (c.status, c.value, c.message) == (
        "attention", 0, "no trial panel of M2 is recorded for zone Z1")


# ---------------------------------------------------------------- SITE-WEATHER
def test_days_outside_the_window_counted_from_the_demo_record(demo):
    from tests.conftest import DEMO
    # Independent count from demo lab/site-temperature.csv with the window of
    # content/rules/works.yaml (5 to 30 °C, common practice: no work at or below 5 °C)
    with open(DEMO / "lab" / "site-temperature.csv", encoding="utf-8") as f:
        rows = [(float(r["day [d]"]), float(r["temperature [degC]"])) for r in csv.DictReader(f)]
    outside = [(d, t) for d, t in rows if t <= 5.0 or t > 30.0]
    assert (len(rows), len(outside)) == (366, 29)
    _, r = demo
    c = by(r)[("SITE-WEATHER", "WEP-2026")]
    assert (c.status, c.value) == ("attention", 29)
    got = r.quantities["WEP-2026"]["days_outside_window"].value
    assert [(o["day"], o["temperature"]) for o in got] == outside
    assert r.quantities["WEP-2026"]["weather_window"].value == {
        "low": 5.0, "high": 30.0, "curing_days": 5.0, "protection_days": 7.0}


def test_window_boundaries(demo_copy):
    # 5.0 °C is outside (at or below the lowest working temperature); 30.0 °C is inside, 30.1
    # outside; 5.1 and 12 inside; 4.9 outside -> days 0, 3, 5: 2 cold + 1 hot = 3 (by hand)
    (demo_copy / "lab" / "site-temperature.csv").write_text(
        "day [d],temperature [degC]\n0,5.0\n1,5.1\n2,30.0\n3,30.1\n4,12\n5,4.9\n",
        encoding="utf-8")
    _, r = check(demo_copy)
    c = by(r)[("SITE-WEATHER", "WEP-2026")]
    assert (c.status, c.value) == ("attention", 3)
    # the demo's record starts on 2027-04-05 (dossier.yaml site_temperature_from): days 0, 3
    # and 5 are 5, 8 and 10 April 2027 (by hand)
    assert r.quantities["WEP-2026"]["days_outside_window"].value == [
        {"day": 0.0, "temperature": 5.0, "side": "cold", "date": "2027-04-05"},
        {"day": 3.0, "temperature": 30.1, "side": "hot", "date": "2027-04-08"},
        {"day": 5.0, "temperature": 4.9, "side": "cold", "date": "2027-04-10"}]
    assert c.message == ("place mortar only between 5 and 30 °C; keep damp 5 d and protect 7 d; "
                         "3 of 6 days of lab/site-temperature.csv fall outside (5 April 2027, "
                         "8 April 2027, 10 April 2027): plan protection or no work")
    assert c.steps[0].substituted == r"2\ \text{cold} + 1\ \text{hot}\ \text{of}\ 6"
    # a record that does not say which day is day 0 keeps its day numbers, and says so
    edit(demo_copy / "dossier.yaml", "site_temperature_from: 2027-04-05\n", "")
    _, r = check(demo_copy)
    c = by(r)[("SITE-WEATHER", "WEP-2026")]
    assert [o["date"] for o in r.quantities["WEP-2026"]["days_outside_window"].value] == \
        [None, None, None]
    assert c.message.endswith("(days 0, 3, 5 after placement; the record is not dated): "
                              "plan protection or no work")


def test_constant_site_temperature_inside_and_outside(demo_copy):
    edit(demo_copy / "dossier.yaml", "site_temperature: lab/site-temperature.csv",
         'site_temperature: "8 degC"')
    _, r = check(demo_copy)
    c = by(r)[("SITE-WEATHER", "WEP-2026")]
    assert (c.status, c.value) == ("pass", 0)
    edit(demo_copy / "dossier.yaml", 'site_temperature: "8 degC"', 'site_temperature: "5 degC"')
    _, r2 = check(demo_copy)
    c2 = by(r2)[("SITE-WEATHER", "WEP-2026")]
    assert (c2.status, c2.value) == ("attention", 1)


def test_no_site_record_is_information_only(demo_copy):
    edit(demo_copy / "dossier.yaml", "site_temperature: lab/site-temperature.csv\n", "")
    _, r = check(demo_copy)
    c = by(r)[("SITE-WEATHER", "WEP-2026")]
    assert (c.status, c.value) == ("info", None)
    assert c.message.endswith("; no site temperature record is given")
    assert "days_outside_window" not in r.quantities["WEP-2026"]


# ---------------------------------------------------------------- CHEM-RATIOS
@pytest.mark.parametrize("analysis, sr, ar, message", [
    # demo analyses.yaml; silica ratio S/(A+F), alumina ratio A/F (Taylor, from memory)
    ("NC1-A", 1.748, 1.9286, "SR = 1.75, AR = 1.93 (for information)"),   # 21.5/12.3, 8.1/4.2
    ("NHL-A", 3.5, 1.6667, "SR = 3.50, AR = 1.67 (for information)"),     # 14/4.0, 2.5/1.5
    ("HM1-B", 1.8173, 1.8889, "SR = 1.82, AR = 1.89 (for information)"),  # 18.9/10.4, 6.8/3.6
])
def test_silica_and_alumina_ratios_by_hand(demo, analysis, sr, ar, message):
    _, r = demo
    c = by(r)[("CHEM-RATIOS", analysis)]
    assert (c.status, c.message) == ("info", message)
    assert c.value == pytest.approx(sr, abs=1e-4)
    assert r.quantities[analysis]["silica_ratio"].value == pytest.approx(sr, abs=1e-4)
    assert r.quantities[analysis]["alumina_ratio"].value == pytest.approx(ar, abs=1e-4)


def test_alumina_ratio_not_assessed_without_iron(demo_copy):
    edit(demo_copy / "analyses.yaml", "SiO2: 14.0, Al2O3: 2.5, Fe2O3: 1.5, CaO: 62.0",
         "SiO2: 14.0, Al2O3: 2.5, CaO: 63.5")
    _, r = check(demo_copy)
    c = by(r)[("CHEM-RATIOS", "NHL-A")]
    # SR = 14.0 / (2.5 + 0) = 5.6
    assert (c.status, c.value) == ("info", 5.6)
    assert c.message == "SR = 5.60; AR not assessed: no Fe2O3 reported (for information)"
    assert "alumina_ratio" not in r.quantities["NHL-A"]


# ---------------------------------------------------------------- CHEM-PASTE
def _porosity(wb, f, dens, alpha=0.7):
    """Powers' capillary porosity written out (per kg binder), products of the belite
    reaction C2S + 4.3 H -> C1.7SH4 + 0.3 CH at the set's densities (kg/m3)."""
    m_c2s = M("Ca2SiO4") / 1000
    v_prod = (M("(CaO)1.7SiO2(H2O)4") / 1000 / dens["C1.7SH4"]
              + 0.3 * M("Ca(OH)2") / 1000 / dens["CH"]) / m_c2s
    vp = f * v_prod + (1 - f) / dens["C2S"]
    v0 = 1 / dens["C2S"] + wb / dens["H"]
    return 100 * (v0 - (1 - alpha) / dens["C2S"] - alpha * vp) / v0


BENTZ = {"C2S": 3280.0, "H": 997.1, "CH": 2240.0, "C1.7SH4": 2110.0}    # Bentz, NIST tables
ROUNDED = {"C2S": 3300.0, "H": 1000.0, "CH": 2240.0, "C1.7SH4": 2000.0}  # common practice
# Potential belite with the default amorphous aluminate assignment (lime suffices):
# C2S = S x M(C2S)/M(SiO2) = 2.86665 S -> NC1-A 21.5 -> 61.633 %, NHL-A 14.0 -> 40.133 %
F_NC1 = 21.5 * M("Ca2SiO4") / M("SiO2") / 100
F_NHL = 14.0 * M("Ca2SiO4") / M("SiO2") / 100


@pytest.mark.parametrize("mix, wb, f", [("M1", 0.55, F_NC1), ("M2", 0.65, F_NC1),
                                        ("M3", 0.75, F_NHL)])
def test_paste_statuses_and_porosity_by_hand(demo, mix, wb, f):
    _, r = demo
    c = by(r)[("CHEM-PASTE", mix)]
    assert c.status == "info"
    assert c.value == pytest.approx(_porosity(wb, f, BENTZ), abs=2e-3)
    assert "set 'bentz_nist'" in c.message


def test_density_set_switch_changes_the_paste_and_the_shrinkage(demo, demo_copy):
    _, r = demo
    edit(demo_copy / "dossier.yaml", "works:\n", "chemistry:\n  density_set: rounded_practice\n\n"
         "works:\n")
    _, r2 = check(demo_copy)
    c = by(r2)[("CHEM-PASTE", "M1")]
    assert c.status == "info" and "set 'rounded_practice'" in c.message
    assert c.value == pytest.approx(_porosity(0.55, F_NC1, ROUNDED), abs=2e-3)
    assert abs(c.value - by(r)[("CHEM-PASTE", "M1")].value) > 1.0
    # chemical shrinkage of C2S + 4.3 H -> C1.7SH4 + 0.3 CH, % of reactant volume, by the
    # chosen set (volumes n M / rho with periodictable); DOMAIN primer: ~9.6 % with Bentz
    # (computed) and ~4.5 % with a C-S-H of about 2.0 g/cm3 (common practice)
    def shrink(d):
        v = {"C2S": M("Ca2SiO4") / d["C2S"], "H": 4.3 * M("H2O") / d["H"],
             "CSH": M("(CaO)1.7SiO2(H2O)4") / d["C1.7SH4"], "CH": 0.3 * M("Ca(OH)2") / d["CH"]}
        return 100 * (v["C2S"] + v["H"] - v["CSH"] - v["CH"]) / (v["C2S"] + v["H"])
    assert shrink(BENTZ) == pytest.approx(9.6, abs=0.1)
    assert shrink(ROUNDED) == pytest.approx(4.5, abs=0.6)
    assert r.quantities["NC1"]["chemical_shrinkage"].value == pytest.approx(shrink(BENTZ), abs=0.01)
    assert r2.quantities["NC1"]["chemical_shrinkage"].value == pytest.approx(shrink(ROUNDED),
                                                                           abs=0.01)


def test_paste_not_assessed_without_a_water_binder_ratio(demo_copy):
    # Powers' porosity needs w/b (V0 = 1/rho_b + (w/b)/rho_w): without it the paste of M2 is
    # not assessed, and M1 and M3, which still give theirs, keep their result
    edit(demo_copy / "mixes.yaml", "    water_binder_ratio: 0.65\n", "")
    _, r = check(demo_copy)
    c = by(r)[("CHEM-PASTE", "M2")]
    assert (c.status, c.value, c.message) == (
        "not_assessed", None, "not assessed: the mix gives no mixes.yaml M2.water_binder_ratio")
    assert by(r)[("CHEM-PASTE", "M1")].value == pytest.approx(_porosity(0.55, F_NC1, BENTZ),
                                                              abs=2e-3)
    assert by(r)[("CHEM-PASTE", "M3")].status == "info"
