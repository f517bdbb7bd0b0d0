"""The strength-development chapter: per mix, aggregates, model comparison, predictions,
acceptance (linked to the calculation sheets) and figures.

Numbers come from the check results and from ``specgen.checks.strength_common`` (the
same computation the checks use); figure curves are evaluated with the science's
``curve``/``components`` functions, never with formulas written here.
"""
from __future__ import annotations

import numpy as np

from specgen.checks import strength_common as sc
from specgen.checks.rules import RuleBook
from specgen.report.chapters import badge, chapter, sheet_anchor
from specgen.report.fmt import num
from specgen.report.wording import plain, reader
from specgen.science import strength_models as sm

DAY, MPA = sc.DAY, sc.MPA


@chapter("strength.md", "Strength development", 40, "strength.md.j2")
def strength(env) -> dict:
    p = env.project
    rules = RuleBook(p.dossier.rule_overrides)
    series = sc.analyse(p, rules)
    mixes = [_mix(env, m, [s for (mid, _), s in series.items() if mid == m.id], rules)
             for m in p.mixes.values() if any(mid == m.id for mid, _ in series)]
    st = sc.settings(p)
    return {"mixes": mixes, "has_data": bool(series), "warning": st.warning,
            "energy": f"{num(st.activation_energy / 1000, 3)} kJ/mol ({plain(st.energy_source)})",
            "method": st.method.replace("_", "-"),
            "site": plain(p.site_temperature.source) if p.site_temperature else ""}


def _mix(env, mix, series: list[sc.Series], rules) -> dict:
    r = env.results
    results = [{"code": c.code, "title": c.title, "badge": badge(c.status), "message": reader(c.message),
                "href": f"calculations.md#{sheet_anchor(c)}"}
               for c in r.checks if c.subject == mix.id and c.code.startswith("STR-")]
    pred = r.value(mix.id, "predicted_strength")
    figures = [env.figure(f"figures/strength-{mix.id}-{s.test}.svg", _figure(env, mix, s, rules),
                          f"{mix.id}: {s.test} strength against age"
                          + (" — fitted model and band" if s.fit else "")
                          + (", requirements and strength in the wall"
                             if s.fit and s.test == "compressive" else ""))
               for s in series]
    fitted = [s for s in series if s.fit is not None]
    resid = None
    if fitted:
        from specgen.report.strength_figures import residuals
        resid = env.figure(f"figures/strength-{mix.id}-residuals.svg",
                           residuals([_residuals(s) for s in fitted]),
                           f"{mix.id}: relative residuals of the chosen models")
    return {"id": mix.id, "name": mix.name, "aggregates": _aggregates(series),
            "has_known": any(g.known for s in series for g in s.groups),
            "models": _models(series), "reasoning": [
                {"test": s.test, "text": s.selection.reasoning if s.selection else s.fit_error}
                for s in series],
            "predictions": _predictions(pred or {}), "results": results,
            "figures": figures, "residuals": resid}


def _aggregates(series) -> list[dict]:
    return [{"test": s.test, "age": f"{g.age / DAY:g}", "n": g.summary.n,
             "mean": num(g.summary.mean / MPA, 3), "sd": num(g.summary.sd / MPA, 2),
             "cv": num(100 * g.summary.cv, 2),
             "fk": num(g.characteristic.value / MPA, 3) if g.characteristic else "—",
             "fk_known": num(g.known.value / MPA, 3) if g.known else "—",
             "excluded": ", ".join(r.specimen for r, _ in g.flagged) or "—"}
            for s in series for g in s.groups]


def _models(series) -> list[dict]:
    rows = []
    for s in series:
        sel = s.selection
        for f in (sel.fits if sel else ()):
            rows.append({"test": s.test, "title": f.title, "k": len(f.params),
                         "aicc": num(f.aicc, 4), "delta": num(sel.delta_aicc[f.model], 3),
                         "weight": _weight(sel.akaike_weights[f.model]),
                         "chosen": "chosen" if f is sel.best else ""})
        for m, why in (sel.not_assessed.items() if sel else ()):
            rows.append({"test": s.test, "title": sm.MODELS[m].title, "k": "—", "aicc": "—",
                         "delta": "—", "weight": "—", "chosen": f"not fitted: {why}"})
    return rows


def _weight(w: float) -> str:
    return "< 0.001" if w < 0.001 else f"{w:.3f}"


def _predictions(pred: dict) -> list[dict]:
    rows = []
    for test, ages in pred.items():
        for age, v in sorted(ages.items(), key=lambda kv: float(kv[0][:-2])):
            flags = [w for w, on in (("extrapolated", v["extrapolated"]),
                                     ("band widened: indicative", v["widened"])) if on]
            rows.append({"test": test, "age": age, "value": num(v["value"], 3),
                         "lower": num(v["lower"], 3), "upper": num(v["upper"], 3),
                         "flags": ", ".join(flags) or "—"})
    return rows


def _figure(env, mix, s: sc.Series, rules) -> bytes:
    from specgen.report.strength_figures import strength_age
    st = sc.settings(env.project)
    data = {"title": f"{mix.id} — {mix.name}", "test": s.test, "model": "",
            "specimens": [(r.age * sc.lab_factor(r.curing_temperature, st) / DAY, r.value / MPA)
                          for g in s.groups for r in g.specimens],
            "means": [(g.te / DAY, g.summary.mean / MPA, g.summary.sd / MPA) for g in s.groups],
            "curve": None, "limits": _limits(env, rules) if s.test == "compressive" else []}
    if s.fit is not None:
        fit = s.fit
        top = min(rules["strength.late_age_2"].value * DAY, fit.age_max * sm.MAX_EXTRAPOLATION)
        ages = np.geomspace(max(fit.age_min / sm.MAX_EXTRAPOLATION, 0.25 * DAY), top, 160)
        v, lo, hi, wide = sc.band_curve(s, ages, rules)
        data.update(model=fit.title, curve={"ages": ages / DAY, "value": v / MPA,
                                            "lower": lo / MPA, "upper": hi / MPA,
                                            "widened": wide},
                    components={k: a / MPA for k, a in sm.components(fit, ages).items()})
        if s.test == "compressive":
            data["wall"] = _wall(env, s, rules)
    return strength_age(data)


def _limits(env, rules) -> list:
    req = env.project.dossier.requirements
    out = [(m.age / DAY, m.value / MPA, f"min {m.value / MPA:g} MPa at {m.age / DAY:g} d", "min") for m in req.min_compressive]
    if req.max_compressive_long_term:
        out.append((rules["strength.late_age_2"].value, req.max_compressive_long_term / MPA,
                    f"cap {req.max_compressive_long_term / MPA:g} MPa "
                    f"(at {rules['strength.late_age_2'].value:g} d)", "max"))
    if req.load_strength:
        out.append((None, req.load_strength / MPA,
                    f"load strength {req.load_strength / MPA:g} MPa (in the wall)", "min"))
    return out


def _wall(env, s: sc.Series, rules) -> dict | None:
    p, fit = env.project, s.fit
    if p.site_temperature is None:
        return None
    st = sc.settings(p)
    t, te = sc.site_equivalent_age(p, st, st.method, rules["strength.late_age_2"].value * DAY)
    ok = (t > 0) & (te >= fit.age_min / sm.MAX_EXTRAPOLATION) & \
        (te <= fit.age_max * sm.MAX_EXTRAPOLATION)
    if not ok.any():
        return None
    v, _, _ = sm.curve(fit, te[ok])
    return {"ages": t[ok] / DAY, "value": v / MPA}


def _residuals(s: sc.Series) -> dict:
    fitted, _, _ = sm.curve(s.fit, s.t_fit)
    return {"test": s.test, "model": s.fit.title, "ages": s.t_fit / DAY,
            "residuals": 100.0 * (s.y_fit / fitted - 1.0)}
