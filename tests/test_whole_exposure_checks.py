"""DUR-EXPOSE and DUR-FROST (exposure_checks) read whole: the demo's zones by hand from
dossier.yaml and content/data/exposure_classes.yaml (EN 1996-2:2006, 2.1.2.1 and Annex A),
the frost regimes of content/rules/durability.yaml (common practice), and hand-made zones,
mixes and freeze-thaw results for the branches the demo never reaches."""
from __future__ import annotations

from types import SimpleNamespace as NS

import pytest

from specgen.checks.result import Basis, Input, Quantity, age_key
from tests.helpers import by_check

EXPOSE, FROST = "Exposure class of the zone", "Freeze–thaw resistance for the exposure"
EN1996 = Basis("reference", "en1996_2", "2.1.2.1 (3) and Annex A, Table A.1")
EN998 = Basis("reference", "en998_2", "durability: freeze–thaw resistance declared by the "
              "provisions valid in the place of use")
PRACTICE = Basis("common practice", note="binder class, air content and strength weighed for "
                 "frost as the trade does: NHL 5 or a cement for severe exposure, measured air "
                 "of a few per cent, a mortar that has reached its class before the first winter")
SEVERE = Basis("common practice", note="twice the moderate regime for saturated, salt-laden "
               "masonry; no European method exists for mortar")
WORDING = ("class wording: EN 1996-2:2006, 2.1.2.1 (3) (micro conditions of exposure of "
           "completed masonry, MX1 to MX5) and Annex A, Table A.1 (their sub-classes); ASTM "
           "C270, Appendix X1, Table X1.1 (guide for the selection of masonry mortars)")
FREEZE_SRC = ("dossier.yaml durability.freezing (Wrenmouth harbour weather station, daily means "
              "1996-2025 (invented))")
INDICATOR_FORMULA = (r"B \ge B_{min}\ (\text{lime only}),\quad a \ge a_{min}\ (\text{measured}),"
                     r"\quad f_{c,28} \ge f_{min}")


def method(n):
    return (f"at least {n} cycles on water-saturated prisms 40 × 40 × 160 mm by the provisions "
            "valid at the place of use (EN 998-2 gives no European method), reporting mass loss "
            "and strength loss against unfrozen companions")


def test_exposure_of_the_sheltered_zone_whole(demo_checked):
    """Z1 (demo dossier.yaml: 'sheltered harbour side, occasional spray'): 'sheltered' and
    'spray' read as the conditions sheltered and salt_spray, both moisture wetting
    (exposure_classes.yaml); a freezing site with wet masonry: MX3.1 (EN 1996-2 Table A.1),
    sea salt: MX4."""
    c = by_check(demo_checked[1])[("DUR-EXPOSE", "Z1")]
    assert (c.code, c.title, c.subject, c.subject_kind, c.status, c.value, c.unit) == (
        "DUR-EXPOSE", EXPOSE, "Z1", "zone", "info", "MX4 with MX3.1", "")
    assert c.basis == (EN1996,) and c.limit is None
    assert c.message == (
        "MX4 with MX3.1 (saturated salt air, sea water or de-icing salts; moisture or wetting "
        "plus freeze–thaw cycling): sheltered: moisture wetting; salt spray: moisture wetting; salt "
        "source: salt air or spray; moisture wetting (MX2.1/MX3.1); freezing site and the "
        "masonry wet → freeze-thaw cycling → MX3.1; salt air, sea water or de-icing salts → MX4")
    assert c.notes == ("dossier.yaml practice: european", WORDING)
    wet, mx = c.steps
    assert (wet.title, wet.formula, wet.substituted, wet.result, wet.unit, wet.symbol) == (
        "Wetting and salt sources of the conditions",
        r"w = \max_i w_i,\quad \text{salt source if any condition carries one}",
        r"w = \text{moisture},\ \text{salts: salt air or spray}", 1.0, "", "w")
    assert wet.inputs == (
        Input("sheltered", "sheltered (moisture wetting)", 1, "",
              "dossier.yaml Z1.exposure: 'sheltered'"),
        Input("salt_spray", "salt spray (moisture wetting; salt air or spray)", 1, "",
              "dossier.yaml Z1.exposure: 'spray'"))
    assert (mx.title, mx.formula, mx.substituted, mx.result, mx.unit, mx.symbol) == (
        "Micro condition", r"\text{MX by wetting, freeze-thaw, salts, chemicals}",
        r"\text{MX4 with MX3.1}", 2.0, "", "MX")
    assert mx.inputs == (Input("F", "site sees freezing", "yes", "", FREEZE_SRC),)
    (q,) = c.quantities
    assert (q.name, q.unit, q.label) == ("exposure_class", "", "exposure class")
    assert q.value == {
        "practice": "european", "designation": "MX4 with MX3.1", "classes": ["MX4", "MX3.1"],
        "base": "MX3.1", "wetting": "moisture", "freeze_thaw": True,
        "sea": ["salt air or spray"], "aggressive": False,
        "conditions": ["sheltered", "salt_spray"],
        # ASTM C270 Table X1.1: exterior, above grade, load-bearing wall: N (S or M)
        "american": {"location": "exterior, above grade, load-bearing wall", "recommended": "N",
                     "alternatives": ["S", "M"], "weathering": "moderate"}}


def test_frost_of_a_tested_mix_whole(demo_checked):
    """Z1/M1: MX4 with frost is the severe regime (sea salt): 50 cycles, mass loss ≤ 5 %,
    strength loss ≤ 20 % (rules of common practice); M1's test (materials.yaml, NML-4471):
    50 cycles, 1.8 % and 14 %: pass; NC1 a cement, measured air 4.5 % ≥ 4 %."""
    c = by_check(demo_checked[1])[("DUR-FROST", "Z1/M1")]
    assert (c.title, c.status, c.value, c.unit) == (FROST, "pass", 50, "cycles")
    assert c.basis == (EN998, SEVERE, PRACTICE)
    # the class with what it means (content/data/exposure_classes.yaml, EN 1996-2 wording)
    assert c.message == ("MX4 with MX3.1 (saturated salt air, sea water or de-icing salts; "
                         "moisture or wetting plus freeze–thaw cycling): 50 of 50 cycles; mass "
                         "loss 1.8 % (limit 5 %); strength loss 14 % (limit 20 %)")
    assert (c.limit.compare, c.limit.low, c.limit.text, c.limit.rule) == (
        ">=", 50.0, "N ≥ 50 cycles", "durability.frost_cycles_severe")
    ind, test = c.steps
    assert (ind.title, ind.formula, ind.result, ind.unit, ind.symbol) == (
        "What the mix has against the minima of common practice for the regime",
        INDICATOR_FORMULA, 3.0, "", "n_{met}")
    assert ind.substituted.startswith(r"B:\ \text{NC1 is a cement},\quad a = 4.5\,\% \ge 4\,\%,"
                                      r"\quad f_{c,28} = ")
    assert [(i.symbol, i.name, i.value, i.unit, i.source) for i in ind.inputs[:2]] == [
        ("NC1", "binder family", "natural cement", "", "materials.yaml NC1.type"),
        ("a", "air content of the fresh mortar", 4.5, "%", "mixes.yaml M1.air_content (measured)")]
    assert [i.symbol for i in ind.inputs[2:]] == ["a_min", "f_c28", "f_min"]
    src = ("materials.yaml mortar_properties M1.freeze_thaw (Northstead Materials Laboratory, "
           "NML-4471)")
    assert (test.title, test.formula, test.substituted, test.result, test.unit, test.symbol) == (
        "Freeze–thaw test against the regime of the class",
        r"N \ge N_{req},\ ML \le ML_{max},\ SL \le SL_{max}", r"N = 50\ \text{against}\ 50",
        50.0, "", "N")
    assert [(i.symbol, i.name, i.value, i.unit, i.source) for i in test.inputs[::2]] == [
        ("N", "cycles completed", 50, "", src), ("ML", "mass loss", 1.8, "%", src),
        ("SL", "strength loss", 14.0, "%", src)]
    assert [(i.symbol, i.value, i.unit) for i in test.inputs[1::2]] == [
        ("N_req", 50.0, ""), ("ML_max", 5.0, "%"), ("SL_max", 20.0, "%")]
    assert test.inputs[3].source == (
        "rule durability.frost_mass_loss_max (common practice — scaling beyond a few per cent of "
        "the mass marks a mortar that will not last in the joint)")
    assert c.quantities == ()


def test_frost_of_an_untested_lime_mix_is_held_whole(demo_checked):
    """Z1/M3: NH35 declared NHL 3.5 < 5 (the severe regime's lime class), air not measured,
    and a 28-d mean under 2.5 MPa: hold, the test named and the indicators that weigh
    against it."""
    c = by_check(demo_checked[1])[("DUR-FROST", "Z1/M3")]
    assert (c.title, c.status, c.value, c.unit, c.limit) == (FROST, "hold", None, "", None)
    assert c.message.startswith(
        "MX4 with MX3.1 (saturated salt air, sea water or de-icing salts; moisture or wetting "
        "plus freeze–thaw cycling) asks for a declared freeze–thaw resistance; M3 has none: "
        "commission "
        + method(50) + " — the indicators weigh against the mix: lime class 3.5 < 5; 28-d "
        "strength ")
    (step,) = c.steps
    assert step.result == 0.0
    assert step.substituted.startswith(r"B = 3.5 < 5,\quad a:\ \text{not measured},\quad "
                                       r"f_{c,28} = ")
    assert [i.symbol for i in step.inputs] == ["NH35", "B_min", "B", "a", "a_min", "f_c28",
                                               "f_min"]
    b = step.inputs[2]
    assert (b.name, b.value, b.source) == ("strength class of the lime (air lime counts 0)", 3.5,
                                           "materials.yaml NH35.declared_class")
    a = step.inputs[3]
    # not measured: the works rule's 4 % assumed, said so, and it does not count
    assert (a.name, a.value, a.unit) == ("air content of the fresh mortar (assumed: does not "
                                         "count)", 4.0, "%")
    (q,) = c.quantities
    assert q.value == [{"test": "freeze–thaw resistance of the mortar", "method": method(50),
                        "why": "zone Z1 is MX4 with MX3.1", "check": "DUR-FROST"}]


# ---------------------------------------------------------------- hand-made
def _ctx(demo_checked, exposure=None, f28=None):
    from specgen.checks.rules import RuleBook
    from specgen.checks.run import Context
    ctx = Context(demo_checked[0], RuleBook())
    if exposure is not None:
        ctx.record("Z9", Quantity("exposure_class", exposure, "", "exposure class"))
    if f28 is not None:
        ctx.record("M9", Quantity("mean_strength", {"compressive": {age_key(28 * 86400.0): f28}},
                                  "MPa", "mean strength"))
    return ctx


def _mix(demo_checked, binder="NC1", air=0.045):
    return NS(id="M9", binders=[NS(binder=binder, parts=1.0)], air_content=air,
              sands=demo_checked[0].mixes["M1"].sands, admixtures=[])


def _pair(mix, ft=None):
    return NS(zone=NS(id="Z9"), subject="Z9/M9", mix=mix, mix_id="M9",
              props=NS(freeze_thaw=ft) if ft is not None else None)


def _ft(cycles, mass=None, strength=None, source="Lab Nine", method_="slab"):
    return NS(cycles=cycles, mass_loss=mass, strength_loss=strength, source=source,
              method=method_)


MODERATE = {"designation": "MX3.1", "base": "MX3.1", "freeze_thaw": True, "sea": [],
            "wetting": "moisture"}


def _frost(demo_checked, pair, **kw):
    from specgen.checks.exposure_checks import _frost_one
    return _frost_one(pair, _ctx(demo_checked, **kw))


def test_frost_without_a_class_or_frost(demo_checked):
    none = _frost(demo_checked, _pair(_mix(demo_checked)))
    assert (none.status, none.basis) == ("not_assessed", (EN998,))
    assert "no exposure class for zone Z9 (see DUR-EXPOSE)" in none.message
    unknown = _frost(demo_checked, _pair(_mix(demo_checked)),
                     exposure={**MODERATE, "freeze_thaw": None})
    assert (unknown.status, unknown.message) == (
        "hold", "the site's frost is not stated: give durability.freezing in dossier.yaml (true "
        "where winter air falls below 0 °C)")
    dry = _frost(demo_checked, _pair(_mix(demo_checked)),
                 exposure={**MODERATE, "freeze_thaw": False, "designation": "MX2.1"})
    assert (dry.status, dry.value, dry.message) == (
        "pass", "MX2.1", "MX2.1: no freeze–thaw cycling, so no frost requirement")


def test_frost_tested_edges(demo_checked):
    """Moderate regime (MX3.1, no sea): 25 cycles.  24 cycles: hold (complete the test);
    mass loss exactly 5 % (0.05) passes (≤), 5.001 % fails; strength loss 20 % passes;
    no loss reported: hold."""
    mix = _mix(demo_checked)
    short = _frost(demo_checked, _pair(mix, _ft(24, 0.01)), exposure=MODERATE, f28=1.0)
    assert short.status == "hold"
    assert short.message == ("MX3.1: 24 of 25 cycles; mass loss 1 % (limit 5 %) — complete the "
                             "test: " + method(25))
    assert [q.value[0]["method"] for q in short.quantities] == [method(25)]
    assert short.steps[1].inputs[0].source == "materials.yaml mortar_properties M9.freeze_thaw (Lab Nine)"
    edge = _frost(demo_checked, _pair(mix, _ft(25, 0.05, 0.2)), exposure=MODERATE, f28=1.0)
    assert (edge.status, edge.limit.rule) == ("pass", "durability.frost_cycles_moderate")
    assert edge.message == ("MX3.1: 25 of 25 cycles; mass loss 5 % (limit 5 %); strength loss "
                            "20 % (limit 20 %)")
    over = _frost(demo_checked, _pair(mix, _ft(25, 0.05001)), exposure=MODERATE, f28=1.0)
    assert over.status == "fail"
    assert over.steps[1].inputs[2].value == 5.001          # 100 × 0.05001, to 3 decimals
    bare = _frost(demo_checked, _pair(mix, _ft(30, source="", method_="slab test")),
                  exposure=MODERATE, f28=1.0)
    assert bare.status == "hold"
    assert bare.message.startswith("MX3.1: 30 of 25 cycles; no mass or strength loss reported")
    assert bare.steps[1].inputs[0].source == ("materials.yaml mortar_properties M9.freeze_thaw "
                                              "(slab test)")


def test_frost_tested_pass_with_an_indicator_short_is_attention(demo_checked):
    """28-d mean 0.99 MPa < 1 MPa (moderate minimum, EN 998-2 class M1) after a passed test:
    attention, keep the site mix to the tested one; 1.0 MPa at the edge counts (≥)."""
    mix = _mix(demo_checked)
    c = _frost(demo_checked, _pair(mix, _ft(25, 0.01)), exposure=MODERATE, f28=0.99)
    assert c.status == "attention"
    assert c.message == ("MX3.1: 25 of 25 cycles; mass loss 1 % (limit 5 %); the test passed but "
                         "the indicators weigh against the mix: 28-d strength 0.99 MPa < 1 MPa — "
                         "keep the site mix to the tested one and protect the young work from "
                         "frost")
    assert c.steps[0].substituted.endswith(r"f_{c,28} = 0.99 < 1")
    at = _frost(demo_checked, _pair(mix, _ft(25, 0.01)), exposure=MODERATE, f28=1.0)
    assert at.status == "pass" and at.steps[0].result == 3.0


def test_frost_untested_moderate_deemed_to_satisfy(demo_checked):
    """MX3.1 untested: a cement, air 4 % measured (edge, ≥ 4 %) and 28-d 1 MPa: all minima met:
    attention, deemed to satisfy; the same in the severe regime (sea) is held."""
    mix = _mix(demo_checked, air=0.04)
    c = _frost(demo_checked, _pair(mix), exposure=MODERATE, f28=1.0)
    assert (c.title, c.status, c.value, c.unit) == (FROST, "attention", None, "")
    # a hand-made exposure without its classes: the designation alone
    assert c.message == ("MX3.1: no freeze–thaw test, but binder class, measured air content and "
                         "28-d strength all meet the minima of common practice for moderate "
                         "frost: deemed to satisfy; " + method(25) + " would confirm it")
    assert c.steps[0].substituted == (r"B:\ \text{NC1 is a cement},\quad a = 4\,\% \ge 4\,\%,"
                                      r"\quad f_{c,28} = 1 \ge 1")
    # content/rules/durability.yaml frost_cycles_moderate's basis
    assert c.basis == (EN998, Basis("common practice", note=(
        "EN 998-2 gives no European freeze-thaw method for masonry mortar and defers to the "
        "provisions valid at the place of use; laboratories commonly run some tens of cycles on "
        "saturated prisms")), PRACTICE)
    sea = _frost(demo_checked, _pair(mix), exposure={**MODERATE, "sea": ["spray"],
                                                     "designation": "MX4 with MX3.1"}, f28=3.0)
    assert sea.status == "hold" and method(50) in sea.message


def test_frost_lime_indicators(demo_checked):
    """An air lime counts class 0 (< 3.5, moderate); NH35's NHL 3.5 meets the moderate 3.5 (≥);
    a lime with no declared class is unknown; air 3.999 % < 4 % is short."""
    from types import SimpleNamespace as N
    p = demo_checked[0]
    binders = {**p.binders, "AL9": N(id="AL9", type="air_lime", declared_class=None),
               "HL9": N(id="HL9", type="hl", declared_class=None)}
    from specgen.checks.rules import RuleBook
    from specgen.checks.run import Context
    from specgen.checks.exposure_checks import _frost_one
    ctx = Context(N(binders=binders, revision=p.revision, dossier=p.dossier), RuleBook())
    ctx.record("Z9", Quantity("exposure_class", MODERATE, "", "exposure class"))
    ctx.record("M9", Quantity("mean_strength", {"compressive": {age_key(28 * 86400.0): 2.0}},
                              "MPa", "mean strength"))
    air = _frost_one(_pair(_mix(demo_checked, "AL9", air=0.03999)), ctx)
    assert air.status == "hold"
    assert air.message.endswith("the indicators weigh against the mix: lime class 0 < 3.5; air "
                                "content 3.999 % < 4 %")
    assert air.steps[0].substituted.startswith(r"B = 0 < 3.5,\quad a = 3.999\,\% < 4\,\%")
    nhl = _frost_one(_pair(_mix(demo_checked, "NH35", air=0.05)), ctx)
    assert nhl.status == "attention"                    # 3.5 ≥ 3.5, 5 % ≥ 4 %, 2 ≥ 1 MPa
    assert nhl.steps[0].substituted == (r"B = 3.5 \ge 3.5,\quad a = 5\,\% \ge 4\,\%,\quad "
                                        r"f_{c,28} = 2 \ge 1")
    hl = _frost_one(_pair(_mix(demo_checked, "HL9", air=0.05)), ctx)
    assert hl.status == "hold"
    assert hl.steps[0].substituted.startswith(r"B:\ \text{not declared}")
    assert "the indicators weigh" not in hl.message       # unknown is not short
    nf = _frost_one(_pair(_mix(demo_checked, "NC1", air=0.05)),
                    Context(N(binders=binders, revision=p.revision, dossier=p.dossier),
                            RuleBook(), quantities={"Z9": ctx.quantities["Z9"]}))
    assert nf.steps[0].substituted.endswith(r"f_{c,28}:\ \text{not tested}")


def test_exposure_not_assessed_unknown_frost_and_american(demo_checked, monkeypatch):
    from specgen.checks import durability_common as dc
    from specgen.checks.exposure_checks import exposure_check
    from specgen.checks.rules import RuleBook
    from specgen.checks.run import Context
    p = demo_checked[0]
    zone = NS(id="Z9", exposure="somewhere damp")
    none = exposure_check(zone, Context(NS(exposure={}, dossier=p.dossier), RuleBook()))
    assert (none.status, none.basis) == ("not_assessed", (EN1996,))
    assert none.message.startswith(
        "not assessed: the exposure of zone Z9 ('somewhere damp') names no condition the checks "
        "read; give 'exposure_conditions:' in dossier.yaml, from: internal, sheltered, exposed,")
    found = NS(conditions=["exposed"], given_as="exposure_conditions", found=[("exposed", "x")])
    dossier = NS(durability=NS(freezing=None, source=""), practice=p.dossier.practice,
                 compatibility=p.dossier.compatibility)
    c = exposure_check(zone, Context(NS(exposure={"Z9": found}, dossier=dossier), RuleBook()))
    assert c.status == "attention"
    assert c.notes[-1] == ("the site's frost is not stated (dossier.yaml durability.freezing): "
                           "the freeze-thaw sub-class cannot be told")
    assert c.steps[0].inputs[0].source == "dossier.yaml Z9.exposure_conditions: x"
    assert c.steps[1].inputs == (Input("F", "site sees freezing", "unknown", "",
                                       "dossier.yaml durability.freezing"),)
    monkeypatch.setattr(dc, "practice", lambda project: ("american",
                                                         "dossier.yaml practice: american"))
    am = exposure_check(zone, Context(NS(exposure={"Z9": found}, dossier=dossier), RuleBook()))
    loc = am.quantities[0].value["american"]
    assert am.basis == (Basis("reference", "astmc270", "Appendix X1, Table X1.1"),)
    assert am.message == (f"{loc['location']}: type {loc['recommended']} recommended "
                          f"(alternatives {', '.join(loc['alternatives'])}); weathering "
                          f"{loc['weathering']} (EN 1996-2 equivalent {am.value})")
