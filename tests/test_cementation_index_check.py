"""The first check end to end: closure and cementation index through the check registry."""
import pytest

from specgen.build import check
from specgen.checks.result import Basis, CheckResult, Input, Limit, Quantity, Step

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


# --- CHEM-CLOSURE and CHEM-CI on hand-made analyses (no demo check) -------------------------
# Every expected value below is written out by hand from the test's own inputs; the rules are
# those of content/rules/analysis.yaml (closure ±1 % pass, ±2.5 % attention, band margin 0.05,
# common practice) and the bands those of content/data/hydraulicity_bands.yaml (Eckel's bands
# as reproduced in Boynton, from memory: 0.3 / 0.5 / 0.7 / 1.1 / 1.7).
LAB = "Harbourside Test House, report HT-17"          # invented laboratory
CLOSURE_BASIS = Basis("common practice", note="a careful wet-chemical or XRF analysis with "
                      "LOI closes within about ±1 %")
ECKEL = Basis("reference", "eckel1922", "cementation index, as reproduced in Boynton (1980)")
BOYNTON = Basis("reference", "boynton1980", "hydraulicity bands of the cementation index")


def _analysis(ox, aid="A1", lab="", material=None, split=None):
    from types import SimpleNamespace as NS
    return NS(id=aid, mass_percent=dict(ox), laboratory=lab, material=material,
              lumped_split=split or {})


def _ctx(binders=None, overrides=()):
    """A hand-made context: ``binders`` {id: family}; the built-in rules with ``overrides``
    ((rule, value, justification), as dossier.yaml rule_overrides gives them)."""
    from types import SimpleNamespace as NS
    from specgen.checks.rules import RuleBook
    from specgen.checks.run import Context
    project = NS(binders={b: NS(id=b, type=t) for b, t in (binders or {}).items()})
    book = RuleBook([NS(rule=r, value=v, justification=j) for r, v, j in overrides])
    return Context(project, book)


def _closure_limit(overridden=""):
    return Limit("within", 99.0, 101.0, "%", "100 ± 1 % (attention to ± 2.5 %)",
                 rule="analysis.closure_pass", overridden=overridden)


def test_closure_without_loi_adds_its_parts_whole():
    """No LOI reported: CO2 and H2O are the loss and are added.  By hand: 20 + 40 + 2.5 + 30
    + 7 = 99.5 % (−0.50 %, within ±1 %: pass); loss on ignition = CO2 + H2O = 37 %.  Inputs
    in the conventional oxide order (SiO2, CaO, MgO, CO2, then H2O, a name outside it)."""
    from specgen.checks.composition_checks import closure_check
    a = _analysis({"H2O": 7.0, "CaO": 40.0, "CO2": 30.0, "SiO2": 20.0, "MgO": 2.5}, lab=LAB)
    src = f"analysis A1 ({LAB})"
    assert closure_check(a, _ctx()) == CheckResult(
        code="CHEM-CLOSURE", title="Oxide analysis closure", subject="A1",
        subject_kind="analysis", status="pass", value=99.5, unit="%", basis=(CLOSURE_BASIS,),
        steps=(Step("Sum of reported constituents", r"\Sigma = \sum_i w_i",
                    (Input("w(SiO2)", "SiO2", 20.0, "%", src),
                     Input("w(CaO)", "CaO", 40.0, "%", src),
                     Input("w(MgO)", "MgO", 2.5, "%", src),
                     Input("w(CO2)", "CO2", 30.0, "%", src),
                     Input("w(H2O)", "H2O", 7.0, "%", src)),
                    r"\Sigma = 20.00 + 40.00 + 2.50 + 30.00 + 7.00", 99.5, "%", "Σ"),),
        limit=_closure_limit(),
        message=f"total 99.50 %, -0.50 % from 100 %; {CLOSURE_WORDS}", notes=(),
        quantities=(Quantity("analysis_total", 99.5, "%", "sum of constituents"),
                    Quantity("loss_on_ignition", 37.0, "%", "loss on ignition")))


@pytest.mark.parametrize("loi, status, words", [
    (26.0, "pass", "total 101.00 %, +1.00 % from 100 %"),        # exactly on the ±1 % edge
    (26.1, "attention", "total 101.10 %, +1.10 % from 100 %"),
    (27.5, "attention", "total 102.50 %, +2.50 % from 100 %"),   # exactly on the ±2.5 % edge
    (22.5, "attention", "total 97.50 %, -2.50 % from 100 %"),
    (27.6, "fail", "total 102.60 %, +2.60 % from 100 %"),
    (24.0, "pass", "total 99.00 %, -1.00 % from 100 %")])
def test_closure_edges_with_loi_and_its_parts(loi, status, words):
    """LOI reported with its parts CO2 and H2O: only LOI is added (by hand 25 + 50 + LOI),
    the parts are noted in oxide order (CO2 before H2O); an edge of the rule belongs to the
    better status.  No laboratory named: the source is the analysis alone."""
    from specgen.checks.composition_checks import closure_check
    a = _analysis({"SiO2": 25.0, "H2O": 4.0, "CaO": 50.0, "CO2": 20.0, "LOI": loi}, aid="A2")
    c = closure_check(a, _ctx())
    assert (c.status, c.message) == (status, f"{words}; {CLOSURE_WORDS}")
    assert c.value == pytest.approx(75.0 + loi, abs=1e-9)
    assert c.notes == (f"CO2 = 20 % is part of LOI = {loi:g} %: not added a second time",
                       f"H2O = 4 % is part of LOI = {loi:g} %: not added a second time")
    assert [(i.name, i.source) for i in c.steps[0].inputs] == [
        ("SiO2", "analysis A2"), ("CaO", "analysis A2"), ("LOI", "analysis A2")]
    assert c.quantities[1] == Quantity("loss_on_ignition", loi, "%", "loss on ignition")


def test_closure_with_the_attention_band_overridden():
    """A project override of the attention band (3 %, with its justification): the limit
    names the justification, the message the new band; 102.6 % is now attention."""
    from specgen.checks.composition_checks import closure_check
    a = _analysis({"SiO2": 25.0, "CaO": 50.0, "LOI": 27.6})
    c = closure_check(a, _ctx(overrides=[("analysis.closure_attention", 3.0,
                                          "the laboratory's stated repeatability")]))
    assert (c.status, c.message) == ("attention", "total 102.60 %, +2.60 % from 100 %; pass "
                                     "within ±1 %, attention within ±3 %")
    assert c.limit == Limit("within", 99.0, 101.0, "%", "100 ± 1 % (attention to ± 3 %)",
                            rule="analysis.closure_pass",
                            overridden="the laboratory's stated repeatability")


def _ci_expected(aid, ox, ci, band, low, high, edges, status, message, src, notes=(),
                 borderline=False):
    """CHEM-CI written out whole from its inputs (``ox`` the oxides the formula reads)."""
    g = lambda k: ox.get(k, 0.0)  # noqa: E731
    return CheckResult(
        code="CHEM-CI", title="Cementation index", subject=aid, subject_kind="analysis",
        status=status, value=ci, unit="", basis=(ECKEL, BOYNTON),
        steps=(Step("Cementation index (Eckel)",
                    r"CI = \frac{2.8\,S + 1.1\,A + 0.7\,F}{C + 1.4\,M}",
                    tuple(Input(s, n, g(n), "%", src) for s, n in (
                        ("S", "SiO2"), ("A", "Al2O3"), ("F", "Fe2O3"), ("C", "CaO"),
                        ("M", "MgO"))),
                    rf"CI = \frac{{2.8 \times {g('SiO2'):.2f} + 1.1 \times {g('Al2O3'):.2f} + "
                    rf"0.7 \times {g('Fe2O3'):.2f}}}{{{g('CaO'):.2f} + 1.4 \times "
                    rf"{g('MgO'):.2f}}}", ci, "", "CI"),),
        limit=Limit("within", low, high, "", f"band '{band}': {edges}",
                    rule="hydraulicity_bands"),
        message=message, notes=notes,
        quantities=(Quantity("cementation_index", ci, "", "Eckel cementation index"),
                    Quantity("hydraulicity_class", band, "", "band of the cementation index"
                             + (" (borderline)" if borderline else ""))))


def test_index_below_the_table_whole():
    """SiO2 5, CaO 70: CI = 2.8·5/70 = 0.2 (by hand), below the lowest edge 0.3 and 0.1 from
    it (more than the 0.05 margin); an analysis of no binder: info."""
    from specgen.checks.composition_checks import cementation_index_check
    ox = {"SiO2": 5.0, "CaO": 70.0, "LOI": 25.0}
    c = cementation_index_check(_analysis(ox, aid="B1", lab=LAB), _ctx())
    assert c == _ci_expected(
        "B1", ox, 0.2, "below the lowest band", None, 0.3, "< 0.3", "info",
        "CI = 0.200: falls in the band 'below the lowest band' (< 0.3)", f"analysis B1 ({LAB})")


@pytest.mark.parametrize("material, binders, status, tail", [
    ("NC9", {"NC9": "natural_cement"}, "attention", ", but binder NC9 is declared a natural "
                                                    "cement"),
    ("NC9", {"NC9": "nhl"}, "info", ""),       # a lime's analysis above the table: no verdict
    ("NC9", {}, "info", ""),                   # a binder the project lacks
    (None, {"NC9": "natural_cement"}, "info", "")])
def test_index_above_the_table_against_the_declared_binder(material, binders, status, tail):
    """SiO2 35, Al2O3 10, Fe2O3 5, CaO 50, MgO 5: CI = (98 + 11 + 3.5)/(50 + 7) = 112.5/57
    = 1.97368 (by hand), above the highest edge 1.7 by more than the margin: a natural cement
    declared for it is told it falls outside its band; anything else is information."""
    from specgen.checks.composition_checks import cementation_index_check
    ox = {"SiO2": 35.0, "Al2O3": 10.0, "Fe2O3": 5.0, "CaO": 50.0, "MgO": 5.0}
    c = cementation_index_check(_analysis(ox, aid="B2", material=material), _ctx(binders))
    assert c == _ci_expected(
        "B2", ox, 1.9737, "above the highest band", 1.7, None, "≥ 1.7", status,
        f"CI = 1.974: falls in the band 'above the highest band' (≥ 1.7){tail}",
        "analysis B2")


def test_index_borderline_wins_over_the_declared_binder():
    """SiO2 24, CaO 60: CI = 67.2/60 = 1.12 (by hand), in the natural-cement band 1.1–1.7 but
    0.02 from its lower edge (within the 0.05 margin): attention, borderline with the
    eminently hydraulic band, although the binder is declared a natural cement."""
    from specgen.checks.composition_checks import cementation_index_check
    ox = {"SiO2": 24.0, "CaO": 60.0}
    c = cementation_index_check(_analysis(ox, aid="B3", material="NC9"),
                                _ctx({"NC9": "natural_cement"}))
    assert c == _ci_expected(
        "B3", ox, 1.12, "natural cement", 1.1, 1.7, "1.1–1.7", "attention",
        "CI = 1.120: falls in the band 'natural cement' (1.1–1.7), within the margin of the "
        "edge with 'eminently hydraulic lime': borderline", "analysis B3", borderline=True)


def test_index_of_a_lumped_analysis_states_the_split():
    """Al2O3+Fe2O3 10 % split 0.6/0.4 (declared): Al2O3 6, Fe2O3 4; CI = (2.8·25 + 1.1·6 +
    0.7·4)/60 = 79.4/60 = 1.32333 (by hand), natural cement, declared so: pass; the split is
    the check's note, worded as the science states an assumption."""
    from specgen.checks.composition_checks import cementation_index_check
    a = _analysis({"SiO2": 25.0, "Al2O3+Fe2O3": 10.0, "CaO": 60.0}, aid="B4", material="NC9",
                  split={"Al2O3+Fe2O3": {"Al2O3": 0.6, "Fe2O3": 0.4}})
    c = cementation_index_check(a, _ctx({"NC9": "natural_cement"}))
    assert c == _ci_expected(
        "B4", {"SiO2": 25.0, "Al2O3": 6.0, "Fe2O3": 4.0, "CaO": 60.0}, 1.3233,
        "natural cement", 1.1, 1.7, "1.1–1.7", "pass",
        "CI = 1.323: falls in the band 'natural cement' (1.1–1.7), consistent with binder "
        "NC9 declared a natural cement", "analysis B4",
        notes=("Al2O3+Fe2O3 = 10.00 % reported together; split assumed as 60 % Al2O3, "
               "40 % Fe2O3",))


def test_index_without_lime_or_silica_names_both():
    """Neither CaO nor SiO2: not assessed, both named in the formula's order (C, S)."""
    from specgen.checks.composition_checks import cementation_index_check
    c = cementation_index_check(_analysis({"Al2O3": 5.0, "MgO": 3.0, "LOI": 10.0}, aid="B5"),
                                _ctx())
    assert c == CheckResult(
        code="CHEM-CI", title="Cementation index", subject="B5", subject_kind="analysis",
        status="not_assessed", value=None, unit="", basis=(ECKEL,),
        message="not assessed: the analysis gives no CaO, SiO2")


def test_chemistry_pieces_by_hand():
    """The shared pieces of the chemistry checks on hand-made analyses: a lumped key without
    its split refused with the line to add, a guarded check's refusal turned into *not
    assessed* with its reason, a non-finite value refused, absent oxides shown as 0, the
    binder an analysis belongs to, and what counts as clinker."""
    from types import SimpleNamespace as NS
    from specgen.checks import chemistry_common as cm
    from specgen.science.oxides import ChemistryInputError
    lumped = _analysis({"SiO2": 20.0, "Al2O3+Fe2O3": 9.0, "CaO": 60.0}, aid="L1")
    with pytest.raises(ChemistryInputError) as err:
        cm.prepared(lumped)
    assert str(err.value) == (
        "'Al2O3+Fe2O3' is reported lumped and no split is declared; add to analysis 'L1' in "
        "analyses.yaml: lumped_split: {'Al2O3+Fe2O3': {Al2O3: …, Fe2O3: …}}")
    plain = cm.prepared(_analysis({"SiO2": 20.0, "CaO": 60.0}))
    assert (plain.ox, plain.assumptions) == ({"SiO2": 20.0, "CaO": 60.0}, ())

    def refuses(subject, ctx):
        raise ChemistryInputError("the index needs CaO above zero")
    guarded = cm.guarded("CHEM-CI", "Cementation index", "analysis", (ECKEL,))(refuses)
    assert guarded(NS(id="L1"), None) == CheckResult(
        code="CHEM-CI", title="Cementation index", subject="L1", subject_kind="analysis",
        status="not_assessed", value=None, unit="", basis=(ECKEL,),
        message="not assessed: the index needs CaO above zero")
    assert cm.finite(1.5, "x") == 1.5
    with pytest.raises(ChemistryInputError) as err:
        cm.finite(float("nan"), "the lime saturation factor")
    assert str(err.value) == ("the lime saturation factor came out non-finite; check the "
                              "analysis")
    with pytest.raises(ChemistryInputError):
        cm.finite(float("inf"), "x")
    a = _analysis({"SiO2": 20.0}, aid="L2", lab=LAB, material="B1")
    assert cm.oxide_inputs(a, a.mass_percent, [("S", "SiO2"), ("A", "Al2O3")]) == (
        Input("S", "SiO2", 20.0, "%", f"analysis L2 ({LAB})"),
        Input("A", "Al2O3", 0.0, "%", "not reported: taken as 0"))
    project = NS(binders={"B1": NS(type="nhl", contains_clinker=False)})
    assert cm.binder_of(a, project) is project.binders["B1"]
    assert cm.binder_of(_analysis({}), project) is None
    assert [cm.is_clinker(b) for b in (None, NS(type="portland", contains_clinker=False),
                                       NS(type="nhl", contains_clinker=True),
                                       NS(type="nhl", contains_clinker=False))] == [
        False, True, True, False]


def test_closure_rounds_to_four_decimals():
    """A laboratory's figures to five decimals: the total 25.00004 + 50 + 25.00004 =
    100.00008 % is recorded, shown and summed as 100.0001 % (four decimals, by hand), the
    loss on ignition 25.00004 as 25.0 %."""
    from specgen.checks.composition_checks import closure_check
    c = closure_check(_analysis({"SiO2": 25.00004, "CaO": 50.0, "LOI": 25.00004}), _ctx())
    assert (c.value, c.steps[0].result) == (100.0001, 100.0001)
    assert c.quantities == (Quantity("analysis_total", 100.0001, "%", "sum of constituents"),
                            Quantity("loss_on_ignition", 25.0, "%", "loss on ignition"))
