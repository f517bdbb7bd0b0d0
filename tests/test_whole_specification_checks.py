"""SPEC-COST, SPEC-SELECT, SPEC-SAMPLING and SPEC-ACCEPT (specification_checks) read whole:
the demo's results (the session's ``demo_checked``), every value worked by hand from the demo's
dossier.yaml, specification.yaml and content/rules/specification.yaml beside it; the branches
the demo never takes on zones and specifications changed in memory (no check of a copy)."""
from __future__ import annotations

import math

import pytest

from specgen.checks import specification_checks as sc
from specgen.checks.result import Basis, Input
from tests.helpers import Swapped, checked_context

SPEC_RULE = "rule specification.{} (common practice — {})"
AREA_NOTE = "sampling by area of work done, with at least one set per day's work"
MIN_NOTE = ("a zone however small gets at least one set, so every zone's mortar is tested; "
            "more sets follow the area and the days of work")
PER_NOTE = "three 40 x 40 x 160 mm prisms per age, as in the laboratory tests (EN 1015-11)"
IND_NOTE = "a single low set beside a conforming characteristic value still calls for investigation"
DAY_SRC = ("rule works.working_day (common practice — about 5-7 h of placing in a site day after "
           "setting up, breaks and cleaning down)")
SAMPLING = Basis("common practice", note="sampling rule of specification.yaml site_tests or "
                 "content/rules/specification.yaml")
COST = Basis("project requirement", note="specification.yaml unit_prices; mortar volume from "
             "WORKS-QTY")


def _zone(project, zid, **update):
    z = next(z for z in project.dossier.zones if z.id == zid)
    return z.model_copy(update=update)


def test_spec_cost_whole_from_the_price_schedule(demo_checked):
    """SPEC-COST of Z1: specification.yaml prices M1 1650, M2 1480, M3 1320 GBP per 1 m³;
    c = P/Q × V/A with V of WORKS-QTY/Z1 and A = 240 m² (dossier.yaml): 1650 × V / 240."""
    project, results = demo_checked
    v = results.quantities["Z1"]["mortar_volume"].value
    for mix, price in (("M1", 1650.0), ("M2", 1480.0), ("M3", 1320.0)):
        c = results.check("SPEC-COST", f"Z1/{mix}")
        cost = price / 1.0 * v / 240.0           # the formula above, by hand
        assert (c.title, c.status, c.unit, c.basis) == (
            "Cost of a candidate per m² of wall", "info", "GBP/m²", (COST,))
        assert c.value == pytest.approx(round(cost, 2), abs=1e-12)
        step, = c.steps
        assert (step.title, step.formula, step.unit, step.symbol) == (
            "Cost per m² of wall", r"c = \frac{P}{Q}\,\frac{V}{A}", "GBP/m²", "c")
        assert step.inputs == (
            Input("P", f"price of {mix}", price, "GBP", "harbour works price schedule 2026 (invented)"),
            Input("Q", "priced quantity", 1.0, "m³", f"specification.yaml unit_prices {mix}.per"),
            Input("V", "mortar volume with wastage", v, "m³", "WORKS-QTY/Z1"),
            Input("A", "wall area", 240.0, "m²", "dossier.yaml Z1.area"))
        assert step.substituted == (rf"c = \frac{{{price:g}}}{{1}} \times \frac{{{v:g}}}{{240}} "
                                    f"= {cost:.2f}")
        assert step.result == round(cost, 2)
        assert c.message == (f"{cost:.2f} GBP/m² ({price:g} GBP per 1 m³ × {v:.3g} m³ / 240 m²)")
        assert [(q.name, q.value, q.unit, q.label) for q in c.quantities] == [
            ("cost_per_m2", round(cost, 2), "GBP/m²", "cost per m²")]
    # Z2 has candidates M1 and M2 only: M3's price gives no result there
    assert results.check("SPEC-COST", "Z2/M3") is None


def test_spec_cost_not_assessed_without_area_or_volume(demo_checked):
    """Z3 has no area (dossier.yaml): not assessed, said why; a zone without WORKS-QTY's
    volume (an id with no quantities) says that instead."""
    project, _ = demo_checked
    ctx = checked_context(demo_checked)
    z3 = sc.cost_check(_zone(project, "Z3"), ctx)
    assert [(c.subject, c.status, c.value, c.unit, c.message, c.basis) for c in z3] == [
        ("Z3/M2", "not_assessed", None, "", "not assessed: no wall area for the zone", (COST,)),
        ("Z3/M3", "not_assessed", None, "", "not assessed: no wall area for the zone", (COST,))]
    lost = sc.cost_check(_zone(project, "Z1", id="Z9"), ctx)
    assert {c.message for c in lost} == {"not assessed: no mortar volume (WORKS-QTY)"}
    assert [c.title for c in lost] == ["Cost of a candidate per m² of wall"] * 3


def test_spec_cost_of_a_fractional_price_shown_to_two_decimals(demo_checked):
    """A price of 1234.5 GBP per 0.5 m³ for M1 on Z1: c = 1234.5 / 0.5 × V / 240, shown to
    2 decimals in the value and the message; the per-quantity Q shown as 0.5 m³."""
    project, results = demo_checked
    ctx = checked_context(demo_checked)
    spec = project.specification
    prices = [spec.doc.unit_prices[0].model_copy(update={"price": 1234.5, "per": 0.5})]
    doc = spec.doc.model_copy(update={"unit_prices": prices, "currency": ""})
    fake = type(spec)(**{**spec.__dict__, "doc": doc})
    ctx.project = Swapped(project, specification=fake)
    c, = sc.cost_check(_zone(project, "Z1"), ctx)
    v = results.quantities["Z1"]["mortar_volume"].value
    cost = 1234.5 / 0.5 * v / 240.0
    assert (c.value, c.unit) == (round(cost, 2), "/m²")    # no currency: the unit alone
    assert c.steps[0].inputs[1].value == 0.5
    assert c.steps[0].inputs[0].unit == ""
    assert c.message == f"{cost:.2f} /m² (1234.5  per 0.5 m³ × {v:.3g} m³ / 240 m²)"


def test_spec_select_whole_of_each_demo_zone(demo_checked):
    """SPEC-SELECT per zone: specification.yaml chooses M2 for Z1 and Z2, M3 for Z3; Z2 and
    Z3 carry a justification.  The step lists every applicable check's status word (read from
    those checks' own results) and J; the substitution counts them by status."""
    project, results = demo_checked
    words = {"pass": "pass", "fail": "fail", "attention": "attention", "hold": "hold",
             "not_assessed": "not assessed", "info": "for information",
             "needs_decision": "needs decision"}
    for zid, mix, just in (("Z1", "M2", "none"), ("Z2", "M2", "given"), ("Z3", "M3", "given")):
        c = results.check("SPEC-SELECT", zid)
        assert (c.title, c.subject_kind, c.value, c.unit) == (
            "Mortar selected for the zone", "zone", mix, "")
        assert c.basis == (Basis("project requirement", note="specification.yaml selections: a "
                                 "chosen mortar that fails a check stands only with a written "
                                 "justification"),)
        step, = c.steps
        assert step.title == f"Checks on {mix} in zone {zid}"
        assert step.formula == (r"\mathrm{status} = \mathrm{pass}\ \mathrm{unless}\ "
                                r"n_{\mathrm{fail}} + n_{\mathrm{hold}} > 0\ (\mathrm{then\ "
                                r"attention,\ a\ fail\ only\ with}\ J)")
        listed = step.inputs[:-1]
        assert step.inputs[-1] == Input("J", "justification", just, "",
                                        f"specification.yaml {zid}.justification")
        for i in listed:
            other = results.check(i.symbol, i.source.split("/", 1)[1])
            assert (i.name, i.value, i.unit) == (other.title, words[other.status], "")
        count = {s: sum(1 for i in listed if i.value == w) for s, w in words.items()}
        assert step.substituted == r",\ ".join(
            rf"\mathrm{{{w.replace(' ', '~')}}}: {count[s]}" for s, w in words.items() if count[s])
        assert (step.result, step.unit, step.symbol) == (count["fail"], "", "n_fail")
        assert [(q.name, q.value, q.label) for q in c.quantities] == [
            ("selected_mix", mix, "mix selected"), ("selection_status", c.status, "selection")]
        assert c.status == "attention"    # each zone has a fail justified or a held check
    z1 = results.check("SPEC-SELECT", "Z1")
    held = [i.symbol for i in z1.steps[0].inputs if i.value == "hold"]
    assert not any(i.value == "fail" for i in z1.steps[0].inputs)
    assert z1.message == ("M2 selected; decision rests on held checks "
                          + ", ".join(held[:-1]) + " and " + held[-1])
    z3 = results.check("SPEC-SELECT", "Z3")
    fails = [i.symbol for i in z3.steps[0].inputs if i.value == "fail"]
    assert fails == ["STR-MIN", "DUR-TSA"]
    assert z3.message.startswith("M3 selected although it fails STR-MIN and DUR-TSA — "
                                 "justification: M3 falls short of the early-age strength")
    assert z3.notes[0].startswith("STR-MIN/M3: fail — ")


def _with_spec(demo_checked, selections=None, drop=False):
    project, _ = demo_checked
    ctx = checked_context(demo_checked)
    spec = project.specification
    if drop:
        fake = None
    else:
        fake = type(spec)(**{**spec.__dict__,
                             "doc": spec.doc.model_copy(update={"selections": selections})})
    ctx.project = Swapped(project, specification=fake)
    return ctx, fake


def test_spec_select_without_a_file_without_a_selection_and_with_an_open_fail(demo_checked):
    """The branches the demo never takes: no specification.yaml (not assessed), a zone left
    out of the selections (hold, candidates named), and Z2's justification with an empty
    covers list (needs_decision naming each failing check by key)."""
    project, _ = demo_checked
    z2 = _zone(project, "Z2")
    ctx, fake = _with_spec(demo_checked, drop=True)
    c, problem = sc._select_one(z2, None, ctx)
    assert problem is None
    assert (c.code, c.status, c.value, c.message) == (
        "SPEC-SELECT", "not_assessed", None,
        "not assessed: no specification.yaml; add one with a selection for each zone")
    assert [(q.name, q.value) for q in c.quantities] == [("selection_status", "not_assessed")]
    ctx, fake = _with_spec(demo_checked, [])
    c, problem = sc._select_one(z2, fake, ctx)
    assert (c.status, c.title, c.message) == (
        "hold", "Mortar selected for the zone", "no mortar selected for zone Z2: add a selection "
        "to specification.yaml (candidates: M1, M2)")
    assert [(q.name, q.value, q.label) for q in c.quantities] == [
        ("selection_status", "hold", "selection")]
    sel = project.specification.doc.selections[1].model_copy(update={"covers": []})
    ctx, fake = _with_spec(demo_checked, [sel])
    c, problem = sc._select_one(z2, fake, ctx)
    assert problem is None
    assert c.status == "needs_decision"
    assert c.message == ("M2 selected; it fails COMP-MOIST/Z2/M2, DUR-TSA/Z2/M2, DUR-ETT/Z2/M2 "
                         "and DUR-RETAIN/Z2/M2, which the justification does not name: the "
                         "selection needs a decision (answer it in the justification and name "
                         "it under covers, or choose again)")


def test_spec_select_unjustified_fail_names_line_field_and_the_clean_choice(demo_checked):
    """SPEC-SELECT of Z3 with M3 and no justification: M3 fails STR-MIN and DUR-TSA (two checks: 'checks'),
    and M2, the other candidate, fails a check in Z3 too (DUR-TSA/Z3/M2, read from the demo's results)."""
    project, results = demo_checked
    z3 = _zone(project, "Z3")
    sel = project.specification.doc.selections[2].model_copy(update={"justification": None})
    ctx, fake = _with_spec(demo_checked, [sel])
    c, problem = sc._select_one(z3, fake, ctx)
    assert (c.status, c.value) == ("fail", "M3")
    assert c.message == ("M3 selected although it fails STR-MIN and DUR-TSA — justification: None")
    assert problem.file == "specification.yaml"
    assert problem.field == "selections[0].justification"
    assert problem.message == ("mix 'M3' chosen for zone Z3 fails STR-MIN and DUR-TSA, and no "
                               "justification is given.")
    m2_fails = [c for c in results.checks if c.status == "fail" and c.subject in ("M2", "Z3/M2")]
    assert m2_fails      # M2 fails a check in Z3 too: no clean candidate to name
    assert problem.fix == ("add 'justification:' saying why the choice stands despite the failed "
                           "checks, or choose another candidate (each of the others fails a "
                           "check too).")


def test_spec_sampling_whole_by_area_and_days_of_work(demo_checked):
    """SPEC-SAMPLING: n = max(n_min, ⌈A/a⌉, ⌈V/(qT)⌉), N = n p k with the rules of
    content/rules/specification.yaml (a = 50 m², n_min = 1, p = 3) and works.working_day
    (T = 6 h); A and q from dossier.yaml (Z1 240 m², 8 L/h; Z2 85 m², 25 L/h; Z3 no area,
    12 L/h); V from WORKS-QTY; ages 28 and 90 d (requirements) and 180 d (the STR-MAX hold)."""
    project, results = demo_checked
    for zid, area, rate, mix in (("Z1", 240.0, 8.0, "M2"), ("Z2", 85.0, 25.0, "M2"),
                                 ("Z3", None, 12.0, "M3")):
        c = results.check("SPEC-SAMPLING", zid)
        v = results.quantities[zid]["mortar_volume"].value
        litres = v * 1000
        days = math.ceil(litres / (rate * 6))
        by_area = math.ceil(area / 50) if area else None
        n = max(1, days, by_area or 0)
        assert (c.title, c.status, c.value, c.unit, c.basis) == (
            "Sets of site prisms for the zone", "info", n, "", (SAMPLING,))
        step, = c.steps
        assert (step.title, step.result, step.unit, step.symbol) == (
            "Sets of prisms and prisms to make", n, "", "n")
        assert step.formula == (r"n = \max\left(n_{\min},\ \lceil A/a \rceil,\ \lceil V/(qT) "
                                r"\rceil\right),\quad N = n\,p\,k")
        inputs = [Input("n_min", "fewest sets", 1, "", SPEC_RULE.format("min_sets", MIN_NOTE)),
                  Input("a", "wall area per set", 50.0, "m²",
                        SPEC_RULE.format("area_per_set", AREA_NOTE)),
                  Input("p", "prisms per set and age", 3, "",
                        SPEC_RULE.format("prisms_per_set", PER_NOTE)),
                  Input("k", "test ages", "28, 90, 180", "d",
                        "28, 90 d: dossier.yaml requirements.min_compressive; 180 d: "
                        f"STR-MAX/{mix} hold (max 365 d): the age that would decide")]
        if area:
            inputs.append(Input("A", "wall area", area, "m²", f"dossier.yaml {zid}.area"))
        inputs += [Input("V", "mortar volume with wastage", v, "m³", f"WORKS-QTY/{zid}"),
                   Input("q", "placing rate", rate, "L/h", f"dossier.yaml {zid}.placing_rate"),
                   Input("T", "placing hours per day", 6.0, "h", DAY_SRC)]
        assert list(step.inputs) == inputs
        terms = ["1"] + ([rf"\lceil {area:g}/50 \rceil = {by_area}"] if area else []) + [
            rf"\lceil {litres:.4g}/({rate:g} \times 6) \rceil = {days}"]
        joined = r",\ ".join(terms)
        assert step.substituted == (rf"n = \max({joined}) = {n};\ N = {n} \times 3 "
                                    rf"\times 3 = {9 * n}")
        why = (f"{by_area} by area; " if area else "") + f"{days} day(s) of work"
        assert c.message == f"{n} set(s) of 3 prisms per test age ({why}): {9 * n} prisms"
        assert [(q.name, q.value, q.unit, q.label) for q in c.quantities] == [
            ("sample_sets", {"sets": n, "by_area": by_area, "working_days": days,
                             "prisms": 9 * n, "per_set": 3, "ages_d": [28.0, 90.0, 180.0]},
             "", "site prism sets")]
    # by hand: Z1 852.35 L / 48 L a day = 17.8 → 18 days; 240/50 = 4.8 → 5
    assert results.check("SPEC-SAMPLING", "Z1").value == 18


def test_spec_sampling_minimum_governs_and_not_assessed(demo_checked):
    """A 30 m² zone counted without days of work (site_tests.per_working_day false): ⌈30/50⌉ =
    1 by area; with min_sets 2 (the project's) the minimum governs: 'the minimum'.  With no
    area and no day count, not assessed."""
    project, _ = demo_checked
    ctx = checked_context(demo_checked)
    spec = project.specification
    tests = spec.doc.site_tests.model_copy(update={"per_working_day": False, "min_sets": 2,
                                                   "test_ages": [28 * 86400.0, 7.5 * 86400.0]})
    fake = type(spec)(**{**spec.__dict__, "doc": spec.doc.model_copy(update={"site_tests": tests})})
    ctx.project = Swapped(project, specification=fake)
    c = sc.sampling_check(_zone(project, "Z1", area=30.0, id="Z1"), ctx)
    step = c.steps[0]
    assert (c.value, c.message) == (2, "2 set(s) of 3 prisms per test age (1 by area): 18 prisms")
    # ages: 7.5 d and 28 d from site_tests, the 180 d STR-MAX hold of M2 added: k = 3
    assert step.inputs[0] == Input("n_min", "fewest sets", 2, "",
                                   "specification.yaml site_tests.min_sets")
    assert step.inputs[3].value == "7.5, 28, 180"
    assert step.substituted == (r"n = \max(2,\ \lceil 30/50 \rceil = 1) = 2;\ N = 2 \times 3 "
                                r"\times 3 = 18")
    assert c.quantities[0].value["ages_d"] == [7.5, 28.0, 180.0]
    assert [i.symbol for i in step.inputs] == ["n_min", "a", "p", "k", "A"]
    none = sc.sampling_check(_zone(project, "Z3"), ctx)
    assert (none.status, none.value, none.message) == (
        "not_assessed", None, "not assessed: give area for zone Z3 in dossier.yaml (or the works "
        "quantities, so that sets per day's work can be counted)")


def test_spec_accept_whole_from_the_requirements(demo_checked):
    """SPEC-ACCEPT: dossier.yaml requires 2 MPa at 28 d and 3 MPa at 90 d, at most 9 MPa long
    term (STR-MAX at 365 d); r = 80 % (content/rules/specification.yaml): each set ≥ 1.6 and
    2.4 MPa.  The 180 d hold age has no requirement: no row."""
    _, results = demo_checked
    for zid, mix in (("Z1", "M2"), ("Z2", "M2"), ("Z3", "M3")):
        c = results.check("SPEC-ACCEPT", zid)
        assert (c.title, c.status, c.value, c.unit, c.basis) == (
            "Site acceptance criteria for the chosen mortar", "info", 2, "", (SAMPLING,))
        step, = c.steps
        assert (step.title, step.formula, step.result, step.unit, step.symbol) == (
            f"Site acceptance of {mix} in zone {zid}",
            r"f_k \ge f_{req},\quad \bar f_{set} \ge r\,f_{req}", 2, "", "ages")
        src = f"STR-MIN/{mix} (dossier.yaml requirements)"
        assert step.inputs == (
            Input("r", "individual minimum / required", 80.0, "%",
                  SPEC_RULE.format("individual_minimum", IND_NOTE)),
            Input("f_req,28", "required minimum at 28 d", 2.0, "MPa", src),
            Input("f_req,90", "required minimum at 90 d", 3.0, "MPa", src),
            Input("f_max", "cap at 365 d", 9.0, "MPa", f"STR-MAX/{mix} (dossier.yaml requirements)"))
        assert step.substituted == (r"28\,\mathrm{d}: 0.8 \times 2 = 1.6,\ "
                                    r"90\,\mathrm{d}: 0.8 \times 3 = 2.4")
        assert c.message == ("28 d: f_k ≥ 2 MPa, each set ≥ 1.6 MPa; 90 d: f_k ≥ 3 MPa, each "
                             "set ≥ 2.4 MPa; at 365 d at most 9 MPa")
        assert [(q.name, q.value, q.unit, q.label) for q in c.quantities] == [
            ("site_acceptance", {
                "28 d": {"characteristic_min": 2.0, "individual_min": 1.6,
                         "source": f"STR-MIN/{mix}"},
                "90 d": {"characteristic_min": 3.0, "individual_min": 2.4,
                         "source": f"STR-MIN/{mix}"},
                "cap": {"age_d": 365.0, "max": 9.0, "source": f"STR-MAX/{mix}"}},
             "MPa", "site acceptance criteria")]


def test_spec_accept_rows_of_a_fractional_share_and_no_requirement():
    """SPEC-ACCEPT's _acceptance_rows by hand: r = 0.8 of 2.123456 MPa at 28 d = 1.6987648 → 1.6988 (4
    decimals) in the table, 1.7 (3 figures) in the substitution and the message; no cap; an age with no
    requirement (7 d) gives no row; the message with nothing is said in words."""
    verdicts = {"min 28 d": {"kind": "min", "limit": 2.123456}}
    table, inputs, subs = sc._acceptance_rows([(7 * 86400.0, "x"), (28 * 86400.0, "y")], "MX",
                                              0.8, verdicts)
    assert table == {"28 d": {"characteristic_min": 2.123456, "individual_min": 1.6988,
                              "source": "STR-MIN/MX"}}
    assert inputs == [Input("f_req,28", "required minimum at 28 d", 2.123456, "MPa",
                            "STR-MIN/MX (dossier.yaml requirements)")]
    assert subs == [r"28\,\mathrm{d}: 0.8 \times 2.12346 = 1.7"]
    assert sc._acceptance_message(table) == "28 d: f_k ≥ 2.12346 MPa, each set ≥ 1.7 MPa"
    assert sc._acceptance_message({}) == "no strength requirement at the site test ages"


def test_spec_accept_not_assessed_without_a_selection(demo_checked):
    """A zone with no selected mix recorded (an id the checks never saw): not assessed."""
    project, _ = demo_checked
    c = sc.acceptance_check(_zone(project, "Z1", id="Z9"), checked_context(demo_checked))
    assert (c.code, c.status, c.value, c.message, c.title) == (
        "SPEC-ACCEPT", "not_assessed", None, "not assessed: no mortar selected for zone Z9",
        "Site acceptance criteria for the chosen mortar")


def test_spec_sampling_placing_rate_shown_to_four_decimals(demo_checked):
    """SPEC-SAMPLING of Z1 at 8.123456 L/h (dossier.yaml, fractional): q shown as 8.1235 L/h;
    days ⌈852.35 / (8.123456 × 6)⌉ by hand."""
    project, results = demo_checked
    z1 = _zone(project, "Z1", placing_rate=8.123456e-3 / 3600)
    c = sc.sampling_check(z1, checked_context(demo_checked))
    q = next(i for i in c.steps[0].inputs if i.symbol == "q")
    assert (q.value, q.unit) == (8.1235, "L/h")
    v = results.quantities["Z1"]["mortar_volume"].value
    assert c.quantities[0].value["working_days"] == math.ceil(v * 1000 / (8.123456 * 6))
