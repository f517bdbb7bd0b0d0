"""Checks on strength results: aggregation per age, model fit, predictions with bands.

Subjects are mixes; the test kind is in the code (``-C`` compressive, ``-F`` flexural)
or, for the aggregation, a key of the recorded quantities.  Numbers come from
``specgen.checks.strength_common`` (computed once per run); acceptance against the
dossier's requirements is in ``strength_acceptance_checks``.
"""
from __future__ import annotations

from specgen.checks import strength_common as sc
from specgen.checks import strength_prior_common as spc
from specgen.checks.registry import declare, register
from specgen.checks.result import Basis, CheckResult, Input, Quantity, Step, age_key  # noqa: F401
from specgen.checks.result import not_assessed as _not_assessed
from specgen.science import maturity, strength_inference as si, strength_models as sm

DAY, MPA = sc.DAY, sc.MPA
EN1990 = Basis("reference", "en1990", "Annex D, D7.2 (5 % fractile, normal distribution)")
GRUBBS = Basis("reference", "grubbs1969", "two-sided test for one outlier; see also ASTM E178")
AICC = Basis("reference", "burnham2002", "AICc and ΔAICc, sec. 2.4 and 2.6")
EN1992 = Basis("reference", "en1992", "eq. 3.2, age function of compressive strength")
C1074 = Basis("reference", "astmc1074", "equivalent age (Arrhenius) and temperature-time factor")

declare("mean_strength", "MPa", "mean strength by test kind and tested age")
declare("characteristic_strength", "MPa", "5 % characteristic strength by test kind and age "
        "(EN 1990 Annex D, variance unknown)")
declare("characteristic_strength_known_cv", "MPa", "5 % characteristic strength by test kind "
        "and age with the project's known coefficient of variation")
declare("strength_cv", "%", "replicate coefficient of variation by test kind and age")
declare("excluded_results", "", "specimens excluded by the outlier screen, with the reason")
declare("model_selected", "", "strength-age model chosen by AICc, by test kind")
declare("fit_parameters", "", "fitted parameters by test kind, each {value, se, unit} in SI")
declare("model_aicc", "", "AICc of every fitted model, by test kind")
declare("predicted_strength", "MPa", "predicted mean strength by test kind and age, with the "
        "band {value, lower, upper, extrapolated, widened}")

LATEX = {
    "two_component": (r"f(t) = f_A\left(1 - e^{-t/\tau_A}\right) + "
                      r"f_S\left(1 - e^{-(t/\tau_S)^{b}}\right)"),
    "en1992_age": r"f(t) = f_{28}\,\exp\left\{s\left[1 - (28/t)^{0.5}\right]\right\}",
    "hyperbolic": r"f(t) = f_\infty\,\frac{t}{k + t}",
}
# Each fitted parameter as the sheet shows it: (symbol as in LATEX, what it is, read off the law)
PARAMETERS = {
    "f_A": ("f_A", "strength gained in the aluminate stage"),
    "tau_A": ("τ_A", "time constant of the aluminate stage"),
    "f_S": ("f_S", "strength gained in the silicate stage"),
    "tau_S": ("τ_S", "time constant of the silicate stage"),
    "b": ("b", "stretch exponent of the silicate stage"),
    "f28": ("f_28", "strength at 28 d"),
    "s": ("s", "coefficient s of the age function"),
    "f_inf": ("f_∞", "strength approached at great age"),
    "k": ("k", "age at half that strength"),
}
# Display of fitted parameters: SI unit -> (shown unit, divisor)
SHOWN = {"Pa": ("MPa", MPA), "s": ("d", DAY), "1": ("", 1.0)}
CODE_OF = {"compressive": "C", "flexural": "F"}


def mpa(v: float | None) -> float | None:
    return None if v is None else round(v / MPA, 4)


def merged(ctx, subject: str, name: str, key: str, value, unit: str, label: str) -> Quantity:
    """A dict quantity with ``key`` added to what an earlier check recorded under ``name``."""
    old = ctx.quantity(subject, name)
    data = dict(old.value) if old and isinstance(old.value, dict) else {}
    data[key] = value
    return Quantity(name, dict(sorted(data.items())), unit, label)


def not_assessed(code: str, title: str, mix: str, reason: str, basis=(AICC,)) -> CheckResult:
    """Not assessed, for a mix (the model-selection basis unless another is given)."""
    return _not_assessed(code, title, mix, "mix", basis, reason)


def series_of(ctx, mix: str) -> list[sc.Series]:
    return [s for (m, _), s in sc.cached(ctx).items() if m == mix]


# ---------------------------------------------------------------- aggregation
@register("STR-AGG", "Strength results per age", "mix", order=400)
def aggregate_check(mix, ctx) -> CheckResult:
    """n, mean, SD, CV and characteristic value of each tested age; outliers screened."""
    series = series_of(ctx, mix.id)
    title = "Strength results per age"
    if not series:
        return not_assessed("STR-AGG", title, mix.id, "the project has no strength results "
                            f"for mix {mix.id} (lab/strength.csv)", (EN1990,))
    steps = tuple(_group_step(g) for s in series for g in s.groups)
    steps += tuple(_known_step(g, ctx) for s in series for g in s.groups if g.known)
    excluded = [f"{r.specimen}: {why}" for s in series for g in s.groups for r, why in g.flagged]
    drops = [d for s in series for d in _drops(s, ctx.rules["strength.strength_drop"].value)]
    implausible = [f"{s.test} {m}" for s in series for m in s.implausible]
    kept = [f"{r.specimen}: {why}" for s in series for g in s.groups for r, why in g.noted]
    notes = tuple(f"implausible: {m}" for m in implausible) + tuple(
        f"excluded from the statistics and the fit: {e}" for e in excluded) + tuple(drops)
    status = "attention" if notes or any("upper bound" not in k for k in kept) else "info"
    notes += tuple(f"flagged by Grubbs' test but kept (group of fewer than "
                   f"{ctx.rules['strength.grubbs_min_n'].value:g}): {k}" for k in kept)
    msg = "; ".join(_summary_text(s) for s in series)
    if implausible:
        msg += f"; {len(implausible)} result(s) of implausible magnitude (psi or kPa typed as MPa?)"
    msg += (f"; {len(excluded)} result(s) excluded by Grubbs' test" if excluded
            else "; no result excluded by Grubbs' test")
    return CheckResult(
        code="STR-AGG", title=title, subject=mix.id, subject_kind="mix", status=status,
        value=_headline(series), unit="MPa", basis=(EN1990, GRUBBS), steps=steps,
        message=msg, notes=notes, quantities=_agg_quantities(series, excluded))


def _group_step(g: sc.Group) -> Step:
    n, m, sd = g.summary.n, g.summary.mean / MPA, g.summary.sd / MPA
    inputs = [Input("f_i", r.specimen, round(r.value / MPA, 4), "MPa",
                    f"{r.file} row {r.row}") for r in g.kept]
    inputs += [Input("f_i", f"{r.specimen} (excluded)", round(r.value / MPA, 4), "MPa",
                     f"{r.file} row {r.row}; {why}") for r, why in g.flagged]
    noted = {r.specimen for r, _ in g.noted}
    inputs = [Input(i.symbol, i.name + " (flagged, kept)", i.value, i.unit, i.source)
              if i.name in noted else i for i in inputs]
    inputs += [Input("n", "results kept", n, "", "count"),
               Input("f̄", "mean", round(m, 4), "MPa", "computed"),
               Input("s", "sample standard deviation", round(sd, 4), "MPa", "computed (n − 1)"),
               Input("CV", "coefficient of variation", round(100 * g.summary.cv, 2), "%",
                     "computed")]
    what = f"{g.test} at {g.age / DAY:g} d"
    if g.characteristic is None:
        return Step(f"{what}: mean of a single result", r"\bar{f} = \frac{1}{n}\sum_i f_i",
                    tuple(inputs), rf"\bar{{f}} = {m:.3f}", round(m, 4), "MPa", "f̄")
    c = g.characteristic
    inputs.append(Input("k_n", "EN 1990 factor, variance unknown", round(c.k_n, 4), "",
                        "EN 1990 Annex D (D7.2): t(0.95, n−1)·√(1 + 1/n), Student's t quantile "
                        "computed with SciPy"))
    return Step(
        f"{what}: characteristic value (n = {n})",
        r"f_k = \bar{f} - k_n\,s,\quad k_n = t_{0.95,\,n-1}\sqrt{1 + 1/n}", tuple(inputs),
        rf"f_k = {m:.3f} - {c.k_n:.3f} \times {sd:.3f} = {c.value / MPA:.3f}",
        round(c.value / MPA, 4), "MPa", "f_k")


def _known_step(g: sc.Group, ctx) -> Step:
    c, cv = g.known, ctx.project.dossier.strength.known_cv
    inputs = (Input("f̄", "mean", round(c.mean / MPA, 4), "MPa", "computed"),
              Input("V", "known coefficient of variation", round(100 * cv, 2), "%",
                    "project input (dossier.yaml strength.known_cv)"),
              Input("k_n", "EN 1990 factor, variance known", round(c.k_n, 4), "",
                    "EN 1990 Annex D (D7.2): u(0.95)·√(1 + 1/n)"))
    return Step(f"{g.test} at {g.age / DAY:g} d: characteristic value, variance known",
                r"f_k = \bar{f}\,(1 - k_n V)", inputs,
                rf"f_k = {c.mean / MPA:.3f} \times (1 - {c.k_n:.3f} \times {cv:.3f}) = "
                rf"{c.value / MPA:.3f}", round(c.value / MPA, 4), "MPa", "f_k")


def _drops(s: sc.Series, limit: float) -> list[str]:
    out = []
    for a, b in zip(s.groups, s.groups[1:]):
        if b.summary.mean < (1 - limit) * a.summary.mean:
            out.append(f"{s.test}: the mean falls from {a.summary.mean / MPA:.3g} MPa at "
                       f"{a.age / DAY:g} d to {b.summary.mean / MPA:.3g} MPa at {b.age / DAY:g} d "
                       f"(more than {100 * limit:g} %): check specimens, curing and the copying of the results")
    return out


def _summary_text(s: sc.Series) -> str:
    ages = [g.age / DAY for g in s.groups]
    last = s.groups[-1]
    fk = f", f_k {last.characteristic.value / MPA:.3g} MPa" if last.characteristic else ""
    return (f"{s.test}: {len(ages)} age(s) {ages[0]:g}–{ages[-1]:g} d, mean "
            f"{last.summary.mean / MPA:.3g} MPa at {last.age / DAY:g} d{fk}")


def _headline(series) -> float | None:
    comp = [s for s in series if s.test == "compressive"]
    return mpa(comp[0].groups[-1].summary.mean) if comp else None


def _agg_quantities(series, excluded) -> tuple[Quantity, ...]:
    per = lambda f: {s.test: {age_key(g.age): f(g) for g in s.groups} for s in series}  # noqa: E731
    q = [Quantity("mean_strength", per(lambda g: mpa(g.summary.mean)), "MPa", "mean strength"),
         Quantity("characteristic_strength", per(lambda g: mpa(g.characteristic.value)
                                                 if g.characteristic else None), "MPa",
                  "characteristic strength (EN 1990 Annex D, variance unknown)"),
         Quantity("strength_cv", per(lambda g: round(100 * g.summary.cv, 3)), "%",
                  "replicate coefficient of variation"),
         Quantity("excluded_results", excluded, "", "excluded by the outlier screen")]
    if any(g.known for s in series for g in s.groups):
        q.append(Quantity("characteristic_strength_known_cv",
                          per(lambda g: mpa(g.known.value) if g.known else None), "MPa",
                          "characteristic strength, variance known"))
    return tuple(q)


# ---------------------------------------------------------------- model fit
def _fit_check(test: str, order: int):
    code, title = f"STR-FIT-{CODE_OF[test]}", f"Strength-age model ({test})"

    @register(code, title, "mix", order=order,
              description=f"fit every strength-age model to the {test} results; AICc choice")
    def check(mix, ctx):
        s = sc.cached(ctx).get((mix.id, test))
        if s is None:
            return [] if test == "flexural" else not_assessed(
                code, title, mix.id, f"no {test} results for mix {mix.id}; at least two "
                "(and for the two-component model five) distinct ages are needed")
        if s.fit is None:
            return not_assessed(code, title, mix.id, s.fit_error)
        return _fit_result(code, title, mix.id, s, ctx)
    return check


def _fit_result(code, title, mix, s: sc.Series, ctx) -> CheckResult:
    sel, best = s.selection, s.fit
    lab = _lab_step(s, ctx)
    steps = (lab,) if lab else ()
    steps += tuple(_model_step(f) for f in sel.fits)
    notes = [sel.reasoning] + [f"{f.title}: {n}" for f in sel.fits for n in f.notes]
    notes.append(f"for reference only: these curves are fitted without a prior and decide nothing; "
                 f"predictions and decisions rest on the two-stage law with the binder family's "
                 f"prior (STR-INF-{CODE_OF[s.test]}, STR-PRED-{CODE_OF[s.test]})")
    st = sc.settings(ctx.project)
    if steps and steps[0].symbol == "a_T" and st.warning:
        notes.append(st.warning)
    params = {n: {"value": v, "se": best.std_errors.get(n), "unit": best.units[n]}
              for n, v in best.params.items()}
    params.update({n: {"value": v, "se": None, "unit": best.units[n], "held": True}
                   for n, v in best.fixed.items()})
    q = (merged(ctx, mix, "model_selected", s.test, best.model, "", "model chosen by AICc"),
         merged(ctx, mix, "fit_parameters", s.test, params, "", "fitted parameters (SI)"),
         merged(ctx, mix, "model_aicc", s.test, {f.model: round(f.aicc, 4) for f in sel.fits},
                "", "AICc of each model"))
    return CheckResult(
        code=code, title=title, subject=mix, subject_kind="mix", status="info",
        value=best.title, unit="", basis=(AICC, EN1992), steps=steps,
        message=f"{best.title} chosen by AICc from {len(sel.fits)} model(s) fitted to "
                f"{best.n_obs} results at {best.n_ages} ages",
        notes=tuple(notes), quantities=q)


def _model_step(f: sm.FitResult) -> Step:
    inputs, subs = [], {}
    for name, v in {**f.params, **f.fixed}.items():
        unit, div = SHOWN[f.units[name]]
        se = f.std_errors.get(name)
        src = "held (not fitted)" if name in f.fixed else (
            f"fitted; standard error {se / div:.3g} {unit}".strip() if se is not None else "fitted")
        symbol, words = PARAMETERS[name]
        inputs.append(Input(symbol, words, round(v / div, 5), unit, src))
        subs[name] = v / div
    inputs += [Input("n", "results fitted", f.n_obs, "", f.weighting),
               Input("ν", "degrees of freedom", f.dof, "", "n − parameters")]
    return Step(f"{f.title} (AICc {f.aicc:.2f})", LATEX[f.model], tuple(inputs),
                _substituted(f.model, subs), round(f.aicc, 4), "", "AICc")


def _substituted(model: str, p: dict) -> str:
    if model == "two_component":
        return (rf"f(t) = {p['f_A']:.3f}\left(1 - e^{{-t/{p['tau_A']:.4f}}}\right) + "
                rf"{p['f_S']:.3f}\left(1 - e^{{-(t/{p['tau_S']:.2f})^{{{p['b']:.3f}}}}}\right)")
    if model == "en1992_age":
        return rf"f(t) = {p['f28']:.3f}\,\exp\left\{{{p['s']:.3f}\left[1 - (28/t)^{{0.5}}\right]\right\}}"
    return rf"f(t) = {p['f_inf']:.3f}\,\frac{{t}}{{{p['k']:.3f} + t}}"


def _lab_step(s: sc.Series, ctx) -> Step | None:
    """Equivalent age of lab curing, shown only when some specimen was not cured at Tref."""
    st = sc.settings(ctx.project)
    temps = sorted({r.curing_temperature for g in s.groups for r in g.kept
                    if r.curing_temperature is not None
                    and abs(r.curing_temperature - st.t_ref) > 0.05})
    if not temps:
        return None
    t = temps[0]
    a = sc.lab_factor(t, st)
    e_t = float(maturity.arrhenius_energy(st.energy, t))
    inputs = (Input("E", "apparent activation energy at T", round(e_t / 1000, 3), "kJ/mol",
                    f"{st.energy_text}; {st.energy_source}"),
              Input("R", "gas constant", 8.314462618, "J/(mol·K)", "CODATA (scipy.constants)"),
              Input("T", "curing temperature", round(t - 273.15, 2), "°C", "lab/strength.csv"),
              Input("T_r", "reference temperature", round(st.t_ref - 273.15, 2), "°C",
                    "maturity_defaults.yaml (EN 1015-11 curing at 20 °C)"))
    return Step("Equivalent age of laboratory curing (fit on t_e = a_T · age)",
                r"a_T = \exp\left[-\frac{E}{R}\left(\frac{1}{T} - \frac{1}{T_r}\right)\right]",
                inputs, rf"a_T = \exp\left[-\frac{{{e_t:.0f}}}{{8.3145}}"
                rf"\left(\frac{{1}}{{{t:.2f}}} - \frac{{1}}{{{st.t_ref:.2f}}}\right)\right] = "
                rf"{a:.4f}", round(a, 5), "", "a_T")


# ---------------------------------------------------------------- predictions
def prediction_ages(ctx, test: str) -> list[float]:
    """Requirement ages (compressive) plus the two late ages of the rules, in s, sorted."""
    r = ctx.rules
    ages = {r["strength.late_age_1"].value * DAY, r["strength.late_age_2"].value * DAY}
    if test == "compressive":
        ages |= {m.age for m in ctx.project.dossier.requirements.min_compressive}
    else:
        ages.add(28 * DAY)
    return sorted(ages)


def _pred_check(test: str, order: int):
    code, title = f"STR-PRED-{CODE_OF[test]}", f"Predicted strength ({test})"

    @register(code, title, "mix", order=order,
              description=f"{test} strength predicted at requirement and late ages: band for "
                          "the mean curve and interval for the next set of site prisms")
    def check(mix, ctx):
        s = sc.cached(ctx).get((mix.id, test))
        if s is None or s.run is None:
            return []        # the inference check says why
        if not s.run.ok:
            why = "; ".join(s.run.misfit) or s.run.error
            return not_assessed(code, title, mix.id, f"no prediction: {why}", (PRIOR_BASIS,))
        return _pred_result(code, title, mix.id, s, ctx)
    return check


PRIOR_BASIS = Basis("common practice", note="two-stage law with the binder family's prior "
                    "(content/data/strength_priors.yaml); see STR-INF")
INDICATIVE = Basis("common practice", note="predictions beyond the extrapolation limit "
                   "(rule strength.extrapolation_limit) are indicative only")


def interval(s: sc.Series, age_s: float, kind: str, ctx, n: float | None = None):
    """The inference interval at ``age_s`` (s): 'mean' (band for the mean curve) or 'set'
    (mean of the next set of ``n`` prisms; default the site set size; inf: one batch)."""
    n = spc.set_size(ctx.project, ctx.rules) if n is None else n
    return si.interval(s.run.inference, age_s / DAY, kind,
                       ctx.rules["strength.confidence_level"].value, n,
                       ctx.rules["strength.extrapolation_limit"].value)


def _pred_result(code, title, mix, s: sc.Series, ctx) -> CheckResult:
    steps, data, indicative = [], {}, []
    si.bands_each(s.run.inference, [a / DAY for a in prediction_ages(ctx, s.test)],
                  ctx.rules["strength.confidence_level"].value,
                  spc.set_size(ctx.project, ctx.rules))   # the ages' intervals made together
    for age in prediction_ages(ctx, s.test):
        m, p = interval(s, age, "mean", ctx), interval(s, age, "set", ctx)
        steps.append(pred_step(s, p, ctx, mean=m))
        data[age_key(age)] = {"value": round(m.value, 4), "lower": round(m.lower, 4),
                              "upper": round(m.upper, 4), "pred_lower": round(p.lower, 4),
                              "pred_upper": round(p.upper, 4), "n": p.kind,
                              "extrapolated": age / DAY > s.run.inference.last_age * (1 + 1e-9),
                              "indicative": m.indicative}
        if m.indicative:
            indicative.append(age_key(age))
    text = "; ".join(f"{k}: {v['value']:.3g} MPa, mean [{v['lower']:.3g}, {v['upper']:.3g}], "
                     f"next set [{v['pred_lower']:.3g}, {v['pred_upper']:.3g}]"
                     + (" (indicative)" if v["indicative"] else "") for k, v in data.items())
    if indicative:
        text += (f"; {', '.join(indicative)} beyond "
                 f"{ctx.rules['strength.extrapolation_limit'].value:g}× the last tested age "
                 f"({s.run.inference.last_age:g} d): indicative, never deciding")
    basis = (PRIOR_BASIS,) + ((INDICATIVE,) if indicative else ())
    return CheckResult(
        code=code, title=title, subject=mix, subject_kind="mix",
        status="attention" if indicative else "info",
        value=data[max(data, key=lambda k: float(k[:-2]))]["value"] if data else None,
        unit="MPa", basis=basis, steps=tuple(steps), message=text,
        quantities=(merged(ctx, mix, "predicted_strength", s.test, data, "MPa",
                           "predicted strength: band for the mean and interval for the next set"),))


def pred_step(s: sc.Series, iv, ctx, prefix: str = "", mean=None) -> Step:
    """Calculation of one inference interval (``iv``), with the mean band beside it."""
    inf, level = s.run.inference, iv.level
    limit = ctx.rules["strength.extrapolation_limit"].value
    inputs = [Input("t", "age (equivalent, at 20 °C)", round(iv.age, 3), "d",
                    prefix or "requirement or late age"),
              Input("t_last", "last tested age", round(inf.last_age, 3), "d", "STR-AGG"),
              Input("k_x", "extrapolation limit", limit, "×", "rule strength.extrapolation_limit "
                    "(common practice)"),
              Input("σ_b", "scatter between batches", round(100 * inf.sigma_b, 3), "%",
                    inf.sigma_b_source),
              Input("σ_w", "scatter within a batch", round(100 * inf.sigma_w, 3), "%",
                    inf.sigma_w_source),
              Input("q", f"Student t, {inf.dof:g} dof, {100 * level:.0f} % two-sided",
                    round(inf.quantile(level), 4), "",
                    "Student's t quantile computed with SciPy")]
    sub = rf"\hat f = {iv.value:.3f};\ \text{{{iv.kind}}}: [{iv.lower:.3f},\ {iv.upper:.3f}]"
    if mean is not None:
        sub += rf";\ \text{{mean curve}}: [{mean.lower:.3f},\ {mean.upper:.3f}]"
    where = ("indicative: beyond the extrapolation limit" if iv.indicative else
             "extrapolated" if iv.age > inf.last_age * (1 + 1e-9) else "within the tested ages")
    # "the mean curve", "the mean of the next set of 3 prisms", but "one batch" (no article)
    kind = iv.kind if iv.kind == "one batch" else f"the {iv.kind}"
    title = (f"{prefix}: t_e = {iv.age:.4g} d ({where}); interval for {kind}" if prefix
             else f"{s.test} at {iv.age:g} d ({where}); interval for {kind}")
    return Step(title,
                si.interval_formulas(inf)[1 if iv.kind != "mean curve" else 0],
                tuple(inputs), sub, round(iv.value, 4), "MPa", "f̂")


for _i, _t in enumerate(sc.TESTS):
    _fit_check(_t, 410 + _i)
    _pred_check(_t, 420 + _i)
