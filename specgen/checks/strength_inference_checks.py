"""STR-INF: the two-stage strength law fitted with the binder family's prior.

The calculation sheet shows the prior and the data side by side (prior range, posterior
estimate), the scatter within and between batches with where each comes from, the
lack-of-fit test (pure error from the replicates) and every measured mean against the
band for the mean curve and the interval for a set of its size.  The curves the strength
chapter draws are recorded here (``strength_curve``), so the chapter never refits.
"""
from __future__ import annotations

import math

import numpy as np

from specgen.checks import strength_common as sc
from specgen.checks import strength_prior_common as spc
from specgen.checks.registry import declare, register
from specgen.checks.result import Basis, CheckResult, Input, Step
from specgen.checks.strength_checks import CODE_OF, merged, not_assessed
from specgen.science import strength_inference as si

DAY, MPA = sc.DAY, sc.MPA
PRIOR = Basis("common practice", note="prior ranges of the binder family "
              "(content/data/strength_priors.yaml); ranges stated on the sheet")
LAPLACE = Basis("reference", "mackay2003", "Laplace approximation of a posterior, ch. 27; "
                "importance sampling, ch. 29")
LOF = Basis("reference", "draper1998", "lack-of-fit F test with pure error from replicates, "
            "sec. 2.1")

declare("strength_inference", "", "two-stage law fitted with the binder family's prior, by "
        "test kind: {family, widest, prior {term: [low, high, source]}, posterior {term: "
        "[mode, low, high]}, sigma_within_pct, sigma_batch_pct, lack_of_fit {F, p, p_batch, "
        "dof}, misfit, n_set}")
declare("strength_curve", "MPa", "curves drawn by the strength chapter, by test kind: "
        "{ages_d, value, mean_lo, mean_hi, pred_lo, pred_hi, aluminate, silicate, n, level, "
        "indicative_from_d, usable, specimens [[age_d, MPa]], means [[age_d, mean, sd, n]], "
        "residuals_pct [[age_d, %]]} (ages: equivalent ages at 20 °C)")

TERMS = {"early_fraction": ("φ", "early (fast-stage) fraction", ""),
         "tau_fast_d": ("τ_A", "fast-stage time constant", "d"),
         "tau_slow_d": ("τ_S", "slow-stage time constant", "d"),
         "shape_b": ("b", "slow-stage shape", ""),
         "gain_365_28": ("f365/f28", "one-year over 28-day strength", "")}
LAW = (r"f(t) = F\left[\varphi\left(1 - e^{-t/\tau_A}\right) + (1-\varphi)"
       r"\left(1 - e^{-(t/\tau_S)^{b}}\right)\right]")


def _check(test: str, order: int):
    code, title = f"STR-INF-{CODE_OF[test]}", f"Strength inference, prior and data ({test})"

    @register(code, title, "mix", order=order,
              description=f"two-stage law fitted to the {test} results with the binder "
                          "family's prior; lack of fit; measured means against the intervals")
    def check(mix, ctx):
        s = sc.cached(ctx).get((mix.id, test))
        if s is None or s.run is None:
            return [] if test == "flexural" else not_assessed(
                code, title, mix.id, f"no {test} results for mix {mix.id}: test three prisms "
                "at 7, 28 and 90 days at least", (PRIOR,))
        if s.run.inference is None:
            return not_assessed(code, title, mix.id, s.run.error, (PRIOR,))
        return _result(code, title, mix.id, s, ctx)
    return check


def _result(code, title, mix, s: sc.Series, ctx) -> CheckResult:
    run, inf = s.run, s.run.inference
    level = ctx.rules["strength.confidence_level"].value
    n = spc.set_size(ctx.project, ctx.rules)
    post = si.posterior_summary(inf)
    steps = (_prior_step(run, post), _scatter_step(inf), _lof_step(inf, ctx),
             _means_step(run, level))
    notes = [run.family.reason]
    if run.family.widest:
        notes.append("no prior for this binder family: the widest prior is used")
    notes += [f"prior ranges are common practice (content/data/strength_priors.yaml), not a "
              f"published series: {run.family.prior.label}"]
    if inf.lof.p_value is not None and inf.lof.p_value < ctx.rules["strength.lof_alpha"].value \
            and not run.misfit:
        notes.append(f"the means scatter about the curve more than the replicates do (pure-error "
                     f"test p = {inf.lof.p_value:.3g}); the prior's batch-to-batch scatter explains "
                     "it, and the intervals carry it")
    if run.mean_misses:
        notes.append("the band for the mean curve misses the measured mean at " + ", ".join(
            f"{a:.4g} d" for a in run.mean_misses) + "; the interval for a set (one batch) "
            "contains it: batch-to-batch scatter, carried by the prediction interval")
    notes += [f"misfit: {m}; the law is not used to predict" for m in run.misfit]
    if run.falls:
        notes.append(run.error)
    status = ("hold" if run.falls else "attention" if run.misfit or run.family.widest
              else "info")
    msg = (f"{run.family.prior.label}: one-year/28-day gain {post['gain_365_28'][0]:.2f} "
           f"[{post['gain_365_28'][1]:.2f}, {post['gain_365_28'][2]:.2f}] (prior "
           f"{inf.prior.terms['gain_365_28'].low:g}–{inf.prior.terms['gain_365_28'].high:g}); "
           f"scatter within a batch {100 * inf.sigma_w:.1f} %, between batches "
           f"{100 * inf.sigma_b:.1f} %" + ("; " + "; ".join(run.misfit) if run.misfit else "")
           + (f"; {run.error}" if run.falls else ""))
    return CheckResult(
        code=code, title=title, subject=mix, subject_kind="mix", status=status,
        value=round(post["gain_365_28"][0], 4), unit="", basis=(PRIOR, LAPLACE, LOF),
        steps=steps, message=msg, notes=tuple(notes),
        quantities=(merged(ctx, mix, "strength_inference", s.test, _record(run, post, n), "",
                           "two-stage law with the family's prior"),
                    merged(ctx, mix, "strength_curve", s.test, _curve(s, level, n, ctx),
                           "MPa", "curves for the strength figure")))


def _fmt(v: float) -> str:
    return f"{v:.3g}"


def _prior_step(run: spc.InferenceRun, post: dict) -> Step:
    inf, prior = run.inference, run.family.prior
    inputs = []
    for k, (sym, name, unit) in TERMS.items():
        t = prior.terms[k]
        m, lo, hi = post[k]
        inputs.append(Input(sym, f"{name}: prior", f"{_fmt(t.low)} to {_fmt(t.high)}", unit,
                            t.source))
        inputs.append(Input(sym, f"{name}: prior and data", f"{_fmt(m)} [{_fmt(lo)}, "
                            f"{_fmt(hi)}]", unit, _posterior_source(inf)))
    p = inf.params
    inputs.append(Input("F", "long-term strength", round(p["F"], 4), "MPa",
                        "fitted (flat prior on ln F)"))
    inputs.append(Input("p_eff", "parameters the data determine", round(inf.p_eff, 3), "",
                        "tr[(JᵀJ)⁻¹ J_dᵀJ_d] at the mode"))
    sub = (rf"f(t) = {p['F']:.3f}\left[{p['phi']:.3f}\left(1 - e^{{-t/{p['tau_a']:.4g}}}\right)"
           rf" + {1 - p['phi']:.3f}\left(1 - e^{{-(t/{p['tau_s']:.4g})^{{{p['b']:.3f}}}}}\right)"
           r"\right]")
    return Step(f"Prior ({prior.label}) and data side by side; posterior mode by penalised "
                "likelihood", LAW, tuple(inputs), sub, round(post["gain_365_28"][0], 4), "",
                "f365/f28")


def _posterior_source(inf: si.Inference) -> str:
    if inf.sampled:
        return (f"posterior mode [central 95 %]; the range from {si.DRAWS} importance-weighted "
                f"draws about the Laplace approximation (effective sample {inf.ess:.0f}), "
                f"resampled to {si.KEPT}")
    return (f"posterior mode [central 95 %], Laplace approximation (importance weights "
            f"degenerate: effective sample {inf.ess:.0f} < {si.MIN_ESS:g})")


def _scatter_step(inf: si.Inference) -> Step:
    inputs = (Input("σ_w", "scatter within one batch (log scale, ≈ CV)",
                    round(100 * inf.sigma_w, 3), "%", inf.sigma_w_source),
              Input("σ_b", "scatter between batches (log scale, ≈ CV)",
                    round(100 * inf.sigma_b, 3), "%", inf.sigma_b_source),
              Input("ν0", "weight of the prior's scatter", si.PRIOR_DOF, "dof",
                    "common practice"))
    return Step("Scatter within and between batches (each tested age: one batch, one curing "
                "history)", r"v_i = \sigma_b^2 + \sigma_w^2/n_i", inputs,
                rf"\sigma_w = {inf.sigma_w:.4f},\ \sigma_b = {inf.sigma_b:.4f}",
                round(100 * inf.sigma_b, 3), "%", "σ_b")


def _lof_step(inf: si.Inference, ctx) -> Step:
    lof, alpha = inf.lof, ctx.rules["strength.lof_alpha"].value
    inputs = (Input("SS_lof", "lack-of-fit sum of squares (ln y)", round(lof.ss_lof, 6), "",
                    "Σ n_i (ȳ_i − ln f(t_i))²"),
              Input("ν_lof", "its degrees of freedom", round(lof.dof_lof, 3), "",
                    "ages − p_eff"),
              Input("SS_pe", "pure-error sum of squares", round(lof.ss_pure, 6), "",
                    "Σ (ln y_ij − ȳ_i)², replicates"),
              Input("ν_pe", "its degrees of freedom", lof.dof_pure, "", "results − ages"),
              Input("α", "significance level", alpha, "", "rule strength.lof_alpha"))
    if lof.f is None:
        sub = (r"\text{not testable: no degrees of freedom for lack of fit or no replicates;"
               r" the prior carries the shape}")
        return Step("Lack of fit (pure error from the replicates)",
                    r"F = \frac{SS_{lof}/\nu_{lof}}{SS_{pe}/\nu_{pe}}", inputs, sub, None, "", "F")
    sub = (rf"F = \frac{{{lof.ss_lof:.5f}/{lof.dof_lof:.2f}}}{{{lof.ss_pure:.5f}/"
           rf"{lof.dof_pure:g}}} = {lof.f:.3f},\ p = {lof.p_value:.3g};\ "
           rf"\text{{allowing }}\sigma_b \le {inf.prior.batch_cv.high:g}:\ p = {inf.lof_batch_p:.3g}")
    return Step("Lack of fit (pure error from the replicates)",
                r"F = \frac{SS_{lof}/\nu_{lof}}{SS_{pe}/\nu_{pe}}", inputs, sub,
                round(lof.f, 4), "", "F")


def _means_step(run: spc.InferenceRun, level: float) -> Step:
    inf, inputs, subs = run.inference, [], []
    b = si.bands(inf, inf.ages, level, inf.counts)
    for i, (age, ml, n) in enumerate(zip(inf.ages, inf.means_log, inf.counts)):
        mean = math.exp(ml)
        inputs.append(Input(f"f̄({age:.4g} d)", f"measured mean of {n:g} at {age:.4g} d",
                            round(mean, 4), "MPa", "STR-AGG (geometric mean of the kept results)"))
        subs.append(rf"{age:.4g}\,\mathrm{{d}}: {mean:.3f} \in [{b['mean_lo'][i]:.3f},\ "
                    rf"{b['mean_hi'][i]:.3f}]_{{mean}},\ [{b['pred_lo'][i]:.3f},\ "
                    rf"{b['pred_hi'][i]:.3f}]_{{set}}")
    return Step(f"Measured means against the {100 * level:.0f} % band for the mean curve and the "
                "interval for a set of the same size",
                r",\quad ".join(si.interval_formulas(inf)),
                tuple(inputs), r";\ ".join(subs), len(run.outside), "", "misses")


def _record(run: spc.InferenceRun, post: dict, n: int) -> dict:
    inf, prior = run.inference, run.family.prior
    lof = inf.lof
    return {"family": prior.family, "label": prior.label, "widest": run.family.widest,
            "prior": {k: [t.low, t.high, t.source] for k, t in prior.terms.items()},
            "posterior": {k: [round(v, 5) for v in post[k]] for k in post},
            "sigma_within_pct": round(100 * inf.sigma_w, 3),
            "sigma_batch_pct": round(100 * inf.sigma_b, 3),
            "lack_of_fit": {"F": None if lof.f is None else round(lof.f, 4),
                            "p": None if lof.p_value is None else round(lof.p_value, 4),
                            "p_batch": None if inf.lof_batch_p is None
                            else round(inf.lof_batch_p, 4),
                            "dof": [round(lof.dof_lof, 3), lof.dof_pure]},
            "misfit": list(run.misfit), "n_set": n, "last_age_d": round(inf.last_age, 4)}


def _curve(s: sc.Series, level: float, n: int, ctx) -> dict:
    run, inf = s.run, s.run.inference
    top = ctx.rules["strength.late_age_2"].value
    ages = spc.curve_ages(inf.last_age, top)
    b = si.bands(inf, ages, level, n)
    comp = si.components(inf, ages)
    r4 = lambda a: [round(v, 4) for v in np.asarray(a, float).tolist()]  # noqa: E731
    pts = [(g.te / DAY, r.value / MPA) for g in s.groups for r in g.specimens]
    fitted = si.value(inf, [p[0] for p in pts])
    return {"ages_d": r4(ages), **{k: r4(v) for k, v in b.items()},
            **{k: r4(v) for k, v in comp.items()}, "n": n, "level": level,
            "specimens": [[round(a, 4), round(v, 4)] for a, v in pts],
            "means": [[round(g.te / DAY, 4), round(g.summary.mean / MPA, 4),
                       round(g.summary.sd / MPA, 4), g.summary.n] for g in s.groups],
            "residuals_pct": [[round(a, 4), round(100 * (v / f - 1), 3)]
                              for (a, v), f in zip(pts, fitted)],
            "indicative_from_d": round(ctx.rules["strength.extrapolation_limit"].value
                                       * inf.last_age, 4), "usable": run.ok}


for _i, _t in enumerate(sc.TESTS):
    _check(_t, 415 + _i)

