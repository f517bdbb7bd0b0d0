"""CHEM-FIRED, CHEM-BURN and CHEM-FIRING (calcination_checks) read whole: the demo's natural
cement NC1 against its raw stone BS-1 and its firing record, by hand from the demo's data
(analyses.yaml, materials.yaml, lab/firing-NC1.csv), content/data/kiln_stages.yaml and IUPAC
atomic weights; hand-made analyses and firings for the branches the demo never reaches."""
from __future__ import annotations

import csv
from pathlib import Path
from types import SimpleNamespace as NS

import pytest

from specgen.checks.result import Basis, Input
from tests.helpers import by_check

ROOT = Path(__file__).resolve().parent.parent
ATOMIC = "content/data/atomic_weights.yaml (IUPAC/CIAAW standard atomic weights)"
RAW = "analysis BS-1 (Northstead Materials Laboratory, report NML-4410)"
NC1 = "analysis NC1-A (Northstead Materials Laboratory, report NML-4418)"
# content/rules/calcination.yaml
FIRED_BASIS = Basis("common practice", note="major oxides of two samples of one stone agree "
                    "within about 1 %; a larger gap points to another bed, fuel ash taken up in "
                    "the kiln, or a mislabelled sample")
BURN_BASIS = Basis("common practice", note="a well-burnt binder keeps only a few tenths to a "
                   "few per cent CO2")
LOSS_NOTE = ("expected fired oxide = raw oxide × 100/(100 − LOI): every loss (CO2, combined "
             "water) leaves in the kiln and nothing is gained from fuel or lining")
# demo analyses.yaml: BS-1 (raw, LOI 33.0) and NC1-A (binder, LOI 3.2), mass %
RAW_OX = {"SiO2": 14.8, "Al2O3": 5.6, "Fe2O3": 2.9, "CaO": 40.1, "MgO": 1.6, "SO3": 0.6}
NC1_OX = {"SiO2": 21.5, "Al2O3": 8.1, "Fe2O3": 4.2, "CaO": 57.9, "MgO": 2.3, "SO3": 0.9}
# IUPAC: CaCO3 = 40.078 + 12.011 + 3·15.999 = 100.086, CO2 = 12.011 + 2·15.999 = 44.009 g/mol
M_CACO3, M_CO2 = 100.086, 44.009


def test_fired_composition_of_nc1_whole(demo_checked):
    c = by_check(demo_checked[1])[("CHEM-FIRED", "NC1")]
    diff = {k: 100 * NC1_OX[k] / 96.8 - 100 * RAW_OX[k] / 67.0 for k in RAW_OX}
    # SiO2: 2150/96.8 − 1480/67 = 22.2107 − 22.0896 = +0.1212 %, the largest of the six
    assert max(diff, key=lambda k: abs(diff[k])) == "SiO2"
    assert (c.code, c.title, c.subject, c.subject_kind, c.status, c.unit) == (
        "CHEM-FIRED", "Fired composition against the raw stone", "NC1", "binder", "pass", "%")
    assert c.value == pytest.approx(diff["SiO2"], abs=1e-4)
    assert c.message == ("raw stone BS-1 → binder NC1-A: largest difference SiO2 +0.12 % "
                         "(loss-free); the binder is what its raw stone should give")
    assert c.basis == (FIRED_BASIS,) and c.notes == (LOSS_NOTE,)
    assert (c.limit.compare, c.limit.low, c.limit.high, c.limit.unit, c.limit.text,
            c.limit.rule) == ("within", -1.5, 1.5, "%", "|Δ| ≤ 1.5 % per oxide",
                              "calcination.fired_difference")
    assert [s.title for s in c.steps] == [f"{k}: measured − expected (loss-free)" for k in RAW_OX]
    for step, k in zip(c.steps, RAW_OX):
        assert step.formula == (r"\Delta = \frac{100\,x_b}{100 - LOI_b} - "
                                r"\frac{100\,x_r}{100 - LOI_r}")
        assert step.substituted == (
            rf"\Delta = \frac{{100 \times {NC1_OX[k]:.2f}}}{{100 - 3.20}} - "
            rf"\frac{{100 \times {RAW_OX[k]:.2f}}}{{100 - 33.00}}")
        assert (step.unit, step.symbol) == ("%", f"Δ{k}")
        assert step.result == pytest.approx(diff[k], abs=6e-5)
        assert step.inputs == (
            Input("x_r", f"{k} in the raw stone", RAW_OX[k], "%", RAW),
            Input("LOI_r", "loss on ignition, raw stone", 33.0, "%", RAW),
            Input("x_b", f"{k} in the binder", NC1_OX[k], "%", NC1),
            Input("LOI_b", "loss on ignition, binder", 3.2, "%", NC1))
    exp, largest = c.quantities
    assert (exp.name, exp.unit, exp.label) == ("expected_fired_composition", "%",
                                               "expected fired composition")
    # every raw oxide × 100/67, in the report's order; K2O 0.8 and Na2O 0.2 too
    assert list(exp.value) == ["SiO2", "Al2O3", "Fe2O3", "CaO", "MgO", "SO3", "K2O", "Na2O"]
    assert exp.value["CaO"] == pytest.approx(4010 / 67, abs=1e-4)
    assert exp.value["Na2O"] == pytest.approx(20 / 67, abs=1e-4)
    assert (largest.name, largest.label) == ("fired_difference", "largest fired difference (SiO2)")


def test_residual_carbonate_of_nc1_whole(demo_checked):
    c = by_check(demo_checked[1])[("CHEM-BURN", "NC1")]
    caco3 = 1.9 * M_CACO3 / M_CO2                      # 4.321 %
    d = 100 * (1 - (1.9 / 96.8) / (30.0 / 67.0))        # 95.616 %
    assert (c.title, c.status, c.value, c.unit, c.basis) == (
        "Residual carbonate (degree of burning)", "pass", 1.9, "%", (BURN_BASIS,))
    assert c.message == ("CO2 1.90 % (as calcite 4.3 %); decarbonation 95.6 % of the raw "
                         "stone's CO2; a well-burnt binder")
    assert (c.limit.compare, c.limit.high, c.limit.unit, c.limit.text, c.limit.rule) == (
        "<=", 3.0, "%", "CO2 ≤ 3 %", "calcination.residual_co2")
    assert c.notes == ("all CO2 of the binder is read as calcite (the first carbonate to form "
                       "again and the last to decompose)",)
    calcite, dec = c.steps
    assert (calcite.title, calcite.formula, calcite.substituted, calcite.unit,
            calcite.symbol) == (
        "Residual carbonate as calcite", r"CaCO_3 = CO_2 \times \frac{M_{CaCO_3}}{M_{CO_2}}",
        r"CaCO_3 = 1.90 \times \frac{100.086}{44.009}", "%", "CaCO3")
    assert calcite.result == pytest.approx(caco3, abs=1e-3)
    assert calcite.inputs == (
        Input("CO_2", "CO2 in the binder", 1.9, "%", NC1),
        Input("M_{CaCO_3}", "molar mass of calcite", M_CACO3, "g/mol", ATOMIC),
        Input("M_{CO_2}", "molar mass of CO2", M_CO2, "g/mol", ATOMIC))
    assert (dec.title, dec.formula, dec.substituted, dec.unit, dec.symbol) == (
        "Degree of decarbonation",
        r"D = 1 - \frac{CO_{2,b}/(100 - LOI_b)}{CO_{2,r}/(100 - LOI_r)}",
        r"D = 1 - \frac{1.90/(100 - 3.20)}{30.00/(100 - 33.00)}", "%", "D")
    assert dec.result == pytest.approx(d, abs=1e-3)
    assert dec.inputs == (
        Input("CO_{2,b}", "CO2 in the binder", 1.9, "%", NC1),
        Input("LOI_b", "loss on ignition, binder", 3.2, "%", NC1),
        Input("CO_{2,r}", "CO2 in the raw stone", 30.0, "%", RAW),
        Input("LOI_r", "loss on ignition, raw stone", 33.0, "%", RAW))
    assert [(q.name, q.unit, q.label) for q in c.quantities] == [
        ("residual_co2", "%", "residual CO2"), ("decarbonation", "%", "degree of decarbonation")]
    assert c.quantities[1].value == pytest.approx(d, abs=1e-3)


def test_firing_record_of_nc1_whole(demo_checked):
    c = by_check(demo_checked[1])[("CHEM-FIRING", "NC1")]
    stages = "content/data/kiln_stages.yaml (common practice)"
    assert (c.title, c.status, c.value, c.unit) == (
        "Firing record against the kiln stages", "pass", 930.0, "°C")
    assert c.basis == (Basis("common practice", note="kiln stages of a marly limestone: clay "
                             "dehydroxylation, calcite decomposition, sintering (content/data/"
                             "kiln_stages.yaml)"),)
    # kiln_stages.yaml: calcite decomposition ends at 900 °C, sintering begins at 1250 °C
    assert (c.limit.compare, c.limit.low, c.limit.high, c.limit.unit, c.limit.text) == (
        "within", 900.0, 1250.0, "°C", "900 °C ≤ peak < 1250 °C (kiln stages)")
    assert c.message == ("peak 930 °C: clay activated, calcite decomposed, below sintering — "
                         "the firing the binder class assumes")
    assert c.notes == ("calcite decomposition shifts with the CO2 pressure in the kiln; the "
                       "stage temperatures are guides, not sharp limits",
                       "Trial firing 2, shaft test kiln at the estuary works, charcoal fired, "
                       "1.2 t charge")
    peak, soak = c.steps
    assert (peak.title, peak.formula, peak.substituted, peak.result, peak.unit, peak.symbol) == (
        "Peak temperature against the stages",
        r"T_{dehyd,from} \le T_{calc,to} \le T_{peak} < T_{sint,from}",
        r"500 \le 900 \le 930 < 1250", 930.0, "°C", "T_peak")
    assert peak.inputs[:4] == (
        Input("T_{peak}", "peak kiln temperature", 930.0, "°C",
              "materials.yaml binders NC1.firing.peak"),
        Input("T_{dehyd}", "clay dehydroxylation (from–to)", "500–650", "°C", stages),
        Input("T_{calc}", "calcite decomposition (from–to)", "800–900", "°C", stages),
        Input("T_{NC}", "usual natural-cement firing range (from–to)", "750–1100", "°C", stages))
    assert (peak.inputs[4].symbol, peak.inputs[4].value) == ("T_{sint}", "1250–1450")
    # lab/firing-NC1.csv: hours and °C; the soak counts the intervals whose two readings are
    # both at or above the onset of calcite decomposition (800 °C)
    with open(ROOT / "demo_project" / "lab" / "firing-NC1.csv", encoding="utf-8") as f:
        rows = [(float(h), float(t)) for h, t in list(csv.reader(f))[1:]]
    held = sum(b[0] - a[0] for a, b in zip(rows, rows[1:]) if min(a[1], b[1]) >= 800)
    assert held == 10.0      # 10-12-14-16-18-20 h: 850, 905, 930, 925, 910, 860 °C
    assert (soak.title, soak.formula, soak.substituted, soak.result, soak.unit,
            soak.symbol) == (
        "Time held above the onset of calcite decomposition",
        r"t_{soak} = \sum \Delta t \;\; (T_i, T_{i+1} \ge T_{calc,start})",
        r"t_{soak} = 10.00\ \mathrm{h}", held, "h", "t_soak")
    assert soak.inputs == (
        Input("T_{calc,start}", "onset of calcite decomposition", 800.0, "°C",
              "content/data/kiln_stages.yaml"),
        Input("record", "time-temperature readings", f"{len(rows)} rows", "",
              "lab/firing-NC1.csv"))
    assert [(q.name, q.value, q.unit, q.label) for q in c.quantities] == [
        ("firing_peak", 930.0, "°C", "firing peak")]


def test_no_raw_stone_and_no_co2_are_not_assessed(demo_checked):
    res = by_check(demo_checked[1])
    fired, burn = res[("CHEM-FIRED", "NH35")], res[("CHEM-BURN", "NH35")]
    assert (fired.title, burn.title) == ("Fired composition against the raw stone",
                                         "Residual carbonate (degree of burning)")
    assert (fired.status, fired.message, fired.basis) == (
        "not_assessed", "not assessed: no raw-stone analysis names this binder as its material; "
        "the balance needs both", (FIRED_BASIS,))
    assert (burn.status, burn.basis) == ("not_assessed", (BURN_BASIS,))
    assert burn.message == ("not assessed: analysis NHL-A gives no CO2; ask the laboratory for "
                            "CO2 beside LOI (LOI alone mixes CO2 with combined and absorbed "
                            "water)")


# ---------------------------------------------------------------- hand-made analyses
def _an(id_, kind, ox):
    return NS(id=id_, kind=kind, material="B9", laboratory="", lumped_split={}, mass_percent=ox)


def _run(fn, analyses, binder=None, firing=None):
    from specgen.checks.rules import RuleBook
    from specgen.checks.run import Context
    project = NS(analyses={a.id: a for a in analyses}, binders={}, firing=firing or {})
    b = binder or NS(id="B9", type="natural_cement", analysis="A9", firing=None)
    return fn(b, Context(project, RuleBook()))


def test_fired_difference_edge_and_attention(demo_checked):
    """Loss-free both (no LOI, no CO2): expected = raw.  CaO 61.5 against 60.0 is +1.5 %, at
    the rule's 1.5 %: pass (≤); 61.6 is +1.6 %: attention, with the words for it; a binder
    with no analysis of its own is not assessed."""
    from specgen.checks.calcination_checks import fired_check
    raw = _an("R9", "raw_stone", {"SiO2": 20.0, "CaO": 60.0})
    at = _run(fired_check, [raw, _an("A9", "binder", {"SiO2": 20.0, "CaO": 61.5})])
    assert (at.status, at.value) == ("pass", 1.5)
    over = _run(fired_check, [raw, _an("A9", "binder", {"SiO2": 20.0, "CaO": 61.6})])
    assert over.status == "attention"
    assert over.value == pytest.approx(1.6, abs=1e-9)
    assert over.message == ("raw stone R9 → binder A9: largest difference CaO +1.60 % "
                            "(loss-free); another bed, fuel ash taken up in the kiln or a "
                            "mislabelled sample?")
    assert over.steps[0].inputs[0].source == "analysis R9"
    # a negative difference keeps its sign: SiO2 18.3 against 20.0 is −1.7 %
    neg = _run(fired_check, [raw, _an("A9", "binder", {"SiO2": 18.3, "CaO": 60.0})])
    assert neg.value == pytest.approx(-1.7, abs=1e-9) and "SiO2 -1.70 %" in neg.message
    alone = _run(fired_check, [raw], NS(id="B9", type="natural_cement", analysis=None,
                                        firing=None))
    assert alone.message == ("not assessed: the binder has no analysis of its own; the balance "
                             "needs both")


def test_residual_carbonate_edge_and_under_burnt(demo_checked):
    """CO2 3.0 % at the rule's 3 %: pass (≤); 3.01 %: attention, under-burnt; no raw stone with
    CO2: no decarbonation step; no analysis: not assessed."""
    from specgen.checks.calcination_checks import burn_check
    at = _run(burn_check, [_an("A9", "binder", {"SiO2": 20.0, "CaO": 60.0, "CO2": 3.0})])
    assert (at.status, len(at.steps)) == ("pass", 1)
    # 3.0 × 100.086/44.009 = 6.8226 % calcite
    assert at.steps[0].result == pytest.approx(3.0 * M_CACO3 / M_CO2, abs=1e-4)
    assert at.message == "CO2 3.00 % (as calcite 6.8 %); a well-burnt binder"
    over = _run(burn_check, [_an("A9", "binder", {"SiO2": 20.0, "CaO": 60.0, "CO2": 3.01})])
    assert over.status == "attention"
    assert over.message == ("CO2 3.01 % (as calcite 6.8 %); above the limit: under-burnt, or "
                            "carbonated in store — check the firing and the storage")
    none = _run(burn_check, [], NS(id="B9", type="natural_cement", analysis=None, firing=None))
    assert (none.status, none.message) == ("not_assessed",
                                           "not assessed: the binder has no analysis")


def _firing(peak_c=None, description=""):
    return NS(id="B9", type="natural_cement", analysis=None,
              firing=NS(peak=None if peak_c is None else peak_c + 273.15,
                        description=description))


def test_firing_branches(demo_checked):
    """No firing: no result.  850 °C lies inside calcite decomposition (800–900 °C): attention.
    Neither peak nor series: not assessed.  A series alone: its highest reading is the peak."""
    from specgen.checks.calcination_checks import firing_check
    assert _run(firing_check, [], NS(id="B9", firing=None)) is None
    low = _run(firing_check, [], _firing(850.0))
    assert (low.status, low.value) == ("attention", 850.0)
    assert low.message == ("peak within the calcite decomposition range: residual carbonate "
                           "likely unless held long enough")
    assert low.notes == ("calcite decomposition shifts with the CO2 pressure in the kiln; the "
                         "stage temperatures are guides, not sharp limits",)
    assert low.steps[0].substituted == r"500 \le 900 \le 850 < 1250"
    blank = _run(firing_check, [], _firing(None))
    assert blank.status == "not_assessed"
    assert blank.message == ("not assessed: the firing record gives neither a peak temperature "
                             "nor a readable time-temperature file")
    series = NS(file="lab/f9.csv", points=((0.0, 293.15), (3600.0, 1193.15), (7200.0, 1193.15),
                                           (10800.0, 293.15)))
    s = _run(firing_check, [], _firing(None), firing={"B9": series})
    # highest reading 1193.15 K = 920 °C; held 1 h at or above 800 °C
    assert (s.value, s.steps[0].inputs[0].source) == (920.0, "lab/f9.csv, highest reading")
    assert (s.steps[1].result, s.steps[1].inputs[1].value) == (1.0, "4 rows")


def test_fired_oxide_missing_from_one_side_and_an_overridden_rule(demo_checked):
    """CHEM-FIRED: MgO 2.0 in the raw stone, none reported in the binder: the binder's MgO is
    taken as 0 on its step (0 − 2.0 = −2.0 %: attention); the rule overridden to 2.5 % with a
    justification shows it on the limit (|−2.0| ≤ 2.5: pass).  CHEM-BURN: CO2 1.23456 % is
    kept to 4 decimals (1.2346) in results.json."""
    from specgen.checks.calcination_checks import burn_check, fired_check
    from specgen.checks.rules import RuleBook
    from specgen.checks.run import Context
    raw = _an("R9", "raw_stone", {"SiO2": 20.0, "CaO": 60.0, "MgO": 2.0})
    b = _an("A9", "binder", {"SiO2": 20.0, "CaO": 60.0})
    c = _run(fired_check, [raw, b])
    assert (c.status, c.value) == ("attention", -2.0)
    mg = next(s for s in c.steps if s.symbol == "ΔMgO")
    assert mg.substituted == (r"\Delta = \frac{100 \times 0.00}{100 - 0.00} - "
                              r"\frac{100 \times 2.00}{100 - 0.00}")
    assert mg.inputs[2] == Input("x_b", "MgO in the binder", 0.0, "%", "analysis A9")
    ov = NS(rule="calcination.fired_difference", value=2.5, justification="two beds, said so")
    project = NS(analyses={"R9": raw, "A9": b}, binders={}, firing={})
    o = fired_check(NS(id="B9", type="natural_cement", analysis="A9", firing=None),
                    Context(project, RuleBook([ov])))
    assert (o.status, o.limit.high, o.limit.overridden) == ("pass", 2.5, "two beds, said so")
    co2 = _run(burn_check, [_an("A9", "binder", {"SiO2": 20.0, "CaO": 60.0, "CO2": 1.23456})])
    assert (co2.value, co2.quantities[0].value) == (1.2346, 1.2346)
