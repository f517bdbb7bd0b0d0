"""STR-AGG, STR-FIT-C/F and STR-PRED-C/F read whole on the demo (the session's checked demo)
and on hand-made strength records built in memory.

Outside values: the demo's results read here from ``demo_project/lab/strength.csv`` by hand
(the ``csv`` and ``statistics`` modules); EN 1990 Annex D, D7.2: f_k = mean − k_n·s with
k_n = t(0.95, n−1)·√(1 + 1/n) for unknown variance and u(0.95)·√(1 + 1/n) for known, the
quantiles from ``scipy.stats``; Grubbs' two-sided test (Grubbs 1969; ASTM E178):
G = max|x − x̄|/s, G_crit = (n−1)/√n · √(t²/(n−2+t²)), t the upper α/(2n) quantile of Student's
t with n−2 degrees of freedom (scipy.stats); the strength-age laws as EN 1992-1-1 eq. 3.2, the
hyperbolic law and the two-component law write them; AICc and Akaike weights as Burnham &
Anderson (2002) sec. 2.4 and 2.9 define them.
"""
from __future__ import annotations

import copy
import csv
import math
import re
import statistics
from collections import defaultdict
from types import SimpleNamespace as NS

import pytest
from scipy import stats

from specgen.checks import strength_checks as stc
from specgen.checks.result import Basis, Input, Quantity, Step
from specgen.checks.registry import checks
from specgen.checks.rules import RuleBook
from specgen.checks.run import Context
from tests.conftest import DEMO

EN1990 = Basis("reference", "en1990", "Annex D, D7.2 (5 % fractile, normal distribution)")
GRUBBS = Basis("reference", "grubbs1969", "two-sided test for one outlier; see also ASTM E178")
AICC = Basis("reference", "burnham2002", "AICc and ΔAICc, sec. 2.4 and 2.6")
EN1992 = Basis("reference", "en1992", "eq. 3.2, age function of compressive strength")
KN_SOURCE = ("EN 1990 Annex D (D7.2): t(0.95, n−1)·√(1 + 1/n), Student's t quantile computed "
             "with SciPy")
NUMBER = r"\d+\.\d+"
FK = r"f_k = \bar{f} - k_n\,s,\quad k_n = t_{0.95,\,n-1}\sqrt{1 + 1/n}"


def _csv_rows():
    """The demo's strength rows as the file gives them, with their row numbers (header 1)."""
    with open(DEMO / "lab" / "strength.csv", newline="", encoding="utf-8") as f:
        return [dict(r, row=i) for i, r in enumerate(csv.DictReader(f), start=2)]


def _grubbs(values, alpha=0.05):
    """(G, G_crit, index of the farthest value) of Grubbs' two-sided test (G = 0 for equal
    values: none lies apart)."""
    n, m, s = len(values), statistics.mean(values), statistics.stdev(values)
    i = max(range(n), key=lambda j: abs(values[j] - m))
    t = stats.t.ppf(1 - alpha / (2 * n), n - 2)
    g = abs(values[i] - m) / s if s > 0 else 0.0
    return g, (n - 1) / math.sqrt(n) * math.sqrt(t * t / (n - 2 + t * t)), i


def _agg_by_hand(mix):
    """The STR-AGG sheet of a demo mix from the CSV: every group has three prisms, so a value
    Grubbs' test flags is kept with a note (rule strength.grubbs_min_n = 4)."""
    groups = defaultdict(list)
    for r in _csv_rows():
        if r["mix"] == mix:
            groups[(r["test"], float(r["age [d]"]))].append(r)
    steps, notes, per = [], [], defaultdict(dict)
    for test in ("compressive", "flexural"):
        for age in sorted(a for t, a in groups if t == test):
            rows = groups[(test, age)]
            x = [float(r["value [MPa]"]) for r in rows]
            n, m, s = len(x), statistics.mean(x), statistics.stdev(x)
            g, gc, far = _grubbs(x)
            kn = stats.t.ppf(0.95, n - 1) * math.sqrt(1 + 1 / n)
            fk = m - kn * s
            names = [r["specimen"] + (" (flagged, kept)" if g > gc and j == far else "")
                     for j, r in enumerate(rows)]
            if g > gc:
                top = (n - 1) / math.sqrt(n)
                bound = (f"; G is at its upper bound (n−1)/√n = {top:.4f}: two results are "
                         "equal, as rounding makes likely" if g >= top - 1e-6 else "")
                notes.append(f"flagged by Grubbs' test but kept (group of fewer than 4): "
                             f"{rows[far]['specimen']}: G = {g:.3f} > G_crit = {gc:.3f} "
                             f"(n = {n}, alpha = 0.05){bound}")
            inputs = tuple(Input("f_i", nm, v, "MPa", f"lab/strength.csv row {r['row']}")
                           for nm, v, r in zip(names, x, rows)) + (
                Input("n", "results kept", n, "", "count"),
                Input("f̄", "mean", round(m, 4), "MPa", "computed"),
                Input("s", "sample standard deviation", round(s, 4), "MPa", "computed (n − 1)"),
                Input("CV", "coefficient of variation", round(100 * s / m, 2), "%", "computed"),
                Input("k_n", "EN 1990 factor, variance unknown", round(kn, 4), "", KN_SOURCE))
            steps.append(Step(f"{test} at {age:g} d: characteristic value (n = {n})", FK, inputs,
                              rf"f_k = {m:.3f} - {kn:.3f} \times {s:.3f} = {fk:.3f}",
                              round(fk, 4), "MPa", "f_k"))
            per[test][f"{age:g} d"] = (round(m, 4), round(fk, 4), round(100 * s / m, 3), m, fk)
    return steps, notes, per


@pytest.mark.parametrize("mix", ["M1", "M2", "M3"])
def test_aggregation_of_the_demo_whole(demo_checked, mix):
    _, results = demo_checked
    got = results.check("STR-AGG", mix)
    steps, notes, per = _agg_by_hand(mix)
    assert got.steps == tuple(steps)
    assert (got.code, got.title, got.subject, got.subject_kind, got.unit, got.basis) == (
        "STR-AGG", "Strength results per age", mix, "mix", "MPa", (EN1990, GRUBBS))
    # every flag of the demo is a tie of three (G on its bound): no attention for those
    assert got.notes == tuple(notes) and got.status == "info"
    assert all("upper bound" in n for n in notes)

    def said(test):
        last = max(per[test], key=lambda k: float(k[:-2]))
        _, _, _, m, fk = per[test][last]
        return (f"{test}: 5 age(s) 1–90 d, mean {m:.3g} MPa at {last}, f_k {fk:.3g} MPa")
    assert got.message == (f"{said('compressive')}; {said('flexural')}; no result excluded by "
                           "Grubbs' test")
    assert got.value == per["compressive"]["90 d"][0]
    assert got.quantities == (
        Quantity("mean_strength", {t: {a: v[0] for a, v in per[t].items()} for t in per},
                 "MPa", "mean strength"),
        Quantity("characteristic_strength", {t: {a: v[1] for a, v in per[t].items()}
                                             for t in per}, "MPa",
                 "characteristic strength (EN 1990 Annex D, variance unknown)"),
        Quantity("strength_cv", {t: {a: v[2] for a, v in per[t].items()} for t in per}, "%",
                 "replicate coefficient of variation"),
        Quantity("excluded_results", [], "", "excluded by the outlier screen"))


# ------------------------------------------------------------------ hand-made records
def _ctx(demo_checked, rows, known_cv=None):
    """A check context on a copy of the demo project whose strength record is ``rows``
    ((specimen, mix, age d, test, MPa, curing °C or None)), in memory."""
    project, results = demo_checked
    p = copy.copy(project)
    p.strength = [NS(specimen=s, mix=m, age=a * 86400.0, test=t, value=v * 1e6,
                     curing_temperature=None if c is None else c + 273.15, row=i,
                     file="lab/strength.csv")
                  for i, (s, m, a, t, v, c) in enumerate(rows, start=2)]
    strength = project.dossier.strength.model_copy(update={"known_cv": known_cv})
    p.dossier = project.dossier.model_copy(update={"strength": strength})
    return Context(p, RuleBook(p.dossier.rule_overrides))


def _registered(code):
    """The function registered under ``code`` (the fit and prediction checks are closures)."""
    return next(s.fn for s in checks() if s.code == code)


def test_aggregation_of_an_outlier_a_single_result_and_a_known_cv(demo_checked):
    # M1 compressive: four prisms at 7 d (2.40, 2.45, 2.50, 4.00 MPa) — Grubbs' test on four
    # (n >= 4, rule strength.grubbs_min_n) drops 4.00; one prism at 28 d (a single result: its
    # mean, no characteristic value); a fall of the mean from 7 to 28 d by more than 10 %
    # (rule strength.strength_drop) is a note; known CV 8 % (EN 1990 D7.2, variance known)
    rows = [(f"X-07-{i}", "M1", 7, "compressive", v, 20) for i, v in
            enumerate((2.40, 2.45, 2.50, 4.00), start=1)] + [("X-28-1", "M1", 28,
                                                               "compressive", 2.0, 20)]
    ctx = _ctx(demo_checked, rows, known_cv=0.08)
    got = stc.aggregate_check(ctx.project.mixes["M1"], ctx)
    x = [2.40, 2.45, 2.50, 4.00]
    g, gc, far = _grubbs(x)
    assert far == 3 and g > gc                     # 4.00 is the outlier (scipy, by hand)
    kept = x[:3]
    m, s = statistics.mean(kept), statistics.stdev(kept)
    kn = stats.t.ppf(0.95, 2) * math.sqrt(1 + 1 / 3)
    reason = f"G = {g:.3f} > G_crit = {gc:.3f} (n = 4, alpha = 0.05)"
    seven = Step(
        f"compressive at 7 d: characteristic value (n = 3)", FK,
        (Input("f_i", "X-07-1", 2.4, "MPa", "lab/strength.csv row 2"),
         Input("f_i", "X-07-2", 2.45, "MPa", "lab/strength.csv row 3"),
         Input("f_i", "X-07-3", 2.5, "MPa", "lab/strength.csv row 4"),
         Input("f_i", "X-07-4 (excluded)", 4.0, "MPa", f"lab/strength.csv row 5; {reason}"),
         Input("n", "results kept", 3, "", "count"),
         Input("f̄", "mean", round(m, 4), "MPa", "computed"),
         Input("s", "sample standard deviation", round(s, 4), "MPa", "computed (n − 1)"),
         Input("CV", "coefficient of variation", round(100 * s / m, 2), "%", "computed"),
         Input("k_n", "EN 1990 factor, variance unknown", round(kn, 4), "", KN_SOURCE)),
        rf"f_k = {m:.3f} - {kn:.3f} \times {s:.3f} = {m - kn * s:.3f}", round(m - kn * s, 4),
        "MPa", "f_k")
    single = Step("compressive at 28 d: mean of a single result", r"\bar{f} = \frac{1}{n}\sum_i f_i",
                  (Input("f_i", "X-28-1", 2.0, "MPa", "lab/strength.csv row 6"),
                   Input("n", "results kept", 1, "", "count"),
                   Input("f̄", "mean", 2.0, "MPa", "computed"),
                   Input("s", "sample standard deviation", 0.0, "MPa", "computed (n − 1)"),
                   Input("CV", "coefficient of variation", 0.0, "%", "computed")),
                  r"\bar{f} = 2.000", 2.0, "MPa", "f̄")
    # variance known (EN 1990 D7.2): k_n = u(0.95)·√(1 + 1/n); f_k = mean·(1 − k_n·V)
    known = []
    for age, mean, n in ((7, m, 3), (28, 2.0, 1)):
        k = stats.norm.ppf(0.95) * math.sqrt(1 + 1 / n)
        fk = mean * (1 - k * 0.08)
        known.append(Step(
            f"compressive at {age} d: characteristic value, variance known",
            r"f_k = \bar{f}\,(1 - k_n V)",
            (Input("f̄", "mean", round(mean, 4), "MPa", "computed"),
             Input("V", "known coefficient of variation", 8.0, "%",
                   "project input (dossier.yaml strength.known_cv)"),
             Input("k_n", "EN 1990 factor, variance known", round(k, 4), "",
                   "EN 1990 Annex D (D7.2): u(0.95)·√(1 + 1/n)")),
            rf"f_k = {mean:.3f} \times (1 - {k:.3f} \times 0.080) = {fk:.3f}", round(fk, 4),
            "MPa", "f_k"))
    assert got.steps == (seven, single, *known)
    assert got.status == "attention"
    assert got.notes == (
        f"excluded from the statistics and the fit: X-07-4: {reason}",
        f"compressive: the mean falls from {m:.3g} MPa at 7 d to 2 MPa at 28 d (more than "
        "10 %): check specimens, curing and the copying of the results")
    assert got.message == (f"compressive: 2 age(s) 7–28 d, mean 2 MPa at 28 d; 1 result(s) "
                           "excluded by Grubbs' test")
    q = {x.name: x for x in got.quantities}
    assert q["excluded_results"].value == [f"X-07-4: {reason}"]
    assert q["characteristic_strength"].value == {"compressive": {"7 d": round(m - kn * s, 4),
                                                                  "28 d": None}}
    k7 = stats.norm.ppf(0.95) * math.sqrt(1 + 1 / 3)
    k28 = stats.norm.ppf(0.95) * math.sqrt(2)
    assert q["characteristic_strength_known_cv"] == Quantity(
        "characteristic_strength_known_cv",
        {"compressive": {"7 d": round(m * (1 - k7 * 0.08), 4),
                         "28 d": round(2.0 * (1 - k28 * 0.08), 4)}},
        "MPa", "characteristic strength, variance known")


def test_implausible_results_are_flagged_not_fitted(demo_checked):
    # 350 "MPa" is a psi value typed under the MPa heading (lab mortars: well under 100 MPa)
    rows = [("P-07-1", "M2", 7, "compressive", 350.0, None),
            ("P-07-2", "M2", 7, "compressive", 2.1, None),
            ("P-07-3", "M2", 7, "compressive", 2.2, None)]
    ctx = _ctx(demo_checked, rows)
    got = stc.aggregate_check(ctx.project.mixes["M2"], ctx)
    assert got.status == "attention"
    assert got.notes[0].startswith("implausible: compressive P-07-1 (row 2): ")
    assert got.message.endswith("; 1 result(s) of implausible magnitude (psi or kPa typed as "
                                "MPa?); no result excluded by Grubbs' test")
    # the fit checks are registered closures: read them through the registry
    assert _registered("STR-FIT-C")(ctx.project.mixes["M2"], ctx).message == (
        "not assessed: results of implausible magnitude (see the aggregation check): correct "
        "the unit or the values before fitting")


def test_a_mix_without_results_is_not_assessed_whole(demo_checked):
    ctx = _ctx(demo_checked, [("Q-07-1", "M1", 7, "compressive", 2.0, None)])
    by = {s.code: s.fn for s in checks()}
    mix = ctx.project.mixes["M3"]
    agg = stc.aggregate_check(mix, ctx)
    assert (agg.status, agg.basis, agg.message) == (
        "not_assessed", (EN1990,), "not assessed: the project has no strength results for mix "
        "M3 (lab/strength.csv)")
    fit = by["STR-FIT-C"](mix, ctx)
    assert (fit.status, fit.basis, fit.message, fit.subject_kind) == (
        "not_assessed", (AICC,), "not assessed: no compressive results for mix M3; at least two "
        "(and for the two-component model five) distinct ages are needed", "mix")
    assert by["STR-FIT-F"](mix, ctx) == [] and by["STR-PRED-C"](mix, ctx) == []
    # one age only: the fit is refused with the science's reason
    one = by["STR-FIT-C"](ctx.project.mixes["M1"], ctx)
    assert one.status == "not_assessed" and "distinct ages" in one.message


LATEX = {  # the laws as EN 1992-1-1 eq. 3.2, the hyperbolic and the two-component law write them
    "EN 1992-1-1 age function (fitted s, f28)":
        r"f(t) = f_{28}\,\exp\left\{s\left[1 - (28/t)^{0.5}\right]\right\}",
    "hyperbolic law": r"f(t) = f_\infty\,\frac{t}{k + t}",
    "two-component model (aluminate + silicate)":
        (r"f(t) = f_A\left(1 - e^{-t/\tau_A}\right) + "
         r"f_S\left(1 - e^{-(t/\tau_S)^{b}}\right)"),
}
UNITS = {"f_28": "MPa", "s": "", "f_∞": "MPa", "k": "d", "f_A": "MPa", "f_S": "MPa",
         "τ_A": "d", "τ_S": "d", "b": ""}
# what each parameter is, read off the laws above: f_A + f_S is the strength approached when
# both exponentials have decayed; at t = k the hyperbolic law gives f_∞·k/(2k) = f_∞/2
WORDS = {"f_A": "strength gained in the aluminate stage",
         "τ_A": "time constant of the aluminate stage",
         "f_S": "strength gained in the silicate stage",
         "τ_S": "time constant of the silicate stage",
         "b": "stretch exponent of the silicate stage", "f_28": "strength at 28 d",
         "s": "coefficient s of the age function", "f_∞": "strength approached at great age",
         "k": "age at half that strength"}


@pytest.mark.parametrize("code, test", [("STR-FIT-C", "compressive"), ("STR-FIT-F", "flexural")])
@pytest.mark.parametrize("mix", ["M1", "M3"])
def test_fit_sheets_of_the_demo_whole(demo_checked, code, test, mix):
    _, results = demo_checked
    got = results.check(code, mix)
    n = sum(1 for r in _csv_rows() if r["mix"] == mix and r["test"] == test)
    assert n == 15                                   # 5 ages × 3 prisms (lab/strength.csv)
    assert (got.title, got.status, got.basis, got.unit) == (
        f"Strength-age model ({test})", "info", (AICC, EN1992), "")
    aicc = {}
    for step in got.steps:                          # no lab step: the demo cures at 20 °C
        title = step.title.rsplit(" (AICc", 1)[0]
        aicc[title] = step.result
        assert step.title == f"{title} (AICc {step.result:.2f})"
        assert (step.formula, step.unit, step.symbol) == (LATEX[title], "", "AICc")
        params = step.inputs[:-2]
        held = {i.symbol for i in params if i.source == "held (not fitted)"}
        assert held == ({"τ_A"} if title.startswith("two-component") else set())
        assert all(i.name == WORDS[i.symbol] and i.unit == UNITS[i.symbol] for i in params)
        assert all(i.source.startswith("fitted; standard error ") and
                   i.source.endswith(f" {UNITS[i.symbol]}".rstrip()) for i in params
                   if i.symbol not in held)
        # tau_A held at 60 min = 0.04167 d
        assert all(i.value == round(60 / 1440, 5) for i in params if i.symbol in held)
        assert step.inputs[-2:] == (
            Input("n", "results fitted", n, "",
                  "relative: weights 1/(mean at age)², constant CV assumed"),
            Input("ν", "degrees of freedom", n - len(params) + len(held), "",
                  "n − parameters"))
        p = {i.symbol: i.value for i in params}
        # the substituted law shows the parameters listed (to the decimals shown)
        if title.startswith("EN 1992"):
            assert step.substituted == (rf"f(t) = {p['f_28']:.3f}\,\exp\left\{{{p['s']:.3f}"
                                        r"\left[1 - (28/t)^{0.5}\right]\right\}")
        elif title.startswith("hyperbolic"):
            assert step.substituted == rf"f(t) = {p['f_∞']:.3f}\,\frac{{t}}{{{p['k']:.3f} + t}}"
        else:
            assert step.substituted == (
                rf"f(t) = {p['f_A']:.3f}\left(1 - e^{{-t/{p['τ_A']:.4f}}}\right) + "
                rf"{p['f_S']:.3f}\left(1 - e^{{-(t/{p['τ_S']:.2f})^{{{p['b']:.3f}}}}}\right)")
    best = min(aicc, key=aicc.get)
    assert got.steps[0].title.startswith(best) and got.value == best
    assert got.message == (f"{best} chosen by AICc from 3 model(s) fitted to {n} results at "
                           "5 ages")
    # Akaike weight of the chosen model: 1 / Σ exp(−Δ_i/2) (Burnham & Anderson sec. 2.9)
    w = 1 / sum(math.exp(-(a - aicc[best]) / 2) for a in aicc.values())
    assert got.notes[0].startswith(f"Chosen: {best} (AICc {aicc[best]:.2f}, Akaike weight "
                                   f"{w:.2f}, ")
    letter = code[-1]
    assert got.notes[-1] == (
        "for reference only: these curves are fitted without a prior and decide nothing; "
        "predictions and decisions rest on the two-stage law with the binder family's prior "
        f"(STR-INF-{letter}, STR-PRED-{letter})")
    q = {x.name: x for x in got.quantities}
    assert q["model_selected"].value[test] == {
        "EN 1992-1-1 age function (fitted s, f28)": "en1992_age", "hyperbolic law": "hyperbolic",
        "two-component model (aluminate + silicate)": "two_component"}[best]
    assert sorted(q["model_aicc"].value[test].values()) == sorted(aicc.values())


def test_fit_on_warm_lab_curing_shows_the_equivalent_age_step(demo_checked):
    # prisms cured at 30 °C: a_T = exp[−E/R (1/T − 1/T_r)] (ASTM C1074, Arrhenius), E the
    # default's value at 30 °C (above the 20 °C split: the constant 33.5 kJ/mol of
    # content/data/maturity_defaults.yaml), R = 8.314462618 J/(mol·K) (CODATA, scipy.constants)
    from scipy.constants import R
    rows = [(f"W-{a:02d}-{i}", "M1", a, "compressive", v, 30.0)
            for a, vals in ((1, (1.1, 1.2, 1.15)), (3, (1.7, 1.8, 1.75)), (7, (2.3, 2.4, 2.35)),
                            (28, (4.6, 4.8, 4.7)), (90, (7.4, 7.6, 7.5)))
            for i, v in enumerate(vals, start=1)]
    ctx = _ctx(demo_checked, rows)
    fit = _registered("STR-FIT-C")(ctx.project.mixes["M1"], ctx)
    lab = fit.steps[0]
    T, Tr, E = 303.15, 293.15, 33500.0
    a = math.exp(-E / R * (1 / T - 1 / Tr))
    assert round(R, 9) == 8.314462618          # CODATA 2018: N_A·k exactly, to 9 decimals
    assert (lab.title, lab.symbol, lab.unit) == (
        "Equivalent age of laboratory curing (fit on t_e = a_T · age)", "a_T", "")
    assert lab.formula == r"a_T = \exp\left[-\frac{E}{R}\left(\frac{1}{T} - \frac{1}{T_r}\right)\right]"
    assert lab.result == pytest.approx(round(a, 5), abs=2e-5)
    assert [(i.symbol, i.name, i.unit) for i in lab.inputs] == [
        ("E", "apparent activation energy at T", "kJ/mol"), ("R", "gas constant", "J/(mol·K)"),
        ("T", "curing temperature", "°C"), ("T_r", "reference temperature", "°C")]
    assert [i.value for i in lab.inputs] == [33.5, 8.314462618, 30.0, 20.0]
    assert [i.source for i in lab.inputs][1:] == [
        "CODATA (scipy.constants)", "lab/strength.csv",
        "maturity_defaults.yaml (EN 1015-11 curing at 20 °C)"]
    assert lab.substituted == (rf"a_T = \exp\left[-\frac{{33500}}{{8.3145}}\left(\frac{{1}}"
                               rf"{{303.15}} - \frac{{1}}{{293.15}}\right)\right] = {a:.4f}")


@pytest.mark.parametrize("code, test", [("STR-PRED-C", "compressive"), ("STR-PRED-F", "flexural")])
@pytest.mark.parametrize("mix", ["M1", "M2", "M3"])
def test_prediction_sheets_of_the_demo_whole(demo_checked, code, test, mix):
    # the ages: the dossier's required ages (dossier.yaml requirements.min_compressive: 28 and
    # 90 d) for compressive, 28 d for flexural, and the late ages of the rules (90 and 365 d);
    # the last tested age 90 d (lab/strength.csv); the extrapolation limit 3 (rule
    # strength.extrapolation_limit): 365 d > 3 × 90 d is indicative, never deciding
    _, results = demo_checked
    got = results.check(code, mix)
    inf = results.check(f"STR-INF-{code[-1]}", mix)
    assert (got.title, got.unit, got.status) == (f"Predicted strength ({test})", "MPa",
                                                 "attention")
    assert got.basis == (
        Basis("common practice", note="two-stage law with the binder family's prior "
              "(content/data/strength_priors.yaml); see STR-INF"),
        Basis("common practice", note="predictions beyond the extrapolation limit (rule "
              "strength.extrapolation_limit) are indicative only"))
    data = got.quantities[0].value[test]
    assert list(data) == ["28 d", "90 d", "365 d"]
    scatter = {i.symbol: (i.value, i.source) for i in inf.steps[1].inputs}
    where = {"28 d": "within the tested ages", "90 d": "within the tested ages",
             "365 d": "indicative: beyond the extrapolation limit"}
    for step, (age, d) in zip(got.steps, data.items()):
        assert step.title == f"{test} at {age} ({where[age]}); interval for the {d['n']}"
        assert d["n"] == "mean of the next set of 3 prisms"       # rule: 3 prisms a set
        assert (step.result, step.unit, step.symbol) == (d["value"], "MPa", "f̂")
        # the sheet's figures to 3 decimals, the quantities' to 4: equal within one unit
        # of the third decimal (the 4-decimal figure may sit on a rounding tie)
        want = (rf"\hat f = {d['value']:.3f};\ \text{{{d['n']}}}: [{d['pred_lower']:.3f},\ "
                rf"{d['pred_upper']:.3f}];\ \text{{mean curve}}: [{d['lower']:.3f},\ "
                rf"{d['upper']:.3f}]")
        assert re.sub(NUMBER, "#", step.substituted) == re.sub(NUMBER, "#", want)
        assert [float(x) for x in re.findall(NUMBER, step.substituted)] == pytest.approx(
            [float(x) for x in re.findall(NUMBER, want)], abs=1.001e-3)
        t, last, kx, sb, sw, q = step.inputs
        assert (t.symbol, t.name, t.value, t.unit, t.source) == (
            "t", "age (equivalent, at 20 °C)", float(age[:-2]), "d", "requirement or late age")
        assert (last.symbol, last.name, last.value, last.unit, last.source) == (
            "t_last", "last tested age", 90.0, "d", "STR-AGG")
        assert (kx.symbol, kx.name, kx.value, kx.unit, kx.source) == (
            "k_x", "extrapolation limit", 3.0, "×", "rule strength.extrapolation_limit "
            "(common practice)")
        # the scatter is STR-INF's, the same on both sheets
        assert (sb.symbol, sb.name, sb.unit, (sb.value, sb.source)) == (
            "σ_b", "scatter between batches", "%", scatter["σ_b"])
        assert (sw.symbol, sw.name, sw.unit, (sw.value, sw.source)) == (
            "σ_w", "scatter within a batch", "%", scatter["σ_w"])
        dof = float(q.name.split(", ")[1].removesuffix(" dof"))
        assert q.name == f"Student t, {dof:g} dof, 95 % two-sided"
        assert q.value == pytest.approx(round(stats.t.ppf(0.975, dof), 4), abs=1e-4)
        assert (q.symbol, q.unit, q.source) == ("q", "", "Student's t quantile computed with SciPy")
        assert d["extrapolated"] is (float(age[:-2]) > 90) and d["indicative"] is (age == "365 d")
        assert d["lower"] <= d["value"] <= d["upper"] and d["pred_lower"] < d["lower"]
        assert d["pred_upper"] > d["upper"]
    text = "; ".join(f"{k}: {v['value']:.3g} MPa, mean [{v['lower']:.3g}, {v['upper']:.3g}], "
                     f"next set [{v['pred_lower']:.3g}, {v['pred_upper']:.3g}]"
                     + (" (indicative)" if v["indicative"] else "") for k, v in data.items())
    assert got.message == (text + "; 365 d beyond 3× the last tested age (90 d): indicative, "
                           "never deciding")
    assert got.value == data["365 d"]["value"]
