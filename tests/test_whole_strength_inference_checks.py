"""STR-INF-C/F read whole on the demo (the session's checked demo) and on hand-made records in
memory: the prior beside the data, the scatter, the lack-of-fit test and the measured means.

Outside values: the demo's results read here from ``demo_project/lab/strength.csv``; the prior
ranges of ``content/data/strength_priors.yaml`` (common practice, each with its own source);
the lack-of-fit F test with pure error from replicates (Draper & Smith 1998, sec. 2.1):
SS_pe = Σ (ln y_ij − ȳ_i)², ν_pe = results − ages, SS_lof = Σ n_i (ȳ_i − ln f(t_i))², F =
(SS_lof/ν_lof)/(SS_pe/ν_pe), p by ``scipy.stats.f``; the two-stage law evaluated here from the
parameters the sheet lists; the within-batch scatter pooled with the prior's as a conjugate
variance update with ν0 = 4 degrees of freedom (common practice):
σ_w² = (ν0 σ0² + SS_pe)/(ν0 + ν_pe), σ0 the geometric middle of the prior's within-batch range.
"""
from __future__ import annotations

import copy
import csv
import math
import re
from collections import defaultdict
from types import SimpleNamespace as NS

import pytest
import yaml
from scipy import stats

from specgen.checks.registry import checks
from specgen.checks.result import Basis
from specgen.checks.rules import RuleBook
from specgen.checks.run import Context
from tests.conftest import DEMO

PRIOR = Basis("common practice", note="prior ranges of the binder family "
              "(content/data/strength_priors.yaml); ranges stated on the sheet")
LAPLACE = Basis("reference", "mackay2003", "Laplace approximation of a posterior, ch. 27; "
                "importance sampling, ch. 29")
LOF = Basis("reference", "draper1998", "lack-of-fit F test with pure error from replicates, "
            "sec. 2.1")
ROWS = {"M1": "natural_cement", "M2": "natural_cement", "M3": "nhl_3_5"}   # materials.yaml
TERMS = [("early_fraction", "φ", "early (fast-stage) fraction", ""),
         ("tau_fast_d", "τ_A", "fast-stage time constant", "d"),
         ("tau_slow_d", "τ_S", "slow-stage time constant", "d"),
         ("shape_b", "b", "slow-stage shape", ""),
         ("gain_365_28", "f365/f28", "one-year over 28-day strength", "")]
LAW = (r"f(t) = F\left[\varphi\left(1 - e^{-t/\tau_A}\right) + (1-\varphi)"
       r"\left(1 - e^{-(t/\tau_S)^{b}}\right)\right]")


def _priors():
    with open(DEMO.parent / "content" / "data" / "strength_priors.yaml", encoding="utf-8") as f:
        return yaml.safe_load(f)["data"]


def _logs(mix, test):
    """{age d: [ln MPa, ...]} of the demo's results (lab/strength.csv; cured at 20 °C, so the
    equivalent age is the age)."""
    out = defaultdict(list)
    with open(DEMO / "lab" / "strength.csv", newline="", encoding="utf-8") as f:
        for r in csv.DictReader(f):
            if (r["mix"], r["test"]) == (mix, test):
                out[float(r["age [d]"])].append(math.log(float(r["value [MPa]"])))
    return dict(sorted(out.items()))


def _law(p, t):
    """The two-stage law at t (d) with the sheet's parameters."""
    return p["F"] * (p["phi"] * (1 - math.exp(-t / p["tau_a"]))
                     + (1 - p["phi"]) * (1 - math.exp(-((t / p["tau_s"]) ** p["b"]))))


@pytest.mark.parametrize("code, test", [("STR-INF-C", "compressive"), ("STR-INF-F", "flexural")])
@pytest.mark.parametrize("mix", ["M1", "M2", "M3"])
def test_inference_sheet_of_the_demo_whole(demo_checked, code, test, mix):
    _, results = demo_checked
    got = results.check(code, mix)
    row = _priors()[ROWS[mix]]
    assert (got.title, got.subject_kind, got.unit, got.basis) == (
        f"Strength inference, prior and data ({test})", "mix", "", (PRIOR, LAPLACE, LOF))
    prior, scatter, lof, means = got.steps
    # -- the prior beside the data: each term's range and source as the table gives them
    assert prior.title == (f"Prior ({row['label']}) and data side by side; posterior mode by "
                           "penalised likelihood")
    assert (prior.formula, prior.unit, prior.symbol) == (LAW, "", "f365/f28")
    for (key, sym, name, unit), (a, b) in zip(TERMS, zip(prior.inputs[0:10:2],
                                                          prior.inputs[1:10:2])):
        lo, hi = row[key]["range"]
        assert (a.symbol, a.name, a.value, a.unit, a.source) == (
            sym, f"{name}: prior", f"{lo:.3g} to {hi:.3g}", unit, row[key]["source"])
        assert (b.symbol, b.name, b.unit) == (sym, f"{name}: prior and data", unit)
        assert b.source.startswith("posterior mode [central 95 %]")
        mode, low, high = (float(x) for x in b.value.replace("[", "").replace("]", "")
                           .replace(",", "").split())
        assert low <= mode <= high
    f_in, peff = prior.inputs[10:]
    assert (f_in.symbol, f_in.name, f_in.unit, f_in.source) == (
        "F", "long-term strength", "MPa", "fitted (flat prior on ln F)")
    assert (peff.symbol, peff.name, peff.unit, peff.source) == (
        "p_eff", "parameters the data determine", "", "tr[(JᵀJ)⁻¹ J_dᵀJ_d] at the mode")
    gain = prior.inputs[9].value.split()[0]
    assert f"{prior.result:.3g}" == gain and got.value == prior.result
    # the law's parameters as the substitution shows them; F as listed
    sub = prior.substituted
    # the sheet's own form of the law, every parameter written out (3 decimals, 4 figures)
    law = re.fullmatch(r"f\(t\) = (\S+)\\left\[(\S+)\\left\(1 - e\^\{-t/(\S+)\}\\right\) \+ "
                       r"(\S+)\\left\(1 - e\^\{-\(t/(\S+)\)\^\{(\S+)\}\}\\right\)\\right\]", sub)
    assert law, sub
    F, phi, tau_a, one_minus, tau_s, b_ = (float(x) for x in law.groups())
    assert F == pytest.approx(f_in.value, abs=6e-4) and one_minus == pytest.approx(1 - phi,
                                                                                   abs=1.1e-3)
    p = {"F": F, "phi": phi, "tau_a": tau_a, "tau_s": tau_s, "b": b_}
    # -- the scatter: σ_w pooled from the replicates (on ln y) and the prior's middle
    logs = _logs(mix, test)
    ss_pe = sum(sum((v - sum(g) / len(g)) ** 2 for v in g) for g in logs.values())
    nu_pe = sum(len(g) for g in logs.values()) - len(logs)
    w_lo, w_hi = row["within_cv"]["range"]
    s0 = math.sqrt(w_lo * w_hi)
    sw = math.sqrt((4 * s0 * s0 + ss_pe) / (4 + nu_pe))
    assert scatter.title == ("Scatter within and between batches (each tested age: one batch, "
                             "one curing history)")
    assert (scatter.formula, scatter.unit, scatter.symbol) == (
        r"v_i = \sigma_b^2 + \sigma_w^2/n_i", "%", "σ_b")
    w, bb, nu0 = scatter.inputs
    assert (w.symbol, w.name, w.unit) == ("σ_w", "scatter within one batch (log scale, ≈ CV)",
                                          "%")
    assert w.value == pytest.approx(100 * sw, abs=1e-3)
    assert w.source == (f"pooled replicates ({nu_pe} dof) with the prior's "
                        f"{100 * s0:.1f} % (4 dof)")
    assert (bb.symbol, bb.name, bb.unit) == ("σ_b", "scatter between batches (log scale, ≈ CV)",
                                             "%")
    assert (nu0.symbol, nu0.value, nu0.unit, nu0.source) == ("ν0", 4.0, "dof", "common practice")
    assert scatter.substituted == rf"\sigma_w = {sw:.4f},\ \sigma_b = {bb.value / 100:.4f}"
    assert scatter.result == bb.value
    # -- the lack of fit: pure error from the replicates, the law at each age (equivalent age
    #    = age: cured at 20 °C), F and p by scipy
    ss_lof = sum(len(g) * (sum(g) / len(g) - math.log(_law(p, t))) ** 2 for t, g in logs.items())
    sl, nl, sp, npe, alpha = lof.inputs
    assert (sl.symbol, sl.name, sl.source) == ("SS_lof", "lack-of-fit sum of squares (ln y)",
                                               "Σ n_i (ȳ_i − ln f(t_i))²")
    assert sl.value == pytest.approx(ss_lof, rel=0.02, abs=2e-5)
    assert (nl.symbol, nl.source) == ("ν_lof", "ages − p_eff")
    assert nl.value == pytest.approx(len(logs) - peff.value, abs=2e-3)
    assert (sp.symbol, sp.name, sp.source, sp.value) == (
        "SS_pe", "pure-error sum of squares", "Σ (ln y_ij − ȳ_i)², replicates", round(ss_pe, 6))
    assert (npe.symbol, npe.value, npe.source) == ("ν_pe", nu_pe, "results − ages")
    assert (alpha.symbol, alpha.name, alpha.value, alpha.unit, alpha.source) == (
        "α", "significance level", 0.05, "", "rule strength.lof_alpha")
    F_lof = (sl.value / nl.value) / (ss_pe / nu_pe)
    assert lof.result == pytest.approx(F_lof, rel=1e-3)
    p_lof = stats.f.sf(F_lof, nl.value, nu_pe)
    assert lof.title == "Lack of fit (pure error from the replicates)"
    assert lof.substituted.startswith(
        rf"F = \frac{{{sl.value:.5f}/{nl.value:.2f}}}{{{ss_pe:.5f}/{nu_pe:g}}} = "
        rf"{lof.result:.3f},\ p = ")
    assert float(lof.substituted.split(r"p = ")[1].split(r";")[0]) == pytest.approx(p_lof,
                                                                                   rel=2e-3)
    batch_high = row["batch_cv"]["range"][1]
    assert rf"\text{{allowing }}\sigma_b \le {batch_high:g}:\ p = " in lof.substituted
    # -- the measured means (geometric means of the kept results) against both intervals
    assert means.title == ("Measured means against the 95 % band for the mean curve and the "
                           "interval for a set of the same size")
    assert (means.unit, means.symbol, means.result) == ("", "misses", 0)
    for inp, (t, g) in zip(means.inputs, logs.items()):
        assert (inp.symbol, inp.name, inp.unit, inp.source) == (
            f"f̄({t:g} d)", f"measured mean of {len(g)} at {t:g} d", "MPa",
            "STR-AGG (geometric mean of the kept results)")
        assert inp.value == round(math.exp(sum(g) / len(g)), 4)
    assert len(means.inputs) == len(logs)
    # -- status, message and notes: the family row named, its prior common practice
    post_gain = prior.inputs[9].value
    mode, lo_, hi_ = (float(x) for x in post_gain.replace("[", "").replace("]", "")
                      .replace(",", "").split())
    glo, ghi = row["gain_365_28"]["range"]
    assert got.message.startswith(
        f"{row['label']}: one-year/28-day gain {prior.result:.2f} [")
    assert got.message.endswith(
        f"] (prior {glo:g}–{ghi:g}); scatter within a batch {100 * sw:.1f} %, between batches "
        f"{bb.value:.1f} %")
    reason = {"M1": "binder family natural cement", "M2": "binder family natural cement",
              "M3": "binder family natural hydraulic lime, declared NHL 3.5"}[mix]
    assert got.notes[:2] == (reason, "prior ranges are common practice "
                             "(content/data/strength_priors.yaml), not a published series: "
                             f"{row['label']}")
    assert got.status in ("info", "attention")
    if p_lof < 0.05:
        assert any(n.startswith("the means scatter about the curve more than the replicates do "
                                "(pure-error test p = ") for n in got.notes)
    rec = got.quantities[0].value[test]
    assert (rec["family"], rec["label"], rec["widest"], rec["n_set"], rec["last_age_d"]) == (
        ROWS[mix], row["label"], False, 3, 90.0)
    assert rec["prior"] == {k: [*row[k]["range"], row[k]["source"]] for k, *_ in TERMS}
    assert rec["lack_of_fit"]["dof"] == [nl.value, nu_pe]
    # the record's test figures are the sheet's: F, p and p with the batch scatter allowed
    p_batch = float(lof.substituted.rsplit("p = ", 1)[1])
    assert set(rec["lack_of_fit"]) == {"F", "p", "p_batch", "dof"}
    assert rec["lack_of_fit"]["F"] == lof.result
    assert rec["lack_of_fit"]["p"] == pytest.approx(p_lof, rel=2e-3, abs=1e-4)
    assert rec["lack_of_fit"]["p_batch"] == pytest.approx(p_batch, rel=5e-3, abs=1e-4)
    curve = got.quantities[1].value[test]
    assert (curve["n"], curve["level"], curve["usable"], curve["indicative_from_d"]) == (
        3, 0.95, True, 270.0)                     # 3 × the last tested age (90 d)
    assert curve["means"] == [[t, pytest.approx(v, abs=1e-4), pytest.approx(sd, abs=1e-4), n]
                              for t, v, sd, n in curve["means"]]
    assert [m[0] for m in curve["means"]] == list(logs)
    assert len(curve["specimens"]) == sum(len(g) for g in logs.values())
    # each specimen's residual against the law at the recorded posterior mode (5 decimals;
    # the sheet's φ to 3 decimals would move f by up to F × 0.0005, 0.4 % at 1 d):
    # 100 (y / f(t) − 1) %
    mode = {k: v[0] for k, v in rec["posterior"].items()}
    law = {"F": f_in.value, "phi": mode["early_fraction"], "tau_a": mode["tau_fast_d"],
           "tau_s": mode["tau_slow_d"], "b": mode["shape_b"]}
    assert [r[0] for r in curve["residuals_pct"]] == [a for a, _ in curve["specimens"]]
    assert [r[1] for r in curve["residuals_pct"]] == pytest.approx(
        [100 * (v / _law(law, a) - 1) for a, v in curve["specimens"]], abs=0.02)


def _ctx(demo_checked, rows):
    project, _ = demo_checked
    p = copy.copy(project)
    p.strength = [NS(specimen=f"H-{i}", mix=m, age=a * 86400.0, test="compressive",
                     value=v * 1e6, curing_temperature=None, row=i, file="lab/strength.csv")
                  for i, (m, a, v) in enumerate(rows, start=2)]
    return Context(p, RuleBook(p.dossier.rule_overrides))


def _inf(code):
    return next(s.fn for s in checks() if s.code == code)


def test_inference_of_too_short_or_absent_records_is_not_assessed(demo_checked):
    # two ages only (7 and 28 d): the two-stage law needs three
    ctx = _ctx(demo_checked, [("M1", 7, 2.1), ("M1", 7, 2.2), ("M1", 28, 4.0), ("M1", 28, 4.2)])
    got = _inf("STR-INF-C")(ctx.project.mixes["M1"], ctx)
    assert (got.status, got.basis, got.subject_kind) == ("not_assessed", (PRIOR,), "mix")
    assert got.message.startswith("not assessed: ")
    # no results of the mix: the sheet says which tests to make
    got = _inf("STR-INF-C")(ctx.project.mixes["M2"], ctx)
    assert got.message == ("not assessed: no compressive results for mix M2: test three prisms "
                           "at 7, 28 and 90 days at least")
    assert _inf("STR-INF-F")(ctx.project.mixes["M2"], ctx) == []


def test_a_later_age_far_weaker_is_held_with_the_reason(demo_checked):
    # the 28-d mean at half the 7-d one: a fall no scatter explains (a hold, never a fit)
    rows = [("M1", a, v) for a, vals in ((1, (1.2, 1.25, 1.18)), (7, (4.0, 4.1, 3.9)),
                                          (28, (2.0, 2.05, 1.95)), (90, (6.0, 6.2, 5.9)))
            for v in vals]
    ctx = _ctx(demo_checked, rows)
    got = _inf("STR-INF-C")(ctx.project.mixes["M1"], ctx)
    assert got.status == "hold"
    assert "the mean falls from 7 d to 28 d to 50 % of its value, more than the scatter " \
           "explains" in got.message
    assert got.notes[-1].endswith(": check the specimens, their curing and the copying of the "
                                  "results, and retest; the record is not used to predict")
    assert got.quantities[1].value["compressive"]["usable"] is False


def test_warm_cured_record_marks_indicative_ages_from_its_equivalent_age(demo_checked):
    # prisms cured at 25 °C (ASTM C1074, Arrhenius, E = 33.5 kJ/mol at or above 20 °C: from
    # memory, as content/data/maturity_defaults.yaml tags it): the last tested age in
    # equivalent days is 90 · a_T, and predictions are indicative beyond 3 times it (rule
    # strength.extrapolation_limit), shown to four decimals
    from scipy import constants
    project, _ = demo_checked
    p = copy.copy(project)
    p.strength = [NS(specimen=f"W-{a}-{k}", mix="M1", age=a * 86400.0, test="compressive",
                     value=m * (1 + 0.01 * k) * 1e6, curing_temperature=298.15, row=2,
                     file="lab/strength.csv")
                  for a, m in ((1, 1.2), (3, 1.8), (7, 2.4), (28, 4.8), (90, 7.6))
                  for k in (-1, 0, 1)]
    ctx = Context(p, RuleBook(p.dossier.rule_overrides))
    got = _inf("STR-INF-C")(p.mixes["M1"], ctx)
    a_t = math.exp(-33500.0 / constants.R * (1 / 298.15 - 1 / 293.15))
    curve = got.quantities[1].value["compressive"]
    assert curve["indicative_from_d"] == round(3 * 90 * a_t, 4)
    assert got.quantities[0].value["compressive"]["last_age_d"] == round(90 * a_t, 4)


def test_a_record_no_law_follows_is_a_misfit_on_every_sheet(demo_checked):
    # 0.3 MPa at 1 d, 4 MPa at 3 d, flat to 28 d, 12 at 90 d (±0.5 %): the law with the
    # natural-cement prior misses measured means even with a set's interval, so STR-INF says
    # so (attention) and no sheet predicts from it: STR-PRED, STR-MIN's untested ages,
    # STR-MAX and STR-SITE are not assessed with the same reasons
    from specgen.checks import strength_acceptance_checks as sac
    rows = [("M1", a, m * (1 + 0.005 * k)) for a, m in ((1, 0.3), (3, 4.0), (7, 4.2),
                                                       (28, 4.3), (90, 12.0)) for k in (-1, 0, 1)]
    ctx = _ctx(demo_checked, rows)
    mix = ctx.project.mixes["M1"]
    got = _inf("STR-INF-C")(mix, ctx)
    assert got.status == "attention"
    misfit = [n for n in got.notes if n.startswith("misfit: ")]
    assert [n.split(": ", 1)[1].split(" ")[0:2] for n in misfit] == [["lack", "of"],
                                                                     ["the", "interval"]]
    assert all(n.endswith("; the law is not used to predict") for n in misfit)
    each = [n.removeprefix("misfit: ").removesuffix("; the law is not used to predict")
            for n in misfit]
    reasons = "; ".join(each)
    assert got.message.endswith("; " + reasons)
    assert got.quantities[1].value["compressive"]["usable"] is False
    assert got.quantities[0].value["compressive"]["misfit"] == each
    pred = _inf("STR-PRED-C")(mix, ctx)
    assert (pred.status, pred.message) == ("not_assessed",
                                           f"not assessed: no prediction: {reasons}")
    mx = sac.maximum_check(mix, ctx)
    assert mx.message == (f"not assessed: no prediction of the long-term strength ({reasons})")
    site = sac.site_check(mix, ctx)
    assert site.message == f"not assessed: no strength prediction ({reasons})"
    mn = sac.minimum_check(mix, ctx)      # 28 and 90 d are tested: measured; none predicted
    assert [s.title.split(" (n")[0] for s in mn.steps] == [
        "measured at 28 d against the minimum", "measured at 90 d against the minimum"]


def test_a_binder_family_without_a_row_is_read_with_the_widest_prior(demo_checked):
    # M1's binder taken as a Portland cement: no row of strength_priors.yaml, so the widest
    # prior, and the sheet says so (attention)
    project, _ = demo_checked
    p = copy.copy(project)
    p.binders = {k: (b.model_copy(update={"type": "portland", "declared_class": ""})
                     if k == "NC1" else b) for k, b in project.binders.items()}
    p.strength = [r for r in project.strength if r.mix == "M1"]
    ctx = Context(p, RuleBook(p.dossier.rule_overrides))
    got = _inf("STR-INF-C")(p.mixes["M1"], ctx)
    widest = _priors()["widest"]
    assert got.status == "attention"
    assert got.notes[:3] == (
        "binder family Portland cement: no prior for this binder family in "
        "content/data/strength_priors.yaml, so the widest prior is used (the band is as wide "
        "as the families allow)",
        "no prior for this binder family: the widest prior is used",
        "prior ranges are common practice (content/data/strength_priors.yaml), not a published "
        f"series: {widest['label']}")
    lo, hi = widest["gain_365_28"]["range"]
    assert f"(prior {lo:g}–{hi:g})" in got.message
    rec = got.quantities[0].value["compressive"]
    assert (rec["family"], rec["widest"]) == ("widest", True)
