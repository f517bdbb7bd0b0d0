"""CHEM-PHASES (phases_checks) read whole: the demo's natural cement by hand from its analysis
and IUPAC atomic weights, the rules' band moved by a written override for the branches the
demo never reaches (inside the band, straddling it), and Bogue (ASTM C150 Annex A1) for a
hand-made clinker."""
from __future__ import annotations

from types import SimpleNamespace as NS

import pytest

from specgen.checks.result import Basis, Input
from tests.helpers import by_check

ATOMIC = "content/data/atomic_weights.yaml (IUPAC/CIAAW standard atomic weights)"
NML = "analysis NC1-A (Northstead Materials Laboratory, report NML-4418)"
# content/rules/calcination.yaml crystalline_share 70 % and crystalline_tolerance 15 %
SHARE = Basis("common practice", note="natural cement: about 70 % crystalline belite, about "
              "30 % amorphous calcium aluminosilicate")
TOL = Basis("common practice", note="the 70/30 split is a rule of thumb; potential-phase "
            "estimates move by several per cent with the assignment assumed")
# IUPAC standard atomic weights: Ca 40.078, Si 28.085, Al 26.982, Fe 55.845, Mg 24.305,
# S 32.06, C 12.011, O 15.999 -> g/mol
CAO, SIO2, AL2O3, FE2O3, SO3, CO2 = 56.077, 60.083, 101.961, 159.687, 80.057, 44.009
C2S = 2 * CAO + SIO2                     # 172.237
K_S, K_C = C2S / SIO2, C2S / (2 * CAO)   # 2.86665, 1.53572
# NC1-A (demo analyses.yaml): SiO2 21.5, Al2O3 8.1, Fe2O3 4.2, CaO 57.9, MgO 2.3, SO3 0.9,
# K2O 1.1, Na2O 0.3, CO2 1.9, LOI 3.2 (LOI and CO2 consumed: the phases sum to 98.2)
CALCITE = 1.9 * (CAO + CO2) / CO2          # 4.3210
CASO4 = 0.9 * (CAO + SO3) / SO3            # 1.5304
FREE_AMORPH = 57.9 - K_S * 21.5 * 2 * CAO / C2S - 0.9 * CAO / SO3 - 1.9 * CAO / CO2  # 14.716
C2S_AMORPH = K_S * 21.5                    # 61.633 (silica-limited: lime is ample)
CRYST_AMORPH = 100 * (C2S_AMORPH + FREE_AMORPH + 2.3 + CASO4 + CALCITE) / 98.2   # 86.049
# gehlenite: C2AS takes 8.1 Al2O3 with its SiO2 (8.1·60.083/101.961 = 4.773) and 2 CaO;
# Fe2O3 as C2F takes 2 CaO per Fe2O3
C2S_GEHL = K_S * (21.5 - 8.1 * SIO2 / AL2O3)                         # 47.950
C2AS = 8.1 * (2 * CAO + AL2O3 + SIO2) / AL2O3                        # 21.783
C2F = 4.2 * (2 * CAO + FE2O3) / FE2O3                                # 7.150
FREE_GEHL = FREE_AMORPH - 4.2 * 2 * CAO / FE2O3                      # 11.766
CRYST_GEHL = 100 * (C2S_GEHL + C2AS + C2F + FREE_GEHL + 2.3 + CASO4 + CALCITE) / 98.2  # 98.574


def test_phases_of_the_natural_cement_whole(demo_checked):
    c = by_check(demo_checked[1])[("CHEM-PHASES", "NC1")]
    assert (c.code, c.title, c.subject, c.subject_kind, c.status, c.unit) == (
        "CHEM-PHASES", "Potential phases", "NC1", "binder", "attention", "%")
    assert c.value == pytest.approx(C2S_AMORPH, abs=1e-3)
    assert c.basis == (SHARE, TOL)
    # the range 86.0–98.6 % lies wholly above 70 + 15 = 85 %: attention
    assert (c.limit.compare, c.limit.low, c.limit.high, c.limit.unit, c.limit.text,
            c.limit.rule, c.limit.overridden) == (
        "within", 55.0, 85.0, "%", "crystalline 70 ± 15 %", "calcination.crystalline_tolerance",
        "")
    assert c.message == (
        "C3S 0 % (below sintering), C2S 48.0–61.6 %, crystalline 86–99 % over the aluminate "
        "assignments (declared amorphous: C2S 61.6 %, crystalline 86 %, free lime 14.7 %) "
        "against the usual 70/30 ± 15 of a natural cement — the whole range lies outside: "
        "check the firing or the analysis")
    assert c.notes == (
        "C3S = 0: fired below sintering, no melt, no alite",
        "aluminate/ferrite assignment: Al2O3 and Fe2O3 in an amorphous aluminosilicate, no lime "
        "bound to them",
        "free lime in the estimate: lime the assignment leaves uncombined; hard-burnt free lime "
        "slakes late and expands — compare with a measured free-lime result")
    belite, share, rng = c.steps
    assert (belite.title, belite.formula, belite.unit, belite.symbol) == (
        "Belite while lime suffices", r"C_2S = \min(k_S\,S_{free},\ k_C\,C_{free})", "%", "C2S")
    assert belite.substituted == (r"C_2S = 61.63\ (\text{silica-limited},\ S = 21.50,\ "
                                  r"C = 57.90)")
    assert belite.result == pytest.approx(C2S_AMORPH, abs=1e-3)
    s, cao, ks, kc, rule = belite.inputs
    assert (s, cao) == (Input("S", "SiO2", 21.5, "%", NML), Input("C", "CaO", 57.9, "%", NML))
    assert (ks.symbol, ks.name, ks.unit, ks.source) == ("k_S", "M(C2S)/M(SiO2)", "g/g", ATOMIC)
    assert (kc.symbol, kc.name, kc.unit, kc.source) == ("k_C", "M(C2S)/(2 M(CaO))", "g/g",
                                                        ATOMIC)
    # shown to 4 decimals: 2.8667 and 1.5357
    assert (ks.value, kc.value) == (round(K_S, 4), round(K_C, 4))
    assert rule == Input("rule", "aluminate/ferrite assignment", "amorphous", "",
                         "dossier.yaml chemistry.aluminate_assignment")
    assert (share.title, share.formula, share.unit, share.symbol) == (
        "Crystalline share", r"\chi = \frac{\sum w_{cryst}}{\sum w_{phases}}", "%", "χ")
    assert share.substituted == r"\chi = \frac{84.50}{98.20}"
    assert share.result == pytest.approx(CRYST_AMORPH, abs=1e-3)
    expected = [("C2S", C2S_AMORPH), ("amorphous A+F", 8.1 + 4.2), ("free lime", FREE_AMORPH),
                ("periclase", 2.3), ("CaSO4", CASO4), ("calcite", CALCITE),
                ("other", 1.1 + 0.3)]
    assert [(i.symbol, i.name, i.unit, i.source) for i in share.inputs] == [
        (k, k, "%", "phase estimate above") for k, _ in expected]
    for i, (_, v) in zip(share.inputs, expected):
        assert i.value == pytest.approx(v, abs=6e-4)
        assert i.value == round(i.value, 3)
    assert (rng.title, rng.formula, rng.unit, rng.symbol) == (
        "Crystalline share over the aluminate assignments",
        r"\chi \in [\min_a \chi_a,\ \max_a \chi_a]", "%", "Δχ")
    assert rng.substituted == r"\chi \in [86.0,\ 98.6]"
    assert rng.result == pytest.approx(CRYST_GEHL - CRYST_AMORPH, abs=2e-3)
    assert [(i.symbol, i.name, i.unit, i.source) for i in rng.inputs] == [
        ("χ[C4AF+C3A]", "crystalline share with Fe2O3 as C4AF, the remaining Al2O3 as C3A "
         "(Al2O3 short: the rest of Fe2O3 as C2F)", "%", "estimate with assignment 'C4AF+C3A'"),
        ("χ[C2AS gehlenite]", "crystalline share with Al2O3 as gehlenite C2AS (taking its SiO2), "
         "Fe2O3 as C2F", "%", "estimate with assignment 'C2AS gehlenite'"),
        ("χ[amorphous]", "crystalline share with Al2O3 and Fe2O3 in an amorphous "
         "aluminosilicate, no lime bound to them", "%", "estimate with assignment 'amorphous'")]
    assert rng.inputs[1].value == pytest.approx(CRYST_GEHL, abs=2e-3)
    assert rng.inputs[2].value == pytest.approx(CRYST_AMORPH, abs=2e-3)
    q = {x.name: x for x in c.quantities}
    assert [x.name for x in c.quantities] == ["potential_phases", "c2s_potential",
                                              "crystalline_share", "phase_range"]
    assert (q["potential_phases"].unit, q["potential_phases"].label) == ("%", "potential phases")
    assert list(q["potential_phases"].value) == [k for k, _ in expected]
    assert q["potential_phases"].value["free lime"] == pytest.approx(FREE_AMORPH, abs=6e-5)
    assert (q["c2s_potential"].label, q["crystalline_share"].label, q["phase_range"].label) == (
        "potential C2S", "crystalline share", "phase estimate over the assignments")
    pr = q["phase_range"].value
    assert pr["c2s_low"] == pytest.approx(C2S_GEHL, abs=2e-4)
    assert pr["c2s_high"] == pytest.approx(C2S_AMORPH, abs=2e-4)
    assert pr["by_assignment"]["C2AS gehlenite"]["free lime"] == pytest.approx(FREE_GEHL,
                                                                              abs=2e-4)
    assert pr["crystalline_low"] == pytest.approx(CRYST_AMORPH, abs=2e-3)
    assert pr["crystalline_high"] == pytest.approx(CRYST_GEHL, abs=2e-3)


def test_phases_of_a_lime_are_not_compared(demo_checked):
    """NH35 (type nhl): the 70/30 split is a natural-cement rule: info, no limit."""
    c = by_check(demo_checked[1])[("CHEM-PHASES", "NH35")]
    assert (c.status, c.limit) == ("info", None)
    assert c.message.endswith("(the 70/30 split is a natural-cement rule: not compared)")
    # NHL-A (demo): SiO2 14.0, CaO 62.0: C2S = 14.0·2.86665 = 40.133 % (silica-limited)
    assert c.value == pytest.approx(14.0 * K_S, abs=1e-3)


def _check(demo_checked, binder, overrides=(), analyses=None):
    from specgen.checks.phases_checks import phases_check
    from specgen.checks.rules import RuleBook
    from specgen.checks.run import Context
    p = demo_checked[0]
    project = NS(analyses={**p.analyses, **(analyses or {})}, binders=p.binders,
                 dossier=p.dossier)
    return phases_check(binder, Context(project, RuleBook(overrides)))


def _ov(rule, value):
    return NS(rule=rule, value=value, justification="hand-made band for the test")


def _nc(analysis="NC1-A", type_="natural_cement"):
    return NS(id="B9", type=type_, analysis=analysis, contains_clinker=False)


def test_phases_band_inside_and_straddling(demo_checked):
    """NC1-A's crystalline range 86.0–98.6 % against a band moved by overrides:
    90 ± 10 (80–100) holds it whole: info; 90 ± 5 (85–95) is straddled: hold; 99.3 ± 0.5
    (98.8–99.8) lies above the whole range: attention."""
    inside = _check(demo_checked, _nc(), [_ov("calcination.crystalline_share", 90),
                                          _ov("calcination.crystalline_tolerance", 10)])
    assert inside.status == "info"
    assert inside.message.endswith("against the usual 90/10 ± 10 of a natural cement")
    assert (inside.limit.low, inside.limit.high, inside.limit.text, inside.limit.overridden) == (
        80.0, 100.0, "crystalline 90 ± 10 %", "hand-made band for the test")
    held = _check(demo_checked, _nc(), [_ov("calcination.crystalline_share", 90),
                                        _ov("calcination.crystalline_tolerance", 5)])
    assert held.status == "hold"
    assert held.message.endswith(
        " — the range straddles the band: the estimate cannot decide; XRD with an internal "
        "standard (quantitative phase analysis) and a measured free lime will")
    above = _check(demo_checked, _nc(), [_ov("calcination.crystalline_share", 99.3),
                                         _ov("calcination.crystalline_tolerance", 0.5)])
    assert above.status == "attention"


def test_phases_without_an_analysis_or_with_a_lumped_oxide(demo_checked):
    none = _check(demo_checked, _nc(analysis=None))
    assert (none.status, none.title, none.message) == (
        "not_assessed", "Potential phases", "not assessed: the binder has no analysis")
    lumped = NS(id="A9", laboratory="", material="B9", lumped_split={},
                mass_percent={"SiO2": 20.0, "CaO": 60.0, "Al2O3+Fe2O3": 10.0})
    c = _check(demo_checked, _nc("A9"), analyses={"A9": lumped})
    assert c.status == "not_assessed" and "Al2O3+Fe2O3" in c.message


def test_bogue_of_a_clinker_whole(demo_checked):
    """A hand-made clinker C 65.0, S 21.0, A 5.5, F 3.0, SO3 2.5 %, by ASTM C150 Annex A1:
    C3S = 4.071·65 − 7.600·21 − 6.718·5.5 − 1.430·3 − 2.852·2.5 = 56.646 %
    C2S = 2.867·21 − 0.7544·56.646 = 17.473 %;  C3A = 2.650·5.5 − 1.692·3 = 9.499 %;
    C4AF = 3.043·3 = 9.129 %;  A/F = 5.5/3.0 = 1.83 ≥ 0.64: the C3A + C4AF form holds."""
    clinker = NS(id="A9", laboratory="Lab Nine", material="B9", lumped_split={},
                 mass_percent={"CaO": 65.0, "SiO2": 21.0, "Al2O3": 5.5, "Fe2O3": 3.0,
                               "SO3": 2.5})
    c = _check(demo_checked, _nc("A9", "portland"), analyses={"A9": clinker})
    c3s = 4.071 * 65 - 7.600 * 21 - 6.718 * 5.5 - 1.430 * 3 - 2.852 * 2.5
    c2s = 2.867 * 21 - 0.7544 * c3s
    assert (c.status, c.unit, c.basis) == (
        "info", "%", (Basis("reference", "astmc150", "Annex A1, potential phase composition"),))
    assert c.value == pytest.approx(c2s, abs=1e-3)
    assert (c.limit.compare, c.limit.low, c.limit.text) == (
        ">=", 0.64, "A/F ≥ 0.64 for the C3A + C4AF form")
    assert c.message.startswith("Bogue (clinker): C3S 56.6 %, C2S 17.5 %, C3A 9.5 %, "
                                "C4AF 9.1 %; A/F = 1.83: ")
    assert c.notes == ("analysis A9 (Lab Nine); potential, not measured, phases: XRD decides",)
    titles = [(s.title, s.formula, s.symbol, s.unit) for s in c.steps]
    assert titles == [
        ("C3S (Bogue)", r"C_3S = 4.071C - 7.600S - 6.718A - 1.430F - 2.852\bar{S}", "C3S", "%"),
        ("C2S (Bogue)", r"C_2S = 2.867S - 0.7544\,C_3S", "C2S", "%"),
        ("C3A (Bogue)", r"C_3A = 2.650A - 1.692F", "C3A", "%"),
        ("C4AF (Bogue)", r"C_4AF = 3.043F", "C4AF", "%")]
    assert c.steps[0].substituted == (r"C_3S = 4.071 \times 65.00 - 7.600 \times 21.00 - "
                                      r"6.718 \times 5.50 - 1.430 \times 3.00 - 2.852 \times "
                                      r"2.50")
    assert c.steps[1].substituted == rf"C_2S = 2.867 \times 21.00 - 0.7544 \times {c3s:.2f}"
    assert c.steps[2].substituted == r"C_3A = 2.650 \times 5.50 - 1.692 \times 3.00"
    assert c.steps[3].substituted == r"C_4AF = 3.043 \times 3.00"
    for step, v in zip(c.steps, (c3s, c2s, 2.650 * 5.5 - 1.692 * 3, 3.043 * 3)):
        assert step.result == pytest.approx(v, abs=1e-3)
    assert [(i.symbol, i.name, i.value, i.source) for i in c.steps[0].inputs] == [
        ("C", "CaO", 65.0, "analysis A9 (Lab Nine)"), ("S", "SiO2", 21.0, "analysis A9 (Lab Nine)"),
        ("A", "Al2O3", 5.5, "analysis A9 (Lab Nine)"), ("F", "Fe2O3", 3.0, "analysis A9 (Lab Nine)"),
        ("S̄", "SO3", 2.5, "analysis A9 (Lab Nine)")]
    q = {x.name: x for x in c.quantities}
    assert q["potential_phases"].label == "potential phases (Bogue)"
    assert q["potential_phases"].value["C4AF"] == pytest.approx(9.129, abs=1e-4)
    assert q["c2s_potential"].value == pytest.approx(c2s, abs=1e-3)
