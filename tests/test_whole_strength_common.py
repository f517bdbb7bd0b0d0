"""The strength module's shared pieces (``specgen.checks.strength_common``) on hand-made inputs
built in memory: the maturity settings and where each comes from, the laboratory curing
factor, the Grubbs screen of one tested age with its bound note, the site record laid out,
and the rows of a mix.

Outside values: ASTM C1074 equivalent age — Arrhenius a_T = exp[−E/R (1/T − 1/T_r)], R by
``scipy.constants``; Nurse-Saul a = (T − T_0)/(T_r − T_0); the temperature-dependent
activation energy E = 33.5 + 1.47·(20 − T[°C]) kJ/mol below 20 °C (Freiesleben Hansen &
Pedersen; from memory, as content/data/maturity_defaults.yaml tags it); the Nurse-Saul datum
−10 °C and the reference 20 °C (common practice, the same file); Grubbs' statistic G =
max|x − x̄|/s, which for n values cannot exceed (n − 1)/√n (Shiffler 1988, from memory):
2/√3 = 1.1547 for three; EN 1990 Annex D D7.2 (k_n by ``scipy.stats``).
"""
from __future__ import annotations

import math
from types import SimpleNamespace as NS

import numpy as np
import pytest
from scipy import constants, stats

from specgen.checks import strength_common as sc

FHP = ("P. Freiesleben Hansen and E. J. Pedersen, Maturity computer for controlled curing and "
       "hardening of concrete, Nordisk Betong 1 (1977) 21-25")
WARNING = ("33.5 kJ/mol is a default for Portland cement concrete; the activation energy of lime "
           "and natural-cement binders differs and must be measured before equivalent ages are "
           "relied on.")


def _project(**strength):
    fields = {"activation_energy": None, "maturity_method": "arrhenius",
              "datum_temperature": None, "known_cv": None}
    fields.update(strength)
    return NS(dossier=NS(strength=NS(**fields)))


def test_default_settings_whole():
    st = sc.settings(_project())
    assert st == sc.Settings(
        "arrhenius", 33500.0, f"default, temperature-dependent form: {FHP}", 263.15, 293.15,
        WARNING, 1470.0, 293.15,
        "common practice: datum temperature T0 = -10 °C, a value of early maturity work and "
        "common practice; it is not taken from ASTM C1074, whose annex has the datum measured "
        "for the binder")
    assert st.energy_text == ("33.5 kJ/mol at or above 20 °C, plus 1.47 kJ/mol per kelvin below "
                              "(temperature-dependent)")
    # E(T): 33.5 kJ/mol at and above 20 °C, 33.5 + 1.47 per kelvin below
    e = st.energy
    assert [e(t + 273.15) for t in (30.0, 20.0, 10.0, 0.0)] == pytest.approx(
        [33500.0, 33500.0, 48200.0, 62900.0])


def test_measured_settings_whole():
    st = sc.settings(_project(activation_energy=41500.0, maturity_method="nurse_saul",
                              datum_temperature=268.15))
    assert st == sc.Settings(
        "nurse_saul", 41500.0, "project input (dossier.yaml strength.activation_energy)",
        268.15, 293.15, "", 0.0, 293.15,
        "project input (dossier.yaml strength.datum_temperature)")
    assert (st.energy, st.energy_text) == (41500.0, "41.5 kJ/mol")


@pytest.mark.parametrize("temp_c", [30.0, 12.5, 20.0])
def test_lab_curing_factor_arrhenius(temp_c):
    st = sc.settings(_project())
    e = 33500.0 + 1470.0 * max(0.0, 20.0 - temp_c)
    a = math.exp(-e / constants.R * (1 / (temp_c + 273.15) - 1 / 293.15))
    assert sc._lab_factor(temp_c + 273.15, st) == pytest.approx(a, rel=1e-9)
    assert sc.lab_factor(temp_c + 273.15, st) == pytest.approx(a, rel=1e-9)
    assert sc.lab_factor(None, st) == 1.0                    # no temperature: the reference


def test_lab_curing_factor_nurse_saul():
    # (T − T0)/(Tr − T0) with T0 = −5 °C given: 30 °C → 35/25 = 1.4; 5 °C → 10/25 = 0.4
    st = sc.settings(_project(maturity_method="nurse_saul", datum_temperature=268.15))
    assert sc._lab_factor(303.15, st) == pytest.approx(1.4, rel=1e-9)
    assert sc._lab_factor(278.15, st) == pytest.approx(0.4, rel=1e-9)


def test_bound_note_at_and_below_the_bound():
    top = 2 / math.sqrt(3)                       # (n − 1)/√n for three values
    note = sc._bound_note(3, top)
    assert note == ("; G is at its upper bound (n−1)/√n = 1.1547: two results are equal, as "
                    "rounding makes likely")
    assert sc._bound_note(3, top - 2e-6) == "" and sc._bound_note(3, top - 5e-7) == note
    assert sc._bound_note(4, 1.4) == ""          # four values: the bound is 3/2


def _row(i, value, age_d=7.0, temp=None):
    return NS(specimen=f"S{i}", mix="MX", age=age_d * 86400.0, test="compressive",
              value=value * 1e6, curing_temperature=temp, row=i + 1, file="lab/strength.csv")


RULES = {"strength.grubbs_alpha": NS(value=0.05), "strength.grubbs_min_n": NS(value=4),
         "strength.fractile": NS(value=0.05)}


def test_group_of_three_keeps_a_flagged_tie_with_the_note():
    # 1.18, 1.24, 1.18 MPa: G = 0.04/0.034641 = 1.1547, on its bound, above G_crit(3, 5 %)
    # = 1.1543 (Grubbs' table); three values are kept (rule strength.grubbs_min_n = 4)
    rows = [_row(1, 1.18), _row(2, 1.24), _row(3, 1.18)]
    g = sc._group("compressive", 7 * 86400.0, rows, sc.settings(_project()), RULES, None)
    assert (g.kept, g.flagged) == (tuple(rows), ())
    assert [(r.specimen, why.split(";")[0]) for r, why in g.noted] == [
        ("S2", "G = 1.155 > G_crit = 1.154 (n = 3, alpha = 0.05)")]
    assert g.noted[0][1].endswith("; G is at its upper bound (n−1)/√n = 1.1547: two results are "
                                  "equal, as rounding makes likely")
    kn = stats.t.ppf(0.95, 2) * math.sqrt(1 + 1 / 3)
    assert g.characteristic.value == pytest.approx((1.2 - kn * 0.0346410) * 1e6, rel=1e-6)
    assert g.known is None and g.te == 7 * 86400.0


def test_group_of_four_drops_the_outlier_and_reads_the_known_cv():
    # 2.40, 2.45, 2.50, 4.00 MPa at 7 d, cured at 30 °C: 4.00 is dropped (n = 4); known CV 8 %:
    # f_k = f̄ (1 − u(0.95) √(1 + 1/3) · 0.08) (EN 1990 D7.2); equivalent age 7 d × a_T(30 °C)
    rows = [_row(i, v, temp=303.15) for i, v in enumerate((2.40, 2.45, 2.50, 4.00), start=1)]
    st = sc.settings(_project())
    g = sc._group("compressive", 7 * 86400.0, rows, st, RULES, 0.08)
    assert g.kept == tuple(rows[:3]) and [r.specimen for r, _ in g.flagged] == ["S4"]
    assert g.noted == ()
    m = 2.45e6
    k = stats.norm.ppf(0.95) * math.sqrt(1 + 1 / 3)
    assert g.known.value == pytest.approx(m * (1 - k * 0.08), rel=1e-9)
    a = math.exp(-33500.0 / constants.R * (1 / 303.15 - 1 / 293.15))
    assert g.te == pytest.approx(7 * 86400.0 * a, rel=1e-9)
    one = sc._group("compressive", 86400.0, [_row(9, 1.0)], st, RULES, None)
    assert (one.characteristic, one.summary.n) == (None, 1)   # one value: no f_k


def test_site_history_constant_daily_and_points():
    assert sc.site_history(NS(site_temperature=None), 10 * 86400.0) is None
    t, temp = sc.site_history(NS(site_temperature=NS(constant=283.15, points=None)),
                              2.5 * 86400.0)
    # a constant laid out daily from day 0 to the day past the horizon (ceil(2.5) = 3)
    assert t.tolist() == [0.0, 86400.0, 172800.0, 259200.0] and temp.tolist() == [283.15] * 4
    pts = [(1000.0, 280.0), (1000.0 + 86400.0, 285.0)]
    t, temp = sc.site_history(NS(site_temperature=NS(constant=None, points=pts)), 86400.0)
    assert (t.tolist(), temp.tolist()) == ([0.0, 86400.0], [280.0, 285.0])


def test_site_equivalent_age_of_a_constant_record():
    # 15 °C for 4 days: Arrhenius t_e = 4 d × a_T(15 °C) with E = 33.5 + 1.47 × 5 kJ/mol;
    # Nurse-Saul: 4 d × 25/30; the arrays are read-only (shared within a run)
    project = _project()
    project.site_temperature = NS(constant=288.15, points=None)
    st = sc.settings(project)
    e = 33500.0 + 1470.0 * 5
    a = math.exp(-e / constants.R * (1 / 288.15 - 1 / 293.15))
    t, te = sc.site_equivalent_age(project, st, "arrhenius", 4 * 86400.0)
    assert te[-1] == pytest.approx(4 * 86400.0 * a, rel=1e-6) and not te.flags.writeable
    _, te2 = sc.site_equivalent_age(project, st, "nurse_saul", 4 * 86400.0)
    assert te2[-1] == pytest.approx(4 * 86400.0 * 25 / 30, rel=1e-9)
    assert sc.site_equivalent_age(NS(site_temperature=None), st, "arrhenius", 86400.0) is None


def test_rows_of_a_mix_in_file_order_once_per_run():
    rows = [NS(mix="A", n=1), NS(mix="B", n=2), NS(mix="A", n=3)]
    ctx = NS(project=NS(strength=rows))
    assert [r.n for r in sc.rows_of(ctx, "A")] == [1, 3] and sc.rows_of(ctx, "C") == []
    ctx.project.strength = []                     # kept on the context: not scanned again
    assert [r.n for r in sc.rows_of(ctx, "A")] == [1, 3]


def test_series_flags_implausible_values_with_their_row():
    # 350 "MPa" typed for a psi value: outside the plausible range of a lab mortar
    # (content/data/strength_classes.yaml plausible_range), named with its row
    rows = [_row(1, 2.0), _row(2, 350.0), _row(3, 2.1)]
    plaus = {"low_mpa": 0.05, "high_mpa": 100.0}
    s = sc._series(("MX", "compressive"), rows, sc.settings(_project()), RULES, plaus,
                   _project())
    assert s.implausible == ["S2 (row 3): 350 MPa is above the plausible 100 MPa; was it "
                             "entered in psi or kPa under an MPa heading?"]
    assert s.t_fit.tolist() == [7 * 86400.0] * 3 and s.y_fit.tolist() == [2e6, 350e6, 2.1e6]
    assert s.last_age == 7 * 86400.0
    assert np.all(np.isfinite(s.t_fit))


def test_the_analysis_is_made_once_per_run(demo_checked):
    # the strength analysis of a check run is kept on its context: asked twice, the same
    # object (not a second analysis)
    import copy
    from specgen.checks.rules import RuleBook
    from specgen.checks.run import Context
    project, _ = demo_checked
    p = copy.copy(project)
    p.strength = [_row(i, v) for i, v in enumerate((2.0, 2.1, 2.2), start=1)]
    for r in p.strength:
        r.mix = "M1"
    ctx = Context(p, RuleBook())
    first = sc.cached(ctx)
    assert list(first) == [("M1", "compressive")] and sc.cached(ctx) is first
    assert ctx.__dict__["_strength"] is first
