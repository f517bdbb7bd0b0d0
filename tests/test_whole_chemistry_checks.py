"""CHEM-LOSSFREE, CHEM-HI, CHEM-LSF, CHEM-RATIOS, CHEM-CO2 and CHEM-CLAY (chemistry_checks)
read whole: the demo's binder NC1-A and raw stone BS-1 by hand from demo analyses.yaml, the
formulas of the trade primer (Vicat's hydraulic index from memory; LSF, SR and AR after Taylor,
*Cement Chemistry*, from memory) and IUPAC atomic weights; hand-made analyses for the branches
the demo never reaches (lumped oxides, no CO2, no Fe2O3, a clinker, a gap within tolerance)."""
from __future__ import annotations

from types import SimpleNamespace as NS

import pytest

from specgen.checks.result import Basis, Input
from tests.helpers import by_check

NC1 = "analysis NC1-A (Northstead Materials Laboratory, report NML-4418)"
BS1 = "analysis BS-1 (Northstead Materials Laboratory, report NML-4410)"
ATOMIC = "content/data/atomic_weights.yaml (IUPAC/CIAAW standard atomic weights)"
TAYLOR = Basis("reference", "taylor1997", "lime saturation factor, silica and alumina ratios")
VICAT = Basis("common practice", note="hydraulic index in Vicat's form (S + A + F)/(C + M), "
              "recalled; other schemes exist, so the scheme is named with the value")
# demo analyses.yaml NC1-A, mass %
C, S, A, F, M, SB, LOI = 57.9, 21.5, 8.1, 4.2, 2.3, 0.9, 3.2
# IUPAC standard atomic weights -> g/mol: CaO 56.077, MgO 40.304, CO2 44.009, CaCO3 100.086,
# MgCO3 84.313
CAO, MGO, CO2, CACO3, MGCO3 = 56.077, 40.304, 44.009, 100.086, 84.313


def _ins(step):
    return [(i.symbol, i.name, i.value, i.unit, i.source) for i in step.inputs]


def test_loss_free_basis_of_nc1_whole(demo_checked):
    c = by_check(demo_checked[1])[("CHEM-LOSSFREE", "NC1-A")]
    f = 100 / (100 - LOI)                       # 100/96.8 = 1.033058
    assert (c.title, c.subject, c.subject_kind, c.status, c.unit) == (
        "Loss-free basis", "NC1-A", "analysis", "info", "")
    assert c.value == pytest.approx(f, abs=5e-6) and c.value == round(c.value, 5)
    assert c.basis == (Basis("common practice", note="fired oxide = raw oxide × 100/(100 − LOI): "
                             "every loss leaves on firing"),)
    assert c.message == ("factor 100/(100 − 3.20) = 1.0331; SiO2 22.21 %, Al2O3 8.37 %, Fe2O3 "
                         "4.34 %, CaO 59.81 %, MgO 2.38 %; the indices are ratios and do not "
                         "change")
    assert c.notes == ()
    first, *oxides = c.steps
    assert (first.title, first.formula, first.substituted, first.unit, first.symbol) == (
        "Loss-free factor", r"f = \frac{100}{100 - LOI}", r"f = \frac{100}{100 - 3.20}", "", "f")
    assert _ins(first) == [("LOI", "loss on ignition", 3.2, "%", NC1)]
    expected = [("C", "CaO", C), ("S", "SiO2", S), ("A", "Al2O3", A), ("F", "Fe2O3", F),
                ("M", "MgO", M)]
    assert len(oxides) == 5
    for step, (sym, name, x) in zip(oxides, expected):
        assert (step.title, step.formula, step.unit, step.symbol) == (
            f"{name} on the loss-free basis", rf"{sym}_{{lf}} = f \times {sym}", "%", f"{sym}lf")
        assert step.substituted == rf"{sym}_{{lf}} = 1.03306 \times {x:.2f}"
        assert step.result == pytest.approx(x * f, abs=5e-5)
        assert _ins(step) == [(sym, name, x, "%", NC1)]
    (q,) = c.quantities
    assert (q.name, q.unit, q.label) == ("loss_free_composition", "%", "loss-free composition")
    # every oxide but the losses (CO2, LOI), K2O 1.1 and Na2O 0.3 too
    assert sorted(q.value) == ["Al2O3", "CaO", "Fe2O3", "K2O", "MgO", "Na2O", "SO3", "SiO2"]
    assert q.value["Na2O"] == pytest.approx(0.3 * f, abs=5e-5)


def test_indices_of_nc1_whole(demo_checked):
    res = by_check(demo_checked[1])
    hi = res[("CHEM-HI", "NC1-A")]
    v = (S + A + F) / (C + M)                   # 33.8/60.2 = 0.56146
    assert (hi.title, hi.status, hi.unit, hi.basis, hi.notes) == (
        "Hydraulic index (Vicat)", "info", "", (VICAT,), ())
    assert hi.value == pytest.approx(v, abs=5e-5) and hi.value == round(hi.value, 4)
    assert hi.message == ("HI = 0.561 (scheme: Vicat hydraulic index HI = (S + A + F) / (C + M)); "
                          "for information — the classification uses the cementation index")
    (step,) = hi.steps
    assert (step.title, step.formula, step.substituted, step.unit, step.symbol) == (
        "Hydraulic index (Vicat)", r"HI = \frac{S + A + F}{C + M}",
        r"HI = \frac{21.50 + 8.10 + 4.20}{57.90 + 2.30}", "", "HI")
    assert _ins(step) == [("C", "CaO", C, "%", NC1), ("S", "SiO2", S, "%", NC1),
                          ("A", "Al2O3", A, "%", NC1), ("F", "Fe2O3", F, "%", NC1),
                          ("M", "MgO", M, "%", NC1)]
    assert [(q.name, q.unit, q.label) for q in hi.quantities] == [
        ("hydraulic_index", "", "hydraulic index (Vicat)")]
    lsf = res[("CHEM-LSF", "NC1-A")]
    v = (C - 0.7 * SB) / (2.8 * S + 1.18 * A + 0.65 * F)   # 57.27/72.488 = 0.79006
    assert (lsf.title, lsf.basis, lsf.unit) == ("Lime saturation factor", (TAYLOR,), "")
    assert lsf.value == pytest.approx(v, abs=5e-5)
    assert lsf.message == ("LSF = 0.790; descriptive only: LSF is a clinker concept and this "
                           "material is not sintered (no alite forms below sintering)")
    (step,) = lsf.steps
    assert step.formula == r"LSF = \frac{C - 0.7\,\bar{S}}{2.8\,S + 1.18\,A + 0.65\,F}"
    assert step.substituted == (r"LSF = \frac{57.90 - 0.7 \times 0.90}{2.8 \times 21.50 + "
                                r"1.18 \times 8.10 + 0.65 \times 4.20}")
    assert (step.title, step.symbol, step.unit) == ("Lime saturation factor", "LSF", "")
    assert [i.symbol for i in step.inputs] == ["C", "S", "A", "F", "S̄"]
    assert step.inputs[4] == Input("S̄", "SO3", SB, "%", NC1)
    assert [(q.name, q.label) for q in lsf.quantities] == [
        ("lime_saturation_factor", "lime saturation factor")]
    r = res[("CHEM-RATIOS", "NC1-A")]
    sr, ar = S / (A + F), A / F                 # 21.5/12.3 = 1.74797; 8.1/4.2 = 1.92857
    assert (r.title, r.basis, r.unit, r.message) == (
        "Silica and alumina ratios", (TAYLOR,), "", "SR = 1.75, AR = 1.93 (for information)")
    assert r.value == pytest.approx(sr, abs=5e-5)
    s1, s2 = r.steps
    assert (s1.title, s1.formula, s1.substituted, s1.symbol) == (
        "Silica ratio", r"SR = \frac{S}{A + F}", r"SR = \frac{21.50}{8.10 + 4.20}", "SR")
    assert [i.symbol for i in s1.inputs] == ["S", "A", "F"]
    assert (s2.title, s2.formula, s2.substituted, s2.symbol) == (
        "Alumina ratio", r"AR = \frac{A}{F}", r"AR = \frac{8.10}{4.20}", "AR")
    assert s2.result == pytest.approx(ar, abs=5e-5)
    assert _ins(s2) == [("A", "Al2O3", A, "%", NC1), ("F", "Fe2O3", F, "%", NC1)]
    assert [(q.name, q.label) for q in r.quantities] == [("silica_ratio", "silica ratio"),
                                                         ("alumina_ratio", "alumina ratio")]
    assert r.quantities[1].value == pytest.approx(ar, abs=5e-5)


def test_carbonate_balance_of_the_raw_stone_whole(demo_checked):
    """BS-1 (demo): CaO 40.1, MgO 1.6, CO2 30.0 %.  Capacity 40.1·44.009/56.077 +
    1.6·44.009/40.304 = 31.4700 + 1.7471 = 33.2171 %; gap 3.217 % > 2.5 % (rule
    analysis.co2_gap_tolerance): attention.  All CO2 to CaO (30.0 < 31.47): CaCO3 =
    30.0·100.086/44.009 = 68.226 %, MgCO3 0."""
    c = by_check(demo_checked[1])[("CHEM-CO2", "BS-1")]
    k_c, k_m, r_ca, r_mg = CO2 / CAO, CO2 / MGO, CACO3 / CO2, MGCO3 / CO2
    cap = k_c * 40.1 + k_m * 1.6
    assert (c.title, c.status, c.unit) == ("Carbonate content and CO2 balance", "attention", "%")
    assert c.value == pytest.approx(cap - 30.0, abs=2e-3)
    assert c.basis == (Basis("common practice", note="part of the CaO and MgO of a marl sits in "
                             "sulfate, silicates or clay, and CO2 and CaO are each determined to "
                             "a few tenths of a per cent"),)
    assert (c.limit.compare, c.limit.low, c.limit.high, c.limit.text, c.limit.rule) == (
        "within", -2.5, 2.5, "|gap| ≤ 2.5 %", "analysis.co2_gap_tolerance")
    assert c.message == ("carbonates 68.2 % (CaCO3 68.2 %, MgCO3 0.0 %); CaO and MgO could carry "
                         "3.22 % more CO2 than measured: part of the lime and magnesia is not "
                         "carbonate, or the analysis is inconsistent")
    assert c.notes == ("CO2 assigned to CaO as calcite first, the remainder to MgO as MgCO3",)
    cap_s, gap, to_ca, to_mg, carb = c.steps
    assert [(s.title, s.formula, s.unit, s.symbol) for s in c.steps] == [
        ("CO2 that CaO and MgO could carry", r"CO_2^{cap} = k_C\,C + k_M\,M", "%", "CO2cap"),
        ("Gap to CO2 measured", r"\Delta = CO_2^{cap} - CO_2", "%", "Δ"),
        ("CO2 given to CaO first (calcite)", r"CO_2^{Ca} = \min(CO_2,\ k_C\,C)", "%", "CO2_Ca"),
        ("The rest of the CO2 to MgO (magnesite)",
         r"CO_2^{Mg} = \min(CO_2 - CO_2^{Ca},\ k_M\,M)", "%", "CO2_Mg"),
        ("Carbonates from that CO2", r"w_{carb} = CO_2^{Ca}\,r_{Ca} + CO_2^{Mg}\,r_{Mg}", "%",
         "carb")]
    assert cap_s.substituted == r"CO_2^{cap} = 0.7848 \times 40.10 + 1.0919 \times 1.60"
    assert cap_s.result == pytest.approx(cap, abs=2e-3)
    assert gap.substituted == r"\Delta = 33.22 - 30.00"
    assert _ins(gap) == [("CO2", "CO2", 30.0, "%", BS1)]
    assert to_ca.substituted == r"CO_2^{Ca} = \min(30.00,\ 0.7848 \times 40.10)"
    assert to_ca.result == 30.0
    assert [i.symbol for i in to_ca.inputs] == ["CO2", "C", "k_C"]
    assert to_mg.substituted == r"CO_2^{Mg} = \min(30.00 - 30.00,\ 1.0919 \times 1.60)"
    assert (to_mg.result, [i.symbol for i in to_mg.inputs]) == (0.0, ["M", "k_M"])
    assert carb.substituted == r"w_{carb} = 30.00 \times 2.2742 + 0.00 \times 1.9158"
    assert carb.result == pytest.approx(30.0 * r_ca, abs=2e-3)
    assert (carb.inputs[1].value, carb.inputs[1].source) == (round(r_mg, 5), ATOMIC)
    assert [(q.name, q.unit, q.label) for q in c.quantities] == [
        ("carbonate_content", "%", "carbonate content"),
        ("co2_gap", "%", "CO2 capacity − measured")]


def test_clay_fraction_of_the_raw_stone_whole(demo_checked):
    """BS-1: SiO2 14.8 + Al2O3 5.6 + Fe2O3 2.9 + combined water (LOI 33.0 − CO2 30.0 = 3.0)
    = 26.3 %, inside 20–30 % (rules analysis.clay_low/high, common practice); the residue
    100 − 68.23 − 0 − 0.6 = 31.17 % is outside: the estimates straddle the edge: attention."""
    c = by_check(demo_checked[1])[("CHEM-CLAY", "BS-1")]
    calcite = 30.0 * CACO3 / CO2
    assert (c.title, c.status, c.value, c.unit) == (
        "Clay fraction of the raw stone", "attention", 26.3, "%")
    assert c.basis == (Basis("common practice", note="natural cement is fired from one marly "
                             "limestone of about 20–30 % clay"),)
    assert (c.limit.low, c.limit.high, c.limit.text, c.limit.rule) == (
        20.0, 30.0, "20–30 % clay for a natural cement", "analysis.clay_low")
    assert c.message == (
        "clay 26.3 % lies in the natural-cement range 20-30 % (binder NC1 is declared a natural "
        "cement); borderline: the non-carbonate residue (31.2 %) falls outside the range, so the "
        "two estimates straddle it — a mineralogical analysis (XRD) of the raw stone decides")
    assert c.notes == ("SiO2 + Al2O3 + Fe2O3 + combined water (LOI - CO2 - moisture - organic "
                       "matter)", "non-carbonate residue: 100 - CaCO3 - MgCO3 (from CO2) - SO3")
    oxide, res = c.steps
    assert (oxide.title, oxide.formula, oxide.substituted, oxide.result, oxide.symbol) == (
        "Clay fraction (oxide sum)", r"w_{clay} = S + A + F + H_{comb}",
        r"w_{clay} = 14.80 + 5.60 + 2.90 + 3.00", 26.3, "w_clay")
    assert _ins(oxide)[3] == ("H_comb", "combined water = LOI − CO2 − moisture − organic matter",
                              3.0, "%", BS1)
    assert (res.formula, res.unit, res.symbol) == (
        r"w_{res} = 100 - CaCO_3 - MgCO_3 - \bar{S}", "%", "w_res")
    # the sheet substitutes every term of its formula
    assert res.substituted == r"w_{res} = 100 - 68.23 - 0.00 - 0.60 = 31.17"
    assert [(i.symbol, i.unit, i.source) for i in res.inputs] == [
        ("CaCO_3", "%", "CHEM-CO2/BS-1"), ("MgCO_3", "%", "CHEM-CO2/BS-1"), ("S̄", "%", BS1)]
    assert res.inputs[0].value == pytest.approx(calcite, abs=2e-3)
    assert res.inputs[0].name == "calcite from the CO2 (CO2 to CaO first)"
    assert res.inputs[1] == Input("MgCO_3", "magnesite from the rest of the CO2", 0.0, "%",
                                  "CHEM-CO2/BS-1")
    assert res.result == pytest.approx(100 - calcite - 0.6, abs=2e-3)
    assert [(q.name, q.value, q.unit, q.label) for q in c.quantities] == [
        ("clay_fraction", 26.3, "%", "clay fraction")]


# ---------------------------------------------------------------- hand-made analyses
def _an(ox, kind="raw_stone", split=None, material="B9", lab="Lab Nine"):
    return NS(id="A9", kind=kind, material=material, laboratory=lab, lumped_split=split or {},
              mass_percent=ox)


def _run(fn, analysis, binders=None):
    from specgen.checks.rules import RuleBook
    from specgen.checks.run import Context
    project = NS(binders=binders or {}, analyses={"A9": analysis})
    return fn(analysis, Context(project, RuleBook()))


def test_lumped_oxides_split_or_refused(demo_checked):
    """'Al2O3+Fe2O3' 12.0 % with a declared 2/3 : 1/3 split gives Al2O3 8.0 and Fe2O3 4.0;
    the assumption is a note of every index.  Without a split: not assessed, naming the fix."""
    from specgen.checks import chemistry_checks as cc
    ox = {"SiO2": 20.0, "CaO": 60.0, "Al2O3+Fe2O3": 12.0, "MgO": 2.0}
    split = {"Al2O3+Fe2O3": {"Al2O3": 2 / 3, "Fe2O3": 1 / 3}}
    note = "Al2O3+Fe2O3 = 12.00 % reported together; split assumed as 67 % Al2O3, 33 % Fe2O3"
    hi = _run(cc.hydraulic_index_check, _an(ox, split=split))
    # (20 + 8 + 4)/(60 + 2) = 0.51613
    assert hi.value == pytest.approx(32 / 62, abs=5e-5) and hi.notes == (note,)
    r = _run(cc.ratios_check, _an(ox, split=split))
    assert r.notes == (note,) and r.message == "SR = 1.67, AR = 2.00 (for information)"
    lsf = _run(cc.lime_saturation_check, _an(ox, split=split))
    assert lsf.notes == (note,)
    lf = _run(cc.loss_free_check, _an(ox, split=split))
    # no LOI and no loss reported: factor 1
    assert (lf.value, lf.notes, lf.message[:32]) == (1.0, (note,), "factor 100/(100 − 0.00) = 1.0000")
    refused = _run(cc.hydraulic_index_check, _an(ox))
    assert (refused.status, refused.basis) == ("not_assessed", (VICAT,))
    assert refused.message == (
        "not assessed: 'Al2O3+Fe2O3' is reported lumped and no split is declared; add to "
        "analysis 'A9' in analyses.yaml: lumped_split: {'Al2O3+Fe2O3': {Al2O3: …, Fe2O3: …}}")
    for fn, basis in ((cc.lime_saturation_check, (TAYLOR,)), (cc.ratios_check, (TAYLOR,))):
        assert _run(fn, _an(ox)).basis == basis


def test_ratios_without_fe2o3_and_lsf_of_a_clinker(demo_checked):
    from specgen.checks import chemistry_checks as cc
    ox = {"SiO2": 21.0, "CaO": 65.0, "Al2O3": 5.0, "SO3": 2.0}
    r = _run(cc.ratios_check, _an(ox, kind="binder"))
    # SR = 21/(5 + 0) = 4.2; no Fe2O3: AR not assessed, said so
    assert r.message == "SR = 4.20; AR not assessed: no Fe2O3 reported (for information)"
    assert len(r.steps) == 1 and [q.name for q in r.quantities] == ["silica_ratio"]
    assert r.steps[0].inputs[2] == Input("F", "Fe2O3", 0.0, "%", "not reported: taken as 0")
    binders = {"B9": NS(id="B9", type="portland", contains_clinker=False)}
    lsf = _run(cc.lime_saturation_check, _an(ox, kind="binder"), binders)
    # (65 − 0.7·2)/(2.8·21 + 1.18·5 + 0) = 63.6/64.7 = 0.98300
    assert lsf.value == pytest.approx(63.6 / 64.7, abs=5e-5)
    assert lsf.message == ("LSF = 0.983; a clinker-bearing binder: LSF describes how far its lime "
                           "saturates the clinker")


def test_raw_stone_checks_without_co2_or_not_a_raw_stone(demo_checked):
    """CHEM-CO2 and CHEM-CLAY: no CO2 is not assessed; a binder's analysis gets no result."""
    from specgen.checks import chemistry_checks as cc
    ox = {"SiO2": 15.0, "CaO": 40.0, "Al2O3": 5.0, "Fe2O3": 3.0, "LOI": 33.0}
    co2 = _run(cc.co2_check, _an(ox))
    assert (co2.status, co2.message) == (
        "not_assessed", "not assessed: the raw-stone analysis gives no CO2; ask the laboratory "
        "for CO2 beside LOI")
    clay = _run(cc.clay_check, _an(ox))
    assert (clay.status, clay.message) == (
        "not_assessed", "not assessed: the raw-stone analysis gives no CO2, so the combined "
        "water (LOI − CO2) is unknown")
    assert _run(cc.co2_check, _an(ox, kind="binder")) is None
    assert _run(cc.clay_check, _an(ox, kind="binder")) is None


def test_carbonate_gap_within_tolerance_and_magnesite(demo_checked):
    """CHEM-CO2 of CaO 30.0, MgO 5.0, CO2 28.0 %: capacity 30·0.784796 + 5·1.091926 = 23.5439 + 5.4596 =
    29.0035; gap 1.0035 ≤ 2.5: pass.  CO2 to CaO 23.5439, the rest 4.4561 to MgO (< 5.4596):
    carbonates 23.5439·2.274217 + 4.4561·1.915812 = 53.5439 + 8.5371 = 62.0810 %."""
    from specgen.checks import chemistry_checks as cc
    c = _run(cc.co2_check, _an({"SiO2": 12.0, "CaO": 30.0, "MgO": 5.0, "CO2": 28.0}))
    k_c, k_m = CO2 / CAO, CO2 / MGO
    to_ca = 30.0 * k_c
    to_mg = 28.0 - to_ca
    assert c.status == "pass"
    assert c.value == pytest.approx(30.0 * k_c + 5.0 * k_m - 28.0, abs=2e-3)
    assert c.steps[2].result == pytest.approx(to_ca, abs=2e-3)
    assert c.steps[3].result == pytest.approx(to_mg, abs=2e-3)
    assert c.steps[3].substituted == (rf"CO_2^{{Mg}} = \min(28.00 - {to_ca:.2f},\ 1.0919 \times "
                                      r"5.00)")
    total = to_ca * CACO3 / CO2 + to_mg * MGCO3 / CO2
    assert c.quantities[0].value == pytest.approx(total, abs=5e-3)
    assert c.message.startswith(f"carbonates {total:.1f} % (CaCO3 {to_ca * CACO3 / CO2:.1f} %, "
                                f"MgCO3 {to_mg * MGCO3 / CO2:.1f} %); ")
    assert c.steps[0].inputs[0].source == "analysis A9 (Lab Nine)"


def test_clay_of_a_stone_inside_and_of_another_binder(demo_checked):
    """CHEM-CLAY of SiO2 14.0, Al2O3 5.0, Fe2O3 2.0, CaO 42.0, CO2 33.0, H2O 2.0: clay =
    14 + 5 + 2 + 2 = 23.0 %.  CaO can carry 42.0·44.009/56.077 = 32.961 % CO2 < 33.0, so the
    calcite is 42.0·100.086/56.077 = 74.961 % (the last 0.039 % CO2 finds no MgO); residue
    100 − 74.961 = 25.04 %: both inside 20–30 %: pass for a natural cement, info for an NHL's
    stone."""
    from specgen.checks import chemistry_checks as cc
    ox = {"SiO2": 14.0, "Al2O3": 5.0, "Fe2O3": 2.0, "CaO": 42.0, "CO2": 33.0, "H2O": 2.0}
    nc = {"B9": NS(id="B9", type="natural_cement")}
    c = _run(cc.clay_check, _an(ox), nc)
    residue = 100 - 42.0 * CACO3 / CAO
    assert (c.status, c.value) == ("pass", 23.0)
    assert c.steps[0].inputs[3].name == "combined water (H2O+)"
    assert c.steps[1].result == pytest.approx(residue, abs=2e-3)
    assert c.message.endswith(f"(binder B9 is declared a natural cement); non-carbonate residue "
                              f"{residue:.1f} %")
    other = _run(cc.clay_check, _an(ox), {"B9": NS(id="B9", type="nhl")})
    assert other.status == "info"
    assert "declared a natural cement" not in other.message
    low = _run(cc.clay_check, _an({**ox, "SiO2": 8.0}), nc)
    # clay 17 % < 20 %, residue 24.95 % inside: straddles: attention, residue "lies in"
    assert low.status == "attention"
    assert f"the non-carbonate residue ({residue:.1f} %) lies in the range" in low.message


def test_lime_saturation_factor_without_silicates_is_not_assessed(demo_checked):
    """CHEM-LSF of CaO 60 % with SiO2, Al2O3 and Fe2O3 all 0: the denominator
    2.8·0 + 1.18·0 + 0.65·0 is zero: the science refuses it before any division, so the
    result is not assessed and says what is missing (never a non-finite factor)."""
    from specgen.checks import chemistry_checks as cc
    c = _run(cc.lime_saturation_check, _an({"CaO": 60.0, "SiO2": 0.0, "Al2O3": 0.0,
                                           "Fe2O3": 0.0}, kind="binder"))
    assert (c.status, c.basis) == ("not_assessed", (TAYLOR,))
    assert c.message == ("not assessed: lime saturation factor needs SiO2, Al2O3 or Fe2O3 above "
                         "zero")
