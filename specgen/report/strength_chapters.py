"""The strength-development chapter: per mix, the figures, predictions with both intervals,
how the intervals narrowed over the revisions and the findings (linked to the calculation
sheets); and its appendix, the record in detail: aggregates, prior and data, model
comparison and residuals.

Everything shown is read from Results (``results.json`` names, see DEVELOPERS.md): the
fitted curves and interval arrays are recorded by STR-INF, the in-wall curve by STR-SITE.
Nothing is refitted or recomputed here.
"""
from __future__ import annotations

from specgen.checks.result import key_days
from specgen.report.chapters import badge, chapter, sheet_anchor
from specgen.report.fmt import UNIT_SPACE, and_list, anchor, num, rounded
from specgen.report.wording import plain, reader

TERMS = {"early_fraction": ("early (fast-stage) fraction", ""),
         "tau_fast_d": ("fast-stage time constant", "d"),
         "tau_slow_d": ("slow-stage time constant", "d"),
         "shape_b": ("slow-stage shape b", ""),
         "gain_365_28": ("one-year / 28-day strength", "")}

#: the equivalent-age methods by their names (ASTM C1074)
METHOD_NAMES = {"arrhenius": "Arrhenius", "nurse_saul": "Nurse–Saul"}


@chapter("strength.md", "Strength development", "strength.md.j2", sections=True)  # a mix a page
def strength(env) -> dict:
    p, r = env.project, env.results
    rules = r.rules  # the rules in force for the checks
    mixes = [_mix(env, m, rules) for m in p.mixes.values() if r.value(m.id, "mean_strength")]
    site = next((c for c in r.checks if c.code == "STR-SITE" and c.steps), None)
    energy = next((i for i in site.steps[0].inputs if i.symbol == "E"), None) if site else None
    held = next((c for c in r.checks if c.code == "STR-SITE"), None)   # not assessed: why
    return {"mixes": mixes, "has_data": bool(mixes),
            "warning": next((n for n in (site.notes if site else ()) if "must be measured" in n),
                            ""),
            "energy": f"{energy.value} ({plain(energy.source)})" if energy else "",
            "method": METHOD_NAMES.get((r.value(site.subject, "equivalent_age") or {}).get(
                "method", ""), "") if site else "",
            "site": plain(p.site_temperature.source) if p.site_temperature else "",
            "no_site": "" if site else reader(held.message).rstrip(".") if held else
            "this revision gives neither a site temperature nor a load strength",
            "limit": f"{rules['strength.extrapolation_limit'].value:g}",
            "level": f"{100 * rules['strength.confidence_level'].value:g} %"}


def _mix(env, mix, rules) -> dict:
    r = env.results
    results = [{"code": c.code, "title": c.title, "badge": badge(c.status), "message": reader(c.message),
                "href": f"calculations.md#{sheet_anchor(c)}"}
               for c in r.checks if c.subject == mix.id and c.code.startswith("STR-")]
    means = r.value(mix.id, "mean_strength") or {}
    curves = r.value(mix.id, "strength_curve") or {}
    figures = [env.figure(f"figures/strength-{mix.id}-{test}.svg", *_figure(
                          env, mix, test, curves.get(test), rules,
                          f"{mix.id}: {test} strength against age"
                          + (" — two-stage law with the family's prior, band for the mean and "
                             "interval for the next set" if test in curves else "")))
               for test in means]
    return {"id": mix.id, "name": mix.name, "anchor": anchor(mix.id),
            "predictions": _predictions(r.value(mix.id, "predicted_strength") or {}),
            "narrowing": _narrowing(env, mix.id), "results": results, "figures": figures}


@chapter("strength-detail.md", "Strength records in detail", "strength_detail.md.j2",
         volume="appendix", sections=True)
def strength_detail(env) -> dict:
    """The record behind the strength chapter, per mix: results per age, the prior and the
    data together, the least-squares models compared, and the residuals."""
    p, r = env.project, env.results
    return {"mixes": [_detail(env, m) for m in p.mixes.values()
                      if r.value(m.id, "mean_strength")]}


def _detail(env, mix) -> dict:
    r = env.results
    curves = r.value(mix.id, "strength_curve") or {}
    resid = None
    if curves:
        from specgen.report.strength_figures import residuals
        resid = env.figure(f"figures/strength-{mix.id}-residuals.svg", residuals(
            [{"test": t, "model": "two-stage law with prior",
              "ages": [a for a, _ in c["residuals_pct"]],
              "residuals": [v for _, v in c["residuals_pct"]]} for t, c in curves.items()]),
            f"{mix.id}: relative residuals of the specimens about the fitted law",
            "One panel per test (" + " and ".join(curves) + "): each specimen's residual "
            "in per cent of the fitted value, plotted against age in days around a zero "
            "line; the largest in size is " + num(max((abs(v) for c in curves.values()
                                                        for _, v in c["residuals_pct"]),
                                                       default=0.0), 2)
            + " %.")
    return {"id": mix.id, "name": mix.name, "anchor": anchor(mix.id),
            "aggregates": _aggregates(r, mix.id),
            "excluded": r.value(mix.id, "excluded_results") or [],
            "has_known": bool(r.value(mix.id, "characteristic_strength_known_cv")),
            "priors": _priors(r.value(mix.id, "strength_inference") or {}),
            "models": _models(r, mix.id), "reasoning": _reasoning(r, mix.id),
            "residuals": resid}


def _aggregates(r, mix: str) -> list[dict]:
    means = r.value(mix, "mean_strength") or {}
    cvs, fks = r.value(mix, "strength_cv") or {}, r.value(mix, "characteristic_strength") or {}
    known = r.value(mix, "characteristic_strength_known_cv") or {}
    curves = r.value(mix, "strength_curve") or {}
    rows = []
    for test, ages in means.items():
        counts = {f"{m[0]:g}": m[3] for m in curves.get(test, {}).get("means", [])}
        for age, m in sorted(ages.items(), key=lambda kv: key_days(kv[0])):
            cv = cvs.get(test, {}).get(age)
            fk, fkk = fks.get(test, {}).get(age), known.get(test, {}).get(age)
            rows.append({"test": test, "age": f"{key_days(age):g}", "mean": num(m, 3),
                         "sd": num(m * cv / 100, 2) if cv is not None else "—",
                         "cv": num(cv, 2) if cv is not None else "—",
                         "n": counts.get(f"{key_days(age):g}", "—"),
                         "fk": num(fk, 3) if fk is not None else "—",
                         "fk_known": num(fkk, 3) if fkk is not None else "—"})
    return rows


def _priors(inf: dict) -> list[dict]:
    rows = []
    for test, rec in inf.items():
        for k, (name, unit) in TERMS.items():
            lo, hi, src = rec["prior"][k]
            m, plo, phi = rec["posterior"][k]
            rows.append({"test": test, "term": name, "unit": unit,
                         "prior": f"{num(lo, 3)} to {num(hi, 3)}", "source": src,
                         "posterior": f"{num(m, 3)} [{num(plo, 3)}, {num(phi, 3)}]",
                         "family": rec["label"], "widest": rec["widest"]})
    return rows


def _models(r, mix: str) -> list[dict]:
    aicc, chosen = r.value(mix, "model_aicc") or {}, r.value(mix, "model_selected") or {}
    rows = []
    for test, models in aicc.items():
        low = min(models.values())
        for m, a in sorted(models.items(), key=lambda kv: kv[1]):
            rows.append({"test": test, "title": m.replace("_", " "), "aicc": num(a, 4),
                         "delta": num(a - low, 3), "chosen": "lowest AICc" if
                         m == chosen.get(test) else ""})
    return rows


def _reasoning(r, mix: str) -> list[dict]:
    out = []
    for code, test in (("STR-FIT-C", "compressive"), ("STR-FIT-F", "flexural")):
        c = r.check(code, mix)
        if c is not None:
            out.append({"test": test, "text": c.notes[0] if c.notes else c.message})
    return out


def _predictions(pred: dict) -> list[dict]:
    rows = []
    for test, ages in pred.items():
        for age, v in sorted(ages.items(), key=lambda kv: key_days(kv[0])):
            flags = [w for w, on in (("extrapolated", v["extrapolated"]),
                                     ("indicative: never decides", v["indicative"])) if on]
            # the age's number and unit kept on one line ("365 d" wrapped in a narrow column)
            rows.append({"test": test, "age": age.replace(" ", UNIT_SPACE),
                         "value": num(v["value"], 3),
                         "mean": f"{num(v['lower'], 3)} – {num(v['upper'], 3)}",
                         "set": f"{num(v['pred_lower'], 3)} – {num(v['pred_upper'], 3)}",
                         "flags": ", ".join(flags) or "—"})
    return rows


def _narrowing(env, mix: str) -> list[dict]:
    """The band for the mean at each predicted age, revision by revision (earlier ones from
    their results.json), with its width as upper/lower."""
    h = env.history
    revs = [(code, res.get("quantities", {}).get(mix, {}).get("predicted_strength", {})
             .get("value", {})) for code, res in (h.earlier if h else ())]
    revs.append((env.project.revision.code, env.results.value(mix, "predicted_strength") or {}))
    rows = []
    for code, pred in revs:
        comp = pred.get("compressive", {}) if isinstance(pred, dict) else {}
        for age in ("90 d", "365 d"):
            v = comp.get(age)
            if v and "pred_lower" in v:
                rows.append({"rev": code, "age": age.replace(" ", UNIT_SPACE),
                             "mean": f"{num(v['lower'], 3)} – {num(v['upper'], 3)}",
                             "ratio": num(v["upper"] / v["lower"], 3),
                             "flag": "indicative" if v["indicative"] else ""})
    return rows if len({r["rev"] for r in rows}) > 1 else []


def _figure(env, mix, test: str, c: dict | None, rules, caption: str
            ) -> tuple[bytes, str, str]:
    """(figure, caption, alternative text) of one strength chart."""
    from specgen.report.strength_figures import strength_age
    r = env.results
    data = {"title": f"{mix.id} — {mix.name}", "test": test, "model": "",
            "specimens": [tuple(p) for p in c["specimens"]] if c else [],
            "means": [tuple(m[:3]) for m in c["means"]] if c else [],
            "curve": None, "limits": _limits(env, rules) if test == "compressive" else []}
    if c is None:
        means = (r.value(mix.id, "mean_strength") or {}).get(test, {})
        data["means"] = [(key_days(a), m, 0.0) for a, m in means.items()]
    elif c.get("usable", True):
        data.update(model="two-stage law with the family's prior", curve=c,
                    components={"aluminate": c["aluminate"], "silicate": c["silicate"]})
        wall = r.value(mix.id, "in_wall_curve")
        if test == "compressive" and wall and wall["days"]:     # none gained: no line
            data["wall"] = {"ages": wall["days"], "value": wall["value"]}
    return strength_age(data), caption, _strength_alt(data)


def _strength_alt(data: dict) -> str:
    """What a strength chart shows, in words: the points, the means, the curve, the limits."""
    test = data["test"]
    # read as the tables print them: ages in whole days, strengths to 0.1 MPa (fmt.PRECISION)
    ages = sorted({rounded(a, "d") for a, *_ in data["means"]}, key=float)
    out = (f"Chart of {test} strength in MPa against age in days on a logarithmic axis. "
           f"{len(data['specimens'])} specimen results as circles at "
           + and_list(ages) + " days; their means: "
           + and_list([f"{rounded(m, 'MPa')} MPa at {rounded(a, 'd')} d"
                   for a, m, _ in data["means"]]) + ".")
    if data["curve"]:
        c = data["curve"]
        out += (f" A line for the fitted {data['model']}, reaching {rounded(c['value'][-1], 'MPa')}"
                f" MPa at {rounded(c['ages_d'][-1], 'd')} days, with its shaded band.")
    if data.get("wall"):
        out += " A dash-dotted line for the strength in the wall at the site temperature."
    for _, value, label, _kind in data["limits"]:
        out += f" A horizontal line marks the {plain(label)}."
    return out


def _limits(env, rules) -> list:
    req = env.project.dossier.requirements
    out = [(m.age / 86400.0, m.value / 1e6, f"min {m.value / 1e6:g} MPa at {m.age / 86400.0:g} d",
            "min") for m in req.min_compressive]
    if req.max_compressive_long_term:
        out.append((rules["strength.late_age_2"].value, req.max_compressive_long_term / 1e6,
                    f"cap {req.max_compressive_long_term / 1e6:g} MPa "
                    f"(at {rules['strength.late_age_2'].value:g} d)", "max"))
    if req.load_strength:
        out.append((None, req.load_strength / 1e6,
                    f"load strength {req.load_strength / 1e6:g} MPa (in the wall)", "min"))
    return out
