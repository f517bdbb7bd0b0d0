"""Chemistry checks on the demo analyses, recomputed by hand from the oxide values."""
from __future__ import annotations

import math

import pytest

from specgen.build import check
from tests.conftest import shared_scope


def by(results):
    return {(c.code, c.subject): c for c in results.checks}


@pytest.fixture(scope=shared_scope("module"))
def demo(demo_checked):
    return demo_checked


def test_indices_of_the_trial_natural_cement(demo):
    _, results = demo
    q = results.quantities["NC1-A"]
    # NC1-A: SiO2 21.5, Al2O3 8.1, Fe2O3 4.2, CaO 57.9, MgO 2.3, SO3 0.9 (demo data), by hand:
    #   HI (Vicat) = (21.5 + 8.1 + 4.2)/(57.9 + 2.3) = 33.8/60.2 = 0.56146
    #   LSF (Taylor, Cement Chemistry, from memory) = (57.9 - 0.7*0.9)/(2.8*21.5 + 1.18*8.1 + 0.65*4.2)
    #       = 57.27/72.488 = 0.79006
    #   SR = 21.5/(8.1 + 4.2) = 1.74797;  AR = 8.1/4.2 = 1.92857
    assert q["hydraulic_index"].value == pytest.approx(0.56146, abs=5e-5)
    assert q["lime_saturation_factor"].value == pytest.approx(0.79006, abs=5e-5)
    assert q["silica_ratio"].value == pytest.approx(1.74797, abs=5e-5)
    assert q["alumina_ratio"].value == pytest.approx(1.92857, abs=5e-5)
    lsf = by(results)[("CHEM-LSF", "NC1-A")]
    assert lsf.status == "info" and "descriptive" in lsf.message


def test_raw_stone_carbonate_co2_balance_and_clay(demo):
    _, results = demo
    q = results.quantities["BS-1"]
    # BS-1: CaO 40.1, MgO 1.6, CO2 30.0, LOI 33.0 (demo data).  Molar masses from IUPAC atomic
    # weights: CaO 56.077, MgO 40.304, CO2 44.009, CaCO3 100.086 g/mol.
    #   capacity = 40.1*44.009/56.077 + 1.6*44.009/40.304 = 31.4700 + 1.7471 = 33.2171 %
    #   gap = 33.2171 - 30.0 = 3.2171 %;  CaCO3 = 30.0*100.086/44.009 = 68.226 %
    #   clay = SiO2 + Al2O3 + Fe2O3 + (LOI - CO2) = 14.8 + 5.6 + 2.9 + 3.0 = 26.3 %
    assert q["co2_gap"].value == pytest.approx(3.2171, abs=2e-3)
    assert q["carbonate_content"].value == pytest.approx(68.226, abs=5e-3)
    assert q["clay_fraction"].value == pytest.approx(26.3, abs=1e-6)
    checks = by(results)
    # 26.3 % lies in the 20-30 % band (common practice) but the non-carbonate residue
    # 100 - 68.226 - 0.6 = 31.17 % does not: the two methods straddle the band, so borderline
    assert checks[("CHEM-CLAY", "BS-1")].status == "attention"
    # the residue's step whole: 100 − 30.0·M(CaCO3)/M(CO2) − SO3 0.6
    #   = 100 − 30.0 × 100.086/44.009 − 0.6 = 100 − 68.2265 − 0.6 = 31.1735 %
    res = checks[("CHEM-CLAY", "BS-1")].steps[1]
    assert (res.title, res.unit, res.symbol) == ("Cross-check: non-carbonate residue", "%",
                                                 "w_res")
    assert res.result == pytest.approx(31.1735, abs=2e-4)


ATOMIC_SOURCE = "content/data/atomic_weights.yaml (IUPAC/CIAAW standard atomic weights)"


def test_carbonate_steps_show_the_molar_mass_ratios_with_their_source(demo):
    _, results = demo
    co2 = by(results)[("CHEM-CO2", "BS-1")]
    ratios = {(i.symbol, i.name, i.unit, i.source): i.value
              for s in co2.steps for i in s.inputs if i.unit == "g/g"}
    # molar masses from IUPAC standard atomic weights (C 12.011, O 15.999, Ca 40.078,
    # Mg 24.305): CO2 44.009, CaO 56.077, MgO 40.304, CaCO3 100.086, MgCO3 84.313 g/mol
    expected = {("k_C", "M(CO2)/M(CaO)"): 44.009 / 56.077,      # 0.78480
                ("k_M", "M(CO2)/M(MgO)"): 44.009 / 40.304,      # 1.09193
                ("r_Ca", "M(CaCO3)/M(CO2)"): 100.086 / 44.009,  # 2.27422
                ("r_Mg", "M(MgCO3)/M(CO2)"): 84.313 / 44.009}   # 1.91581
    assert set(ratios) == {(sym, name, "g/g", ATOMIC_SOURCE) for sym, name in expected}
    for (sym, name), value in expected.items():
        assert ratios[(sym, name, "g/g", ATOMIC_SOURCE)] == pytest.approx(value, abs=2e-5)


def test_loss_free_factor(demo):
    _, results = demo
    c = by(results)[("CHEM-LOSSFREE", "BS-1")]
    assert c.value == pytest.approx(100 / 67.0, abs=1e-3)  # 100/(100 - 33.0), by hand


def test_no_nan_in_results(demo):
    _, results = demo
    for c in results.checks:
        if isinstance(c.value, float):
            assert math.isfinite(c.value), c.key


@pytest.mark.parametrize("old, new, expect", [
    # missing CaO and SiO2: indices cannot be formed -> not assessed, never a crash
    ("SiO2: 21.5, Al2O3: 8.1, Fe2O3: 4.2, CaO: 57.9,", "Al2O3: 8.1, Fe2O3: 4.2, Cr2O3: 79.4,", "not_assessed"),
])
def test_missing_oxides_not_assessed(demo_copy, old, new, expect):
    path = demo_copy / "analyses.yaml"
    path.write_text(path.read_text().replace(old, new, 1))
    _, results = check(demo_copy)
    assert by(results)[("CHEM-HI", "NC1-A")].status == expect
    assert by(results)[("CHEM-CI", "NC1-A")].status == expect


def test_negative_oxide_is_refused(demo_copy, cli):
    path = demo_copy / "analyses.yaml"
    path.write_text(path.read_text().replace("MgO: 2.3,", "MgO: -2.3,", 1))
    result = cli("check", demo_copy)
    assert result.exit_code == 2
    assert "analyses[1].mass_percent.MgO: Input should be greater than or equal to 0" in result.output


def test_raw_stone_without_co2_is_not_assessed(demo_copy):
    path = demo_copy / "analyses.yaml"
    path.write_text(path.read_text().replace("Na2O: 0.2, CO2: 30.0, LOI: 33.0}", "Na2O: 0.2, LOI: 33.0}", 1))
    _, results = check(demo_copy)
    c = by(results)[("CHEM-CO2", "BS-1")]
    assert c.status == "not_assessed" and "gives no CO2" in c.message


def test_loss_on_ignition_above_50_percent(demo_copy, cli):
    path = demo_copy / "analyses.yaml"
    path.write_text(path.read_text().replace("CaO: 57.9, MgO: 2.3, SO3: 0.9, K2O: 1.1, Na2O: 0.3, CO2: 1.9, LOI: 3.2}",
                                             "CaO: 5.9, MgO: 2.3, SO3: 0.9, K2O: 1.1, Na2O: 0.3, LOI: 55.2}", 1))
    result = cli("check", demo_copy)
    assert result.exit_code == 2 and "Traceback" not in result.output
    assert ("analyses.yaml, line 17: analyses[1].mass_percent: analysis 'NC1-A': loss on ignition "
            "55.20 % exceeds 50 %") in result.output


def test_lumped_oxide_without_split_is_not_assessed(demo_copy):
    path = demo_copy / "analyses.yaml"
    path.write_text(path.read_text().replace("Al2O3: 8.1, Fe2O3: 4.2,", "Al2O3+Fe2O3: 12.3,", 1))
    _, results = check(demo_copy)
    ci = by(results)[("CHEM-CI", "NC1-A")]
    assert ci.status == "not_assessed"
    assert "'Al2O3+Fe2O3' is reported lumped and no split is declared" in ci.message


def test_carbonate_sheet_steps_recompute_with_periodictable(demo):
    """CHEM-CO2 on the raw stone BS-1 (demo data: CaO 40.1, MgO 1.6, CO2 30.0 %): CO2 goes to
    CaO first, the rest to MgO; each step's inputs are listed so a reader can recompute it."""
    import periodictable as pt
    _, results = demo
    c = by(results)[("CHEM-CO2", "BS-1")]
    steps = {s.symbol: s for s in c.steps}
    m = lambda f: pt.formula(f).mass  # noqa: E731 - molar mass in g/mol (reference library)
    k_ca = m("CO2") / m("CaO")                      # 44.009/56.077 = 0.78480
    co2_ca = min(30.0, k_ca * 40.1)                 # calcite first: all 30.0 % of the CO2
    co2_mg = min(30.0 - co2_ca, m("CO2") / m("MgO") * 1.6)
    carb = co2_ca * m("CaCO3") / m("CO2") + co2_mg * m("MgCO3") / m("CO2")  # 30 * 2.27420 = 68.23
    assert steps["CO2_Ca"].result == pytest.approx(co2_ca, abs=1e-3)
    assert steps["CO2_Mg"].result == pytest.approx(co2_mg, abs=1e-3)
    assert steps["carb"].result == pytest.approx(carb, abs=1e-3)
    assert {i.symbol for i in steps["carb"].inputs} == {"r_Ca", "r_Mg"}
    assert results.quantities["BS-1"]["carbonate_content"].value == pytest.approx(carb, abs=1e-3)
