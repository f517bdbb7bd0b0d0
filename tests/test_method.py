"""The method statement: the rake-out depth by its rule (MTH-RAKE), the derived wording per
zone and the project's overrides (method.yaml), responsibilities from the parties, and the
glossary of the terms the pages print."""
from __future__ import annotations

import pytest

from specgen.build import check
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
