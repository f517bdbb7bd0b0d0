"""The specification: selection per zone, clauses from the checks, site tests, hold points.

Scenario tests on copies of the demo project.  Sampling values are worked by hand from the
sampling rule (one set per area, per day's work, at least a minimum: common practice);
strength limits are the project's requirements (dossier.yaml) as STR-MIN/STR-MAX judge them.
"""
from __future__ import annotations


import pytest

from specgen.build import check
from specgen.errors import InputErrors
from specgen.science import site_tests as st

pytestmark = pytest.mark.costly(20)   # CPU s (tests/conftest.py)


def edit(path, old: str, new: str) -> None:
    text = path.read_text(encoding="utf-8")
    assert old in text, f"test setup: {old!r} not in {path.name}"
    path.write_text(text.replace(old, new, 1), encoding="utf-8")


def by(results) -> dict:
    return {(c.code, c.subject): c for c in results.checks}


def run_check(cli, project) -> str:
    result = cli("check", project)
    assert result.exit_code == 2, result.output
    assert "Traceback" not in result.output
    return result.output


def render_spec(project_dir=None, checked=None):
    """The specification page and its exports, rendered alone (no figures, no build), of
    ``project_dir`` checked here or of an already ``checked`` (project, results)."""
    from specgen.report.mathsvg import MathAssets
    from specgen.report.pageset import PageSet
    from specgen.report.render import RenderEnv, template_env
    from specgen.report.specification_chapters import specification
    project, results = checked if checked is not None else check(project_dir)
    pages = PageSet()
    env = RenderEnv(project, results, pages, MathAssets(pages))
    ctx = specification(env)
    pages.make_downloads()   # as render does (the DOCX exports are made on demand)
    text = template_env(project.root).get_template("specification.md.j2").render(
        title="Specification", narrative="", **ctx)
    return text, pages, results


# ------------------------------------------------------------------ selection
def test_failing_choice_without_justification_is_an_input_error(cli, demo_copy):
    spec = demo_copy / "specification.yaml"
    text = spec.read_text(encoding="utf-8")
    start = text.index("    justification: >-\n      M3 falls short")
    end = text.index("\nsite_tests:")
    spec.write_text(text[:start] + text[end:], encoding="utf-8")
    out = run_check(cli, demo_copy)
    # STR-MIN (early age) and DUR-TSA (every thaumasite condition met in the tidal zone)
    assert ("specification.yaml, line 25: selections[2].justification: mix 'M3' chosen for zone "
            "Z3 fails STR-MIN and DUR-TSA, and no justification is given. Fix: add "
            "'justification:' saying why the choice stands despite the failed checks, or choose "
            "another candidate (each of the others fails a check too).") in out


def test_failing_choice_names_a_clean_candidate(cli, demo_copy):
    # Z1 fails nothing with M2; choosing M3 (fails STR-MIN at 28 d) with no justification
    edit(demo_copy / "specification.yaml", "  - zone: Z1\n    mix: M2", "  - zone: Z1\n    mix: M3")
    out = run_check(cli, demo_copy)
    assert ("specification.yaml, line 6: selections[0].justification: mix 'M3' chosen for zone Z1 "
            "fails STR-MIN, and no justification is given. Fix: add 'justification:' saying why "
            "the choice stands despite the failed check, or choose M1 or M2, which fail no "
            "check.") in out   # M1 holds STR-MAX (a hold is not a failure)


def test_justified_failure_is_attention_and_shown_prominently(demo_copy):
    text, _, results = render_spec(demo_copy)
    z2 = by(results)[("SPEC-SELECT", "Z2")]
    assert z2.status == "attention" and z2.value == "M2"
    assert z2.message.startswith("M2 selected although it fails COMP-MOIST, DUR-TSA, DUR-ETT and "
                                 "DUR-RETAIN — justification: Both candidates fail for this zone.")
    box = text[text.index('!!! warning "Chosen although it fails checks"'):]
    # each check by its title, linked to its sheet, with its register key after it (the
    # site points calculations.md at calculations.html: publish.site.page_addresses)
    assert box.split("\n")[1] == (
        '    Fails <a href="calculations.md#calc-comp-moist-z2-m2">Repair at least as open as '
        'the units</a> (COMP-MOIST/Z2/M2); <a href="calculations.md#calc-dur-tsa-z2-m2">'
        'Thaumasite sulfate attack</a> (DUR-TSA/Z2/M2); <a href="calculations.md#calc-dur-ett-'
        'z2-m2">Ettringite sulfate expansion</a> (DUR-ETT/Z2/M2); <a href="calculations.md#calc-'
        'dur-retain-z2-m2">Water retention against the suction of the units</a> '
        '(DUR-RETAIN/Z2/M2).')
    assert "**Justification recorded by the specifier:** Both candidates fail" in box


def test_clean_choice_passes_and_missing_choice_is_flagged(demo_copy):
    text = (demo_copy / "specification.yaml").read_text(encoding="utf-8")
    start, end = text.index("  - zone: Z3\n"), text.index("\nsite_tests:")
    (demo_copy / "specification.yaml").write_text(text[:start] + text[end:], encoding="utf-8")
    # the durability tests Z1's choice waits for, given as measured (invented values)
    edit(demo_copy / "materials.yaml", '    bag_mass: "25 kg"\n  - id: NH35',
         '    bag_mass: "25 kg"\n    soundness: {free_cao: 0.9, free_mgo: 0.5, expansion: "1.5 mm"}'
         '\n  - id: NH35')
    edit(demo_copy / "materials.yaml", "water_retention: \"78 %\",",
         "water_retention: \"78 %\", freeze_thaw: {method: saturated prisms, cycles: 50, "
         "mass_loss: \"2 %\"},")
    edit(demo_copy / "mixes.yaml", "    water_binder_ratio: 0.65\n",
         "    water_binder_ratio: 0.65\n    setting: {initial: \"12 min\", final: \"30 min\"}\n")
    _, r = check(demo_copy)
    z1, z3 = by(r)[("SPEC-SELECT", "Z1")], by(r)[("SPEC-SELECT", "Z3")]
    # M2's cap at 365 d is held (365 d is beyond 3x its last tested age, 90 d)
    assert z1.status == "attention" and z1.message == \
        "M2 selected; decision rests on held check STR-MAX"
    assert z3.status == "hold"
    assert z3.message == ("no mortar selected for zone Z3: add a selection to specification.yaml "
                          "(candidates: M2, M3)")
    assert r.quantities["Z3"]["selection_status"].value == "hold"
    assert "selected_mix" not in r.quantities["Z3"]


def test_results_names_selection_and_hold_points(demo_checked):
    _, r = demo_checked
    d = r.to_dict()["quantities"]
    assert {z: d[z]["selected_mix"]["value"] for z in ("Z1", "Z2", "Z3")} == \
        {"Z1": "M2", "Z2": "M2", "Z3": "M3"}
    # Z1 rests on held durability checks (soundness, freeze-thaw and setting tests asked for)
    assert {z: d[z]["selection_status"]["value"] for z in ("Z1", "Z2", "Z3")} == \
        {"Z1": "attention", "Z2": "attention", "Z3": "attention"}   # Z1: STR-MAX/M2 held
    holds = d["WEP-2026"]["hold_points"]["value"]
    assert {k: v["state"] for k, v in holds.items()} == {
        "HP1": "released", "HP2": "open", "HP3": "open", "HP4": "open", "HP5": "open"}
    assert holds["HP1"]["released_in"] == "R3" and holds["HP1"]["released_by"] == "reviewer"


def test_without_specification_file_nothing_is_selected(demo_copy):
    (demo_copy / "specification.yaml").unlink()
    _, r = check(demo_copy)
    sel = by(r)[("SPEC-SELECT", "Z1")]
    assert sel.status == "not_assessed"
    assert sel.message == ("not assessed: no specification.yaml; add one with a selection for "
                           "each zone")
    assert by(r)[("SPEC-HOLD", "WEP-2026")].status == "not_assessed"


# ------------------------------------------------------------------ clauses
def test_clause_numbers_are_the_check_limits(demo_checked):
    text, pages, r = render_spec(checked=demo_checked)
    c = by(r)
    md = pages.downloads["exports/WEP-2026-R3-Z1-specification.md"].decode()
    acc = r.quantities["M2"]["acceptance"].value
    # the project's requirements as STR-MIN/STR-MAX judged them: 2 MPa at 28 d, 3 MPa at 90 d,
    # at most 9 MPa at 365 d (demo dossier.yaml requirements, written here from that file)
    assert acc["min 28 d"]["limit"] == c[("STR-MIN", "M2")].limit.low == 2.0
    assert acc["min 90 d"]["limit"] == 3.0 and c[("STR-MAX", "M2")].limit.high == 9.0
    assert "is at least 2 MPa [STR-MIN/M2]" in md
    assert "is at least 3 MPa [STR-MIN/M2]" in md
    assert ("not stronger than 9 MPa, so that it stays weaker than the fabric [STR-MAX/M2]"
            in md)
    # individual minimum 80 % of the requirement (common practice rule): 1.6 and 2.4 MPa
    assert "no set has a mean below 1.6 MPa [SPEC-ACCEPT/Z1]" in md
    assert "no set has a mean below 2.4 MPa [SPEC-ACCEPT/Z1]" in md
    # working window and curing from content/rules/works.yaml (common practice): 5 to 30 °C,
    # damp 5 days, protected 7 days; grading within an RMS difference of 10 points
    # (content/rules, common practice)
    assert ("at or below 5 °C or when the temperature is falling towards it, nor "
            "above 30 °C") in md
    assert ("for at least 5 days, and protected from frost, driving rain, "
            "strong sun and drying wind for at least 7 days") in md
    assert "within Δ_rms ≤ 10 % [COMP-GRAD/Z1/M2]" in md
    assert "[CHEM-CI/NC1-A]" in md and "1.1–1.7" in md


def test_clauses_follow_a_changed_requirement_and_rule(demo_copy):
    edit(demo_copy / "dossier.yaml", '{age: "28 d", value: "2 MPa"}', '{age: "28 d", value: "2.5 MPa"}')
    edit(demo_copy / "dossier.yaml", "compatibility:\n", "rule_overrides:\n"
         "  - {rule: works.min_working_temperature, value: 7, justification: 'exposed harbour "
         "wall, wind chill at the pier head'}\n"
         "  - {rule: specification.individual_minimum, value: 75, justification: 'few sets "
         "per zone in the short harbour season'}\n\ncompatibility:\n")
    _, pages, r = render_spec(demo_copy)
    md = pages.downloads["exports/WEP-2026-R3-Z1-specification.md"].decode()
    assert by(r)[("STR-MIN", "M2")].limit.low == 2.5
    assert "is at least 2.5 MPa [STR-MIN/M2]" in md
    assert "no set has a mean below 1.875 MPa [SPEC-ACCEPT/Z1]" in md   # 0.75 × 2.5
    assert "at or below 7 °C" in md
    # an overridden rule carries its written justification wherever it is an input
    inputs = [i for st in by(r)[("SPEC-ACCEPT", "Z1")].steps for i in st.inputs]
    assert any(i.source.startswith("rule specification.individual_minimum") and
               i.source.endswith("project override: few sets per zone in the short harbour "
                                 "season") for i in inputs)


def test_clauses_name_the_exposure_and_the_durability_tests_as_hold_points(demo_checked):
    """Each zone's clauses carry its exposure class and, as hold points, the tests the
    durability checks asked for its chosen mix (EN 1996-2 Annex A classes, memory)."""
    text, _, r = render_spec(checked=demo_checked)
    flat = " ".join(text.split())
    assert "The work is in exposure class MX4 with MX3.2" in flat
    for t in r.quantities["Z3"]["durability_tests"].value:
        assert (f"**{t['test'][0].upper() + t['test'][1:]}.** Hold point: no work in this zone "
                f"until the result is given to the specifier — {t['method']}") in flat
    # Z3's chosen M3 (NHL 3.5) has no freeze–thaw test and no soundness result
    assert {t["check"] for t in r.quantities["Z3"]["durability_tests"].value} == {
        "DUR-FROST/Z3/M3", "DUR-SOUND/NH35"}


def test_project_template_overrides_the_clause_wording(demo_copy):
    (demo_copy / "templates").mkdir()
    (demo_copy / "templates" / "specification_clauses.md.j2").write_text(
        "{{ h }} {{ c.zone.id }} Own clauses\n\nMortar {{ c.mix.id }}, cap "
        "{{ c.acceptance.cap.max }} MPa {{ ref(c.acceptance.cap.source) }}.\n", encoding="utf-8")
    text, pages, _ = render_spec(demo_copy)
    md = pages.downloads["exports/WEP-2026-R3-Z2-specification.md"].decode()
    assert "## Z2 Own clauses\n\nMortar M2, cap 9 MPa [STR-MAX/M2]." in md
    assert "#### Z2 Own clauses" in text and "Joint preparation" not in text


def test_exports_are_plain_and_escaped(demo_copy):
    edit(demo_copy / "specification.yaml", "    Stop the works in the zone,",
         "    <script>alert(1)</script> Stop the works in the zone,")
    _, pages, _ = render_spec(demo_copy)
    html = pages.downloads["exports/WEP-2026-R3-Z1-specification.html"].decode()
    md = pages.downloads["exports/WEP-2026-R3-Z1-specification.md"].decode()
    assert "<script" not in html and "&lt;script&gt;alert(1)&lt;/script&gt;" in html
    assert "<script" not in md
    assert html.startswith("<h1>Specification of zone Z1: Inner face, repointing of brick "
                           "courses</h1>\n")
    assert " class=" not in html and " href=" not in html and "<style" not in html
    assert "<h2>Cautions</h2>" in html and "heritage" in html.lower()


def test_clean_html_keeps_structure_only():
    from specgen.report.specification_export import clean_html
    dirty = ('<h2 id="x">Title</h2><p onclick="x()">a <a href="javascript:y">b</a> '
             '<img src=x onerror=z>c</p><style>p{}</style><script>bad()</script><ol><li>d</li></ol>')
    assert clean_html(dirty) == "<h2>Title</h2><p>a b c</p><ol><li>d</li></ol>"


# ------------------------------------------------------------------ sampling
@pytest.mark.parametrize("area, per_set, expected", [
    (240.0, 50.0, 5),    # ⌈4.8⌉ (worked by hand)
    (150.0, 50.0, 3),    # exactly three areas: no fourth set from rounding
    (85.0, 50.0, 2),     # ⌈1.7⌉
    (10.0, 50.0, 1),     # a small zone still gets one set
])
def test_sets_by_area(area, per_set, expected):
    assert st.sets_by_area(area, per_set) == expected


def test_sets_by_days_and_minimum():
    # 0.852 m³ placed at 8 L/h for 6 h a day: 852 / 48 = 17.75 → 18 days (worked by hand)
    assert st.working_days(0.852, 8e-3 / 3600, 6 * 3600) == 18
    n = st.sample_sets(1, 240.0, 50.0, 0.852, 8e-3 / 3600, 6 * 3600)
    assert (n.by_area, n.working_days, n.sets) == (5, 18, 18)
    assert st.sample_sets(3, 40.0, 50.0).sets == 3          # the minimum governs
    assert st.prisms(5, 3, 2) == 30


def test_sampling_for_the_zone_area(demo_copy):
    edit(demo_copy / "specification.yaml", "site_tests:\n",
         "site_tests:\n  per_working_day: false\n  area_per_set: \"40 m^2\"\n")
    _, r = check(demo_copy)
    z1, z2 = r.quantities["Z1"]["sample_sets"].value, r.quantities["Z2"]["sample_sets"].value
    # Z1 240 m² / 40 m² = 6 sets; Z2 85 m² / 40 m² = 2.125 → 3; 3 prisms × 3 ages (28, 90 d
    # required; 180 d named by the held cap STR-MAX/M2)
    assert (z1["sets"], z1["prisms"], z1["working_days"]) == (6, 54, None)
    assert (z2["sets"], z2["prisms"]) == (3, 27)
    assert z1["ages_d"] == [28.0, 90.0, 180.0]
    res = by(r)[("SPEC-SAMPLING", "Z1")]
    assert res.message == "6 set(s) of 3 prisms per test age (6 by area): 54 prisms"
    assert by(r)[("SPEC-SAMPLING", "Z3")].status == "not_assessed"   # no area, days not counted


# ------------------------------------------------------------------ hold points
def _archive_spec(project, rev: str, text: str) -> None:
    (project / "issued" / rev / "specification.yaml").write_text(text, encoding="utf-8")


EARLIER = """hold_points:
  - {id: HP1, what: trial panels accepted, stage: before any work, released_by: reviewer}
  - {id: HP2, what: site results, stage: beyond the first bay, released_by: specifier}
  - {id: HP9, what: scaffold survey, stage: before access, released_by: client}
"""


def test_hold_point_states_carried_across_revisions(demo_copy):
    _archive_spec(demo_copy, "R2", EARLIER)
    text, _, r = render_spec(demo_copy)
    holds = r.quantities["WEP-2026"]["hold_points"].value
    assert holds["HP1"]["history"] == {"R2": "open", "R3": "released"}
    assert holds["HP3"]["history"] == {"R3": "open"}
    res = by(r)[("SPEC-HOLD", "WEP-2026")]
    assert res.status == "attention"
    assert res.notes == ("HP9 of R2 is no longer listed: say why it was withdrawn",)
    assert "R2: open → R3: released" in text
    assert ("- **HP1 released in R3** — evidence: Panel TP2 accepted at the site meeting of "
            "2026-10-20 (heritage service note WDHS/EP/14).") in text


def test_hold_point_released_earlier_cannot_silently_reopen(demo_copy):
    _archive_spec(demo_copy, "R2", EARLIER.replace(
        "released_by: specifier}", "released_by: specifier, state: released, released_in: R2, "
        "evidence: results of sets 1-3}"))
    _, r = check(demo_copy)
    res = by(r)[("SPEC-HOLD", "WEP-2026")]
    assert "HP2 was released in R2 (R2) and is open again in R3: record why in its evidence" \
        in res.notes
    assert r.quantities["WEP-2026"]["hold_points"].value["HP2"]["history"] == \
        {"R2": "released", "R3": "open"}


def test_hold_points_counted_from_the_demo_file(demo_checked):
    # demo specification.yaml, read by hand: HP1 to HP5; HP1 released in R3, the other four
    # open (no state given: open); no earlier revision has a specification.yaml, so no
    # carry-over notes and the result is for information
    _, r = demo_checked
    res = by(r)[("SPEC-HOLD", "WEP-2026")]
    assert (res.status, res.value, res.notes) == ("info", 4, ())
    assert res.message == "5 hold point(s): 1 released (HP1 in R3), 4 open (HP2, HP3, HP4, HP5)"
    assert res.steps[0].substituted == r"\mathrm{released}: 1,\ \mathrm{open}: 4"
    assert [i.value for i in res.steps[0].inputs] == \
        ["R3 released", "R3 open", "R3 open", "R3 open", "R3 open"]


def test_hold_point_released_in_another_revision_is_noted(demo_copy):
    # R2's file says HP1 was released in R2; the current file says R3: both cannot be true
    _archive_spec(demo_copy, "R2", EARLIER.replace(
        "released_by: reviewer}", "released_by: reviewer, state: released, released_in: R2, "
        "evidence: panel TP2 accepted}"))
    _, r = check(demo_copy)
    res = by(r)[("SPEC-HOLD", "WEP-2026")]
    assert res.status == "attention"
    assert res.notes == ("HP1 was released in R2 according to R2, but in R3 according to R3",
                         "HP9 of R2 is no longer listed: say why it was withdrawn")
    assert r.quantities["WEP-2026"]["hold_points"].value["HP1"]["history"] == \
        {"R2": "released", "R3": "released"}
    # a point withdrawn before R2 (listed in R1 only) was answered in R2: only the points of
    # the latest earlier revision missing now are noted
    _archive_spec(demo_copy, "R1", EARLIER.replace("HP9, what: scaffold survey",
                                                   "HP8, what: scaffold survey"))
    _, r = check(demo_copy)
    assert by(r)[("SPEC-HOLD", "WEP-2026")].notes[-1:] == (
        "HP9 of R2 is no longer listed: say why it was withdrawn",)
    assert not any("HP8" in n for n in by(r)[("SPEC-HOLD", "WEP-2026")].notes)


# ------------------------------------------------------------------ bad input
@pytest.mark.parametrize("old, new, message", [
    ("  - zone: Z3\n    mix: M3", "  - zone: Z3\n    mix: M9",
     "specification.yaml, line 25: selections[2].mix: names mix 'M9', which is not defined. "
     "Fix: define it, or use one of: M1, M2, M3."),
    ("  - zone: Z3\n    mix: M3", "  - zone: Z8\n    mix: M3",
     "specification.yaml, line 24: selections[2].zone: names zone 'Z8', which is not defined. "
     "Fix: define it, or use one of: Z1, Z2, Z3."),
    ("  - zone: Z3\n    mix: M3", "  - zone: Z1\n    mix: M3",
     "specification.yaml, line 24: selections[2].zone: zone Z1 is selected twice (also "
     "selections[0]). Fix: keep one selection per zone."),
    ("  - zone: Z2\n    mix: M2", "  - zone: Z2\n    mix: M3",
     "specification.yaml, line 12: selections[1].mix: mix 'M3' is not a candidate of zone Z2 "
     "(candidates: M1, M2). Fix: choose one of the candidates, or add M3 to the zone's "
     "candidates in dossier.yaml so that it is appraised."),
    ("    stage: before pointing each lift of Z1\n    released_by: specifier\n",
     "    stage: before pointing each lift of Z1\n",
     "specification.yaml, line 62: hold_points[3].released_by: hold point 'HP4' names no "
     "releasing role. Fix: add 'released_by:' with the role of the party who releases it "
     "(dossier.yaml parties): client, laboratory, reviewer, specifier."),
    ("    released_by: laboratory", "    released_by: labratory",
     "specification.yaml, line 69: hold_points[4].released_by: hold point 'HP5' names the role "
     "'labratory', which is not a party role in dossier.yaml. Fix: did you mean 'laboratory'?"),
    ("    released_in: R3\n", "",
     "specification.yaml, line 47: hold_points[0].state: hold point 'HP1' is released but gives "
     "no released_in. Fix: say in which revision it was released and on what evidence, or set "
     "'state: open'."),
    ("    released_in: R3\n", "    released_in: R7\n",
     "specification.yaml, line 48: hold_points[0].released_in: hold point 'HP1' was released in "
     "'R7', which is neither this revision nor an issued one. Fix: use one of: R3, R1, R2."),
    ("    colour_sample: M3\n", "    colour_sample: M33\n",
     "specification.yaml, line 104: trial_panels[2].colour_sample: trial panel 'TP3' names colour "
     "sample 'M33', which is not in lab/colour.csv. Fix: did you mean 'M3'?"),
    ("    judgement: pending\n\ncurrency", "    judgement: pending\n    photo: ../TP4.jpg\n\n"
     "currency", "specification.yaml: trial_panels[3].photo: the path '../TP4.jpg' leaves the "
     "project folder. Fix: give a path relative to the project folder, without '..'."),
])
def test_bad_specification_messages(cli, demo_copy, old, new, message):
    edit(demo_copy / "specification.yaml", old, new)
    out = run_check(cli, demo_copy)
    assert message in out


def test_bad_input_stops_before_any_check(demo_copy):
    edit(demo_copy / "specification.yaml", "  - zone: Z3\n    mix: M3", "  - zone: Z3\n    mix: M9")
    with pytest.raises(InputErrors) as exc:
        check(demo_copy)
    assert len(exc.value.problems) == 1


# ------------------------------------------------------------------ fuzzing
def test_malformed_specification_ends_in_located_messages(tmp_path_factory, full):
    """The loader fuzz of test_fuzz_loaders, on the demo's specification.yaml (20 cases, each
    a whole check when the file still loads; --full: 60)."""
    import shutil

    from hypothesis import HealthCheck, given, settings

    from tests.conftest import DEMO
    from tests.test_fuzz_loaders import apply, mutation

    @settings(max_examples=60 if full else 20, deadline=None, derandomize=True,
              suppress_health_check=[HealthCheck.function_scoped_fixture, HealthCheck.too_slow])
    @given(change=mutation)
    def case(change):
        root = tmp_path_factory.mktemp("fuzz-spec")
        shutil.copytree(DEMO, root, dirs_exist_ok=True)
        apply(root / "specification.yaml", *change)
        try:
            check(root)
        except InputErrors as exc:
            assert exc.problems
            for p in exc.problems:
                assert p.file and p.message and "Traceback" not in p.message, p
    case()
