"""COMP-STR-UNIT, COMP-STR-HIST, COMP-MOIST and COMP-MOVE (compatibility_checks) read whole:
the demo's results (``demo_checked``), the fabric's values from the demo's materials.yaml, the
capillary readings from lab/capillary.csv and the limits from content/rules/compatibility.yaml
(each by hand beside it); the strength the ratios divide comes from the strength checks
(STR-AGG, STR-PRED-C), read from their own quantities, not from the result under test.  The
branches the demo never takes on in-memory contexts (no copy checked)."""
from __future__ import annotations

import math

import pytest

from specgen.checks import compatibility_checks as cx
from specgen.checks import compatibility_common as cc
from specgen.checks.result import Basis, Input, Quantity
from specgen.checks.rules import RuleBook
from specgen.checks.run import Context

RATIO = r"{} = \frac{{x_\mathrm{{repair}}}}{{x_\mathrm{{fabric}}}}"
UNIT_NOTE = ("the joint is sacrificial: the mortar stays well below the strength of the units, "
             "commonly at most about half")
HIST_NOTE = "the repair is not stronger than the sound historic mortar it sits beside"


def _strengths(results, mix):
    """(measured mean at the latest age, predicted at 365 d, its upper edge), read from the
    strength checks' quantities (STR-AGG, STR-PRED-C)."""
    comp = results.quantities[mix]["mean_strength"].value["compressive"]
    age = max(comp, key=lambda k: float(k.split()[0]))
    band = results.quantities[mix]["predicted_strength"].value["compressive"]["365 d"]
    return age, comp[age], band


def test_comp_str_unit_of_z1_m2_whole(demo_checked):
    """Z1/M2 against EB1: 48 MPa, 22 GPa (materials.yaml); M2 6 GPa (mortar_properties);
    limits 0.5 for strength and stiffness (content/rules/compatibility.yaml).  Each ratio
    f / 48 by hand; E 6/22 = 0.2727 ≤ 0.5: pass."""
    _, results = demo_checked
    c = results.check("COMP-STR-UNIT", "Z1/M2")
    age, meas, band = _strengths(results, "M2")
    tag = ", indicative" if band.get("indicative") else ""
    assert (c.title, c.status, c.subject_kind, c.unit) == (
        "Repair weaker than the masonry units", "pass", "zone", "")
    assert c.basis == (Basis("common practice", note=UNIT_NOTE),)
    assert (c.limit.compare, c.limit.high, c.limit.text, c.limit.rule) == (
        "<=", 0.5, "r_f ≤ 0.5 (repair / masonry unit)", "compatibility.strength_ratio_unit_max")
    labels = [f"measured mean at {age}", f"predicted at 365 d{tag}", f"upper band edge at 365 d{tag}"]
    values = [meas, band["value"], band["upper"]]
    sources = ["STR-AGG/M2 (lab/strength.csv)", "STR-PRED-C/M2", "STR-PRED-C/M2, 95 % band"]
    for step, label, f, src in zip(c.steps, labels, values, sources):
        assert (step.title, step.formula, step.symbol, step.unit) == (
            f"Strength ratio, {label}", RATIO.format("r_f"), "r_f", "")
        assert step.inputs == (Input("x_repair", f"repair mortar, {label}", round(f, 5), "MPa", src),
                               Input("x_fabric", "masonry unit EB1", 48.0, "MPa",
                                     "materials.yaml EB1.compressive_strength"))
        assert step.substituted == rf"r_f = \frac{{{f:.4g}}}{{48}} = {f / 48:.4f}"
        assert step.result == round(f / 48, 5)
    stiff = c.steps[3]
    assert (stiff.title, stiff.formula, stiff.symbol) == ("Stiffness ratio", RATIO.format("r_E"),
                                                          "r_E")
    assert stiff.inputs == (
        Input("x_repair", "repair mortar elastic modulus", 6.0, "GPa",
              "materials.yaml mortar_properties M2"),
        Input("x_fabric", "masonry unit EB1 elastic modulus", 22.0, "GPa", "materials.yaml EB1"))
    assert (stiff.substituted, stiff.result) == (r"r_E = \frac{6}{22} = 0.2727", round(6 / 22, 5))
    assert c.value == round(round(band["value"] / 48, 5), 4)
    words = "; ".join(f"{lab} {f:.3g} MPa → {f / 48:.3f}" for lab, f in zip(labels, values))
    assert c.message == (f"{words}; elastic modulus ratio {6 / 22:.3f} (limit 0.5) against 0.5 × "
                         "48 MPa of masonry unit EB1")
    assert c.notes == ()
    assert [(q.name, q.value, q.unit, q.label) for q in c.quantities] == [
        ("strength_ratio_to_unit", {"measured": round(meas / 48, 5),
                                    "predicted": round(band["value"] / 48, 5),
                                    "predicted_upper": round(band["upper"] / 48, 5),
                                    "elastic_modulus": round(6 / 22, 5)},
         "", "repair / masonry unit strength")]


def test_comp_str_hist_of_z2_m2_upper_edge_above_the_historic(demo_checked):
    """Z2/M2 against HM2, 7.5 MPa and no elastic modulus (materials.yaml); limit 1
    (content/rules): the band's upper edge above 7.5 MPa gives attention, said so."""
    _, results = demo_checked
    c = results.check("COMP-STR-HIST", "Z2/M2")
    age, meas, band = _strengths(results, "M2")
    assert band["upper"] / 7.5 > 1 >= band["value"] / 7.5       # premise, by hand
    assert (c.title, c.status) == ("Repair not stronger than the historic mortar", "attention")
    assert c.basis == (Basis("common practice", note=HIST_NOTE),)
    assert c.limit.text == "r_f ≤ 1 (repair / historic mortar)"
    assert [s.inputs[1] for s in c.steps] == [
        Input("x_fabric", "historic mortar HM2", 7.5, "MPa",
              "materials.yaml HM2.compressive_strength")] * 3
    assert c.notes == ("elastic modulus not compared: not given for historic mortar HM2",)
    assert c.message.endswith(f"→ {band['upper'] / 7.5:.3f} against 1 × 7.5 MPa of historic "
                              "mortar HM2; the band's upper edge exceeds the limit: confirm "
                              "with the late-age tests")
    assert [(q.name, q.label) for q in c.quantities] == [
        ("strength_ratio_to_historic", "repair / historic mortar strength")]


def _ctx_with(demo_checked, mix, mean, band):
    project, results = demo_checked
    q = {k: dict(v) for k, v in results.quantities.items()}
    q[mix] = dict(q[mix])
    q[mix]["mean_strength"] = Quantity("mean_strength", {"compressive": mean}, "MPa", "")
    q[mix]["predicted_strength"] = Quantity("predicted_strength",
                                            {"compressive": {"365 d": band}}, "MPa", "")
    return Context(project, RuleBook(project.dossier.rule_overrides), quantities=q,
                   results=results.checks)


def _pair(project, zone_id, mix):
    zone = next(z for z in project.dossier.zones if z.id == zone_id)
    return next(p for p in cc.pairs(zone, project) if p.mix_id == mix)


def test_comp_str_indicative_prediction_above_the_limit_is_held(demo_checked):
    """A measured 5.25 MPa at 90 d and an indicative prediction of 12.1 MPa (upper 13.3) for
    M2 against HM1's 11 MPa (limit 1): 12.1/11 = 1.1 > 1 but indicative: hold, not fail;
    the measured ratio 5.25/11 = 0.4773 passes; the upper edge (attention) is less severe
    than hold.  E: 6 / 9 GPa = 0.6667 ≤ 1 passes."""
    project, _ = demo_checked
    ctx = _ctx_with(demo_checked, "M2", {"28 d": 3.0, "90 d": 5.25},
                    {"value": 12.1, "upper": 13.3, "indicative": True, "extrapolated": True})
    pair = _pair(project, "Z1", "M2")
    c, = [r for r in cx.strength_historic_check(pair.zone, ctx) if r.subject == "Z1/M2"]
    assert c.status == "hold"
    assert [s.title for s in c.steps] == [
        "Strength ratio, measured mean at 90 d", "Strength ratio, predicted at 365 d, indicative",
        "Strength ratio, upper band edge at 365 d, indicative", "Stiffness ratio"]
    assert [s.result for s in c.steps] == [round(5.25 / 11, 5), round(12.1 / 11, 5),
                                           round(13.3 / 11, 5), round(6 / 9, 5)]
    assert c.value == round(12.1 / 11, 4)
    assert c.message == (
        "measured mean at 90 d 5.25 MPa → 0.477; predicted at 365 d, indicative 12.1 MPa → "
        "1.100; upper band edge at 365 d, indicative 13.3 MPa → 1.209; elastic modulus ratio "
        "0.667 (limit 1) against 1 × 11 MPa of historic mortar HM1; the prediction beyond the "
        "last tested age exceeds the limit but is indicative, so it cannot decide: held until "
        "results at later ages (the strength sheets of M2 name the test age that would decide)")
    # the same prediction not indicative but extrapolated decides: fail, tagged so
    ctx = _ctx_with(demo_checked, "M2", {"90 d": 5.25},
                    {"value": 12.1, "upper": 13.3, "indicative": False, "extrapolated": True})
    c, = [r for r in cx.strength_historic_check(pair.zone, ctx) if r.subject == "Z1/M2"]
    assert c.status == "fail"
    assert c.steps[1].title == "Strength ratio, predicted at 365 d, extrapolated"
    assert c.steps[2].inputs[0].source == "STR-PRED-C/M2, 95 % band"
    # exactly on the limit passes (r ≤ 1): 11/11
    ctx = _ctx_with(demo_checked, "M2", {"90 d": 5.25},
                    {"value": 11.0, "upper": 11.0, "extrapolated": False})
    c, = [r for r in cx.strength_historic_check(pair.zone, ctx) if r.subject == "Z1/M2"]
    assert (c.status, c.steps[1].title) == ("pass", "Strength ratio, predicted at 365 d")


def test_comp_str_not_assessed_names_what_is_missing(demo_checked):
    """A mix without any strength result or prediction, and a unit without a strength."""
    project, results = demo_checked
    q = {k: dict(v) for k, v in results.quantities.items()}
    q["M2"] = {k: v for k, v in q["M2"].items()
               if k not in ("mean_strength", "predicted_strength")}
    ctx = Context(project, RuleBook(project.dossier.rule_overrides), quantities=q,
                  results=results.checks)
    pair = _pair(project, "Z1", "M2")
    unit = pair.unit.model_copy(update={"compressive_strength": None})
    c = cx._hierarchy_one("COMP-STR-UNIT", "Repair weaker than the masonry units", "unit",
                          pair, unit, ctx)
    assert (c.status, c.subject, c.value) == ("not_assessed", "Z1/M2", None)
    assert c.message == ("not assessed: masonry unit EB1 has no compressive_strength "
                         "(materials.yaml); mix M2 has no compressive strength results or "
                         "prediction (lab/strength.csv)")


def test_comp_moist_of_z2_m2_whole_by_en1015_18(demo_checked):
    """Z2/M2: lab/capillary.csv gives M2 1.04 kg/m² at 10 min and 2.94 at 90 min (EN 1015-18
    two-point, European practice of dossier.yaml): C = (2.94 − 1.04) / (√90 − √10); GS1 C
    0.35 and μ 25, M2 μ 12 (materials.yaml); d = 25 mm (dossier.yaml): sd = 12 × 0.025 =
    0.3 m.  C ratio below 1: fail."""
    _, results = demo_checked
    c = results.check("COMP-MOIST", "Z2/M2")
    cap = (2.94 - 1.04) / (math.sqrt(90) - math.sqrt(10))
    assert (c.title, c.status) == ("Repair at least as open as the units", "fail")
    assert c.value == pytest.approx(round(cap / 0.35, 4), abs=1e-12)
    assert [b.ref or b.note for b in c.basis] == [
        "en1015_18", "en1015_19", "en12572",
        "water and salts must leave through the joints, not through the stone or brick",
        "the repair is at least as vapour-open as the units"]
    fit, rc, rm, sd = c.steps
    assert (fit.title, fit.formula, fit.unit, fit.symbol) == (
        "Capillary coefficient of M2: EN 1015-18, 10 and 90 min readings",
        r"C = \frac{W_{90} - W_{10}}{\sqrt{90} - \sqrt{10}}", "kg/(m²·min^0.5)", "C")
    assert fit.inputs == (Input("W_10", "uptake at 10 min", 1.04, "kg/m²", "lab/capillary.csv row 3"),
                          Input("W_90", "uptake at 90 min", 2.94, "kg/m²", "lab/capillary.csv row 7"))
    assert fit.substituted == rf"C = \frac{{2.94 - 1.04}}{{\sqrt{{90}} - \sqrt{{10}}}} = {cap:.4f}"
    assert fit.result == pytest.approx(round(cap, 4), abs=1e-12)
    assert (rc.title, rc.formula) == ("Capillary ratio (repair / units)", RATIO.format("r_C"))
    assert [(i.name, i.unit, i.source) for i in rc.inputs] == [
        ("repair mortar C", "kg/(m²·min^0.5)",
         "lab/capillary.csv, EN 1015-18 two-point (6 readings given)"),
        ("units GS1 C", "kg/(m²·min^0.5)", "materials.yaml GS1")]
    assert rc.substituted == rf"r_C = \frac{{{cap:.4g}}}{{0.35}} = {cap / 0.35:.4f}"
    assert (rm.title, rm.substituted, rm.result) == (
        "Vapour resistance ratio (repair / units)", r"r_μ = \frac{12}{25} = 0.4800", 0.48)
    assert rm.inputs == (Input("x_repair", "repair mortar μ", 12.0, "", "materials.yaml "
                               "mortar_properties M2"),
                         Input("x_fabric", "units GS1 μ", 25.0, "", "materials.yaml GS1"))
    assert (sd.title, sd.formula, sd.substituted, sd.result, sd.unit, sd.symbol) == (
        "Diffusion-equivalent air layer of the repair", r"s_d = \mu\,d",
        r"s_d = 12 \times 0.025 = 0.3000", 0.3, "m", "s_d")
    assert sd.inputs == (
        Input("μ", "repair mortar μ", 12.0, "", "materials.yaml mortar_properties M2"),
        Input("d", "repair thickness", 25.0, "mm", "dossier.yaml compatibility.repair_thickness"))
    assert (c.limit.compare, c.limit.low, c.limit.text) == (">=", 1.0, "r_C ≥ 1 and r_μ ≤ 1")
    assert c.message == (f"C repair {cap:.3g} vs units 0.35 kg/(m²·min^0.5) (ratio "
                         f"{cap / 0.35:.2f}, at least 1); μ repair 12 vs units 25 (ratio 0.48, "
                         "at most 1)")
    caps, mus = c.quantities
    assert (caps.name, caps.unit, caps.label) == (
        "capillary_coefficient", "kg/(m²·min^0.5)", "capillary absorption coefficient")
    assert caps.value == pytest.approx({"repair": round(cap, 4), "units": 0.35})
    assert (mus.name, mus.value, mus.unit, mus.label) == (
        "vapour_resistance_factor", {"repair": 12.0, "units": 25.0, "sd_repair_m": 0.3}, "",
        "vapour diffusion resistance factor μ")


def test_comp_moist_of_z1_m1_given_coefficients_and_the_historic(demo_checked):
    """Z1/M1: M1 C 0.45 (materials.yaml, no readings), EB1 0.08, HM1 0.55; μ 14, 60, 14:
    C ratio 0.45/0.08 = 5.625, μ ratio 14/60 = 0.2333: pass; no fit step."""
    _, results = demo_checked
    c = results.check("COMP-MOIST", "Z1/M1")
    assert c.status == "pass"
    assert [s.title for s in c.steps] == [
        "Capillary ratio (repair / units)", "Vapour resistance ratio (repair / units)",
        "Diffusion-equivalent air layer of the repair"]
    assert c.steps[0].inputs[0].source == "materials.yaml M1"
    assert c.steps[0].result == round(0.45 / 0.08, 5)
    assert c.steps[1].result == round(14 / 60, 5)
    caps, mus = c.quantities
    assert caps.value == pytest.approx({"repair": 0.45, "units": 0.08, "historic": 0.55})
    assert mus.value == {"repair": 14.0, "units": 60.0, "historic": 14.0,
                         "sd_repair_m": round(14 * 0.025, 5)}


def test_comp_moist_not_assessed_lists_every_missing_value(demo_checked):
    """M2 without μ and a unit without C or μ: four things missing, each named."""
    project, _ = demo_checked
    pair = _pair(project, "Z1", "M2")
    bare = type(pair)(**{**pair.__dict__,
                         "unit": pair.unit.model_copy(update={"capillary_coefficient": None,
                                                              "vapour_resistance_factor": None}),
                         "props": pair.props.model_copy(update={"vapour_resistance_factor": None})})
    project_, results = demo_checked
    ctx = Context(project_, RuleBook(project_.dossier.rule_overrides),
                  quantities=results.quantities, results=results.checks)
    c = cx._moisture_one(bare, ctx)
    assert (c.code, c.status, c.title) == ("COMP-MOIST", "not_assessed",
                                           "Repair at least as open as the units")
    assert c.message == (
        "not assessed: missing capillary coefficient of masonry unit EB1; missing vapour "
        "resistance factor of mix M2 (materials.yaml mortar_properties); missing vapour "
        "resistance factor of masonry unit EB1")


def test_comp_move_of_z2_m2_thermal_and_hygric(demo_checked):
    """Z2/M2: M2 10e-6/K and 0.3 mm/m; GS1 11e-6/K and 0.4 mm/m (materials.yaml); tolerance
    0.5 (content/rules): δ = |10 − 11| / 11 = 0.0909 and |0.3 − 0.4| / 0.4 = 0.25: pass."""
    _, results = demo_checked
    c = results.check("COMP-MOVE", "Z2/M2")
    assert (c.title, c.status, c.unit) == ("Similar thermal and moisture movement", "pass", "")
    assert c.basis == (Basis("common practice", note="similar thermal and moisture movement; a "
                             "mismatch beyond about half of the fabric's value opens the joint or "
                             "spalls the arrises"),)
    th, hy = c.steps
    formula = (r"\delta = \frac{|\alpha_\mathrm{repair} - \alpha_\mathrm{fabric}|}"
               r"{\alpha_\mathrm{fabric}}")
    assert (th.title, th.formula, th.symbol, th.unit) == (
        "Relative difference of thermal expansion", formula, "δ", "")
    assert th.inputs == (
        Input("α_repair", "repair mortar thermal expansion", pytest.approx(10.0), "10⁻⁶/K",
              "materials.yaml mortar_properties M2"),
        Input("α_fabric", "units GS1 thermal expansion", pytest.approx(11.0), "10⁻⁶/K",
              "materials.yaml GS1"))
    # δ to 0.01 on every page (SYMBOL_PRECISION), its substitution as its result line
    assert th.substituted == rf"\delta = \frac{{|10 - 11|}}{{11}} = {1 / 11:.2f}"
    assert th.result == pytest.approx(round(1 / 11, 5), abs=1e-12)
    assert (hy.title, hy.inputs[0].unit, hy.inputs[1].name) == (
        "Relative difference of hygric expansion", "mm/m", "units GS1 hygric expansion")
    assert hy.result == pytest.approx(0.25, abs=1e-9)
    assert c.value == th.result
    assert c.message == ("thermal 10 vs 11 × 10⁻⁶/K (δ = 0.09); hygric 0.3 vs 0.4 mm/m "
                         "(δ = 0.25); tolerance 0.5")
    assert c.notes == ()
    assert (c.limit.compare, c.limit.high, c.limit.text, c.limit.rule) == (
        "<=", 0.5, "δ ≤ 0.5", "compatibility.movement_tolerance")


def test_comp_move_of_z1_m2_beyond_the_tolerance_and_missing(demo_checked):
    """Z1/M2: 10 vs EB1 6 (10⁻⁶/K): δ = 4/6 = 0.6667 > 0.5: attention; EB1 has no hygric
    value: said.  A mix without a thermal value: not assessed, named."""
    project, results = demo_checked
    c = results.check("COMP-MOVE", "Z1/M2")
    assert (c.status, c.value) == ("attention", round(4 / 6, 5))
    assert c.notes == ("hygric expansion not compared: not given for both",)
    assert c.message == "thermal 10 vs 6 × 10⁻⁶/K (δ = 0.67); tolerance 0.5"
    pair = _pair(project, "Z1", "M2")
    bare = type(pair)(**{**pair.__dict__,
                         "props": pair.props.model_copy(update={"thermal_expansion": None})})
    ctx = Context(project, RuleBook(project.dossier.rule_overrides),
                  quantities=results.quantities, results=results.checks)
    na = cx._movement_one(bare, ctx)
    assert (na.code, na.status, na.message) == (
        "COMP-MOVE", "not_assessed", "not assessed: missing thermal expansion coefficient of "
        "mix M2 (materials.yaml mortar_properties)")
    # δ exactly at the tolerance passes (≤): 9 against 6 is 0.5
    at = type(pair)(**{**pair.__dict__,
                       "props": pair.props.model_copy(update={"thermal_expansion": 9e-6})})
    assert cx._movement_one(at, ctx).status == "pass"


def test_comp_moist_capillary_by_regression_when_two_points_are_missing(demo_checked):
    """M2's readings of lab/capillary.csv without the 10 min one: EN 1015-18's two-point
    coefficient cannot be made, so the least-squares slope of W against √t is used (said in
    the source); slope by scipy.stats.linregress on t in seconds, × √60 for min^0.5."""
    from scipy.stats import linregress
    project, _ = demo_checked
    rows = [r for r in project.capillary if not (r.sample == "M2" and abs(r.time - 600) < 1)]
    sw = type("P", (), {"capillary": rows, "dossier": project.dossier})()
    c, src, step = cx.capillary(None, "M2", sw)
    kept = [(t, w) for t, w in ((5, 0.78), (15, 1.27), (30, 1.74), (60, 2.43), (90, 2.94))]
    fit = linregress([math.sqrt(60 * t) for t, _ in kept], [w for _, w in kept])
    assert c == pytest.approx(fit.slope * math.sqrt(60), rel=1e-9)
    assert step.result == round(c, 4)
    assert (step.title, step.unit, step.symbol) == (
        "Capillary coefficient of M2: least-squares slope against √t", "kg/(m²·min^0.5)", "C")
    assert src.startswith("fitted to lab/capillary.csv (5 readings); EN 1015-18 two-point "
                          "coefficient not possible: ")
