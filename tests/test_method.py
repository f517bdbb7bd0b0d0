"""The method statement: the rake-out depth by its rule (MTH-RAKE), the derived wording per
zone and the project's overrides (method.yaml), responsibilities from the parties, and the
glossary of the terms the pages print."""
from __future__ import annotations

import pytest

from specgen.build import check
from specgen.report.chapters import badge
from specgen.report.glossary_chapters import printed
from tests.helpers import by_check, edit, problems


def _env(project_dir):
    from specgen.report.mathsvg import MathAssets
    from specgen.report.pageset import PageSet
    from specgen.report.render import RenderEnv
    project, results = check(project_dir)
    pageset = PageSet()
    return RenderEnv(project, results, pageset, MathAssets(pageset))


def test_rake_out_depth_given_within_the_rule():
    # demo Z1: joints 10 mm wide, raked 20 mm; rule: max(2 x 10, 15) = 20 mm (joint depth ratio
    # 2 and least depth 15 mm: common practice), deepest 3 x 10 = 30 mm (common practice)
    c = by_check(check("demo_project")[1])[("MTH-RAKE", "Z1")]
    assert (c.status, c.value, c.unit) == ("pass", 20.0, "mm")
    assert c.message == "rake out to 20 mm as given: within the rule's 20–30 mm"
    assert c.steps[0].substituted == r"d = \max(2 \cdot 10,\ 15)"


@pytest.mark.parametrize("depth, status, message", [
    ("12 mm", "attention", "the depth given, 12 mm, is shallower than the rule's 20 mm: the "
     "repair may not key; confirm it on the trial bay or change it"),
    ("35 mm", "attention", "the depth given, 35 mm, is deeper than 30 mm: it takes more "
     "original mortar than the repair needs; confirm it on the trial bay or change it"),
    ("30 mm", "pass", "rake out to 30 mm as given: within the rule's 20–30 mm"),
])
def test_rake_out_depth_against_the_rule(demo_copy, depth, status, message):
    edit(demo_copy / "dossier.yaml", 'joint_depth: "20 mm"', f'joint_depth: "{depth}"')
    c = by_check(check(demo_copy)[1])[("MTH-RAKE", "Z1")]
    assert (c.status, c.message) == (status, message)


def test_narrow_joint_takes_the_least_depth(demo_copy):
    # 6 mm joint: 2 x 6 = 12 mm < 15 mm, so the least depth of practice (15 mm) governs
    edit(demo_copy / "dossier.yaml", 'joint_width: "10 mm"\n    joint_depth: "20 mm"\n',
         'joint_width: "6 mm"\n')
    c = by_check(check(demo_copy)[1])[("MTH-RAKE", "Z1")]
    assert (c.status, c.value, c.message) == ("pass", 15.0, "rake out to 15 mm (the rule)")


def test_method_wording_per_zone_and_the_projects_override(demo_copy):
    (demo_copy / "method.yaml").write_text(
        "zones:\n  - zone: Z3\n    sequencing: Rebed the four loose blocks of the landward "
        "return first, then the seaward ones.\n", encoding="utf-8")
    from specgen.report.method_chapters import method
    ctx = method(_env(demo_copy))
    z1, z2, z3 = ctx["zones"]
    parts = {p["title"]: p for p in z1["parts"]}
    assert parts["Preparation"]["text"].startswith(
        "Rake out the joints by hand with plugging chisels and hand rakes to 20 mm (the rule "
        "from the joint width gives 20 mm), square at the back")
    # M2 in Z1: 81 gaugings a day (works check of the demo, gauging_by_zone)
    assert "(81 gaugings a day by the batching card)" in parts["Sequence and bays"]["text"]
    # MTH-BAY: 48 L a day at 3.09 L per m² of face (test_bay_area_of_a_day_s_work_by_hand)
    assert ("in bays that one crew fills in a day: about 16 m² of face (the day's 48 L of mortar "
            "at 3.09 L per m² of face)") in parts["Sequence and bays"]["text"]
    assert "keep the work damp by misting and wet hessian for at least 5 d" in \
        parts["Curing and protection"]["text"]
    assert parts["Weather limits"]["text"].startswith("Mix and place only between 5 and 30 °C")
    render = {p["title"]: p["text"] for p in z2["parts"]}
    assert "joint" not in render["Placing"].replace("joints", "")   # render coats, own words
    assert "coat 1 12 mm, coat 2 8 mm" in render["Sequence and bays"]
    assert ("each panel no larger than a day's work: about 7.5 m² of face (the day's 150 L of "
            "mortar at 20 L per m² of face)") in render["Sequence and bays"]
    own = {p["title"]: p for p in z3["parts"]}["Sequence and bays"]
    assert own == {"title": "Sequence and bays", "own": True, "text": "Rebed the four loose "
                   "blocks of the landward return first, then the seaward ones."}
    assert [h["id"] for h in z1["holds"]] == ["HP2", "HP4"]
    assert [h["id"] for h in ctx["general_holds"]] == ["HP1", "HP3"]
    who = {r["task"]: r for r in ctx["responsibilities"]}
    assert who["tests the prisms and reports the results"]["who"] == \
        "Materials section, Northstead Materials Laboratory"
    assert not who["casts and sends the site prisms"]["named"]   # no contractor in the demo


def test_method_file_naming_an_unknown_zone(demo_copy):
    (demo_copy / "method.yaml").write_text("zones:\n  - zone: Z9\n    curing: Keep damp.\n",
                                           encoding="utf-8")
    assert ("method.yaml, line 2: zones[0].zone: names zone 'Z9', which is not defined. Fix: "
            "define it, or use one of: Z1, Z2, Z3.") in problems(demo_copy)


def test_glossary_lists_only_what_the_pages_print():
    entries = [{"term": "LSF", "meaning": "lime saturation factor"},
               {"term": "f_k", "match": "f<sub>k</sub>", "meaning": "characteristic strength"},
               {"term": "HP", "match": "HP[0-9]+", "meaning": "hold point"},
               {"term": "CI", "meaning": "cementation index"}]
    pages = {"a.md": "measured f<sub>k</sub> 1.36 MPa; see HP2.",
             "b.md": "CIELAB readings", "glossary.md": "LSF"}
    # 'CI' inside 'CIELAB' is not the term; the glossary page itself is not searched
    assert [e["term"] for e in printed(entries, pages)] == ["f_k", "HP"]


@pytest.mark.parametrize("text", ["CIELAB, then CI 1.2", "xHP2 -HP3 HP", "MX1.5 of MX", "a|b",
                                  "LSF-2 LSF_3", "(CI)", "HP4", ""])
def test_glossary_search_tried_where_the_term_stands_finds_what_a_whole_search_finds(text):
    # the search starts only where a term's plain head stands (a speed-up): the reference is
    # the plain search of the whole text with the same pattern (Python's re)
    import re
    entries = [{"term": "CI"}, {"term": "HP", "match": "HP[0-9]+"}, {"term": "LSF"},
               {"term": "MX", "match": "MX[0-9.]+"}, {"term": "a|b", "match": "a|b"},
               {"term": "ab", "match": "ab?c?"}]
    whole = [e["term"] for e in entries if re.search(
        rf"(?<![\w-]){e.get('match') or re.escape(e['term'])}(?![\w-])", text)]
    assert [e["term"] for e in printed(entries, {"a.md": text})] == whole


def test_bay_area_of_a_day_s_work_by_hand():
    """Bay area A_bay = min(q·T·A/V, A), the rule stated on the calculation sheet."""
    c = by_check(check("demo_project")[1])
    # demo Z2, render by area: q = 25 L/h (dossier.yaml Z2.placing_rate), T = 6 h (works rule
    # working_day, common practice), coats 12 + 8 mm (dossier.yaml), so 20 L per m² of face;
    # by hand: 25 x 6 = 150 L a day / 20 L/m² = 7.5 m² (less than the zone's 85 m²)
    z2 = c[("MTH-BAY", "Z2")]
    assert (z2.status, z2.value, z2.unit) == ("info", 7.5, "m²")
    assert z2.steps[0].formula == r"A_{bay} = \min(q\,T\,A / V,\ A)"
    # demo Z1, repointing: q = 8 L/h (dossier.yaml), 48 L a day; the net joint volume of the
    # zone (WORKS-QTY) is 741.2 L over 240 m²: 48 x 240 / 741.2 = 15.54 m² by hand
    assert c[("MTH-BAY", "Z1")].value == pytest.approx(48 * 240 / 741.18, abs=0.01)
    assert ("MTH-BAY", "Z3") not in c          # bedding: block by block, no bay by area


def test_bay_never_larger_than_the_zone():
    from specgen.science.works import bay_area
    # 10 L/h for 6 h = 0.06 m³ a day at 0.018 m³/m² (a 10 + 8 mm render) = 3.33 m² by hand;
    # a 2 m² zone is one bay
    assert bay_area(10 / 3.6e6, 6 * 3600, 0.018 * 50, 50) == pytest.approx(60 / 18, rel=1e-12)
    assert bay_area(10 / 3.6e6, 6 * 3600, 0.018 * 2, 2) == 2


WORKS_RULE = ("rule works.joint_depth_ratio (common practice — joints are raked out to about "
              "twice their width, to sound mortar)")             # content/rules/works.yaml
MIN_RULE = ("rule method.rake_out_min (common practice — a thinner repair has too little body "
            "to key and is lost at the first frost; rake to at least about 15 mm, deeper only "
            "to sound mortar)")                                   # content/rules/method.yaml
MAX_RULE = ("rule method.rake_out_max_ratio (common practice — raking much deeper than two to "
            "three joint widths loosens the units and takes more original mortar than the "
            "repair needs)")                                      # content/rules/method.yaml
DAY_RULE = ("rule works.working_day (common practice — about 5-7 h of placing in a site day "
            "after setting up, breaks and cleaning down)")        # content/rules/works.yaml


def test_rake_out_result_whole_with_the_depth_given(demo_checked):
    """MTH-RAKE of demo Z1 whole: j = 10 mm, d = max(2 × 10, 15) = 20 mm by the rule, 20 mm
    given (dossier.yaml), deepest 3 × 10 = 30 mm (rules: common practice); by hand."""
    c = by_check(demo_checked[1])[("MTH-RAKE", "Z1")]
    assert (c.title, c.subject_kind, c.status, c.value, c.unit) == (
        "Rake-out depth of the joints", "zone", "pass", 20.0, "mm")
    assert (c.limit.compare, c.limit.low, c.limit.high, c.limit.unit, c.limit.text) == (
        "within", 20.0, 30.0, "mm", "20–30 mm")
    rule, given = c.steps
    assert (rule.title, rule.formula, rule.result, rule.unit, rule.symbol) == (
        "Rake-out depth by the rule", r"d = \max(r \cdot j,\ d_{\min})", 20.0, "mm", "d")
    assert [(i.symbol, i.name, i.value, i.unit, i.source) for i in rule.inputs] == [
        ("j", "joint width", 10.0, "mm", "dossier.yaml Z1.joint_width"),
        ("r", "depth as a multiple of the width", 2.0, "", WORKS_RULE),
        ("d_min", "shallowest rake-out", 15.0, "mm", MIN_RULE)]
    assert (given.title, given.formula, given.substituted, given.result, given.unit,
            given.symbol) == ("The project's depth against the rule",
                              r"d \le d_{given} \le r_{\max} \cdot j", r"20 \le 20 \le 30",
                              20.0, "mm", "d_given")
    assert [(i.symbol, i.name, i.value, i.unit, i.source) for i in given.inputs] == [
        ("d_given", "depth given for the zone", 20.0, "mm", "dossier.yaml Z1.joint_depth"),
        ("r_max", "deepest rake-out as a multiple of the width", 3.0, "", MAX_RULE)]
    assert [(q.name, q.value, q.unit) for q in c.quantities] == [
        ("rake_out_depth", {"depth": 20.0, "rule": 20.0, "given": 20.0, "deepest": 30.0},
         "mm")]


@pytest.mark.parametrize("depth, substituted", [("12 mm", r"20 > 12 \le 30"),
                                                ("35 mm", r"20 \le 35 > 30")])
def test_rake_out_depth_outside_the_rule_shown_on_the_sheet(demo_copy, depth, substituted):
    """The sheet shows which side of the rule a depth given breaks (by hand: 20–30 mm)."""
    edit(demo_copy / "dossier.yaml", 'joint_depth: "20 mm"', f'joint_depth: "{depth}"')
    c = by_check(check(demo_copy)[1])[("MTH-RAKE", "Z1")]
    assert c.steps[1].substituted == substituted
    assert c.quantities[0].value["given"] == float(depth.split()[0])


def test_rake_out_without_a_depth_given_has_no_limit(demo_copy):
    """A 6 mm joint with no depth given: 15 mm by the rule (2 × 6 = 12 < 15), deepest 18 mm."""
    edit(demo_copy / "dossier.yaml", 'joint_width: "10 mm"\n    joint_depth: "20 mm"\n',
         'joint_width: "6 mm"\n')
    c = by_check(check(demo_copy)[1])[("MTH-RAKE", "Z1")]
    assert (c.limit, len(c.steps), c.steps[0].substituted) == (
        None, 1, r"d = \max(2 \cdot 6,\ 15)")
    assert c.quantities[0].value == {"depth": 15.0, "rule": 15.0, "given": None,
                                     "deepest": 18.0}


def test_bay_result_whole_and_the_default_placing_rate(demo_copy):
    """MTH-BAY of demo Z2 whole (25 L/h × 6 h = 150 L a day; 12 + 8 mm coats = 20 L/m²;
    150 × 85 / 1700 = 7.5 m², by hand); Z1 without its placing rate takes the works rule's
    10 L/h (common practice): 60 L a day over 741.18 L / 240 m² = 19.43 m², by hand."""
    z2 = by_check(check(demo_copy)[1])[("MTH-BAY", "Z2")]
    assert (z2.title, z2.subject_kind, z2.status, z2.unit) == (
        "Bay size of a day's work", "zone", "info", "m²")
    assert z2.message == "bays of about 7.5 m² a crew-day (150 L a day at 20 L per m² of face)"
    step = z2.steps[0]
    assert (step.title, step.result, step.unit, step.symbol) == (
        "Face area one crew fills in a day", 7.5, "m²", "A_bay")
    assert step.substituted == (r"A_{bay} = \min(150\ \mathrm{L} \times 85 / 1700\ \mathrm{L},"
                                r"\ 85) = 7.5")
    assert [(i.symbol, i.name, i.value, i.unit, i.source) for i in step.inputs] == [
        ("q", "placing rate", 25.0, "L/h", "dossier.yaml Z2.placing_rate"),
        ("T", "placing hours per day", 6.0, "h", DAY_RULE),
        ("V", "mortar volume before wastage", pytest.approx(1.7, abs=1e-12), "m³",
         "WORKS-QTY/Z2"),
        ("A", "face area of the zone", 85.0, "m²", "dossier.yaml Z2.area")]
    assert [(q.name, q.value, q.unit) for q in z2.quantities] == [
        ("bay_area", {"area": 7.5, "per_m2_l": 20.0, "per_day_l": 150.0, "zone_area": 85.0},
         "m²")]
    edit(demo_copy / "dossier.yaml", '    placing_rate: "8 L/h"\n', "")
    z1 = by_check(check(demo_copy)[1])[("MTH-BAY", "Z1")]
    assert z1.value == pytest.approx(60 * 240 / 741.18, abs=0.01)
    assert (z1.steps[0].inputs[0].value, z1.steps[0].inputs[0].source) == (
        10.0, "rule works.placing_rate (common practice — one operative pointing or bedding; "
              "confirm on the trial panel)")


def test_rake_out_only_for_repointing(demo_copy):
    """MTH-RAKE is for repointing alone: the bedding zone Z3 given a joint width has no
    rake-out depth (its blocks are rebedded, not raked out), nor has the render zone Z2."""
    edit(demo_copy / "dossier.yaml", "    works: bedding\n",
         '    works: bedding\n    joint_width: "10 mm"\n')
    got = by_check(check(demo_copy)[1])
    assert [k for k in got if k[0] == "MTH-RAKE"] == [("MTH-RAKE", "Z1")]


# --- MTH-RAKE and MTH-BAY on hand-made zones (no demo check) --------------------------------
# Rules (content/rules/works.yaml and method.yaml, common practice): depth ratio 2, least
# depth 15 mm, deepest 3 joint widths; placing rate 10 L/h, 6 h of placing a day.
RAKE_BASIS = ("common practice", "joints are raked out to about twice their width, to sound "
              "mortar, and never less than about 15 mm")
RATE_RULE = ("rule works.placing_rate (common practice — one operative pointing or bedding; "
             "confirm on the trial panel)")


def _ctx(volumes=None):
    from specgen.checks.rules import RuleBook
    from specgen.checks.run import Context
    from specgen.checks.result import Quantity
    ctx = Context(None, RuleBook())
    for zone, v in (volumes or {}).items():
        ctx.record(zone, Quantity("mortar_volume_net", v, "m³", "net mortar volume"))
    return ctx


def _rake(width_mm, depth_mm=None, works="repointing"):
    from types import SimpleNamespace as NS
    from specgen.checks.method_checks import rake_out_check
    zone = NS(id="Z9", works=works, joint_width=None if width_mm is None else width_mm * 1e-3,
              joint_depth=None if depth_mm is None else depth_mm * 1e-3)
    return rake_out_check(zone, _ctx())


def _rule_step(width, rule):
    from specgen.checks.result import Input, Step
    return Step("Rake-out depth by the rule", r"d = \max(r \cdot j,\ d_{\min})",
                (Input("j", "joint width", width, "mm", "dossier.yaml Z9.joint_width"),
                 Input("r", "depth as a multiple of the width", 2.0, "", WORKS_RULE),
                 Input("d_min", "shallowest rake-out", 15.0, "mm", MIN_RULE)),
                rf"d = \max(2 \cdot {width:g},\ 15)", rule, "mm", "d")


def test_rake_out_by_the_rule_alone_whole():
    """A 12 mm joint, no depth given: d = max(2 × 12, 15) = 24 mm, deepest 3 × 12 = 36 mm."""
    from specgen.checks.result import Basis, CheckResult, Quantity
    assert _rake(12.0) == CheckResult(
        code="MTH-RAKE", title="Rake-out depth of the joints", subject="Z9",
        subject_kind="zone", status="pass", value=24.0, unit="mm",
        basis=(Basis(RAKE_BASIS[0], note=RAKE_BASIS[1]),), steps=(_rule_step(12.0, 24.0),),
        limit=None, message="rake out to 24 mm (the rule)",
        quantities=(Quantity("rake_out_depth", {"depth": 24.0, "rule": 24.0, "given": None,
                                                "deepest": 36.0}, "mm",
                             "rake-out depth of the joints"),))


@pytest.mark.parametrize("depth, status, shown, message", [
    (24.0, "pass", r"24 \le 24 \le 36", "rake out to 24 mm as given: within the rule's "
                                        "24–36 mm"),          # on the rule's depth
    (36.0, "pass", r"24 \le 36 \le 36", "rake out to 36 mm as given: within the rule's "
                                        "24–36 mm"),          # on the deepest
    (23.9, "attention", r"24 > 23.9 \le 36", "the depth given, 23.9 mm, is shallower than the "
     "rule's 24 mm: the repair may not key; confirm it on the trial bay or change it"),
    (36.1, "attention", r"24 \le 36.1 > 36", "the depth given, 36.1 mm, is deeper than 36 mm: "
     "it takes more original mortar than the repair needs; confirm it on the trial bay or "
     "change it")])
def test_rake_out_depth_given_on_and_beyond_the_edges(depth, status, shown, message):
    """A 12 mm joint (rule 24 mm, deepest 36 mm, by hand) with a depth given: the edges
    belong to the rule; the sheet shows which side a depth breaks."""
    from specgen.checks.result import Input, Limit, Step
    c = _rake(12.0, depth)
    assert (c.status, c.value, c.message) == (status, depth, message)
    assert c.limit == Limit("within", low=24.0, high=36.0, unit="mm", text="24–36 mm")
    assert c.steps == (_rule_step(12.0, 24.0), Step(
        "The project's depth against the rule", r"d \le d_{given} \le r_{\max} \cdot j",
        (Input("d_given", "depth given for the zone", depth, "mm", "dossier.yaml Z9.joint_depth"),
         Input("r_max", "deepest rake-out as a multiple of the width", 3.0, "", MAX_RULE)),
        shown, depth, "mm", "d_given"))
    assert c.quantities[0].value == {"depth": depth, "rule": 24.0, "given": depth,
                                     "deepest": 36.0}


def test_rake_out_least_depth_governs_a_narrow_joint():
    """A 5 mm joint: 2 × 5 = 10 < 15 mm, so 15 mm; deepest 15 mm too (3 × 5)."""
    c = _rake(5.0)
    assert (c.value, c.steps, c.quantities[0].value) == (
        15.0, (_rule_step(5.0, 15.0),), {"depth": 15.0, "rule": 15.0, "given": None,
                                         "deepest": 15.0})


def test_rake_out_none_for_other_works_or_no_width():
    assert (_rake(10.0, works="render"), _rake(10.0, works="bedding"), _rake(None)) == (
        [], [], [])


def _bay(area, volume, rate_l_h=None, works="render"):
    from types import SimpleNamespace as NS
    from specgen.checks.method_checks import bay_check
    zone = NS(id="Z9", works=works, area=area,
              placing_rate=None if rate_l_h is None else rate_l_h / 3.6e6)
    return bay_check(zone, _ctx({} if volume is None else {"Z9": volume}))


def test_bay_of_a_render_zone_whole():
    """50 m² rendered 18 mm thick in all: V = 0.9 m³ (18 L per m²); the rule's 10 L/h for
    6 h = 60 L a day; A_bay = min(60 × 50 / 900, 50) = 3.333 m² (by hand)."""
    from specgen.checks.result import Basis, CheckResult, Input, Quantity, Step
    assert _bay(50.0, 0.9) == CheckResult(
        code="MTH-BAY", title="Bay size of a day's work", subject="Z9", subject_kind="zone",
        status="info", value=3.33, unit="m²",
        basis=(Basis("common practice", note="work by area is done in bays that one crew "
                     "finishes in a day, so no bay is left raked out, part-pointed or with an "
                     "open render coat overnight"),),
        steps=(Step("Face area one crew fills in a day", r"A_{bay} = \min(q\,T\,A / V,\ A)",
                    (Input("q", "placing rate", 10.0, "L/h", RATE_RULE),
                     Input("T", "placing hours per day", 6.0, "h", DAY_RULE),
                     Input("V", "mortar volume before wastage", 0.9, "m³", "WORKS-QTY/Z9"),
                     Input("A", "face area of the zone", 50.0, "m²", "dossier.yaml Z9.area")),
                    r"A_{bay} = \min(60\ \mathrm{L} \times 50 / 900\ \mathrm{L},\ 50) = 3.33",
                    3.33, "m²", "A_bay"),),
        message="bays of about 3.33 m² a crew-day (60 L a day at 18 L per m² of face)",
        quantities=(Quantity("bay_area", {"area": 3.33, "per_m2_l": 18.0, "per_day_l": 60.0,
                                          "zone_area": 50.0}, "m²", "bay area of a day's work"),))


def test_bay_of_a_small_repointing_zone_is_the_zone():
    """2 m² at 18 L per m² (V = 0.036 m³) with the zone's own 25 L/h: 150 L a day would fill
    150 × 2 / 36 = 8.33 m², more than the zone: one bay of 2 m² (by hand)."""
    c = _bay(2.0, 0.036, rate_l_h=25.0, works="repointing")
    assert (c.value, c.message) == (2.0, "bays of about 2 m² a crew-day (150 L a day at 18 L "
                                         "per m² of face)")
    assert (c.steps[0].inputs[0].value, c.steps[0].inputs[0].source) == (
        25.0, "dossier.yaml Z9.placing_rate")
    assert c.steps[0].substituted == (r"A_{bay} = \min(150\ \mathrm{L} \times 2 / 36\ "
                                      r"\mathrm{L},\ 2) = 2")
    assert c.quantities[0].value == {"area": 2.0, "per_m2_l": 18.0, "per_day_l": 150.0,
                                     "zone_area": 2.0}


def test_bay_none_for_bedding_no_volume_or_no_area():
    assert (_bay(50.0, 0.9, works="bedding"), _bay(50.0, None), _bay(None, 0.9),
            _bay(0.0, 0.9)) == ([], [], [], [])


def test_rake_out_of_a_fractional_width_shown_to_a_thousandth_of_a_mm():
    """An 8.1234 mm joint, no depth given: d = max(2 × 8.1234, 15) = 16.2468 mm and deepest
    3 × 8.1234 = 24.3702 mm (by hand); the inputs and results are shown to 0.001 mm (8.123,
    16.247, 24.37), the working line and the message with the figures to six digits."""
    from specgen.checks.result import Input, Step
    c = _rake(8.1234)
    assert (c.value, c.message) == (16.247, "rake out to 16.2468 mm (the rule)")
    assert c.steps == (Step(
        "Rake-out depth by the rule", r"d = \max(r \cdot j,\ d_{\min})",
        (Input("j", "joint width", 8.123, "mm", "dossier.yaml Z9.joint_width"),
         Input("r", "depth as a multiple of the width", 2.0, "", WORKS_RULE),
         Input("d_min", "shallowest rake-out", 15.0, "mm", MIN_RULE)),
        r"d = \max(2 \cdot 8.1234,\ 15)", 16.247, "mm", "d"),)
    assert c.quantities[0].value == {"depth": 16.247, "rule": 16.247, "given": None,
                                     "deepest": 24.37}


@pytest.mark.parametrize("given, status", [
    (0.015625 - 1e-9, "pass"),      # 1e-9 m shallower than the rule: within the tolerance
    (0.0234375 + 1e-9, "pass"),     # 1e-9 m deeper than the deepest: within the tolerance
    (0.015625 - 2e-9, "attention"),
    (0.0234375 + 2e-9, "attention")])
def test_rake_out_edges_allow_a_nanometre_of_rounding(given, status):
    """A 7.8125 mm joint (2⁻⁷ m, so every product is exact in binary): rule max(2 × 7.8125,
    15) = 15.625 mm, deepest 3 × 7.8125 = 23.4375 mm (by hand).  A depth given in other units
    can land a rounding error off an edge: the comparison allows 1e-9 m either side, no more."""
    from types import SimpleNamespace as NS
    from specgen.checks.method_checks import rake_out_check
    c = rake_out_check(NS(id="Z9", works="repointing", joint_width=0.0078125,
                          joint_depth=given), _ctx())
    assert c.status == status


def test_rake_out_fractional_depth_given_shown_to_a_thousandth_of_a_mm():
    """The 8.1234 mm joint (rule 16.2468 mm, deepest 24.3702 mm, by hand) with 20.1236 mm
    given: within, so it passes; the depth given and the limit's edges are shown to 0.001 mm
    (20.124; 16.247–24.37), the working line and the message to six digits."""
    from specgen.checks.result import Input, Limit, Step
    c = _rake(8.1234, 20.1236)
    assert (c.status, c.value, c.message) == (
        "pass", 20.124, "rake out to 20.1236 mm as given: within the rule's 16.2468–24.3702 mm")
    assert c.limit == Limit("within", low=16.247, high=24.37, unit="mm",
                            text="16.2468–24.3702 mm")
    assert c.steps[1] == Step(
        "The project's depth against the rule", r"d \le d_{given} \le r_{\max} \cdot j",
        (Input("d_given", "depth given for the zone", 20.124, "mm", "dossier.yaml Z9.joint_depth"),
         Input("r_max", "deepest rake-out as a multiple of the width", 3.0, "", MAX_RULE)),
        r"16.2468 \le 20.1236 \le 24.3702", 20.124, "mm", "d_given")
    assert c.quantities[0].value == {"depth": 20.124, "rule": 16.247, "given": 20.124,
                                     "deepest": 24.37}


@pytest.mark.parametrize("given, value, said", [
    (None, 15.0, ""),
    (15.0, 15.0, "; the depth given, 15 mm, cannot settle it"),
    (10.0, 10.0, "; the depth given, 10 mm, cannot settle it")])
def test_rake_out_of_a_joint_too_fine_for_both_rules_is_held(given, value, said):
    """A 4 mm joint: the rule gives max(2 × 4, 15) = 15 mm but the deepest is 3 × 4 = 12 mm
    (by hand; ratios 2 and 3, least depth 15 mm: common practice), so no depth meets both
    rules.  The check holds — whatever depth is given — and says what decides: a trial bay,
    with the heritage authority; the sheet shows the conflict, 15 > 3 · 4 = 12."""
    from specgen.checks.result import Input, Step
    c = _rake(4.0, given)
    assert (c.status, c.value, c.limit) == ("hold", value, None)
    assert c.message == (
        "joints 4 mm wide are too fine for both rules of practice: the least depth, 15 mm, is "
        "deeper than the deepest the width allows, 12 mm" + said + "; agree on a trial bay, "
        "with the heritage authority, whether these joints are raked out at all and to what "
        "depth")
    assert c.steps == (_rule_step(4.0, 15.0), Step(
        "The rule's depth against the deepest rake-out", r"d \le r_{\max} \cdot j",
        (Input("r_max", "deepest rake-out as a multiple of the width", 3.0, "", MAX_RULE),),
        r"15 > 3 \cdot 4 = 12", 12.0, "mm", "d_max"))
    assert c.quantities[0].value == {"depth": value, "rule": 15.0, "given": given,
                                     "deepest": 12.0}


def test_rake_out_of_the_finest_joint_both_rules_allow_passes():
    """5 mm is the finest joint both rules allow (15 mm / 3 = 5 mm, by hand): rule 15 mm,
    deepest 15 mm, so it passes; 4.999 mm (deepest 14.997 mm < 15 mm) is held."""
    assert (_rake(5.0).status, _rake(5.0, 15.0).status, _rake(4.999).status) == (
        "pass", "pass", "hold")


def test_method_statement_names_no_depth_for_a_held_joint(demo_copy):
    """Demo Z1 given 4 mm joints and no depth: the preparation clause sends the depth to a
    trial bay instead of quoting 15 mm, which the deepest rule (12 mm) forbids."""
    from specgen.report.method_chapters import method
    edit(demo_copy / "dossier.yaml", 'joint_width: "10 mm"\n    joint_depth: "20 mm"\n',
         'joint_width: "4 mm"\n')
    z1 = method(_env(demo_copy))["zones"][0]
    text = {p["title"]: p["text"] for p in z1["parts"]}["Preparation"]
    assert ("hand rakes to a depth agreed on a trial bay with the heritage authority (joints "
            "this fine cannot meet both rules of practice for the rake-out depth), square at "
            "the back") in text
    assert "15 mm" not in text
    assert z1["rake"]["badge"] == badge("hold")


@pytest.mark.parametrize("rate_l_h, shown_rate, per_day, area", [
    # 12.34567 L/h for the rule's 6 h: 74.07402 L a day, shown 74.074; the bay
    # 74.07402 × 7 / 100 = 5.185 m², shown 5.19 (by hand)
    (12.34567, 12.3457, 74.074, 5.19),
    # 25.000045 L/h: 150.00027 L a day, shown 150.0; the rate is shown 25.0 only when it is
    # converted by exactly 3.6e6 (1000 L per m³ × 3600 s per h); 150 × 7 / 100 = 10.5 m² is
    # more than the zone: the bay is the zone's 7 m² (by hand)
    (25.000045, 25.0, 150.0, 7.0)])
def test_bay_figures_shown_to_their_decimals(rate_l_h, shown_rate, per_day, area):
    """A 7 m² repointing zone taking 0.1 m³: 100 / 7 = 14.2857 L per m² of face, shown to
    0.001 L (14.286); the zone's own placing rate shown to 0.0001 L/h and the day's mortar
    to 0.001 L (by hand)."""
    c = _bay(7.0, 0.1, rate_l_h=rate_l_h, works="repointing")
    assert c.steps[0].inputs[0].value == shown_rate
    assert c.quantities[0].value == {"area": area,
                                     "per_m2_l": 14.286, "per_day_l": per_day, "zone_area": 7.0}
