"""DUR-TSA and DUR-ETT (sulfate_checks) read whole: the demo's zones and hand-made contexts for
the branches the demo never reaches (a condition absent, unknown, the edges of the cold and
carbonate rules).  Expected values by hand beside each from the demo's data and the rules
(content/rules/durability.yaml: thaumasite below 15 °C, carbonate from CO2 0.5 %;
compatibility.yaml: aluminate-rich from Al2O3 5 %)."""
from __future__ import annotations

from types import SimpleNamespace as NS

import pytest

from specgen.checks.result import Basis, Input, Quantity
from tests.helpers import by_check

TSA, ETT = "Thaumasite sulfate attack", "Ettringite sulfate expansion"
# the rule's basis (content/rules/durability.yaml thaumasite_temperature_max): the Thaumasite
# Expert Group's report (1999) read in a public summary
TEG = Basis("reference", "teg1999", "primary risk factors: a sulfate source, mobile water, "
            "carbonate and low temperatures, generally below 15 °C", read_in="teg_summary")
ALU = Basis("common practice", note="natural cements and clinker-bearing binders carry several "
            "per cent of reactive alumina")   # compatibility.aluminate_rich_al2o3's basis
FORMULA = r"\text{risk} = \bigwedge_i \text{condition}_i"
SEA_NOTE = ("sea water: its chloride moderates the expansion of ettringite in practice, but the "
            "sulfate still reacts; a sulfate-resisting choice is the safe one (common practice)")
# demo: dossier.yaml lowest winter temperature 269.15 K = -4.0 °C; NC1-A CO2 1.9 % and Al2O3
# 8.1 %, NHL-A Al2O3 2.5 % (analyses.yaml); Z2 exposure MX4 with MX3.2 (splash, severe)
COLD = "cold: -4.0 °C < 15 °C"
CARB_NC1 = "carbonate: NC1: CO2 1.9 % ≥ 0.5 % (analysis NC1-A)"

#: the water condition of the demo's zone Z1: the class by its designation (what it means is
#: said once, by DUR-EXPOSE/Z1, named as the condition's source)
WATER_MX31 = "water: moisture wetting (MX4 with MX3.1)"


def _inputs(step):
    return [(i.symbol, i.name, i.value, i.unit, i.source) for i in step.inputs]


def test_thaumasite_of_natural_cement_in_the_splash_zone_whole(demo_checked):
    c = by_check(demo_checked[1])[("DUR-TSA", "Z2/M1")]
    # every condition met and the fabric's sulfate is high (COMP-SALT/Z2/M1): fail
    assert (c.code, c.title, c.subject, c.subject_kind, c.status, c.value, c.unit) == (
        "DUR-TSA", TSA, "Z2/M1", "zone", "fail", "all 5 conditions met", "")
    sul = ("sulfate: fabric sulfate high (COMP-SALT/Z2/M1); sea water (splash and wave "
           "overtopping, DUR-EXPOSE/Z2)")
    water = "water: severe wetting (MX4 with MX3.2)"
    assert c.message == ("thaumasite risk: every condition met — C-S-H: NC1 (natural cement); "
                         f"{sul}; {water}; {CARB_NC1}; {COLD}")
    assert (c.basis, c.limit, c.notes, c.quantities) == ((TEG,), None, (), ())
    (step,) = c.steps
    assert (step.title, step.formula, step.result, step.unit, step.symbol) == (
        "Conditions of thaumasite", FORMULA, 5.0, "", "n")
    assert step.substituted == r"\ \wedge\ ".join(
        rf"\text{{{n}: yes}}" for n in ("C-S-H", "sulfate", "water", "carbonate", "cold"))
    assert _inputs(step) == [
        ("C-S-H", "C-S-H: NC1 (natural cement)", "yes", "", "materials.yaml binder types"),
        ("sulfate", sul, "yes", "", "COMP-SALT, DUR-EXPOSE"),
        ("water", water, "yes", "", "DUR-EXPOSE/Z2"),
        ("carbonate", CARB_NC1, "yes", "", "analyses.yaml, materials.yaml"),
        ("cold", COLD, "yes", "", "dossier.yaml durability.lowest_temperature")]


def test_thaumasite_of_a_lime_in_the_sheltered_zone_is_attention(demo_checked):
    """Z1/M3: NHL (lime-rich, carbonates in the wall), fabric sulfate only low but salt spray
    (sea water) with moisture wetting: every condition met, not severe: attention."""
    c = by_check(demo_checked[1])[("DUR-TSA", "Z1/M3")]
    assert (c.status, c.value) == ("attention", "all 5 conditions met")
    carb = "carbonate: NH35: natural hydraulic lime (NHL) carbonates in the wall (calcite)"
    assert c.steps[0].inputs[0].name == "C-S-H: NH35 (NHL)"
    assert c.steps[0].inputs[3].name == carb
    assert carb in c.message and WATER_MX31 in c.message


def test_ettringite_whole(demo_checked):
    res = by_check(demo_checked[1])
    alu_src = "analyses.yaml Al2O3 against rule compatibility.aluminate_rich_al2o3"
    # Z1/M3: NH35's Al2O3 2.5 % < 5 %: aluminate absent, pass
    p = res[("DUR-ETT", "Z1/M3")]
    assert (p.title, p.status, p.value, p.unit, p.basis, p.notes) == (
        ETT, "pass", "aluminate absent", "", (ALU,), ())
    assert p.message == ("no ettringite risk: aluminate absent (NH35: Al2O3 2.5 % in analysis "
                         "NHL-A < 5 %)")
    (step,) = p.steps
    assert (step.title, step.formula, step.result, step.unit, step.symbol) == (
        "Conditions of ettringite", FORMULA, 2.0, "", "n")
    assert step.substituted == (r"\text{aluminate: no}\ \wedge\ \text{sulfate: yes}\ \wedge\ "
                                r"\text{water: yes}")
    sul = "sulfate: fabric sulfate low (COMP-SALT/Z1/M3); sea water (salt air or spray, DUR-EXPOSE/Z1)"
    assert _inputs(step) == [
        ("aluminate", "aluminate: NH35: Al2O3 2.5 % in analysis NHL-A < 5 %", "no", "", alu_src),
        ("sulfate", sul, "yes", "", "COMP-SALT, DUR-EXPOSE"),
        ("water", WATER_MX31, "yes", "", "DUR-EXPOSE/Z1")]
    # Z1/M1: NC1's 8.1 % ≥ 5 %, sea water, not high sulfate: attention with the sea note
    a = res[("DUR-ETT", "Z1/M1")]
    assert (a.status, a.value, a.notes) == ("attention", "all 3 conditions met", (SEA_NOTE,))
    assert a.message.startswith("ettringite risk: every condition met — aluminate: NC1: Al2O3 "
                                "8.1 % in analysis NC1-A ≥ 5 %; sulfate: fabric sulfate low")
    # Z2/M1: high fabric sulfate: fail, and no sea note (the note is for the sea's risk only)
    f = res[("DUR-ETT", "Z2/M1")]
    assert (f.status, f.notes, f.steps[0].result) == ("fail", (), 3.0)


# ---------------------------------------------------------------- hand-made contexts
def _ctx(demo_checked, zone_q=None, salt=None, lowest=269.15, site=None, issued=False):
    """The demo project with the named parts replaced, and the zone's exposure and the pair's
    salt classes given as quantities (the way DUR-EXPOSE and COMP-SALT record them)."""
    from specgen.checks.rules import RuleBook
    from specgen.checks.run import Context
    p = demo_checked[0]
    project = NS(binders=p.binders, analyses=p.analyses, mixes=p.mixes,
                 revision=NS(status="issued" if issued else "draft"),
                 dossier=NS(durability=NS(lowest_temperature=lowest),
                            compatibility=p.dossier.compatibility), site_temperature=site)
    ctx = Context(project, RuleBook())
    if zone_q is not None:
        ctx.record("Z9", Quantity("exposure_class", zone_q, "", "exposure class"))
    if salt is not None:
        ctx.record("Z9/M1", Quantity("salt_load_class", {"table": "wta_2_9", **salt}, "",
                                     "salt-load classes"))
    return ctx


def _pair(demo_checked, mix="M1", binders=None):
    m = demo_checked[0].mixes[mix]
    if binders is not None:
        m = NS(id=m.id, binders=[NS(binder=b, parts=1.0) for b in binders])
    return NS(zone=NS(id="Z9"), subject="Z9/M1", mix=m, mix_id=mix)


WET = {"wetting": "moisture", "designation": "MX3.1", "sea": []}


def _tsa(demo_checked, pair=None, **kw):
    from specgen.checks.sulfate_checks import _tsa_one
    return _tsa_one(pair or _pair(demo_checked), _ctx(demo_checked, **kw))


def test_thaumasite_cold_edge_is_strict(demo_checked):
    """DUR-TSA: 15 °C exactly (288.15 K) is not below 15 °C: cold absent, pass; 14.9 °C is cold."""
    c = _tsa(demo_checked, zone_q=WET, salt={"HM1": {"sulfate": "medium"}}, lowest=288.15)
    assert (c.status, c.value) == ("pass", "cold absent")
    assert c.message == ("no thaumasite risk: cold absent (15.0 °C ≥ 15 °C)")
    assert c.steps[0].inputs[-1] == Input("cold", "cold: 15.0 °C ≥ 15 °C", "no", "",
                                          "dossier.yaml durability.lowest_temperature")
    assert c.steps[0].result == 4.0
    cold = _tsa(demo_checked, zone_q=WET, salt={"HM1": {"sulfate": "medium"}}, lowest=288.05)
    # 288.05 − 273.15 = 14.9 °C < 15; medium sulfate, no sea: attention, not fail
    assert (cold.status, cold.steps[0].inputs[-1].name) == ("attention", "cold: 14.9 °C < 15 °C")
    assert "sulfate: fabric sulfate medium (COMP-SALT/Z9/M1)" in cold.message


def test_thaumasite_cold_from_the_site_record(demo_checked):
    """DUR-TSA with no lowest winter temperature: the coldest day of the site record (here 276.15 K, 3.0 °C,
    the least of the points), or its constant temperature."""
    site = NS(source="lab/site.csv", constant=None, points=((0.0, 280.15), (86400.0, 276.15)))
    c = _tsa(demo_checked, zone_q=WET, salt={"HM1": {"sulfate": "high"}}, lowest=None,
             site=site)
    assert c.steps[0].inputs[-1] == Input("cold", "cold: 3.0 °C < 15 °C", "yes", "",
                                          "coldest day of lab/site.csv")
    assert c.status == "fail"          # high fabric sulfate
    flat = NS(source="lab/flat.csv", constant=293.15, points=())
    w = _tsa(demo_checked, zone_q=WET, salt={"HM1": {"sulfate": "high"}}, lowest=None, site=flat)
    assert (w.status, w.steps[0].inputs[-1].name) == ("pass", "cold: 20.0 °C ≥ 15 °C")


def test_thaumasite_unknowns_hold_and_name_the_measurement(demo_checked):
    """No exposure class, no fabric sulfate and no winter temperature: three conditions
    unknown: hold, each with what decides it, and the tests asked."""
    c = _tsa(demo_checked, lowest=None)
    assert (c.status, c.value) == ("hold", None)
    assert c.message == (
        "thaumasite: cannot decide — sulfate unknown: measure sulfate in the units and the "
        "historic mortar (soluble salts, mass %); water unknown: give dossier.yaml "
        "Z9.exposure_conditions; cold unknown: give durability.lowest_temperature in "
        "dossier.yaml")
    assert _inputs(c.steps[0])[1:] == [
        ("sulfate", "sulfate: no sulfate measured in the fabric and no sea water", "unknown", "",
         "COMP-SALT, DUR-EXPOSE"),
        ("water", "water: no exposure class", "unknown", "", "DUR-EXPOSE"),
        ("carbonate", CARB_NC1, "yes", "", "analyses.yaml, materials.yaml"),
        ("cold", "cold: winter temperature unknown", "unknown", "", "dossier.yaml")]
    assert c.steps[0].result == 2.0
    (q,) = c.quantities
    assert q.name == "tests_asked"
    assert [(t["test"], t["check"]) for t in q.value] == [
        ("sulfate for thaumasite", "DUR-TSA"), ("water for thaumasite", "DUR-TSA"),
        ("cold for thaumasite", "DUR-TSA")]
    assert q.value[0]["why"] == "thaumasite in zone Z9"


def test_thaumasite_absent_conditions(demo_checked):
    """DUR-TSA: dry wetting; low fabric sulfate with no sea; air lime only (no C-S-H, but it carbonates);
    de-icing salt is not sea water."""
    dry = {"wetting": "dry", "designation": "MX1", "sea": ["de-icing salts"]}
    c = _tsa(demo_checked, _pair(demo_checked, binders=["L9"]), zone_q=dry,
             salt={"HM1": {"sulfate": "low"}})
    # L9 is not a demo binder: no C-S-H former and no carbonate source either
    assert (c.status, c.value) == ("pass", "C-S-H, sulfate, water, carbonate absent")
    assert c.message == (
        "no thaumasite risk: C-S-H absent (air lime only: no C-S-H); sulfate absent (fabric "
        "sulfate low (COMP-SALT/Z9/M1)); water absent (dry wetting (MX1)); carbonate absent "
        "(no CO2 in the binders' analyses and no lime-rich binder)")


def test_thaumasite_carbonate_edge_and_sea_severity(demo_checked):
    """CO2 exactly 0.5 % carbonates (≥); sea water with severe wetting is a fail without any
    fabric sulfate class."""
    from specgen.checks import sulfate_checks as sc
    p = demo_checked[0]
    an = NS(id="A9", mass_percent={"CO2": 0.5, "Al2O3": 5.0})
    b = NS(id="B9", type="natural_cement", analysis="A9")
    project = NS(binders={**p.binders, "B9": b}, analyses={**p.analyses, "A9": an})
    from specgen.checks.rules import RuleBook
    from specgen.checks.run import Context
    ctx = Context(project, RuleBook())
    pair = _pair(demo_checked, binders=["B9"])
    cond = sc.carbonate(pair, ctx)
    assert (cond.met, cond.why) == (True, "B9: CO2 0.5 % ≥ 0.5 % (analysis A9)")
    an.mass_percent["CO2"] = 0.49
    assert sc.carbonate(pair, ctx).met is False
    sea = {"wetting": "severe", "designation": "MX3.2", "sea": ["splash"]}
    c = _tsa(demo_checked, zone_q=sea, salt={"HM1": {"sulfate": "low"}})
    assert c.status == "fail"
    moist = _tsa(demo_checked, zone_q={**sea, "wetting": "moisture"},
                 salt={"HM1": {"sulfate": "low"}})
    assert moist.status == "attention"


def test_ettringite_branches(demo_checked):
    from specgen.checks.sulfate_checks import _ett_one
    none = _ett_one(NS(zone=NS(id="Z9"), subject="Z9/M7", mix=None, mix_id="M7"),
                    _ctx(demo_checked))
    assert (none.code, none.title, none.status) == ("DUR-ETT", ETT, "not_assessed")
    assert "unknown mix M7" in none.message
    # high fabric sulfate on NC1 (8.1 % Al2O3 ≥ 5 %) in a moist zone: fail, no sea note
    hi = _ett_one(_pair(demo_checked), _ctx(demo_checked, zone_q=WET,
                                            salt={"GS1": {"sulfate": "high"}}))
    assert (hi.status, hi.notes) == ("fail", ())
    assert hi.basis == (ALU,)
    tsa_none = _tsa(demo_checked, NS(zone=NS(id="Z9"), subject="Z9/M7", mix=None, mix_id="M7"))
    assert (tsa_none.status, tsa_none.basis) == ("not_assessed", (TEG,))


def test_sulfate_verdicts_held_in_an_issued_revision_only_on_a_recalled_table(demo_checked,
                                                                          monkeypatch):
    """DUR-TSA: content/data/salt_load.yaml's tables carry no memory tag: an issued revision keeps a
    fail on a high fabric class; were the table's edges recalled (tag memory, patched here),
    the verdict is held and the table named."""
    from specgen.checks import salt_checks
    from specgen.checks.sulfate_checks import _tsa_one
    ctx = _ctx(demo_checked, zone_q=WET, salt={"HM1": {"sulfate": "high"}}, issued=True)
    assert _tsa_one(_pair(demo_checked), ctx).status == "fail"
    monkeypatch.setattr(salt_checks, "table", lambda c: ("t9", {"tag": "memory", "title": "T9"}))
    c = _tsa_one(_pair(demo_checked), ctx)
    assert c.status == "hold"
    assert c.notes == ("held: the verdict (fail) rests on the salt-load class edges of T9, still "
                       "to be confirmed against the printed source (or overridden with a "
                       "justification) before this revision is issued",)
    monkeypatch.setattr(salt_checks, "table", lambda c: ("t9", {"tag": "memory"}))
    assert "the salt-load class edges of the salt-load table," in _tsa_one(
        _pair(demo_checked), ctx).notes[0]
    # sea water alone (low fabric class) rests on no table: the verdict stands
    low = _ctx(demo_checked, zone_q={"wetting": "severe", "designation": "MX3.2",
                                     "sea": ["splash"]}, salt={"HM1": {"sulfate": "low"}},
               issued=True)
    assert _tsa_one(_pair(demo_checked), low).status == "fail"


def test_thaumasite_of_medium_fabric_sulfate_without_sea_is_not_severe(demo_checked):
    """DUR-TSA and DUR-ETT: medium fabric sulfate, no sea water, severe wetting: every
    condition met, but neither high sulfate nor sea water with severe wetting: attention, and
    no sea note on the ettringite result."""
    from specgen.checks.sulfate_checks import _ett_one
    severe = {"wetting": "severe", "designation": "MX3.2", "sea": []}
    c = _tsa(demo_checked, zone_q=severe, salt={"HM1": {"sulfate": "medium"}})
    assert c.status == "attention"
    e = _ett_one(_pair(demo_checked), _ctx(demo_checked, zone_q=severe,
                                           salt={"HM1": {"sulfate": "medium"}}))
    assert (e.status, e.notes) == ("attention", ())
