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


NC1_A = ("{SiO2: 21.5, Al2O3: 8.1, Fe2O3: 4.2, CaO: 57.9, MgO: 2.3, SO3: 0.9, K2O: 1.1, "
         "Na2O: 0.3, CO2: 1.9, LOI: 3.2}")                       # demo analyses.yaml
CLOSURE_WORDS = "pass within ±1 %, attention within ±2.5 %"    # content/rules/analysis.yaml


def _by(results):
    return {(c.code, c.subject): c for c in results.checks}


def test_closure_and_index_results_whole(demo_checked):
    """CHEM-CLOSURE and CHEM-CI of the demo's analyses, whole.  NC1-A (demo analyses.yaml):
    21.5 + 8.1 + 4.2 + 57.9 + 2.3 + 0.9 + 1.1 + 0.3 + 3.2 = 99.5 % (CO2 1.9 inside LOI, not
    added); CI = (2.8·21.5 + 1.1·8.1 + 0.7·4.2)/(57.9 + 1.4·2.3) = 72.05/61.12 = 1.1788 in
    Eckel's natural-cement band 1.1–1.7 (Boynton, from memory) and NC1 is declared a natural
    cement: pass.  NHL-A: (39.2 + 2.75 + 1.05)/(62 + 2.1) = 0.6708, within 0.05 (the band
    margin rule) of the 0.7 edge: borderline.  HM1-B is no binder's analysis: info."""
    from specgen.checks.result import Basis, Limit
    by = _by(demo_checked[1])
    c = by[("CHEM-CLOSURE", "NC1-A")]
    assert (c.title, c.subject_kind, c.status, c.value, c.unit) == (
        "Oxide analysis closure", "analysis", "pass", pytest.approx(99.5, abs=1e-9), "%")
    assert c.message == f"total 99.50 %, -0.50 % from 100 %; {CLOSURE_WORDS}"
    assert c.notes == ("CO2 = 1.9 % is part of LOI = 3.2 %: not added a second time",)
    assert c.limit == Limit("within", 99.0, 101.0, "%", "100 ± 1 % (attention to ± 2.5 %)",
                            rule="analysis.closure_pass", overridden="")
    assert c.basis == (Basis("common practice", note="a careful wet-chemical or XRF analysis "
                             "with LOI closes within about ±1 %"),)
    step = c.steps[0]
    assert (step.title, step.formula, step.symbol, step.unit) == (
        "Sum of reported constituents", r"\Sigma = \sum_i w_i", "Σ", "%")
    assert step.substituted == (r"\Sigma = 21.50 + 8.10 + 4.20 + 57.90 + 2.30 + 0.90 + 1.10 + "
                                "0.30 + 3.20")
    assert [(i.symbol, i.name, i.value, i.unit) for i in step.inputs][:2] == [
        ("w(SiO2)", "SiO2", 21.5, "%"), ("w(Al2O3)", "Al2O3", 8.1, "%")]
    assert "CO2" not in [i.name for i in step.inputs]
    assert [(q.name, q.value, q.unit) for q in c.quantities] == [
        ("analysis_total", pytest.approx(99.5, abs=1e-9), "%"),
        ("loss_on_ignition", pytest.approx(3.2, abs=1e-9), "%")]
    ci = by[("CHEM-CI", "NC1-A")]
    assert (ci.title, ci.subject_kind, ci.status, ci.value, ci.unit) == (
        "Cementation index", "analysis", "pass", pytest.approx(72.05 / 61.12, abs=5e-5), "")
    assert ci.message == ("CI = 1.179: falls in the band 'natural cement' (1.1–1.7), "
                          "consistent with binder NC1 declared a natural cement")
    assert ci.limit == Limit("within", 1.1, 1.7, "", "band 'natural cement': 1.1–1.7",
                             rule="hydraulicity_bands")
    assert ci.basis == (Basis("reference", "eckel1922", "cementation index, as reproduced in "
                              "Boynton (1980)"),
                        Basis("reference", "boynton1980", "hydraulicity bands of the "
                              "cementation index"))
    st = ci.steps[0]
    assert (st.title, st.formula, st.symbol) == (
        "Cementation index (Eckel)", r"CI = \frac{2.8\,S + 1.1\,A + 0.7\,F}{C + 1.4\,M}", "CI")
    assert st.substituted == (r"CI = \frac{2.8 \times 21.50 + 1.1 \times 8.10 + 0.7 \times "
                              r"4.20}{57.90 + 1.4 \times 2.30}")
    assert [(i.symbol, i.name, i.value, i.unit) for i in st.inputs] == [
        ("S", "SiO2", 21.5, "%"), ("A", "Al2O3", 8.1, "%"), ("F", "Fe2O3", 4.2, "%"),
        ("C", "CaO", 57.9, "%"), ("M", "MgO", 2.3, "%")]
    assert [(q.name, q.value) for q in ci.quantities] == [
        ("cementation_index", pytest.approx(1.1788, abs=1e-4)),
        ("hydraulicity_class", "natural cement")]
    assert ci.quantities[1].label == "band of the cementation index"
    nhl = by[("CHEM-CI", "NHL-A")]
    assert (nhl.status, nhl.value) == ("attention", pytest.approx(43 / 64.1, abs=5e-5))
    assert nhl.message == ("CI = 0.671: falls in the band 'moderately hydraulic lime' "
                           "(0.5–0.7), within the margin of the edge with 'eminently hydraulic "
                           "lime': borderline")
    assert nhl.quantities[1].label == "band of the cementation index (borderline)"
    hm = by[("CHEM-CI", "HM1-B")]
    assert (hm.status, hm.message) == ("info", "CI = 1.334: falls in the band 'natural "
                                               "cement' (1.1–1.7)")


@pytest.mark.parametrize("loi, status, words", [
    ("5.2", "attention", "total 101.50 %, +1.50 % from 100 %"),
    ("7.2", "fail", "total 103.50 %, +3.50 % from 100 %")])
def test_closure_attention_and_fail(demo_copy, loi, status, words):
    """NC1-A with its LOI raised: 99.5 − 3.2 + LOI (by hand) against ±1 % and ±2.5 %."""
    path = demo_copy / "analyses.yaml"
    path.write_text(path.read_text(encoding="utf-8").replace(
        "CO2: 1.9, LOI: 3.2}", f"CO2: 1.9, LOI: {loi}}}"), encoding="utf-8")
    c = _by(check(demo_copy)[1])[("CHEM-CLOSURE", "NC1-A")]
    assert (c.status, c.message) == (status, f"{words}; {CLOSURE_WORDS}")


def test_index_of_a_natural_cement_outside_its_band_and_without_lime(demo_copy):
    """NC1-A with SiO2 15.0: CI = (42 + 8.91 + 2.94)/61.12 = 0.8811 (by hand), in the
    eminently hydraulic band 0.7–1.1 although NC1 is declared a natural cement: attention.
    An analysis without SiO2 (its 21.5 % moved into LOI, so it still closes) cannot give the
    index."""
    path = demo_copy / "analyses.yaml"
    text = path.read_text(encoding="utf-8")
    assert NC1_A in text
    path.write_text(text.replace(NC1_A, NC1_A.replace("SiO2: 21.5", "SiO2: 15.0")),
                    encoding="utf-8")
    c = _by(check(demo_copy)[1])[("CHEM-CI", "NC1-A")]
    assert (c.status, c.value) == ("attention", pytest.approx(53.85 / 61.12, abs=5e-5))
    assert c.message == ("CI = 0.881: falls in the band 'eminently hydraulic lime' (0.7–1.1), "
                         "but binder NC1 is declared a natural cement")
    path.write_text(text.replace(NC1_A, NC1_A.replace("SiO2: 21.5, ", "").replace(
        "LOI: 3.2", "LOI: 24.7")), encoding="utf-8")
    c = _by(check(demo_copy)[1])[("CHEM-CI", "NC1-A")]
    assert (c.title, c.status, c.value, c.unit, c.message, c.steps) == (
        "Cementation index", "not_assessed", None, "", "not assessed: the analysis gives no "
        "SiO2", ())
    assert [b.ref for b in c.basis] == ["eckel1922"]
