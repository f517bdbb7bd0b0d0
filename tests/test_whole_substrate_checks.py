"""DUR-RETAIN, DUR-BOND and DUR-CARB (substrate_checks) read whole: the demo's results
(``demo_checked``), every value by hand from the demo's materials.yaml, dossier.yaml and
content/rules/durability.yaml beside it; the branches the demo never takes on pairs changed in
memory (no copy checked)."""
from __future__ import annotations

import math

import pytest

from specgen.checks import compatibility_common as cc
from specgen.checks import substrate_checks as sb
from specgen.checks.result import Basis, Input
from tests.helpers import checked_context

IRA_HIGH = Input(
    "IRA_high", "initial rate of absorption above which units are of high suction and are "
    "wetted before laying (30 g/min over 30 in²)", 1.55, "kg/(m^2*min)",
    "rule durability.ira_high (common practice — the edge of high suction lies at about 1.5-2 "
    "kg/(m²·min) in the trade's guidance; the lower end (30 g/min over 30 in²) is taken, the "
    "safe side for bond)")
THIRSTY = ("a thirsty background draws the water out of the mortar before it can set or bond: "
           "the mortar must hold it, and the background is damped first")
BOND_NOTE = ("EN 998-1 asks for a declared value and the fracture pattern, not a minimum; about "
             "0.1 MPa is usual for lime-based renders that stay on the wall")
DAMP = "units of high suction: damp the background evenly before placing, and again between coats"


def _pair(project, zone_id, mix, **swap):
    zone = next(z for z in project.dossier.zones if z.id == zone_id)
    pair = next(p for p in cc.pairs(zone, project) if p.mix_id == mix)
    return type(pair)(**{**pair.__dict__, **swap}) if swap else pair


def test_dur_retain_of_z2_m2_high_suction_fails(demo_checked):
    """Z2/M2: GS1's IRA 2.1 kg/(m²·min) (materials.yaml) > 1.55 (durability.ira_high): high
    suction, so WR ≥ 85 % (water_retention_min_high_suction); M2 holds 78 %: fail, and the
    note to damp the background."""
    _, results = demo_checked
    c = results.check("DUR-RETAIN", "Z2/M2")
    assert (c.title, c.status, c.value, c.unit) == (
        "Water retention against the suction of the units", "fail", 78.0, "%")
    assert c.basis == (Basis("common practice", note=THIRSTY),)
    step, = c.steps
    assert (step.title, step.formula, step.result, step.unit, step.symbol) == (
        "Water retention against the suction of the units", r"WR \ge WR_{min}(\text{suction})",
        78.0, "%", "WR")
    assert step.inputs == (
        Input("IRA", "initial rate of absorption of GS1", 2.1, "kg/(m²·min)", "materials.yaml GS1"),
        IRA_HIGH,
        Input("WR", "water retention of M2", 78.0, "%", "materials.yaml mortar_properties M2"),
        Input("WR_min", "smallest water retention of a mortar on units of high suction", 85.0,
              "%", f"rule durability.water_retention_min_high_suction (common practice — {THIRSTY})"))
    assert step.substituted == r"78\,\% < 85\,\%"
    assert c.message == "high suction: water retention 78 % < 85 %"
    assert c.notes == (DAMP,)
    assert (c.limit.compare, c.limit.low, c.limit.unit, c.limit.text, c.limit.rule) == (
        ">=", 85.0, "%", "WR ≥ 85 %", "durability.water_retention_min_high_suction")


def test_dur_retain_of_z1_m2_ordinary_suction_passes(demo_checked):
    """Z1/M2: EB1's IRA 0.4 ≤ 1.55: ordinary suction, WR ≥ 75 % (ASTM C270, recalled: the
    demo is a draft, so the verdict stands); 78 ≥ 75: pass, no damping note."""
    _, results = demo_checked
    c = results.check("DUR-RETAIN", "Z1/M2")
    assert (c.status, c.message, c.notes) == (
        "pass", "ordinary suction: water retention 78 % ≥ 75 %", ())
    assert c.steps[0].substituted == r"78\,\% \ge 75\,\%"
    assert c.steps[0].inputs[-1] == Input(
        "WR_min", "smallest water retention of a masonry mortar laid on units of ordinary "
        "suction", 75.0, "%", "rule durability.water_retention_min (ASTM C270, property "
        "specification, water retention)")
    assert c.basis == (Basis("reference", "astmc270", "property specification, water retention",
                             "from memory"),)


def test_dur_retain_by_the_capillary_coefficient_edges_and_hold(demo_checked):
    """A unit without IRA falls back on COMP-MOIST's C of the units (GS1 0.35 > 0.3,
    durability.capillary_high_suction: high); WR exactly 85 % passes (≥); 84.99 % fails; no
    WR at all: hold with the test asked; no suction known at all: not assessed."""
    project, _ = demo_checked
    ctx = checked_context(demo_checked)
    pair = _pair(project, "Z2", "M2")
    unit = pair.unit.model_copy(update={"initial_rate_of_absorption": None})
    at = _pair(project, "Z2", "M2", unit=unit,
               props=pair.props.model_copy(update={"water_retention": 0.85}))
    c = sb._retain_one(at, ctx)
    assert c.status == "pass"
    assert c.steps[0].inputs[:2] == (
        Input("C_u", "capillary coefficient of the units", 0.35, "kg/(m²·min^0.5)",
              "COMP-MOIST/Z2/M2"),
        Input("C_high", "capillary absorption coefficient of the units above which they are "
              "treated as of high suction when no initial rate of absorption is given", 0.3,
              "kg/(m^2*min^0.5)", "rule durability.capillary_high_suction (common practice — "
              "porous sandstones and soft bricks absorb above this; dense engineering bricks "
              "far below)"))
    assert c.message == "high suction: water retention 85 % ≥ 85 %"
    below = _pair(project, "Z2", "M2", unit=unit,
                  props=pair.props.model_copy(update={"water_retention": 0.8499}))
    c = sb._retain_one(below, ctx)
    assert (c.status, c.value, c.steps[0].substituted) == ("fail", 84.99, r"84.99\,\% < 85\,\%")
    none = _pair(project, "Z2", "M2", props=pair.props.model_copy(update={"water_retention": None}))
    c = sb._retain_one(none, ctx)
    assert (c.code, c.status, c.value) == ("DUR-RETAIN", "hold", None)
    assert c.message == ("units of high suction: the mortar must retain at least 85 % of its "
                         "water; M2 has no water retention — commission the suction test of the "
                         "fresh mortar (ASTM C1506 / EN 413-2 style)")
    tests = {q.name: q.value for q in c.quantities}["tests_asked"]
    assert {"test": "water retention of the fresh mortar", "method": "suction test of the fresh "
            "mortar (ASTM C1506 / EN 413-2 style)", "why": "units of high suction in zone Z2",
            "check": "DUR-RETAIN"} in tests
    blind = _pair(project, "Z2", "M2", unit=unit)
    ctx.quantities = {k: v for k, v in ctx.quantities.items() if k != "Z2/M2"}
    c = sb._retain_one(blind, ctx)
    assert (c.status, c.message) == (
        "not_assessed", "not assessed: the suction of the units is unknown: commission their "
        "initial rate of absorption (EN 772-11; ASTM C67) or capillary coefficient (EN 1925) and "
        "give materials.yaml GS1.initial_rate_of_absorption (or GS1.capillary_coefficient)")


def test_dur_bond_of_z2_m2_whole(demo_checked):
    """Z2/M2 render: M2 bond 0.12 MPa, broke in the mortar (materials.yaml); minimum 0.1 MPa
    (durability.render_bond_min): pass.  Only the render zone Z2 has DUR-BOND."""
    _, results = demo_checked
    c = results.check("DUR-BOND", "Z2/M2")
    src = ("materials.yaml mortar_properties M2 (NML-4460; capillary readings in "
           "lab/capillary.csv)")
    assert (c.title, c.status, c.value, c.unit) == (
        "Render bond to the background", "pass", 0.12, "MPa")
    assert c.basis == (Basis("reference", "en1015_12", "adhesive strength by pull-off, fracture "
                             "pattern"), Basis("common practice", note=BOND_NOTE))
    step, = c.steps
    assert (step.title, step.formula, step.result, step.unit, step.symbol) == (
        "Pull-off bond against the minimum", r"f_u \ge f_{u,min}", 0.12, "MPa", "f_u")
    assert step.inputs == (
        Input("f_u", "pull-off bond strength", 0.12, "MPa", src),
        Input("FP", "fracture", "in the mortar", "", src),
        Input("f_u,min", "smallest pull-off bond strength of a render on its background "
              "(EN 1015-12)", 0.1, "MPa", f"rule durability.render_bond_min (common practice — "
              f"{BOND_NOTE})"))
    assert step.substituted == r"0.12 \ge 0.1\ \mathrm{MPa}"
    assert c.message == "bond 0.12 MPa ≥ 0.1 MPa, broke in the mortar"
    assert (c.limit.compare, c.limit.low, c.limit.unit, c.limit.text, c.limit.rule) == (
        ">=", 0.1, "MPa", "≥ 0.1 MPa", "durability.render_bond_min")
    assert {s for (code, s) in ((r.code, r.subject) for r in results.checks)
            if code == "DUR-BOND"} == {"Z2/M1", "Z2/M2"}


@pytest.mark.parametrize("bond, failure, status, tail", [
    # below 0.1 MPa: where it broke decides between attention and fail (EN 1015-12 fracture
    # patterns: in the mortar or the background the bond outlasted it)
    (0.08e6, "mortar", "attention", "bond 0.08 MPa < 0.1 MPa, broke in the mortar — below the "
     "minimum, but the bond outlasted the mortar: a weak, sacrificial render"),
    (0.08e6, "substrate", "attention", "bond 0.08 MPa < 0.1 MPa, broke in the background — "
     "below the minimum, but the bond outlasted the background: consolidate or accept the "
     "weak surface"),
    (0.08e6, "adhesive", "fail", "bond 0.08 MPa < 0.1 MPa, broke at the interface"),
    (0.08e6, None, "fail", "bond 0.08 MPa < 0.1 MPa, broke fracture not recorded"),
    # exactly the minimum passes (≥)
    (0.1e6, "adhesive", "pass", "bond 0.1 MPa ≥ 0.1 MPa, broke at the interface"),
    # a fractional value shown to 4 decimals: 0.123456 MPa → 0.1235
    (0.123456e6, "adhesive", "pass", "bond 0.123456 MPa ≥ 0.1 MPa, broke at the interface"),
])
def test_dur_bond_on_each_fracture_and_the_edge(demo_checked, bond, failure, status, tail):
    project, _ = demo_checked
    pair = _pair(project, "Z2", "M2")
    p = pair.props.model_copy(update={"bond_strength": bond, "bond_failure": failure,
                                      "source": None})
    c = sb._bond_one(_pair(project, "Z2", "M2", props=p), checked_context(demo_checked))
    assert (c.code, c.status, c.message) == ("DUR-BOND", status, tail)
    assert c.value == round(bond / 1e6, 4)
    assert c.steps[0].inputs[0].source == "materials.yaml mortar_properties M2 (laboratory)"


def test_dur_bond_not_measured_is_held_and_not_a_render_zone(demo_checked):
    """No bond measured: hold, the EN 1015-12 pull-off asked; a repointing zone: no result."""
    project, _ = demo_checked
    pair = _pair(project, "Z2", "M2")
    p = pair.props.model_copy(update={"bond_strength": None})
    c = sb._bond_one(_pair(project, "Z2", "M2", props=p), checked_context(demo_checked))
    assert (c.status, c.value, c.title) == ("hold", None, "Render bond to the background")
    assert c.message == ("render bond of M2 not measured: commission the EN 1015-12 pull-off "
                         "on the trial panel at 28 d, at least five discs, recording where each "
                         "broke")
    z1 = next(z for z in project.dossier.zones if z.id == "Z1")
    assert sb.bond_check(z1, checked_context(demo_checked)) == []


def test_dur_carb_of_z1_m3_whole_by_least_squares_through_the_origin(demo_checked):
    """Z1/M3 (NH35, natural hydraulic lime: lime-rich): depths 4.5 mm at 28 d and 8 mm at
    90 d (materials.yaml).  x = K√t by least squares through the origin: K = Σx√t / Σt =
    (4.5√28 + 8√90) / 118 mm/√d; t = (d/K)² with d = 20 mm (dossier.yaml Z1.joint_depth)."""
    _, results = demo_checked
    c = results.check("DUR-CARB", "Z1/M3")
    k = (4.5 * math.sqrt(28) + 8 * math.sqrt(90)) / (28 + 90)
    t = (20 / k) ** 2
    assert (c.title, c.status, c.unit) == ("Carbonation of a lime-rich mortar", "info", "d")
    assert c.value == pytest.approx(round(t, 1), abs=1e-9)
    assert c.basis == (Basis("common practice", note="carbonation front x = K√t; "
                             "phenolphthalein on a fresh break (EN 14630 method)"),)
    fit, time = c.steps
    src = "materials.yaml mortar_properties M3.carbonation"
    assert (fit.title, fit.formula, fit.unit, fit.symbol) == (
        "Carbonation coefficient (least squares through the origin)",
        r"K = \frac{\sum x_i \sqrt{t_i}}{\sum t_i}", "mm/√d", "K")
    assert fit.inputs == (Input("x_1", "depth at 28 d", 4.5, "mm", f"{src}[0]"),
                          Input("x_2", "depth at 90 d", 8.0, "mm", f"{src}[1]"))
    assert fit.substituted == (rf"K = \frac{{4.5\sqrt{{28}} + 8\sqrt{{90}}}}{{28 + 90}} = "
                               rf"{k:.3f}\ \mathrm{{mm/\sqrt{{d}}}}")
    assert fit.result == pytest.approx(round(k, 4), abs=1e-12)
    assert (time.title, time.formula, time.unit, time.symbol) == (
        "Time to carbonate the repair's depth", r"t = (d/K)^2", "d", "t")
    assert time.inputs == (
        Input("d", "depth of the repair", 20.0, "mm", "dossier.yaml Z1.joint_depth"),
        Input("K", "carbonation coefficient", pytest.approx(round(k, 4), abs=1e-12), "mm/√d",
              "step above"))
    assert time.substituted == rf"t = (20 / {k:.3f})^2 = {t:.0f}\ \mathrm{{d}}"
    assert c.message == (f"NH35 (NHL) hardens largely by carbonation: until the front has "
                         f"passed through the repair the hydraulic strength model does not "
                         f"describe it: K = {k:.3f} mm/√d, so 20 mm carbonate in about {t:.0f} "
                         f"days (≈ {t / 30.4:.0f} months); protect it from frost and saturation "
                         f"over that time")
    q, = c.quantities
    assert (q.name, q.unit, q.label) == ("carbonation_front", "", "carbonation front")
    assert q.value == pytest.approx({"K_mm_per_sqrt_d": round(k, 4), "depth_mm": 20.0,
                                     "days_to_depth": round(t, 1)})


def test_dur_carb_depths_of_render_and_bedding_and_nothing_measured(demo_checked):
    """Z3/M3 bedding takes dossier.yaml compatibility.repair_thickness (25 mm); a render zone
    takes the coats' total; no depths measured: attention, the test asked; a natural cement
    (M2, not lime-rich): no result."""
    project, results = demo_checked
    z3 = results.check("DUR-CARB", "Z3/M3")
    assert z3.steps[1].inputs[0] == Input("d", "depth of the repair", 25.0, "mm",
                                          "dossier.yaml compatibility.repair_thickness")
    z2 = next(z for z in project.dossier.zones if z.id == "Z2")
    assert sb._depth(z2, checked_context(demo_checked)) == (pytest.approx(0.020),
                                                 "dossier.yaml Z2.coats (total)")
    pair = _pair(project, "Z3", "M3")
    bare = _pair(project, "Z3", "M3", props=pair.props.model_copy(update={"carbonation": []}))
    c = sb._carb_one(bare, checked_context(demo_checked))
    assert (c.code, c.status, c.value) == ("DUR-CARB", "attention", None)
    assert c.message == ("NH35 (NHL) hardens largely by carbonation: until the front has passed "
                         "through the repair the hydraulic strength model does not describe "
                         "it; no carbonation depths measured — measure by phenolphthalein on "
                         "fresh breaks of prisms cured beside the work, at 28 and 90 d "
                         "(EN 14630 method)")
    assert sb._carb_one(_pair(project, "Z3", "M2"), checked_context(demo_checked)) is None
    assert ("DUR-CARB", "Z3/M2") not in {(r.code, r.subject) for r in results.checks}


def test_dur_bond_asked_for_a_render_zone_without_units(demo_checked):
    """DUR-BOND of Z2/M2 with no units named and no bond measured: the test asked names 'the
    background' (nothing to name it by)."""
    project, _ = demo_checked
    pair = _pair(project, "Z2", "M2")
    bare = _pair(project, "Z2", "M2", unit=None,
                 props=pair.props.model_copy(update={"bond_strength": None}))
    c = sb._bond_one(bare, checked_context(demo_checked))
    asked = {q.name: q.value for q in c.quantities}["tests_asked"]
    assert {"test": "render bond (pull-off)", "method": "EN 1015-12 pull-off on the trial panel "
            "at 28 d, at least five discs, recording where each broke",
            "why": "render on the background in zone Z2", "check": "DUR-BOND"} in asked
