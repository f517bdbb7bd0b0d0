"""The first check end to end: closure and cementation index through the check registry."""
import pytest

from specgen.build import check

# Published analysis: "Report of the tests of metals and other materials for industrial
# purposes ... Watertown Arsenal" (tests of 1900, Washington, 1902), p. 474, table
# "Chemical analyses of cement rock", row 3 (rock of a natural-cement works):
#   SiO2 22.69, Fe2O3 3.28, Al2O3 5.52, CaO 20.90, MgO 13.75, SO3 0.96, humus+water 7.20, CO2 25.70
# By hand: CI = (2.8*22.69 + 1.1*5.52 + 0.7*3.28) / (20.90 + 1.4*13.75)
#             = (63.532 + 6.072 + 2.296) / (20.90 + 19.25) = 71.900 / 40.150 = 1.79078
# Closure: 22.69+3.28+5.52+20.90+13.75+0.96+7.20+25.70 = 100.00 (hand sum)
PUBLISHED = "{SiO2: 22.69, Fe2O3: 3.28, Al2O3: 5.52, CaO: 20.90, MgO: 13.75, SO3: 0.96, H2O: 7.20, CO2: 25.70}"


@pytest.fixture
def project(demo_copy):
    path = demo_copy / "analyses.yaml"
    path.write_text(path.read_text(encoding="utf-8")
                    + "  - id: W3\n    kind: raw_stone\n"
                    + "    laboratory: Watertown Arsenal report (1902), p. 474, row 3\n"
                    + f"    mass_percent: {PUBLISHED}\n", encoding="utf-8")
    return demo_copy


def test_published_cement_rock_through_the_checks(project):
    _, results = check(project)
    by = {(c.code, c.subject): c for c in results.checks}
    ci = by[("CHEM-CI", "W3")]
    assert ci.value == pytest.approx(1.79078, abs=5e-5)
    # 1.791 lies above Eckel's natural-cement band 1.1-1.7 (Boynton, from memory)
    assert results.quantities["W3"]["hydraulicity_class"].value == "above the highest band"
    assert ci.status == "info"
    closure = by[("CHEM-CLOSURE", "W3")]
    assert closure.value == pytest.approx(100.00, abs=1e-9) and closure.status == "pass"


def test_calculation_steps_allow_recomputation(project):
    _, results = check(project)
    ci = next(c for c in results.checks if c.code == "CHEM-CI" and c.subject == "W3")
    step = ci.steps[0]
    inputs = {i.name: i.value for i in step.inputs}
    recomputed = ((2.8 * inputs["SiO2"] + 1.1 * inputs["Al2O3"] + 0.7 * inputs["Fe2O3"])
                  / (inputs["CaO"] + 1.4 * inputs["MgO"]))
    assert recomputed == pytest.approx(step.result, abs=1e-4)
    assert "2.8 \\times 22.69" in step.substituted
    assert all(i.unit == "%" and "Watertown" in i.source for i in step.inputs)
    assert ci.basis[0].ref == "eckel1922"


def test_every_check_has_a_basis(cli):
    import json
    result = cli("check", "demo_project", "--format", "json")
    data = json.loads(result.output)
    assert data["checks"], "the demo must produce checks"
    for c in data["checks"]:
        assert c["basis"], c["code"]
        for b in c["basis"]:
            assert b["kind"] in {"reference", "common practice", "project requirement"}
            assert b["kind"] != "reference" or b["ref"]
