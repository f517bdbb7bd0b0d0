"""Durability checks on copies of the demo project: exposure, frost, thaumasite and ettringite,
soundness, setting, water retention, render bond, carbonation, the tests asked for — and bad
input, asserted word for word.  Limits: content/rules/durability.yaml (each value's source is
named beside it here: a standard recalled from memory, or common practice)."""
from __future__ import annotations

import pytest

from specgen.build import check
from tests.conftest import shared_scope
from specgen.checks.result import Basis, Input, Quantity, Step
from tests.helpers import by_check, edit

pytestmark = pytest.mark.costly(17)   # CPU s (tests/conftest.py)

#: the demo's designations with what their classes mean (content/data/exposure_classes.yaml,
#: EN 1996-2 wording, tagged memory there)
MX31 = ("MX4 with MX3.1 (saturated salt air, sea water or de-icing salts; moisture or wetting "
        "plus freeze–thaw cycling)")
MX32 = ("MX4 with MX3.2 (saturated salt air, sea water or de-icing salts; severe wetting plus "
        "freeze–thaw cycling)")


def _run_bad(cli, project) -> str:
    result = cli("check", project)
    assert result.exit_code == 2, result.output
    assert "Traceback" not in result.output
    return result.output


@pytest.fixture(scope=shared_scope("module"))
def demo(tmp_path_factory):
    import shutil
    from tests.conftest import DEMO
    dst = tmp_path_factory.mktemp("dur") / "project"
    shutil.copytree(DEMO, dst)
    return check(dst)[1]


# ---------------------------------------------------------------- exposure
def test_exposure_class_of_each_demo_zone(demo):
    r = by_check(demo)
    # EN 1996-2:2006, 2.1.2.1 (3): MX4 "exposed to saturated salt air or seawater", MX3
    # "moisture or wetting plus freeze/thaw cycling" (read in a copy not cited, so still
    # memory); the sub-classes of its Annex A from memory: moisture + frost → MX3.1, severe
    # wetting + frost → MX3.2 (demo: freezing site, -4 °C)
    assert (r[("DUR-EXPOSE", "Z1")].basis[0].ref, r[("DUR-EXPOSE", "Z1")].basis[0].clause) == (
        "en1996_2", "2.1.2.1 (3) and Annex A, Table A.1")
    assert {z: r[("DUR-EXPOSE", z)].value for z in ("Z1", "Z2", "Z3")} == {
        "Z1": "MX4 with MX3.1", "Z2": "MX4 with MX3.2", "Z3": "MX4 with MX3.2"}
    z3 = r[("DUR-EXPOSE", "Z3")]
    assert z3.status == "info" and z3.message.startswith(
        f"{MX32}: splash: severe wetting; salt source: splash and wave overtopping; "
        "tidal: severe wetting; salt source: tidal wetting and drying; severe wetting "
        "(MX2.2/MX3.2); freezing site and the masonry wet → freeze-thaw cycling → MX3.2")
    # the words read from the zone's free text are shown as the inputs' sources
    assert {i.source for i in z3.steps[0].inputs} == {"dossier.yaml Z3.exposure: 'splash'",
                                                      "dossier.yaml Z3.exposure: 'tidal'"}
    q = demo.quantities["Z3"]["exposure_class"].value
    assert q["american"]["recommended"] == "S" and q["american"]["weathering"] == "severe"
    assert "dossier.yaml practice: european" in z3.notes       # the demo's practice.follows


def test_exposure_conditions_win_over_the_text(demo_copy):
    edit(demo_copy / "dossier.yaml", "    exposure: tidal splash zone\n",
          "    exposure: tidal splash zone\n    exposure_conditions: [submerged]\n")
    _, r = check(demo_copy)
    c = by_check(r)[("DUR-EXPOSE", "Z3")]
    assert c.value == "MX4 with MX2.2"     # immersed: not cycled by frost (EN 1996-2 Annex A, memory)
    assert c.steps[0].inputs[0].source == "dossier.yaml Z3.exposure_conditions: exposure_conditions"
    assert by_check(r)[("DUR-FROST", "Z3/M3")].status == "pass"


def test_unrecognised_exposure_is_not_assessed(demo_copy):
    edit(demo_copy / "dossier.yaml", "    exposure: tidal splash zone\n",
          "    exposure: moderate\n")
    _, r = check(demo_copy)
    c = by_check(r)[("DUR-EXPOSE", "Z3")]
    assert c.status == "not_assessed" and c.message.startswith(
        "not assessed: the exposure of zone Z3 ('moderate') names no condition the checks read; "
        "give 'exposure_conditions:' in dossier.yaml, from: internal, sheltered, exposed,")
    assert by_check(r)[("DUR-FROST", "Z3/M3")].message == (
        "not assessed: no exposure class for zone Z3 (see DUR-EXPOSE)")


def test_unknown_frost_holds_the_frost_check(demo_copy):
    edit(demo_copy / "dossier.yaml", "  freezing: true\n", "")
    _, r = check(demo_copy)
    assert by_check(r)[("DUR-EXPOSE", "Z1")].status == "attention"
    c = by_check(r)[("DUR-FROST", "Z1/M1")]
    assert c.status == "hold" and c.message == (
        "the site's frost is not stated: give durability.freezing in dossier.yaml (true where "
        "winter air falls below 0 °C)")


# ---------------------------------------------------------------- frost
def test_frost_requirement_against_the_mix(demo):
    r = by_check(demo)
    m1 = r[("DUR-FROST", "Z1/M1")]
    # MX4 → the severe regime: 50 cycles, mass loss ≤ 5 %, strength loss ≤ 20 % (common
    # practice); demo M1: 50 cycles, 1.8 %, 14 %
    assert m1.status == "pass" and m1.value == 50 and m1.limit.low == 50
    # the class with its words (content/data/exposure_classes.yaml, EN 1996-2 wording)
    assert m1.message == (f"{MX31}: 50 of 50 cycles; mass loss 1.8 % (limit 5 %); "
                          "strength loss 14 % (limit 20 %)")
    air = {i.symbol: i for i in m1.steps[0].inputs}["a"]
    assert air.value == 4.5 and air.source == "mixes.yaml M1.air_content (measured)"
    m3 = r[("DUR-FROST", "Z3/M3")]
    assert m3.status == "hold" and m3.message.startswith(
        f"{MX32} asks for a declared freeze–thaw resistance; M3 has none: commission at "
        "least 50 cycles on water-saturated prisms 40 × 40 × 160 mm by the provisions valid at "
        "the place of use (EN 998-2 gives no European method), reporting mass loss and strength "
        "loss against unfrozen companions — the indicators weigh")
    assert demo.quantities["Z3/M3"]["tests_asked"].value[0]["check"] == "DUR-FROST"


def test_frost_test_beyond_the_limit_fails(demo_copy):
    edit(demo_copy / "materials.yaml", 'mass_loss: "1.8 %"', 'mass_loss: "6.5 %"')
    _, r = check(demo_copy)
    c = by_check(r)[("DUR-FROST", "Z1/M1")]
    assert c.status == "fail" and "mass loss 6.5 % (limit 5 %)" in c.message


def _mean_28d(mix: str) -> float:
    """28-d mean compressive strength of ``mix`` from the demo's laboratory table, by hand."""
    import csv

    from tests.conftest import DEMO
    with open(DEMO / "lab" / "strength.csv", encoding="utf-8") as f:
        vals = [float(r["value [MPa]"]) for r in csv.DictReader(f)
                if r["mix"] == mix and r["age [d]"] == "28" and r["test"] == "compressive"]
    assert len(vals) == 3
    return sum(vals) / len(vals)


def test_frost_indicators_weigh_in_the_verdict(demo):
    r = by_check(demo)
    # Z3 is MX4 with MX3.2 (severe): NHL 5 or a cement, a measured air content >= 4 % and a
    # 28-d mean >= 2.5 MPa (EN 998-2 class M2.5) count for frost (common practice).  M3 is
    # NHL 3.5 with no measured air and a 28-d mean below M2.5: the hold names them.
    m3 = r[("DUR-FROST", "Z3/M3")]
    f28 = _mean_28d("M3")
    assert f28 < 2.5
    assert m3.status == "hold" and m3.message.endswith(
        f"— the indicators weigh against the mix: lime class 3.5 < 5; 28-d strength "
        f"{f28:.3g} MPa < 2.5 MPa")
    ind = m3.steps[0]
    assert ind.substituted == (rf"B = 3.5 < 5,\quad a:\ \text{{not measured}},\quad "
                               rf"f_{{c,28}} = {f28:.3g} < 2.5")
    assert ind.result == 0.0          # none of the three indicators met
    got = {i.symbol: i for i in ind.inputs}
    assert got["B"].source == "materials.yaml NH35.declared_class"
    assert got["f_c28"].value == pytest.approx(f28, abs=1e-3)
    assert got["a"].name.endswith("(assumed: does not count)")
    # M1: natural cement, 4.5 % air measured, 28-d mean above 2.5 MPa: all three met, and
    # its 50-cycle test passed, so the verdict stays a pass
    m1 = r[("DUR-FROST", "Z1/M1")]
    assert _mean_28d("M1") >= 2.5
    assert m1.status == "pass" and m1.steps[0].result == 3.0
    assert m1.steps[0].substituted.startswith(r"B:\ \text{NC1 is a cement},\quad a = 4.5\,\% "
                                              r"\ge 4\,\%")


def test_passed_frost_test_with_too_little_air_is_attention(demo_copy):
    edit(demo_copy / "mixes.yaml", 'air_content: "4.5 %"', 'air_content: "3 %"')
    _, r = check(demo_copy)
    c = by_check(r)[("DUR-FROST", "Z1/M1")]
    # 3 % < 4 % (frost_air_min, common practice): the passed test stands, the air does not
    assert c.status == "attention" and c.message == (
        f"{MX31}: 50 of 50 cycles; mass loss 1.8 % (limit 5 %); strength loss 14 % "
        "(limit 20 %); the test passed but the indicators weigh against the mix: air content "
        "3 % < 4 % — keep the site mix to the tested one and protect the young work from frost")


def test_moderate_frost_deemed_to_satisfy_only_on_measured_indicators(demo_copy):
    # sheltered, no salt: MX3.1 with frost, the moderate regime (EN 1996-2 Annex A, memory)
    edit(demo_copy / "dossier.yaml", "    exposure: sheltered harbour side, occasional spray\n",
          "    exposure: sheltered harbour side, occasional spray\n"
          "    exposure_conditions: [sheltered]\n")
    _, r = check(demo_copy)
    c = by_check(r)[("DUR-FROST", "Z1/M2")]
    # M2: natural cement, 28-d mean 3.33 MPa >= 1 MPa (M1), but no measured air: hold
    assert by_check(r)[("DUR-EXPOSE", "Z1")].value == "MX3.1"
    assert c.status == "hold" and "at least 25 cycles" in c.message
    assert "indicators weigh against" not in c.message      # unknown is not short
    edit(demo_copy / "mixes.yaml", "    water_binder_ratio: 0.65\n",
          "    water_binder_ratio: 0.65\n    air_content: \"5 %\"\n")
    _, r = check(demo_copy)
    c = by_check(r)[("DUR-FROST", "Z1/M2")]
    assert c.status == "attention" and c.message.startswith(
        "MX3.1 (moisture or wetting plus freeze–thaw cycling): no freeze–thaw test, but binder "
        "class, measured air content and 28-d strength all meet the minima of common practice for moderate frost: deemed to satisfy; at least "
        "25 cycles")
    assert "tests_asked" not in r.quantities.get("Z1/M2", {}) or not any(
        t["check"] == "DUR-FROST" for t in r.quantities["Z1/M2"]["tests_asked"].value)
    # the same mix in the severe zone Z3 (MX4 with MX3.2) is still held for the test
    assert by_check(r)[("DUR-FROST", "Z3/M2")].status == "hold"


def test_air_lime_counts_as_class_zero_for_frost(demo_copy):
    edit(demo_copy / "materials.yaml", "    type: nhl\n", "    type: air_lime\n")
    edit(demo_copy / "specification.yaml", "  - zone: Z3\n    mix: M3", "  - zone: Z3\n    mix: M2")
    _, r = check(demo_copy)
    c = by_check(r)[("DUR-FROST", "Z1/M3")]
    # air lime hardens by carbonation only: class 0 < 5 (common practice)
    assert c.status == "hold" and "lime class 0 < 5" in c.message


# ---------------------------------------------------------------- sulfate
def test_hydraulic_lime_in_the_tidal_zone_no_longer_passes(demo):
    r = by_check(demo)
    c = r[("DUR-TSA", "Z3/M3")]
    # Thaumasite Expert Group (1999), risk factors as a public summary of the report states
    # them (references.json teg_summary): sulfate, mobile water, carbonate and "low
    # temperatures, generally below 15 °C", on a binder that forms C-S-H; NHL 3.5 has 2.5 %
    # Al2O3, yet all conditions hold
    assert c.status == "fail"
    words = {i.symbol: i.value for i in c.steps[0].inputs}
    assert words == {"C-S-H": "yes", "sulfate": "yes", "water": "yes", "carbonate": "yes",
                     "cold": "yes"}
    assert "cold: -4.0 °C < 15 °C" in c.message
    # the 15 °C limit is read (not recalled): the sheet cites the report as the summary
    # states it, and the limit is not among the values to confirm
    assert not any("memory" in n for n in c.notes)
    assert [b.text() for b in c.basis] == [
        "Thaumasite Expert Group 1999, primary risk factors: a sulfate source, mobile water, "
        "carbonate and low temperatures, generally below 15 °C (as stated in "
        "civilengineeringx.com)"]
    assert not [v for v in demo.unconfirmed() if "thaumasite" in v["where"]]
    ett = r[("DUR-ETT", "Z3/M3")]
    assert c.value == "all 5 conditions met" and ett.value == "aluminate absent"
    assert ett.status == "pass" and ett.message.startswith(
        "no ettringite risk: aluminate absent (NH35: Al2O3 2.5 % in analysis NHL-A < 5 %")


def test_sea_spray_with_low_fabric_sulfate_is_attention(demo):
    r = by_check(demo)
    for code in ("DUR-TSA", "DUR-ETT"):
        assert r[(code, "Z1/M2")].status == "attention"
    assert any("chloride moderates" in n for n in r[("DUR-ETT", "Z1/M2")].notes)


def test_air_lime_forms_no_csh(demo_copy):
    edit(demo_copy / "materials.yaml", "    type: nhl\n", "    type: air_lime\n")
    edit(demo_copy / "specification.yaml", "  - zone: Z3\n    mix: M3", "  - zone: Z3\n    mix: M2")
    _, r = check(demo_copy)
    c = by_check(r)[("DUR-TSA", "Z1/M3")]
    assert c.status == "pass" and c.message.startswith(
        "no thaumasite risk: C-S-H absent (air lime only: no C-S-H)")


def test_warm_site_clears_thaumasite_and_unknown_cold_holds(demo_copy):
    edit(demo_copy / "dossier.yaml", 'lowest_temperature: "-4 degC"', 'lowest_temperature: "17 degC"')
    _, r = check(demo_copy)
    assert by_check(r)[("DUR-TSA", "Z3/M3")].message.endswith("cold absent (17.0 °C ≥ 15 °C)")
    edit(demo_copy / "dossier.yaml", '  lowest_temperature: "17 degC"\n', "")
    edit(demo_copy / "dossier.yaml", "site_temperature: lab/site-temperature.csv", "")
    edit(demo_copy / "dossier.yaml", "  load_strength: \"1 MPa\"\n", "")
    _, r = check(demo_copy)
    c = by_check(r)[("DUR-TSA", "Z3/M3")]
    assert c.status == "hold" and c.message == (
        "thaumasite: cannot decide — cold unknown: give durability.lowest_temperature in "
        "dossier.yaml")


def test_recalled_limit_holds_the_verdict_of_an_issued_revision(demo_copy, monkeypatch):
    from specgen import refdata
    # the salt-load table's edges are read (salt_summary_wta); mark the table recalled here
    # to see a verdict that rests on a recalled table held too
    raw = dict.__getitem__(refdata.load("salt_load").data, "wta_2_9")
    monkeypatch.setitem(raw, "tag", "memory")
    edit(demo_copy / "dossier.yaml", "  status: draft", "  status: issued")
    _, r = check(demo_copy)
    c = by_check(r)[("DUR-RETAIN", "Z1/M2")]   # ASTM C270 water retention 75 %, recalled
    assert c.status == "hold" and c.notes[-1].startswith(
        "held: the verdict (pass) rests on “smallest water retention of a masonry mortar laid "
        "on units of ordinary suction") and c.notes[-1].endswith(
        "still to be confirmed against the printed source (or overridden with a justification) "
        "before this revision is issued")
    # the thaumasite limit is read in a public summary of the report: an issued revision
    # keeps the verdict (sulfate from the sea: the salt table does not decide)
    c = by_check(r)[("DUR-TSA", "Z3/M3")]
    assert c.status == "fail" and not any(n.startswith("held:") for n in c.notes)
    c = by_check(r)[("DUR-ETT", "Z2/M2")]      # high sulfate class read from the recalled table
    assert c.status == "hold" and c.notes[-1].startswith(
        "held: the verdict (fail) rests on the salt-load class edges of WTA salt-load table "
        "for assessing masonry (low / medium / high), still to be confirmed")
    monkeypatch.delitem(raw, "tag")          # as shipped: the table read, the verdict stands
    _, r = check(demo_copy)
    assert by_check(r)[("DUR-ETT", "Z2/M2")].status == "fail"


# ---------------------------------------------------------------- soundness
def test_soundness_from_the_phase_range_when_nothing_is_measured(demo):
    r = by_check(demo)
    c = r[("DUR-SOUND", "NC1")]
    # free lime 0–14.7 % over the three aluminate assignments (tests/science/test_exposure.py
    # by hand) > 2 % (common practice); MgO 2.3 % > 2 % periclase (common practice)
    assert c.status == "hold"
    assert c.message == (
        "nothing measured; free lime could reach 14.7 % (range 0.0–14.7 % over the aluminate "
        "assignments) > 2 %; periclase could reach 2.3 % > 2 % — commission Le Chatelier "
        "expansion (EN 196-3; EN 459-2 for building limes), with free CaO by ethylene-glycol "
        "extraction and free MgO (periclase) by XRD")
    assert "peak 930 °C within the usual range" in demo.quantities["NC1"]["free_oxide_range"].value["firing"]
    nh = r[("DUR-SOUND", "NH35")]
    assert nh.status == "attention" and "declared NHL 3.5: ask for the soundness result" in nh.message


@pytest.mark.parametrize("soundness, status, message", [
    # EN 197-1 expansion ≤ 10 mm for every class (makers' public summaries agree, but
    # from memory; applied to natural cement); free CaO ≤ 2 %,
    # free MgO ≤ 2 % (common practice); SO3 ≤ 3 % (ASTM C10/C10M, as ASTM WK90140 quotes it),
    # demo NC1-A SO3 0.9 %
    ('{free_cao: 0.9, free_mgo: 0.5, expansion: "1.5 mm"}', "pass",
     "Le Chatelier expansion 1.5 mm ≤ 10 mm; free CaO 0.9 % ≤ 2 %; free MgO 0.5 % ≤ 2 %; "
     "SO3 0.9 % ≤ 3 %"),
    ('{expansion: "12 mm"}', "fail", "Le Chatelier expansion 12 mm > 10 mm; SO3 0.9 % ≤ 3 %"),
    ('{free_cao: 3.1}', "fail", "free CaO 3.1 % > 2 %; SO3 0.9 % ≤ 3 %; no expansion test: "
     "commission Le "
     "Chatelier expansion (EN 196-3; EN 459-2 for building limes), with free CaO by "
     "ethylene-glycol extraction and free MgO (periclase) by XRD"),
    ('{free_cao: 3.1, expansion: "2 mm"}', "attention", "Le Chatelier expansion 2 mm ≤ 10 mm; "
     "free CaO 3.1 % > 2 %; SO3 0.9 % ≤ 3 %; oxides above the limit although the expansion is "
     "within it: watch the trial panel for pop-outs"),
])
def test_measured_soundness(demo_copy, soundness, status, message):
    edit(demo_copy / "materials.yaml", '    bag_mass: "25 kg"\n  - id: NH35',
          f'    bag_mass: "25 kg"\n    soundness: {soundness}\n  - id: NH35')
    if status == "fail":   # a failing binder needs the choices of M1/M2 justified: leave them out
        (demo_copy / "specification.yaml").unlink()
    _, r = check(demo_copy)
    c = by_check(r)[("DUR-SOUND", "NC1")]
    assert (c.status, c.message) == (status, message)


NH35_END = '    declared_class: NHL 3.5\n    analysis: NHL-A\n    bulk_density: "700 kg/m^3"\n    bag_mass: "25 kg"\n'


@pytest.mark.parametrize("soundness, status, message", [
    # EN 459-1 building limes: soundness (EN 459-2) at most 2 mm (from memory; a draft shows
    # the verdict, an issued revision holds it); a cement's 10 mm never applies to a lime;
    # unslaked CaO in a slaked lime at most 1 % (common practice)
    ('{expansion: "1 mm"}', "pass", "Le Chatelier expansion 1 mm ≤ 2 mm"),
    ('{expansion: "3 mm"}', "fail", "Le Chatelier expansion 3 mm > 2 mm"),
    ('{expansion: "1 mm", free_cao: 1.4}', "attention", "Le Chatelier expansion 1 mm ≤ 2 mm; "
     "free CaO 1.4 % > 1 %; oxides above the limit although the expansion is within it: watch "
     "the trial panel for pop-outs"),
])
def test_measured_soundness_of_a_building_lime(demo_copy, soundness, status, message):
    edit(demo_copy / "materials.yaml", NH35_END, NH35_END + f"    soundness: {soundness}\n")
    if status == "fail":   # a failing binder needs the choice of M3 justified: leave it out
        (demo_copy / "specification.yaml").unlink()
    _, r = check(demo_copy)
    c = by_check(r)[("DUR-SOUND", "NH35")]
    assert (c.status, c.message) == (status, message)
    assert c.limit.rule == "durability.expansion_max_lime" and c.limit.high == 2


def test_lime_soundness_limit_recalled_holds_an_issued_verdict(demo_copy):
    edit(demo_copy / "materials.yaml", NH35_END, NH35_END + '    soundness: {expansion: "1 mm"}\n')
    edit(demo_copy / "dossier.yaml", "  status: draft", "  status: issued")
    _, r = check(demo_copy)
    c = by_check(r)[("DUR-SOUND", "NH35")]
    assert c.status == "hold" and c.notes[-1].startswith(
        "held: the verdict (pass) rests on “largest soundness expansion of a building lime")
    listed = {v["where"]: v["used_by"] for v in r.unconfirmed()}
    assert "DUR-SOUND/NH35" in listed["content/rules/durability.yaml: expansion_max_lime"]


def test_natural_cement_so3_against_astm_c10(demo_copy):
    # ASTM C10/C10M limits a natural cement's SO3 to 3.0 % (the limit ASTM's work item WK90140
    # quotes); demo NC1-A: 0.9 % passes, 3.6 % is a risk without a test and, with a sound
    # Le Chatelier result (EN 197-1 cement limit 10 mm, from memory), an
    # attention
    _, r = check(demo_copy)
    c = by_check(r)[("DUR-SOUND", "NC1")]
    assert r"SO_3 = 0.9 \le 3\,\%" in c.steps[0].substituted and "SO3" not in c.message
    edit(demo_copy / "analyses.yaml", "CaO: 57.9, MgO: 2.3, SO3: 0.9", "CaO: 57.9, MgO: 2.3, SO3: 3.6")
    _, r = check(demo_copy)
    c = by_check(r)[("DUR-SOUND", "NC1")]
    assert c.status == "hold" and "; SO3 3.6 % > 3 % (ASTM C10/C10M) — commission" in c.message
    edit(demo_copy / "materials.yaml", '    bag_mass: "25 kg"\n  - id: NH35',
         '    bag_mass: "25 kg"\n    soundness: {expansion: "1.5 mm"}\n  - id: NH35')
    _, r = check(demo_copy)
    c = by_check(r)[("DUR-SOUND", "NC1")]
    assert (c.status, c.message) == ("attention", "Le Chatelier expansion 1.5 mm ≤ 10 mm; SO3 "
                                      "3.6 % > 3 %; oxides above the limit although the "
                                      "expansion is within it: watch the trial panel for pop-outs")


def test_natural_cement_autoclave_limit_is_astm_c10s(demo_copy):
    edit(demo_copy / "materials.yaml", '    bag_mass: "25 kg"\n  - id: NH35',
         '    bag_mass: "25 kg"\n    soundness: {autoclave_expansion: "0.5 %"}\n  - id: NH35')
    _, r = check(demo_copy)
    c = by_check(r)[("DUR-SOUND", "NC1")]
    ea = [i for i in c.steps[0].inputs if i.symbol == "E_a,max"][0]
    # ASTM C10/C10M autoclave expansion (C151) at most 0.80 % (from memory)
    assert ea.value == 0.8 and ea.source.startswith(
        "rule durability.autoclave_expansion_max_natural_cement")
    assert c.message.startswith("autoclave expansion 0.5 % ≤ 0.8 %; SO3 0.9 % ≤ 3 %")


def test_free_lime_above_the_cao_is_an_input_error(cli, demo_copy):
    edit(demo_copy / "materials.yaml", '    bag_mass: "25 kg"\n  - id: NH35',
          '    bag_mass: "25 kg"\n    soundness: {free_cao: 61.5}\n  - id: NH35')
    out = _run_bad(cli, demo_copy)
    assert ("materials.yaml, line 12: binders[0].soundness.free_cao: binder 'NC1': free CaO "
            "61.5 % is more than the CaO of its analysis NC1-A (57.9 %); free CaO is part of the "
            "CaO. Fix: check the free CaO result and its unit (mass % of the binder), or the "
            "analysis the binder names.") in out


# ---------------------------------------------------------------- setting
def test_setting_times_against_the_family(demo):
    r = by_check(demo)
    m3 = r[("SITE-SET", "M3")]
    # EN 459-1 (from memory): initial set > 1 h, final ≤ 40 h; demo M3: 4.5 h and 16 h
    assert m3.status == "pass" and m3.message.startswith(
        "initial 270 min, final 960 min (Vicat, EN 459-2); natural hydraulic lime (NHL): "
        "initial ≥ 60 min, final ≤ 40 h")
    m1 = r[("SITE-SET", "M1")]
    assert m1.status == "pass" and "tested at the card's retarder dose (0.2 %)" in m1.message
    m2 = r[("SITE-SET", "M2")]
    assert m2.status == "hold" and m2.message == (
        "no setting time: commission Vicat (EN 196-3; EN 459-2 for building limes) on the paste "
        "at the retarder dose of the card; until then the gaugings rest on the workable life "
        "alone")


def test_initial_set_caps_the_workable_life(demo_copy):
    edit(demo_copy / "mixes.yaml", 'setting: {initial: "45 min", final: "110 min", '
          'retarder_dose: "0.2 %"', 'setting: {initial: "20 min", final: "110 min", '
          'retarder_dose: "0.1 %"')
    _, r = check(demo_copy)
    c = by_check(r)[("SITE-SET", "M1")]
    assert c.status == "attention"
    assert ("tested at 0.1 % retarder but the card doses 0.2 %: repeat the test at the card's "
            "dose") in c.message
    assert "measured workable life 30 min is longer than the initial set" in c.message
    # the gaugings use the 20 min initial set: 20 min × 8 L/h / 1.5 = 1.778 L (by hand; rule
    # works.gauging_safety_factor 1.5, common practice)
    assert r.quantities["M1"]["workable_life"].value["value"] == 20
    assert r.quantities["M1"]["max_gauging_volume"].value["Z1"] == pytest.approx(1.778, abs=1e-3)


def test_initial_set_after_final_set_is_an_input_error(cli, demo_copy):
    edit(demo_copy / "mixes.yaml", 'initial: "45 min", final: "110 min"',
          'initial: "150 min", final: "110 min"')
    out = _run_bad(cli, demo_copy)
    assert ("mixes.yaml, line 7: mixes[0].setting.initial: mix 'M1': the initial set (150 min) "
            "is not before the final set (110 min). Fix: check the two times and their units; "
            "the initial set comes first, e.g. 'initial: \"12 min\"', 'final: \"35 min\"'.") in out


# ---------------------------------------------------------------- substrate
def test_water_retention_against_suction(demo):
    r = by_check(demo)
    # GS1 initial rate of absorption 2.1 kg/(m²·min) > 1.55 (30 g/min/30 in², common practice:
    # the edge of high suction lies at about 1.5-2 kg/(m²·min)): high suction, so ≥ 85 %
    # (common practice); M2 holds 78 %
    z2 = r[("DUR-RETAIN", "Z2/M2")]
    assert (z2.status, z2.message) == ("fail", "high suction: water retention 78 % < 85 %")
    # EB1 0.4 kg/(m²·min): ordinary suction, ≥ 75 % (ASTM C270, from memory)
    z1 = r[("DUR-RETAIN", "Z1/M2")]
    assert (z1.status, z1.message) == ("pass", "ordinary suction: water retention 78 % ≥ 75 %")


def test_missing_measurements_name_the_test(demo_copy):
    edit(demo_copy / "materials.yaml", 'water_retention: "78 %", bond_strength: "0.12 MPa", '
          'bond_failure: mortar', 'hygric_expansion: "0.3 mm/m"')
    edit(demo_copy / "materials.yaml", '     hygric_expansion: "0.3 mm/m", source: "NML-4460; '
          'capillary readings in lab/capillary.csv",\n     hygric_expansion: "0.3 mm/m"}',
          '     hygric_expansion: "0.3 mm/m", source: "NML-4460; capillary readings in '
          'lab/capillary.csv"}')
    _, r = check(demo_copy)
    c = by_check(r)[("DUR-RETAIN", "Z2/M2")]
    assert c.status == "hold" and c.message == (
        "units of high suction: the mortar must retain at least 85 % of its water; M2 has no "
        "water retention — commission the suction test of the fresh mortar (ASTM C1506 / "
        "EN 413-2 style)")
    b = by_check(r)[("DUR-BOND", "Z2/M2")]
    assert b.status == "hold" and b.message == (
        "render bond of M2 not measured: commission the EN 1015-12 pull-off on the trial panel "
        "at 28 d, at least five discs, recording where each broke")
    tests = [t["test"] for t in r.quantities["Z2"]["durability_tests"].value]
    assert "render bond (pull-off)" in tests and "water retention of the fresh mortar" in tests


def test_missing_measurements_are_never_a_silent_pass(demo_copy):
    """Unit suction, carbonation depths and the freeze–thaw losses taken out: each check says
    what to commission instead of passing."""
    edit(demo_copy / "materials.yaml", ', initial_rate_of_absorption: "2.1 kg/(m^2*min)"', "")
    edit(demo_copy / "materials.yaml", 'capillary_coefficient: "0.35 kg/(m^2*min^0.5)", ', "")
    edit(demo_copy / "materials.yaml", ',\n     carbonation: [{age: "28 d", depth: "4.5 mm"}, '
         '{age: "90 d", depth: "8 mm"}]}', "}")
    edit(demo_copy / "materials.yaml", ',\n                   mass_loss: "1.8 %", '
         'strength_loss: "14 %"', "")
    _, r = check(demo_copy)
    c = by_check(r)
    assert c[("DUR-RETAIN", "Z2/M1")].status == "not_assessed"
    assert c[("DUR-RETAIN", "Z2/M1")].message == (
        "not assessed: the suction of the units is unknown: commission their initial rate of "
        "absorption (EN 772-11; ASTM C67) or capillary coefficient (EN 1925) and give "
        "materials.yaml GS1.initial_rate_of_absorption (or GS1.capillary_coefficient)")
    carb = c[("DUR-CARB", "Z3/M3")]
    assert carb.status == "attention" and "no carbonation depths measured — measure by " \
        "phenolphthalein" in carb.message
    ft = c[("DUR-FROST", "Z2/M1")]
    assert ft.status == "hold" and ft.message.startswith(
        f"{MX32}: 50 of 50 cycles; no mass or strength loss reported — complete the "
        "test: at least 50 cycles")
    assert {s.status for k, s in c.items() if k[0].startswith("DUR-")} >= {"hold", "not_assessed"}


def test_free_mgo_above_the_mgo_is_an_input_error(cli, demo_copy):
    edit(demo_copy / "materials.yaml", '    bag_mass: "25 kg"\n  - id: NH35',
          '    bag_mass: "25 kg"\n    soundness: {free_mgo: 4.0}\n  - id: NH35')
    out = _run_bad(cli, demo_copy)
    # free MgO (periclase) is part of the analysis's MgO, 2.3 % in NC1-A
    assert ("materials.yaml, line 12: binders[0].soundness.free_mgo: binder 'NC1': free MgO "
            "4 % is more than the MgO of its analysis NC1-A (2.3 %)") in out


def test_render_bond_only_where_render_is_specified(demo):
    r = by_check(demo)
    assert {s for (code, s) in r if code == "DUR-BOND"} == {"Z2/M1", "Z2/M2"}
    # 0.12 MPa ≥ 0.1 MPa (common practice), broke in the mortar
    assert r[("DUR-BOND", "Z2/M2")].message == "bond 0.12 MPa ≥ 0.1 MPa, broke in the mortar"
    # the step as the sheet shows it: the measured bond (demo materials.yaml: M2
    # "0.12 MPa") in MPa, under its symbol
    step = r[("DUR-BOND", "Z2/M2")].steps[0]
    assert (step.title, step.result, step.unit, step.symbol) == (
        "Pull-off bond against the minimum", 0.12, "MPa", "f_u")


def test_carbonation_front_of_the_lime_mix(demo):
    r = by_check(demo)
    c = r[("DUR-CARB", "Z1/M3")]
    # by hand (tests/science/test_exposure.py): K = 0.845 mm/√d, shown to the sheet's three
    # decimals in the message too (it read 0.84 beside the sheet's 0.845); 20 mm → 560 d
    assert c.status == "info" and c.value == pytest.approx(560.2, abs=0.1)
    assert "K = 0.845 mm/√d, so 20 mm carbonate in about 560 days" in c.message
    assert ("DUR-CARB", "Z1/M2") not in r          # natural cement: not lime-rich


def test_tests_asked_gathered_per_zone(demo):
    c = by_check(demo)[("DUR-TESTS", "Z1")]
    rows = demo.quantities["Z1"]["durability_tests"].value
    assert c.status == "hold"
    assert [(t["test"], t["check"]) for t in rows] == [
        ("freeze–thaw resistance of the mortar", "DUR-FROST/Z1/M2"),
        ("initial and final setting time", "SITE-SET/M2"),
        ("soundness (expansion)", "DUR-SOUND/NC1")]
    # the hold point counts them and names each with the check that asked for it, in that order
    assert (c.value, c.message) == (3, "hold: before the works in zone Z1, the results of "
                                    "freeze–thaw resistance of the mortar (DUR-FROST/Z1/M2); "
                                    "initial and final setting time (SITE-SET/M2); "
                                    "soundness (expansion) (DUR-SOUND/NC1)")
    assert c.steps[0].title == "Tests asked for chosen mix M2"      # demo specification.yaml
    assert [(i.symbol, i.source) for i in c.steps[0].inputs] == [
        ("T1", "DUR-FROST/Z1/M2"), ("T2", "SITE-SET/M2"), ("T3", "DUR-SOUND/NC1")]


def test_contradictory_exposure_is_an_input_error(cli, demo_copy):
    edit(demo_copy / "dossier.yaml", "    exposure: tidal splash zone\n",
          "    exposure: sheltered tidal wall\n")
    out = _run_bad(cli, demo_copy)
    assert ("dossier.yaml, line 57: zones[2].exposure: zone 'Z3': the exposure is both sheltered "
            "('sheltered') and tidal ('tidal'), which cannot describe one zone. Fix: split the "
            "zone into one zone per exposure, or give the exposure that governs in "
            "'exposure_conditions:', e.g. [tidal].") in out


def test_cautions_follow_the_exposure():
    from specgen.build import load as load_project  # as every command reads a project
    from specgen.report.cautions import cautions_for
    from tests.conftest import DEMO
    ids = [c["id"] for c in cautions_for(load_project(DEMO))[0]]
    assert "tidal" in ids and "frost" in ids


def test_every_durability_sheet_formula_renders(demo):
    """Formulas and substituted values of the new checks go through the math renderer (a
    character the renderer copies into its XML unescaped would stop the build)."""
    from specgen.report.mathsvg import svg_of
    codes = {"DUR-EXPOSE", "DUR-FROST", "DUR-TSA", "DUR-ETT", "DUR-SOUND", "SITE-SET",
             "DUR-RETAIN", "DUR-BOND", "DUR-CARB", "DUR-TESTS"}
    seen = {t for c in demo.checks if c.code in codes for s in c.steps
            for t in (s.formula, s.substituted)}
    assert len(seen) > 20
    for latex in sorted(seen):
        assert svg_of(latex).startswith("<svg"), latex


def test_practice_key_read_when_present(demo_copy):
    """The exposure classes follow the practice the whole dossier follows (specgen.practice):
    the stated one, or, when dossier.yaml states none, the same default as the gradings, the
    mortar classes and the scope page — never a second default of its own."""
    from specgen import practice as pr
    from specgen.build import load
    from specgen.checks.durability_common import practice
    project = load(demo_copy)                 # the demo states "follows: european"
    assert practice(project) == ("european", "dossier.yaml practice: european")
    edit(demo_copy / "dossier.yaml", "  follows: european\n", "")
    project = load(demo_copy)
    key, said = practice(project)
    assert key == pr.resolve(project.dossier).key == pr.DEFAULT
    assert said.startswith("practice not stated in dossier.yaml:")


def test_american_practice_names_the_c270_location(demo_copy, monkeypatch):
    from specgen.checks import durability_common
    monkeypatch.setattr(durability_common, "practice",
                        lambda project: ("american", "dossier.yaml practice: american"))
    _, r = check(demo_copy)
    c = by_check(r)[("DUR-EXPOSE", "Z3")]
    # ASTM C270 Table X1.1 (from memory): at or below grade → type S (alternatives M, N)
    assert c.message == (
        "exterior, at or below grade (foundation and retaining walls, manholes, sewers, "
        "pavements): type S recommended (alternatives M, N); weathering severe (EN 1996-2 "
        "equivalent MX4 with MX3.2)")
    assert c.basis[0].ref == "astmc270"
    assert by_check(r)[("DUR-EXPOSE", "Z2")].message.startswith(
        "exterior, above grade, parapet wall: type N recommended (alternatives S)")


def _dur_tests_of(zone, quantities, mixes):
    """DUR-TESTS run on a hand-made context: ``quantities`` {subject: {name: value}} as the
    earlier checks would have recorded them, ``mixes`` {mix id: [binder ids]}."""
    from types import SimpleNamespace as NS
    from specgen.checks.durability_tests_checks import tests_check
    from specgen.checks.result import Quantity
    from specgen.checks.run import Context
    project = NS(mixes={m: NS(binders=[NS(binder=b) for b in bs]) for m, bs in mixes.items()})
    ctx = Context(project, None)
    for sid, named in quantities.items():
        for name, value in named.items():
            ctx.record(sid, Quantity(name, value, "", name))
    return tests_check(zone, ctx)


# the basis DUR-TESTS gives: the project's own requirement that works wait for the tests
DUR_TESTS_BASIS = (Basis("project requirement", note="tests asked for by the durability "
                         "checks; the works in the zone wait for their results"),)


def test_dur_tests_gathers_the_candidates_once_each_when_none_is_chosen():
    """With no mix chosen (no ``selected_mix`` for the zone) DUR-TESTS gathers the tests asked
    on every candidate, the zone, each pair and each binder, a test asked on a binder that two
    candidates share listed once.  Expected rows written out by hand from the inputs below."""
    from types import SimpleNamespace as NS
    frost = {"test": "freeze–thaw resistance", "method": "EN 12371", "why": "w", "check": "F"}
    sound = {"test": "soundness", "method": "EN 459-2", "why": "w", "check": "S"}
    setting = {"test": "setting time", "method": "EN 196-3", "why": "w", "check": "T"}
    c = _dur_tests_of(NS(id="Z9", candidates=["MA", "MB"]),
                      {"Z9/MA": {"tests_asked": [frost]}, "B1": {"tests_asked": [sound]},
                       "MB": {"tests_asked": [setting]}},
                      {"MA": ["B1"], "MB": ["B1"]})
    rows = [dict(frost, check="F/Z9/MA"), dict(sound, check="S/B1"),
            dict(setting, check="T/MB")]
    assert (c.code, c.title, c.subject, c.subject_kind, c.status, c.value, c.unit) == (
        "DUR-TESTS", "Durability tests to commission", "Z9", "zone", "hold", 3, "")
    assert c.message == ("hold: before the works in zone Z9, the results of "
                         "freeze–thaw resistance (F/Z9/MA); soundness (S/B1); "
                         "setting time (T/MB)")
    assert c.quantities == (Quantity("durability_tests", rows, "", "tests"),)
    assert c.basis == DUR_TESTS_BASIS
    assert c.steps == (Step(
        "Tests asked for the candidates (none chosen yet)",
        r"n = \text{tests asked by the checks}",
        (Input("T1", "freeze–thaw resistance", "EN 12371", "", "F/Z9/MA"),
         Input("T2", "soundness", "EN 459-2", "", "S/B1"),
         Input("T3", "setting time", "EN 196-3", "", "T/MB")), "n = 3", 3.0, "", "n"),)


def test_dur_tests_passes_when_nothing_is_outstanding():
    """No check asked for a test on the chosen mix (MA; MB's test is not read): DUR-TESTS
    passes with an empty list; the words written out by hand."""
    from types import SimpleNamespace as NS
    asked = {"test": "soundness", "method": "EN 459-2", "why": "w", "check": "S"}
    c = _dur_tests_of(NS(id="Z9", candidates=["MA", "MB"]),
                      {"Z9": {"selected_mix": "MA"}, "MB": {"tests_asked": [asked]}},
                      {"MA": ["B1"], "MB": ["B2"]})
    assert (c.code, c.title, c.subject, c.subject_kind, c.status, c.value, c.unit) == (
        "DUR-TESTS", "Durability tests to commission", "Z9", "zone", "pass", 0, "")
    assert c.message == "no durability test outstanding for chosen mix MA"
    assert c.quantities == (Quantity("durability_tests", [], "", "tests"),)
    assert (c.steps, c.basis) == ((), DUR_TESTS_BASIS)
    c = _dur_tests_of(NS(id="Z9", candidates=["MA"]), {}, {"MA": []})
    assert (c.status, c.value, c.message) == (
        "pass", 0, "no durability test outstanding for the candidates (none chosen yet)")


NML = "Northstead Materials Laboratory, NML-4460"          # demo mixes.yaml setting source
LIME_RULE = "(EN 459-1, physical requirements, setting times)"  # content/rules/durability.yaml


def test_setting_results_whole(demo):
    """SITE-SET of demo M1 (natural cement, 45/110 min, tested at the card's 0.2 % retarder,
    workable life 30 min measured) and M3 (NHL, 4.5 h = 270 min and 16 h = 960 min, against
    EN 459-1's > 60 min and ≤ 40 h, from memory; workable life the NHL default of 2 h,
    common practice), whole; the minutes by hand."""
    r = by_check(demo)
    m1 = r[("SITE-SET", "M1")]
    assert (m1.title, m1.subject_kind, m1.status, m1.value, m1.unit, m1.notes) == (
        "Setting time and workable life", "mix", "pass", 45.0, "min", ())
    assert m1.message == ("initial 45 min, final 110 min (Vicat, EN 196-3); natural cement: no "
                          "current standard limit; the set governs the gaugings; tested at "
                          "the card's retarder dose (0.2 %)")
    src = f"mixes.yaml M1.setting (Vicat, EN 196-3; {NML})"
    assert m1.steps == (Step(
        "Setting times and the workable life the gaugings use",
        r"t_i < t_f,\quad t_w = \min(t_{w,0},\ t_i)",
        (Input("t_i", "initial set", 45.0, "min", src),
         Input("t_f", "final set", 110.0, "min", src),
         Input("t_w,0", "workable life measured (EN 1015-9), else the binder default", 30.0,
               "min", "mixes.yaml M1.workable_life"),
         Input("t_w", "workable life used for the gaugings", 30.0, "min",
               f"mixes.yaml M1.workable_life, EN 1015-9 ({NML})")),
        r"t_i = 45,\ t_f = 110,\ t_w = 30\ \mathrm{min}", 30.0, "min", "t_w"),)
    assert m1.basis == (Basis("reference", "en196_3", "setting times (Vicat)"),)
    m3 = r[("SITE-SET", "M3")]
    assert (m3.status, m3.value, m3.message) == (
        "pass", 270.0, "initial 270 min, final 960 min (Vicat, EN 459-2); natural hydraulic "
        "lime (NHL): initial ≥ 60 min, final ≤ 40 h")
    nhl_life = ("rule works.workable_life_nhl (common practice — natural hydraulic lime mortars "
                "stay workable for about 2-4 h if kept from drying (set is slow); measure it on "
                "the trial mix)")
    assert m3.notes == ("the workable life is not measured (EN 1015-9): the gaugings rest on "
                        + nhl_life,)
    lime = "a building lime with hydraulic properties (NHL, HL, FL)"
    assert [(i.symbol, i.name, i.value, i.unit, i.source) for i in m3.steps[0].inputs[2:]] == [
        ("t_i,min", "shortest initial setting time of " + lime, 60.0, "min",
         "rule durability.setting_initial_min_lime " + LIME_RULE),
        ("t_f,max", "longest final setting time of " + lime, 40.0, "h",
         "rule durability.setting_final_max_lime " + LIME_RULE),
        ("t_w,0", "workable life measured (EN 1015-9), else the binder default", 120.0, "min",
         "default workable life of the binder family (common practice)"),
        ("t_w", "workable life used for the gaugings", 120.0, "min", nhl_life)]
    assert m3.steps[0].substituted == r"t_i = 270,\ t_f = 960,\ t_w = 120\ \mathrm{min}"
    assert [(b.ref, b.note) for b in m3.basis] == [
        ("en196_3", ""), ("en459", "from memory: initial set more than 1 h"),
        ("en459", "from memory: final set at most 40 h")]


def test_setting_outside_the_lime_limits_fails(demo_copy):
    """M3 (NHL) set at 50 min and 41 h (2460 min): below EN 459-1's 60 min and above its
    40 h (from memory, the rule's values): fail, both named (by hand)."""
    edit(demo_copy / "mixes.yaml", 'setting: {initial: "4.5 h", final: "16 h"',
         'setting: {initial: "50 min", final: "41 h"')
    c = by_check(check(demo_copy)[1])[("SITE-SET", "M3")]
    assert (c.status, c.value, c.message) == (
        "fail", 50.0, "initial 50 min, final 2460 min (Vicat, EN 459-2); natural hydraulic "
        "lime (NHL): initial < 60 min, final > 40 h")


@pytest.mark.parametrize("initial, status, words", [
    ("40 min", "fail", "Portland cement: initial set < 45 min"),
    ("45 min", "pass", "Portland cement: initial set ≥ 45 min")])
def test_setting_of_a_portland_binder(demo_copy, initial, status, words):
    """NC1 declared a Portland cement: M1's initial set against EN 197-1's 45 min, the lowest
    of the strength classes (from memory, content/rules/durability.yaml); on the limit passes."""
    edit(demo_copy / "materials.yaml", "type: natural_cement", "type: portland")
    edit(demo_copy / "mixes.yaml", 'setting: {initial: "45 min"',
         f'setting: {{initial: "{initial}"')
    c = by_check(check(demo_copy)[1])[("SITE-SET", "M1")]
    assert (c.status, c.message) == (status, f"initial {initial}, final 110 min (Vicat, "
                                     f"EN 196-3); {words}; tested at the card's retarder dose "
                                     "(0.2 %)")
    assert c.steps[0].inputs[2].symbol == "t_i,min"


# --- SITE-SET on hand-made mixes (no demo check) ---------------------------------------------
# The rules are the inputs of these tests: content/rules/durability.yaml (EN 459-1 setting
# times of building limes, > 60 min and ≤ 40 h; EN 197-1's 45 min for Portland cement; all
# from memory) and content/rules/works.yaml (workable lives by family, common practice).
SET_BASIS = Basis("reference", "en196_3", "setting times (Vicat)")
WL_SYMBOL = "workable life measured (EN 1015-9), else the binder default"


def _setting_of(binders, setting=None, admixtures=(), life=None, issued=False):
    """SITE-SET (setting_check) of mix MX on a hand-made project: ``binders`` {id: family},
    ``setting`` (initial s, final s, method, source, retarder dose) or None, ``admixtures``
    [(name, purpose, dose)], ``life`` the measured workable life (s) or None."""
    from types import SimpleNamespace as NS
    from specgen.checks.rules import RuleBook
    from specgen.checks.run import Context
    from specgen.checks.setting_checks import setting_check
    project = NS(binders={b: NS(id=b, type=t) for b, t in binders.items()},
                 revision=NS(status="issued" if issued else "draft"))
    s = None if setting is None else NS(initial=setting[0], final=setting[1],
                                        method=setting[2], source=setting[3],
                                        retarder_dose=setting[4])
    mix = NS(id="MX", binders=[NS(binder=b) for b in binders], setting=s,
             admixtures=[NS(name=n, purpose=p, dose=d) for n, p, d in admixtures],
             workable_life=life, workable_life_source="")
    ctx = Context(project, RuleBook())
    ctx.record("MX", Quantity("tests_asked", [{"test": "soundness"}], "", "tests to commission"))
    return setting_check(mix, ctx), ctx.rules


def test_setting_of_air_lime_alone_does_not_apply():
    c, _ = _setting_of({"L1": "air_lime"})
    assert (c.code, c.title, c.subject, c.subject_kind, c.status, c.value, c.unit) == (
        "SITE-SET", "Setting time and workable life", "MX", "mix", "info", None, "")
    assert c.message == ("air lime hardens by carbonation: a setting time does not apply; the "
                         "mortar stays workable while kept from drying")
    assert (c.basis, c.steps, c.notes, c.quantities, c.limit) == ((SET_BASIS,), (), (), (), None)


def test_setting_not_measured_holds_and_asks_for_the_test():
    """No setting time: hold, the test added to the ones earlier checks asked on MX."""
    c, _ = _setting_of({"N1": "natural_cement", "L1": "air_lime"})
    test = {"test": "initial and final setting time",
            "method": "Vicat (EN 196-3; EN 459-2 for building limes) on the paste at the "
                      "retarder dose of the card",
            "why": "sizes the gaugings of MX", "check": "SITE-SET"}
    assert (c.status, c.value, c.unit, c.steps, c.notes, c.basis) == (
        "hold", None, "", (), (), (SET_BASIS,))
    assert c.message == ("no setting time: commission Vicat (EN 196-3; EN 459-2 for building "
                         "limes) on the paste at the retarder dose of the card; until then the "
                         "gaugings rest on the workable life alone")
    assert c.quantities == (Quantity("tests_asked", [{"test": "soundness"}, test], "",
                                     "tests to commission"),)


def test_setting_of_a_natural_cement_at_the_card_dose_whole():
    """Natural cement with air lime, 45 min / 110 min (Vicat, EN 196-3, no laboratory named),
    tested at the card's 0.2 % ("Retarder" in the name only): no standard limit; no workable
    life measured, so the shorter family default (natural cement 10 min against air lime
    240 min) is used, shorter than the initial set: pass, with the default noted."""
    c, rules = _setting_of({"N1": "natural_cement", "L1": "air_lime"},
                           (2700.0, 6600.0, "vicat_en196_3", "", 0.002),
                           [("Citric Retarder", "set control", 0.002),
                            ("air entrainer", "frost", 0.0005)])
    nc = rules["works.workable_life_natural_cement"].source()
    src = "mixes.yaml MX.setting (Vicat, EN 196-3; laboratory not named)"
    assert (c.status, c.value, c.unit, c.basis) == ("pass", 45.0, "min", (SET_BASIS,))
    assert c.message == ("initial 45 min, final 110 min (Vicat, EN 196-3); natural cement: no "
                         "current standard limit; the set governs the gaugings; tested at the "
                         "card's retarder dose (0.2 %)")
    assert c.notes == ("the workable life is not measured (EN 1015-9): the gaugings rest on "
                       + nc,)
    assert c.steps == (Step(
        "Setting times and the workable life the gaugings use",
        r"t_i < t_f,\quad t_w = \min(t_{w,0},\ t_i)",
        (Input("t_i", "initial set", 45.0, "min", src),
         Input("t_f", "final set", 110.0, "min", src),
         Input("t_w,0", WL_SYMBOL, 10.0, "min",
               "default workable life of the binder family (common practice)"),
         Input("t_w", "workable life used for the gaugings", 10.0, "min", nc)),
        r"t_i = 45,\ t_f = 110,\ t_w = 10\ \mathrm{min}", 10.0, "min", "t_w"),)


def _lime_portland(issued=False):
    """NHL with Portland cement, 50 min / 10 h (600 min), Vicat EN 459-2, tested without the
    card's 0.2 % retarder, workable life measured 60 min (longer than the initial set)."""
    return _setting_of({"H1": "nhl", "P1": "portland"},
                       (3000.0, 36000.0, "vicat_en459_2", "Quayside Materials Lab", None),
                       [("sodium gluconate", "retarder", 0.002)], life=3600.0, issued=issued)


def test_setting_of_a_lime_with_portland_every_verdict_whole():
    """By hand: NHL 50 min < 60 min (fail) and 10 h ≤ 40 h; Portland 50 ≥ 45 min; the
    retarder dose differs (attention); the measured life 60 min exceeds the set (attention,
    the gaugings use 50 min): fail, every reason in the message in that order."""
    c, rules = _lime_portland()
    lo, hi, pc = (rules[f"durability.setting_{k}"] for k in (
        "initial_min_lime", "final_max_lime", "initial_min_portland"))
    src = "mixes.yaml MX.setting (Vicat, EN 459-2; Quayside Materials Lab)"
    measured = "mixes.yaml MX.workable_life, EN 1015-9 (laboratory)"
    assert (c.status, c.value, c.unit, c.notes) == ("fail", 50.0, "min", ())
    assert c.message == (
        "initial 50 min, final 600 min (Vicat, EN 459-2); natural hydraulic lime (NHL): "
        "initial < 60 min, final ≤ 40 h; Portland cement: initial set ≥ 45 min; tested at 0 % "
        "retarder but the card doses 0.2 %: repeat the test at the card's dose; measured "
        "workable life 60 min is longer than the initial set: the gaugings use 50 min; check "
        "the two tests")
    assert c.basis == (SET_BASIS, lo.basis, hi.basis, pc.basis)
    assert c.steps == (Step(
        "Setting times and the workable life the gaugings use",
        r"t_i < t_f,\quad t_w = \min(t_{w,0},\ t_i)",
        (Input("t_i", "initial set", 50.0, "min", src),
         Input("t_f", "final set", 600.0, "min", src),
         Input("t_i,min", lo.description, 60.0, "min", lo.source()),
         Input("t_f,max", hi.description, 40.0, "h", hi.source()),
         Input("t_i,min", pc.description, 45.0, "min", pc.source()),
         Input("t_w,0", WL_SYMBOL, 60.0, "min", "mixes.yaml MX.workable_life"),
         Input("t_w", "workable life used for the gaugings", 50.0, "min",
               f"mixes.yaml MX.setting.initial (initial set 50 min caps the 60 min of "
               f"{measured})")),
        r"t_i = 50,\ t_f = 600,\ t_w = 50\ \mathrm{min}", 50.0, "min", "t_w"),)


def test_setting_verdict_on_recalled_limits_held_when_issued():
    """The same mix in an issued revision: the fail rests on three limits recalled from
    memory, so it is held with each named (their descriptions)."""
    c, rules = _lime_portland(issued=True)
    named = ", ".join(f"“{rules[f'durability.setting_{k}'].description}”" for k in (
        "initial_min_lime", "final_max_lime", "initial_min_portland"))
    assert (c.status, c.notes) == ("hold", (
        f"held: the verdict (fail) rests on {named}, still to be confirmed against the "
        "printed source (or overridden with a justification) before this revision is issued",))


@pytest.mark.parametrize("initial, final, status, words", [
    (3600.0, 144000.0, "pass", "initial ≥ 60 min, final ≤ 40 h"),     # both on the edge
    (3540.0, 144000.0, "fail", "initial < 60 min, final ≤ 40 h"),
    (3600.0, 144060.0, "fail", "initial ≥ 60 min, final > 40 h"),
    (3600.0, 144030.0, "fail", "initial ≥ 60 min, final > 40 h")])     # 40 h and 30 s
def test_setting_of_a_lime_on_the_edges(initial, final, status, words):
    """EN 459-1 (from memory): initial set 60 min or more and final set 40 h (2400 min) or
    less both meet the limits; a minute beyond either fails.  Tested at the card's dose (no
    retarder on either), workable life measured 30 min (below the set)."""
    c, _ = _setting_of({"H1": "nhl"}, (initial, final, "vicat_en459_2", "Quayside", 0.0),
                       life=1800.0)
    assert (c.status, c.message) == (status, (
        f"initial {initial / 60:g} min, final {final / 60:g} min (Vicat, EN 459-2); natural "
        f"hydraulic lime (NHL): {words}"))


def test_durability_pieces_by_hand():
    """The shared pieces of the durability checks on hand-made inputs: the practice when
    dossier.yaml states none (content/data/practice.yaml: American practice is the default),
    a recalled rule's hold only in an issued revision and only of a verdict (not of info, hold
    or not assessed), a recalled table named in the hold, a rule confirmed by an override not
    held, the exposure recorded, and the words made safe for a formula's \\text{}."""
    from types import SimpleNamespace as NS
    from specgen.checks import durability_common as dc
    from specgen.checks.rules import RuleBook
    from specgen.checks.run import Context
    dossier = NS(practice=NS(follows=None, mortar_classes=None, mixing_reason=""),
                 compatibility=NS(grading_envelope=None))
    assert dc.practice(NS(dossier=dossier)) == (
        "american", "practice not stated in dossier.yaml: American practice (ASTM standards) "
        "assumed")
    dossier.practice.follows = "european"
    assert dc.practice(NS(dossier=dossier)) == ("european", "dossier.yaml practice: european")
    issued = Context(NS(revision=NS(status="issued")), RuleBook())
    draft = Context(NS(revision=NS(status="draft")), RuleBook())
    lime = dc.rule(issued, "setting_initial_min_lime")
    assert lime.key == "durability.setting_initial_min_lime"
    held = (f"held: the verdict (pass) rests on “{lime.description}”, table T, still to be "
            "confirmed against the printed source (or overridden with a justification) before "
            "this revision is issued")
    assert dc.memory_gate(issued, "pass", [lime], ["table T"]) == ("hold", [held])
    assert dc.memory_gate(issued, "fail", [], ["table T"])[0] == "hold"
    for status in ("info", "hold", "not_assessed"):
        assert dc.memory_gate(issued, status, [lime]) == (status, [])
    assert dc.memory_gate(draft, "fail", [lime], ["table T"]) == ("fail", [])
    confirmed = Context(NS(revision=NS(status="issued")), RuleBook([NS(
        rule="durability.setting_initial_min_lime", value=60, justification="read in EN 459-1")]))
    assert dc.memory_gate(confirmed, "pass", [dc.rule(confirmed, "setting_initial_min_lime")]) \
        == ("pass", [])
    assert dc.rule_input(issued, "t", "setting_initial_min_lime", shown=1.0) == Input(
        "t", lime.description, 1.0, "min", lime.source())
    assert dc.exposure(issued, "Z9") is None
    issued.record("Z9", Quantity("exposure_class", {"class": "MX3.2"}, "", "exposure"))
    assert dc.exposure(issued, "Z9") == {"class": "MX3.2"}
    assert dc.tests_quantity(issued, "Z9", []) == []
    assert dc.tex(r"a\b & <c> {d}") == "a b &amp; &lt;c&gt; (d)"
    assert dc.binder_types(NS(binders=[NS(binder="B1"), NS(binder="B9")]),
                           NS(binders={"B1": NS(type="nhl")})) == [("B1", "nhl")]


def test_setting_tested_at_another_retarder_dose_alone_is_attention():
    """Natural cement set tested at 0.1 % retarder while the card doses 0.2 % (workable life
    measured 10 min, within the set): the dose alone makes it attention (by hand)."""
    c, _ = _setting_of({"N1": "natural_cement"}, (2700.0, 6600.0, "vicat_en196_3", "", 0.001),
                       [("Citric Retarder", "set control", 0.002)], life=600.0)
    assert (c.status, c.notes) == ("attention", ())
    assert c.message == ("initial 45 min, final 110 min (Vicat, EN 196-3); natural cement: no "
                         "current standard limit; the set governs the gaugings; tested at 0.1 % "
                         "retarder but the card doses 0.2 %: repeat the test at the card's dose")


def test_setting_times_shown_to_two_decimals_of_a_minute():
    """Times read in seconds (2746.4 s and 6622 s, a workable life of 1000 s) are shown in
    minutes to two decimals: 45.77, 110.37 and 16.67 min (by hand: 45.7733…, 110.3667…,
    16.6667…); the message keeps %g."""
    c, _ = _setting_of({"N1": "natural_cement"}, (2746.4, 6622.0, "vicat_en196_3", "", 0.0),
                       life=1000.0)
    assert [(i.symbol, i.value) for i in c.steps[0].inputs] == [
        ("t_i", 45.77), ("t_f", 110.37), ("t_w,0", 16.67), ("t_w", 16.67)]
    assert (c.value, c.steps[0].result) == (45.77, 16.67)
    assert c.message.startswith("initial 45.7733 min, final 110.367 min (Vicat, EN 196-3)")


def test_setting_workable_life_equal_to_the_initial_set_is_no_conflict():
    """A workable life measured equal to the initial set (45 min both) is not longer than it:
    pass, the life used is 45 min (min of the two, by hand)."""
    c, _ = _setting_of({"N1": "natural_cement"}, (2700.0, 6600.0, "vicat_en196_3", "", 0.0),
                       life=2700.0)
    assert (c.status, c.steps[0].result) == ("pass", 45.0)
    assert c.message == ("initial 45 min, final 110 min (Vicat, EN 196-3); natural cement: no "
                         "current standard limit; the set governs the gaugings")


def test_setting_workable_life_longer_than_the_set_alone_is_attention():
    """A natural cement set at 45 min whose workable life was measured at 60 min (tested at
    the card's dose, no standard limit): the conflict of the two tests alone makes it
    attention, and the gaugings use the 45 min (by hand)."""
    c, _ = _setting_of({"N1": "natural_cement"}, (2700.0, 6600.0, "vicat_en196_3", "", 0.0),
                       life=3600.0)
    assert (c.status, c.steps[0].result) == ("attention", 45.0)
    assert c.message == ("initial 45 min, final 110 min (Vicat, EN 196-3); natural cement: no "
                         "current standard limit; the set governs the gaugings; measured "
                         "workable life 60 min is longer than the initial set: the gaugings use "
                         "45 min; check the two tests")
