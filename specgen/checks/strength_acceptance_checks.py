"""Acceptance of strength against the dossier's requirements; strength in the wall.

* STR-MIN: minimum compressive strength at each stated age — the measured characteristic
  value where that age was tested, otherwise the prediction band (pass / fail / hold);
* STR-MAX: the long-term cap (compatibility), judged on the prediction at the late age;
* STR-SITE: equivalent age in the wall from the site temperature (ASTM C1074), in-wall
  strength and the earliest day the load strength is reached;
* STR-CLASS (``strength_class_checks.py``): the descriptive mortar class of the 28-d mean.

Decisions use the interval for the next set of site prisms; a prediction beyond the
extrapolation limit never decides: its verdict is ``hold``, with the test age that would.
"""
from __future__ import annotations

import math

from specgen import refdata
from specgen.checks import strength_common as sc
from specgen.checks.registry import declare, register
from specgen.checks.result import Basis, CheckResult, Input, Limit, Quantity, Step, worst
from specgen.checks import strength_prior_common as spc
from specgen.checks.strength_checks import (C1074, EN1990, age_key, interval, mpa,
                                            not_assessed, pred_step)
from specgen.science import maturity, strength_classes as scl
from specgen.science import strength_inference as si, strength_stats as ss

DAY, MPA = sc.DAY, sc.MPA
REQ = Basis("project requirement", note="dossier.yaml requirements")
RECOMMEND = Basis("common practice", note="later test age: the one named for a hold is the "
                  "earliest candidate age (content/data/strength_classes.yaml) that brings the "
                  "requirement's age within the extrapolation limit, else that age itself")

declare("acceptance", "", "verdict per requirement: {age or cap: {status, basis, value, limit}}")
declare("equivalent_age", "d", "equivalent age at 20 °C in the wall at each wall age "
        "(ASTM C1074), with the method")
declare("in_wall_strength", "MPa", "predicted compressive strength in the wall by wall age, "
        "with the band")
declare("in_wall_curve", "MPa", "strength in the wall along the site record: {days, value, "
        "lower} (interval for one batch), as the strength figure draws it")
declare("load_strength_day", "d", "earliest day after placement at which the lower band edge "
        "reaches the load strength")


def _comp(ctx, mix) -> sc.Series | None:
    return sc.cached(ctx).get((mix, "compressive"))


def _group_at(s: sc.Series | None, age: float) -> sc.Group | None:
    for g in (s.groups if s else []):
        if abs(g.age - age) <= 1e-6 * age:
            return g
    return None


def _candidates(ctx) -> list[float]:
    return [a * DAY for a in refdata.load("strength_classes").data["candidate_test_ages"]["age_days"]]


QUESTION = {"min": "will the next site sets reach the minimum?",
            "max": "will the mortar placed (any batch) stay below the cap?"}


def _decide(s: sc.Series, age: float, limit: float, kind: str, ctx) -> dict:
    """Verdict at ``age`` (s) against ``limit`` (Pa) from the interval for the next set.

    Both questions are about site batches, not the mean curve, so both use the prediction
    interval for the mean of the next set of n prisms.  Beyond the extrapolation limit the
    prediction is indicative: the verdict is hold, with the test age that would decide.
    """
    if s.run is None or not s.run.ok:
        why = (("; ".join(s.run.misfit) or s.run.error) if s.run else "no compressive results")
        return {"status": "not_assessed", "text": f"not predicted: {why}", "step": None}
    iv = interval(s, age, "set", ctx)
    inf = s.run.inference
    status = scl.accept(iv.value * MPA, iv.lower * MPA, iv.upper * MPA, limit, kind)
    text = (f"predicted {iv.value:.3g} MPa; {100 * iv.level:.0f} % interval for the {iv.kind} "
            f"[{iv.lower:.3g}, {iv.upper:.3g}] MPa")
    hold_d = None
    if iv.indicative and status != "hold":
        text += (f" would {status}, but {age / DAY:g} d is beyond "
                 f"{ctx.rules['strength.extrapolation_limit'].value:g}× the last tested age "
                 f"({inf.last_age:g} d): indicative only, held")
        status = "hold"
    if status == "hold":
        hold_d = spc.hold_age(age / DAY, inf.last_age,
                              ctx.rules["strength.extrapolation_limit"].value,
                              [a / DAY for a in _candidates(ctx)])
        text += (f"; test {spc.set_size(ctx.project, ctx.rules)} prisms at {hold_d:g} d"
                 + (" (results there bring the prediction within the extrapolation limit)"
                    if hold_d < age / DAY - 1e-9 else " (results there decide directly)"))
    step = pred_step(s, iv, ctx, f"prediction ({QUESTION[kind]})",
                     mean=interval(s, age, "mean", ctx))
    return {"status": status, "text": text, "step": step, "hold_age_d": hold_d,
            "value": round(iv.lower if kind == "min" else iv.upper, 4)}


# ---------------------------------------------------------------- minimum strength
@register("STR-MIN", "Minimum compressive strength", "mix", order=430)
def minimum_check(mix, ctx):
    """Each stated minimum: measured characteristic value if tested at that age, else predicted."""
    reqs = ctx.project.dossier.requirements.min_compressive
    if not reqs:
        return []
    s = _comp(ctx, mix.id)
    items = [_min_item(s, m.age, m.value, ctx) for m in sorted(reqs, key=lambda m: m.age)]
    status = worst([i["status"] for i in items])
    text = "; ".join(f"{age_key(m.age)} (min {m.value / MPA:g} MPa): {i['status']} — {i['text']}"
                     for m, i in zip(sorted(reqs, key=lambda m: m.age), items))
    gov = next(i for i in items if i["status"] == status)
    return CheckResult(
        code="STR-MIN", title="Minimum compressive strength", subject=mix.id, subject_kind="mix",
        status=status, value=gov.get("value"), unit="MPa", basis=(REQ, EN1990) + (
            (RECOMMEND,) if status == "hold" else ()),
        steps=tuple(i["step"] for i in items if i["step"]),
        limit=Limit(">=", low=min(m.value for m in reqs) / MPA, unit="MPa", text="; ".join(
            f"f ≥ {m.value / MPA:g} MPa at {m.age / DAY:g} d" for m in reqs),
            rule="requirements.min_compressive"),
        message=text, quantities=(Quantity("acceptance", {
            **_prev(ctx, mix.id), **{f"min {age_key(m.age)}": {
                "kind": "min", "age_d": round(m.age / DAY, 6),
                "status": i["status"], "value": i.get("value"), "limit": m.value / MPA,
                "hold_age_d": i.get("hold_age_d")}
                for m, i in zip(sorted(reqs, key=lambda m: m.age), items)}}, "",
            "verdict per requirement"),))


def _prev(ctx, mix) -> dict:
    q = ctx.quantity(mix, "acceptance")
    return dict(q.value) if q else {}


def _min_item(s, age, limit, ctx) -> dict:
    g = _group_at(s, age)
    if g is not None and g.characteristic is not None:
        return _measured_min(s, g, age, limit, ctx)
    if s is None:
        return {"status": "not_assessed", "step": None, "text": "not tested at this age and no "
                "model to predict it (no compressive results)"}
    return _decide(s, age, limit, "min", ctx)


def _known_cv(s: sc.Series, ctx) -> tuple[float, str, bool]:
    """(CV, its source, whether it may decide): the project's known CV, else the prior's."""
    cv = ctx.project.dossier.strength.known_cv
    if cv:
        return cv, "project input (dossier.yaml strength.known_cv: a long laboratory record)", True
    if s.run is not None:
        w = s.run.family.prior.within_cv
        return (math.sqrt(w.low * w.high), f"prior of the binder family, middle of "
                f"{100 * w.low:g}–{100 * w.high:g} % ({w.source})", False)
    return 0.0, "", False


def _measured_min(s, g, age, limit, ctx) -> dict:
    """f_k with variance unknown and known side by side; which decides; the mean beside."""
    fk, n, mean = g.characteristic.value, g.summary.n, g.summary.mean
    cv, cv_src, known_decides = _known_cv(s, ctx)
    frac = ctx.rules["strength.fractile"].value
    known = ss.characteristic_value([r.value for r in g.kept], sigma=cv * mean, fractile=frac) \
        if cv else None
    decide = known if (known_decides and known) else g.characteristic
    status = "pass" if decide.value >= limit else "fail"
    inputs = [Input("f̄", "mean (EN 998-2 declares a mortar's class on the mean)",
                    round(mean / MPA, 4), "MPa", "STR-AGG"),
              Input("f_k,unknown", f"characteristic value, variance unknown (k_n = "
                    f"{g.characteristic.k_n:.2f})", round(fk / MPA, 4), "MPa",
                    "EN 1990 Annex D (D7.2), from the specimens at this age")]
    if known:
        inputs += [Input("V", "coefficient of variation taken as known", round(100 * cv, 3),
                         "%", cv_src),
                   Input("f_k,known", f"characteristic value, variance known (k_n = "
                         f"{known.k_n:.2f})", round(known.value / MPA, 4), "MPa",
                         "EN 1990 Annex D (D7.2): f̄ − k_n·V·f̄")]
    inputs.append(Input("f_min", "required minimum", round(limit / MPA, 4), "MPa",
                        "dossier.yaml requirements.min_compressive"))
    which = "variance known" if decide is known else "variance unknown"
    sub = (f"{decide.value / MPA:.3f} " + (r"\geq" if status == "pass" else "<")
           + f" {limit / MPA:.3f}" + rf"\ (\text{{{which} decides}})")
    step = Step(f"measured at {age / DAY:g} d against the minimum (n = {n})",
                r"f_k = \bar f - k_n s \geq f_{\min}", tuple(inputs), sub,
                round(decide.value / MPA, 4), "MPa", "f_k")
    text = f"measured f_k {decide.value / MPA:.3g} MPa ({which} decides, n = {n})"
    if known and decide is not known:
        other = "pass" if known.value >= limit else "fail"
        text += (f"; with a known CV of {100 * cv:.3g} % it would be {known.value / MPA:.3g} "
                 f"MPa ({other})" + (": the verdict rests on the variance assumption; a CV "
                                     "from a long laboratory record (dossier.yaml "
                                     "strength.known_cv) would settle it"
                                     if other != status else ""))
    text += f"; mean {mean / MPA:.3g} MPa"
    return {"status": status, "step": step, "value": mpa(decide.value), "text": text}


# ---------------------------------------------------------------- long-term cap
@register("STR-MAX", "Long-term compressive strength cap", "mix", order=431)
def maximum_check(mix, ctx):
    """The compatibility cap, judged at the late age (measured mean there, else the band)."""
    cap = ctx.project.dossier.requirements.max_compressive_long_term
    if cap is None:
        return []
    age = ctx.rules["strength.late_age_2"].value * DAY
    s, title = _comp(ctx, mix.id), "Long-term compressive strength cap"
    g = _group_at(s, age)
    if g is not None:
        m = g.summary.mean
        item = {"status": "pass" if m <= cap else "fail", "value": mpa(m), "step": None,
                "text": f"measured mean {m / MPA:.3g} MPa at {age / DAY:g} d"}
    elif s is None or s.run is None or not s.run.ok:
        why = (("; ".join(s.run.misfit) or s.run.error) if s and s.run else
               "no compressive results")
        return not_assessed("STR-MAX", title, mix.id, "no prediction of the long-term "
                            f"strength ({why})", (REQ,))
    else:
        item = _decide(s, age, cap, "max", ctx)
    return CheckResult(
        code="STR-MAX", title=title, subject=mix.id, subject_kind="mix", status=item["status"],
        value=item.get("value"), unit="MPa",
        basis=(REQ,) + ((RECOMMEND,) if item["status"] == "hold" else ()),
        steps=(item["step"],) if item["step"] else (),
        limit=Limit("<=", high=cap / MPA, unit="MPa", text=f"f ≤ {cap / MPA:g} MPa at "
                    f"{age / DAY:g} d (compatibility with the fabric)",
                    rule="requirements.max_compressive_long_term"),
        message=f"{item['text']} against the cap {cap / MPA:g} MPa",
        quantities=(Quantity("acceptance", {**_prev(ctx, mix.id), f"max {age_key(age)}": {
            "kind": "max", "status": item["status"], "value": item.get("value"), "limit": cap / MPA,
            "age_d": round(age / DAY, 6), "hold_age_d": item.get("hold_age_d")}}, "",
            "verdict per requirement"),))


# ---------------------------------------------------------------- in the wall
@register("STR-SITE", "Strength in the wall", "mix", order=440)
def site_check(mix, ctx):
    """Equivalent age from the site temperature; in-wall strength; day the load strength is met."""
    p, title = ctx.project, "Strength in the wall"
    load = p.dossier.requirements.load_strength
    if p.site_temperature is None and load is None:
        return []
    if p.site_temperature is None:
        return not_assessed("STR-SITE", title, mix.id, "a load strength is required but the "
                            "dossier gives no site temperature (dossier.yaml site_temperature: a "
                            "constant, or a CSV of daily means under lab/)", (C1074,))
    s = _comp(ctx, mix.id)
    if s is None or s.run is None or not s.run.ok:
        why = (("; ".join(s.run.misfit) or s.run.error) if s and s.run else
               "no compressive results")
        return not_assessed("STR-SITE", title, mix.id, f"no strength prediction ({why})", (C1074,))
    if s.run.family.prior.carbonating:
        return not_assessed("STR-SITE", title, mix.id, CARBONATING.format(
            label=s.run.family.prior.label), (C1074,))
    try:
        return _site_result(mix.id, s, load, ctx)
    except maturity.MaturityInputError as exc:
        return not_assessed("STR-SITE", title, mix.id, f"the site temperature record cannot be "
                            f"used: {exc}", (C1074,))


CARBONATING = ("{label} gains its strength mainly by carbonation, which depends on the air and "
               "moisture reaching the joint, not on temperature alone: it lies outside the "
               "maturity method (ASTM C1074), so no in-wall strength or load date is derived "
               "from temperature. Test instead prisms cured beside the work (site-cured "
               "companions) and the carbonation depth (phenolphthalein on fresh breaks) at the "
               "ages that matter, and load only on those results")


def wall_ages(ctx, t_end: float) -> list[float]:
    r = ctx.rules
    ages = {m.age for m in ctx.project.dossier.requirements.min_compressive}
    ages |= {7 * DAY, r["strength.late_age_1"].value * DAY, r["strength.late_age_2"].value * DAY}
    return sorted(a for a in ages if a <= t_end + 1.0)


def _site_result(mix, s: sc.Series, load, ctx) -> CheckResult:
    p, st = ctx.project, sc.settings(ctx.project)
    horizon = ctx.rules["strength.late_age_2"].value * DAY
    t, te = sc.site_equivalent_age(p, st, st.method, horizon)
    other = "nurse_saul" if st.method == "arrhenius" else "arrhenius"
    _, te2 = sc.site_equivalent_age(p, st, other, horizon)
    steps, wall, ages_te, notes = [_te_step(p, st, t, te, te2)], {}, {}, []
    si.bands_each(s.run.inference, [float(_interp(a, t, te)) / DAY for a in wall_ages(ctx, t[-1])],
                  ctx.rules["strength.confidence_level"].value, math.inf)   # made together
    for a in wall_ages(ctx, t[-1]):
        e = float(_interp(a, t, te))
        ages_te[age_key(a)] = round(e / DAY, 4)
        if e <= 0:
            notes.append(f"wall age {a / DAY:g} d: no equivalent age gained (below the datum)")
            continue
        iv = interval(s, e, "set", ctx, n=math.inf)
        steps.append(pred_step(s, iv, ctx, f"in the wall at {a / DAY:g} d"))
        wall[age_key(a)] = {"value": round(iv.value, 4), "lower": round(iv.lower, 4),
                            "upper": round(iv.upper, 4), "indicative": iv.indicative}
    status, msg, q = "info", _wall_text(wall), []
    if load is not None:
        day, why = _load_day(s, load / MPA, t, te, ctx)
        msg += (f"; load strength {load / MPA:g} MPa reached on day {day:g} after placement "
                f"(lower edge of the interval for one batch in the wall{why})"
                if day is not None else f"; load strength {load / MPA:g} MPa {why}")
        status = "info" if day is not None and not why else "attention" if day is None else "hold"
        q.append(Quantity("load_strength_day", day, "d", "earliest day the load strength is met"))
    if st.warning:
        notes.append(st.warning)
    if p.dossier.strength.site_temperature_is == "air":
        notes.append(AIR_NOTE)
    q += [Quantity("equivalent_age", {"method": st.method, "wall": ages_te}, "d",
                   "equivalent age at 20 °C in the wall"),
          Quantity("in_wall_curve", _wall_curve(s, t, te, ctx), "MPa",
                   "strength in the wall along the site record"),
          Quantity("in_wall_strength", wall, "MPa", "predicted strength in the wall")]
    return CheckResult(
        code="STR-SITE", title="Strength in the wall", subject=mix, subject_kind="mix",
        status=status, value=q[0].value if load is not None else None,
        unit="d" if load is not None else "", basis=(C1074,) + ((REQ,) if load else ()),
        steps=tuple(steps), message=msg, notes=tuple(notes), quantities=tuple(q))


def _load_day(s: sc.Series, load_mpa: float, t, te, ctx) -> tuple[float | None, str]:
    """First day (on the site record) at which the lower edge of the interval for one batch
    in the wall reaches ``load_mpa``; linear between readings.  (day, note): a day beyond
    the extrapolation limit comes with a note that it is indicative."""
    import numpy as np
    ok = te > 0
    if not ok.any():
        return None, "not reached: no equivalent age gained on the site record"
    lo = np.zeros(te.size)
    lo[ok] = si.bands(s.run.inference, te[ok] / DAY, ctx.rules["strength.confidence_level"].value,
                      math.inf)["pred_lo"]
    up = np.flatnonzero(lo >= load_mpa)
    if up.size == 0:
        return None, (f"not reached by the end of the site record (day {t[-1] / DAY:g}, lower "
                      f"edge {lo[-1]:.3g} MPa)")
    k = int(up[0])
    day = t[k] if k == 0 else t[k - 1] + (load_mpa - lo[k - 1]) / (lo[k] - lo[k - 1]) * (
        t[k] - t[k - 1])
    limit = ctx.rules["strength.extrapolation_limit"].value * s.run.inference.last_age
    far = float(np.interp(day, t, te)) / DAY > limit
    return round(float(day) / DAY, 2), (f"; indicative: equivalent age beyond {limit:g} d, the "
                                        "extrapolation limit" if far else "")


def _wall_curve(s: sc.Series, t, te, ctx) -> dict:
    ok = te > 0
    if not ok.any():     # a record at or below the Nurse-Saul datum: no age gained, no curve
        return {"days": [], "value": [], "lower": []}
    b = si.bands(s.run.inference, te[ok] / DAY, ctx.rules["strength.confidence_level"].value,
                 math.inf)
    # a year of daily points per mix: rounded as Python floats (``tolist``), the same numbers
    return {"days": [round(v / DAY, 4) for v in t[ok].tolist()],
            "value": [round(v, 4) for v in b["value"].tolist()],
            "lower": [round(v, 4) for v in b["pred_lo"].tolist()]}


def _interp(a, t, te):
    import numpy as np
    return np.interp(a, t, te)


def _wall_text(wall: dict) -> str:
    return "in the wall (interval for one batch): " + "; ".join(
        f"{k} {v['value']:.3g} MPa [{v['lower']:.3g}, {v['upper']:.3g}]"
        + (" indicative" if v["indicative"] else "") for k, v in wall.items())


#: the equivalent-age methods as a reader names them (the dossier.yaml keys stay inside)
METHOD_NAMES = {"arrhenius": "Arrhenius", "nurse_saul": "Nurse-Saul"}
WHERE = {"air": "air temperature, standing in for the temperature in the joint",
         "surface": "surface temperature of the wall", "joint": "temperature in the joint"}
AIR_NOTE = ("the site record is of air temperature, a stand-in for the temperature in the joint: "
            "a sunlit or sheltered wall runs warmer or colder than the air, so give the joint or "
            "surface temperature (dossier.yaml strength.site_temperature_is) when it is logged")


def _te_step(p, st: sc.Settings, t, te, te2) -> Step:
    site = p.site_temperature
    temp = (f"{site.constant - 273.15:.1f}" if site.constant is not None else
            f"daily means, {len(site.points)} days")
    kind = p.dossier.strength.site_temperature_is
    inputs = (Input("E", "apparent activation energy", st.energy_text, "", st.energy_source),
              Input("T", f"site temperature ({WHERE[kind]})", temp, "°C",
                    f"site_temperature: {site.source}"),
              Input("T_r", "reference temperature", round(st.t_ref - 273.15, 2), "°C",
                    "maturity_defaults.yaml"),
              Input("T_0", "Nurse-Saul datum", round(st.datum - 273.15, 2), "°C",
                    st.datum_source),
              Input("t_e'", f"equivalent age at {t[-1] / DAY:g} d by the other method "
                    f"({METHOD_NAMES['nurse_saul' if st.method == 'arrhenius' else 'arrhenius']})",
                    round(te2[-1] / DAY, 3), "d", "ASTM C1074, for comparison"))
    formula = (r"t_e = \sum e^{-\frac{E}{R}\left(\frac{1}{T_a} - \frac{1}{T_r}\right)}\,\Delta t"
               if st.method == "arrhenius" else r"t_e = \frac{\sum (T_a - T_0)\,\Delta t}{T_r - T_0}")
    return Step(f"Equivalent age in the wall ({METHOD_NAMES[st.method]}, ASTM C1074)",
                formula, inputs, rf"t_e({t[-1] / DAY:g}\,\mathrm{{d}}) = {te[-1] / DAY:.2f}\,"
                r"\mathrm{d}", round(te[-1] / DAY, 4), "d", "t_e")
