"""A binder against the class it is declared to (BIND-CLASS): NHL, FL and HL of EN 459-1 judged
on what the project measured, each one result, against the standard's limit values for single
results; a natural cement named by its ASTM C10/C10M designation — and the bad inputs."""
from __future__ import annotations

import pytest

from specgen import refdata
from specgen.build import check
from tests.helpers import edit, problems

NH35 = '''    declared_class: NHL 3.5
    analysis: NHL-A
'''
LAB = "Northstead Materials Laboratory, report NML-4419"


def _class_tests(project, text: str = 'available_lime: "31 %", free_water: "0.6 %", '
                 'strength_28d: "4.1 MPa"') -> None:
    """Give the demo lime NH35 (NHL 3.5) the class tests ``text`` (one line, line 17)."""
    edit(project / "materials.yaml", '    bulk_density: "700 kg/m^3"\n',
         f'    class_tests: {{{text}, laboratory: "{LAB}"}}\n    bulk_density: "700 kg/m^3"\n')


# EN 459-1:2015, Annex A, Table A.4 "Limit values for single results": SO3 upper limit 2,5 for NHL and FL A/B/C,
# 3,5 for HL; available lime as Ca(OH)2 lower limit NHL 2 37, NHL 3,5 22, NHL 5 12, FL A 37,
# FL B 22, FL C 12, HL 2 8, HL 3,5 6, HL 5 2,5; free water upper limit 2,5; 7-day strength
# lower limit 1,5 (class 5); 28-day strength lower limit 1,5 / 2,7 / 4,0 and upper limit
# 10 / 14 / 20 MPa (classes 2 / 3,5 / 5).
TABLE_A4 = {
    ("NHL", "so3_max"): 2.5, ("FL", "so3_max"): 2.5, ("HL", "so3_max"): 3.5,
    ("NHL", "2"): 37.0, ("NHL", "3.5"): 22.0, ("NHL", "5"): 12.0,
    ("FL", "A"): 37.0, ("FL", "B"): 22.0, ("FL", "C"): 12.0,
    ("HL", "2"): 8.0, ("HL", "3.5"): 6.0, ("HL", "5"): 2.5,
}
STRENGTH_A4 = {"2": {"min_28d": 1.5, "max_28d": 10.0},
               "3.5": {"min_28d": 2.7, "max_28d": 14.0},
               "5": {"min_28d": 4.0, "max_28d": 20.0, "min_7d": 1.5}}


@pytest.mark.parametrize("family, key", sorted(TABLE_A4))
def test_chemical_limits_are_the_standards_single_result_table(family, key):
    req = refdata.load("binder_classes").data["en459_1"]["families"][family]
    got = req["so3_max"] if key == "so3_max" else req["available_lime_min"][key]
    assert got == TABLE_A4[(family, key)]


def test_physical_limits_are_the_standards_single_result_table():
    table = refdata.load("binder_classes").data["en459_1"]
    assert table["free_water_max"] == 2.5            # Table A.4, free water upper limit
    assert table["strength"] == STRENGTH_A4          # Table A.4, 7-d and 28-d strength
    # every family has the three classes (FL by its available-lime category A, B, C)
    assert {f: sorted(v["available_lime_min"]) for f, v in table["families"].items()} == {
        "NHL": ["2", "3.5", "5"], "FL": ["A", "B", "C"], "HL": ["2", "3.5", "5"]}
    assert "tag" not in table                         # read in the text, not recalled


def test_natural_cement_designations_of_astm_c10():
    # ASTM C10/C10M-14, 1.1 Scope: "This specification covers natural cement and
    # quick-setting natural cement."
    table = refdata.load("binder_classes").data["astm_c10"]
    assert table["designations"] == ["natural cement", "quick-setting natural cement"]


def test_demo_lime_within_its_class(demo_copy):
    _, r = check(demo_copy)
    c = r.check("BIND-CLASS", "NH35")
    # the demo gives SO3 only (analysis NHL-A 0.8 %): at most 2,5 for NHL (Table A.4)
    assert (c.status, [s.substituted for s in c.steps]) == ("pass", [r"0.8 \le 2.5"])
    _class_tests(demo_copy)
    _, r = check(demo_copy)
    c = r.check("BIND-CLASS", "NH35")
    # NH35 (NHL 3.5): SO3 0.8 % (analysis NHL-A) <= 2.5; available lime 31 % >= 22;
    # free water 0.6 % <= 2.5; 28-d strength 4.1 MPa within 2.7-14 (Table A.4)
    assert c.status == "pass"
    assert c.message == ("declared NHL 3.5: SO3 0.8 %, available lime 31 %, free water 0.6 %, "
                         "28-d strength 4.1 MPa within the single-result limits")
    assert [s.substituted for s in c.steps] == [r"0.8 \le 2.5", r"22 \le 31", r"0.6 \le 2.5",
                                                r"2.7 \le 4.1 \le 14"]
    assert r.check("BIND-CLASS", "NC1") is None      # a natural cement that declares nothing
    # the single-result table is read, not recalled: nothing of it is a value to confirm
    assert not [v for v in r.unconfirmed() if "binder_classes" in v["where"]]


@pytest.mark.parametrize("so3, status", [("2.5", "pass"), ("2.6", "fail")])
def test_so3_at_and_beyond_the_single_result_limit(demo_copy, so3, status):
    edit(demo_copy / "analyses.yaml", "SO3: 0.8, LOI: 17.0", f"SO3: {so3}, LOI: 17.0")
    _, r = check(demo_copy)
    assert r.check("BIND-CLASS", "NH35").status == status     # NHL: at most 2,5 (Table A.4)


def test_formulated_lime_by_its_available_lime_category(demo_copy):
    _class_tests(demo_copy)
    edit(demo_copy / "materials.yaml", "    type: nhl\n    declared_class: NHL 3.5\n",
         "    type: fl\n    declared_class: FL B 3.5\n")
    edit(demo_copy / "materials.yaml", 'available_lime: "31 %"', 'available_lime: "21.9 %"')
    _, r = check(demo_copy)
    c = r.check("BIND-CLASS", "NH35")
    # FL B: available lime at least 22 % as a single result (Table A.4): 21.9 % fails
    assert c.status == "fail"
    assert c.message == ("declared FL B 3.5: available lime 21.9 % beyond the single-result "
                         "limit")


@pytest.mark.parametrize("cls, s7, status", [("HL 5", "1.5 MPa", "pass"),
                                             ("HL 5", "1.4 MPa", "fail")])
def test_class_5_early_strength(demo_copy, cls, s7, status):
    _class_tests(demo_copy)
    edit(demo_copy / "materials.yaml", "    type: nhl\n    declared_class: NHL 3.5\n",
         f"    type: hl\n    declared_class: {cls}\n")
    edit(demo_copy / "materials.yaml", 'strength_28d: "4.1 MPa"',
         f'strength_7d: "{s7}", strength_28d: "4.1 MPa"')
    _, r = check(demo_copy)
    c = r.check("BIND-CLASS", "NH35")
    # HL 5, single results (Table A.4): 7-d at least 1,5 MPa; 28-d 4,0-20 MPa (4.1 within);
    # available lime at least 2,5 % (31 within); SO3 at most 3,5 (0.8 within)
    assert c.status == status
    step = next(s for s in c.steps if s.title.startswith("7-d strength"))
    assert [i.value for i in step.inputs] == [float(s7.split()[0]), 1.5]


def test_a_class_of_another_family_is_not_assessed(demo_copy):
    edit(demo_copy / "materials.yaml", NH35, NH35.replace("NHL 3.5", "HL 5"))
    _, r = check(demo_copy)
    c = r.check("BIND-CLASS", "NH35")
    assert c.status == "not_assessed"
    assert c.message == ("not assessed: binder NH35 declares 'HL 5', which is no EN 459-1 "
                         "class of NHL such as 'NHL 3.5' (materials.yaml declared_class)")
    # it still names the table it would have read: a reference, EN 459-1 Annex A Table A.4
    # (content/data/binder_classes.yaml, en459_1)
    assert [(b.kind, b.ref, b.clause) for b in c.basis] == [
        ("reference", "en459", "Annex A, Table A.4, limit values for single results")]


@pytest.mark.parametrize("declared, status, message", [
    ("quick-setting natural cement (ASTM C10)", "info",
     "declared as quick-setting natural cement (ASTM C10/C10M); the specification's chemical "
     "and physical requirements have not been read here, so the declaration is named, not "
     "judged"),
    ("Roman cement", "not_assessed",
     "binder NC1 declares 'Roman cement', which is no designation of a natural cement in ASTM "
     "C10/C10M (known: natural cement, quick-setting natural cement)"),
])
def test_natural_cement_named_by_its_designation(demo_copy, declared, status, message):
    edit(demo_copy / "materials.yaml", "    type: natural_cement\n",
         f"    type: natural_cement\n    declared_class: {declared}\n")
    _, r = check(demo_copy)
    c = r.check("BIND-CLASS", "NC1")
    assert (c.status, c.message.removeprefix("not assessed: ")) == (status, message)


def test_class_test_without_its_unit_is_refused(demo_copy):
    _class_tests(demo_copy, "available_lime: 31")
    text = problems(demo_copy)
    assert "materials.yaml, line 17: binders[1].class_tests.available_lime:" in text, text
