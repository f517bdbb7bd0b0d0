"""Acceptance of strength against the dossier's requirements; strength in the wall; classes.

* STR-MIN: minimum compressive strength at each stated age — the measured characteristic
  value where that age was tested, otherwise the prediction band (pass / fail / hold);
* STR-MAX: the long-term cap (compatibility), judged on the prediction at the late age;
* STR-SITE: equivalent age in the wall from the site temperature (ASTM C1074), in-wall
  strength and the earliest day the load strength is reached;
* STR-CLASS: descriptive mortar class of the 28-d mean by the practice's classification
  (EN 998-2 M-classes or ASTM C270 types); EN 459-1 classes belong to the *binder* (tested in
  the standard mortar of EN 196-1), so a mix is never placed in them.

A band that extrapolates from a short record (widened, see strength_common.band) never
decides alone: its verdict is at most ``hold``, with the later test age that would decide.
"""
from __future__ import annotations

from specgen import refdata
from specgen.checks import strength_common as sc
from specgen.checks.registry import declare, register
from specgen.checks.result import Basis, CheckResult, Input, Limit, Quantity, Step, worst
from specgen.checks.strength_checks import (C1074, EN1990, age_key, mpa, not_assessed,
                                            pred_step)
from specgen.science import maturity, strength_classes as scl, strength_models as sm

DAY, MPA = sc.DAY, sc.MPA
REQ = Basis("project requirement", note="dossier.yaml requirements")
RECOMMEND = Basis("common practice", note="later test age: " + scl.SHRINK_RULE)
C270 = Basis("reference", "astmc270", "property specification, minimum 28-d compressive strength")
EN998 = Basis("reference", "en998_2", "compressive strength classes M1 … M20 on the mean at 28 d "
              "(tested to EN 1015-11)")
MORTAR_CLASSES = {"astm_c270": ("ASTM C270", "type", C270),
                  "en998_2": ("EN 998-2", "class", EN998)}

declare("acceptance", "", "verdict per requirement: {age or cap: {status, basis, value, limit}}")
declare("equivalent_age", "d", "equivalent age at 20 °C in the wall at each wall age "
        "(ASTM C1074), with the method")
declare("in_wall_strength", "MPa", "predicted compressive strength in the wall by wall age, "
        "with the band")
declare("load_strength_day", "d", "earliest day after placement at which the lower band edge "
        "reaches the load strength")
declare("strength_classes", "", "mortar class met by the 28-d mean by the practice's "
        "classification (EN 998-2 or ASTM C270), descriptive: {standard, table, classes}")


def _comp(ctx, mix) -> sc.Series | None:
    return sc.cached(ctx).get((mix, "compressive"))


def _group_at(s: sc.Series | None, age: float) -> sc.Group | None:
    for g in (s.groups if s else []):
        if abs(g.age - age) <= 1e-6 * age:
            return g
    return None


def _candidates(ctx) -> list[float]:
    return [a * DAY for a in refdata.load("strength_classes").data["candidate_test_ages"]["age_days"]]


def _decide(s: sc.Series, age: float, limit: float, kind: str, ctx) -> dict:
    """Verdict of a prediction band at ``age`` against ``limit`` (Pa), hold advice included."""
    try:
        b = sc.band(s, age, ctx.rules)
    except sm.StrengthFitError as exc:
        return {"status": "not_assessed", "text": f"not predicted: {exc}", "step": None}
    status = scl.accept(b.value, b.lower, b.upper, limit, kind)
    text = (f"predicted {b.value / MPA:.3g} MPa, {ctx.rules['strength.confidence_level'].value:.0%}"
            f" band [{b.lower / MPA:.3g}, {b.upper / MPA:.3g}] MPa")
    if b.widened and status != "hold":
        text += f" would {status}, but {b.note}: held"
        status = "hold"
    if status == "hold":
        rec = scl.recommend_test_age(
            s.fit, limit, kind, sorted(set(_candidates(ctx)) | {age}), cv=sc.pooled_cv(s),
            n_specimens=int(ctx.rules["strength.specimens_per_age"].value),
            level=ctx.rules["strength.confidence_level"].value)
        text += f"; {rec.reason}"
    return {"status": status, "text": text, "step": pred_step(s, b, ctx, "prediction"),
            "value": mpa(b.lower if kind == "min" else b.upper)}


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
                "status": i["status"], "value": i.get("value"), "limit": m.value / MPA}
                for m, i in zip(sorted(reqs, key=lambda m: m.age), items)}}, "",
            "verdict per requirement"),))


def _prev(ctx, mix) -> dict:
    q = ctx.quantity(mix, "acceptance")
    return dict(q.value) if q else {}


def _min_item(s, age, limit, ctx) -> dict:
    g = _group_at(s, age)
    if g is not None and g.characteristic is not None:
        fk = g.characteristic.value
        status = "pass" if fk >= limit else "fail"
        step = Step(f"measured at {age / DAY:g} d against the minimum",
                    r"f_k \geq f_{\min}",
                    (Input("f_k", "characteristic value (STR-AGG)", round(fk / MPA, 4), "MPa",
                           "EN 1990 Annex D, from the specimens at this age"),
                     Input("f_min", "required minimum", round(limit / MPA, 4), "MPa",
                           "dossier.yaml requirements.min_compressive")),
                    f"{fk / MPA:.3f} " + (r"\geq" if status == "pass" else "<")
                    + f" {limit / MPA:.3f}",
                    round(fk / MPA, 4), "MPa", "f_k")
        return {"status": status, "step": step, "value": mpa(fk),
                "text": f"measured f_k {fk / MPA:.3g} MPa (n = {g.summary.n})"}
    if s is None or s.fit is None:
        why = s.fit_error if s else "no compressive results"
        return {"status": "not_assessed", "step": None, "text": f"not tested at this age and no "
                f"model to predict it ({why})"}
    return _decide(s, age, limit, "min", ctx)


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
    elif s is None or s.fit is None:
        return not_assessed("STR-MAX", title, mix.id, "no model to predict the long-term "
                            f"strength ({s.fit_error if s else 'no compressive results'})", (REQ,))
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
            "status": item["status"], "value": item.get("value"), "limit": cap / MPA,
            "age_d": round(age / DAY, 6)}}, "",
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
                            "dossier gives no site_temperature (a constant or a CSV of daily "
                            "means under lab/)", (C1074,))
    s = _comp(ctx, mix.id)
    if s is None or s.fit is None:
        return not_assessed("STR-SITE", title, mix.id, "no strength-age model ("
                            f"{s.fit_error if s else 'no compressive results'})", (C1074,))
    return _site_result(mix.id, s, load, ctx)


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
    for a in wall_ages(ctx, t[-1]):
        e = float(_interp(a, t, te))
        ages_te[age_key(a)] = round(e / DAY, 4)
        try:
            b = sc.band(s, e, ctx.rules)
        except sm.StrengthFitError as exc:
            notes.append(f"wall age {a / DAY:g} d (t_e {e / DAY:.3g} d) not predicted: {exc}")
            continue
        steps.append(pred_step(s, b, ctx, f"in the wall at {a / DAY:g} d"))
        wall[age_key(a)] = {"value": mpa(b.value), "lower": mpa(b.lower), "upper": mpa(b.upper),
                            "widened": b.widened}
    status, msg, q = "info", _wall_text(wall), []
    if load is not None:
        et = maturity.earliest_time(s.fit, load, t, te, conservative=True,
                                    level=ctx.rules["strength.confidence_level"].value)
        day = round(et.time / DAY, 2) if et.reached else None
        msg += (f"; load strength {load / MPA:g} MPa reached on day {day:g} after placement "
                f"(lower band edge; {et.reason})" if et.reached else
                f"; load strength {load / MPA:g} MPa {et.reason}")
        status = "info" if et.reached else "attention"
        q.append(Quantity("load_strength_day", day, "d", "earliest day the load strength is met"))
    if st.warning:
        notes.append(st.warning)
    q += [Quantity("equivalent_age", {"method": st.method, "wall": ages_te}, "d",
                   "equivalent age at 20 °C in the wall"),
          Quantity("in_wall_strength", wall, "MPa", "predicted strength in the wall")]
    return CheckResult(
        code="STR-SITE", title="Strength in the wall", subject=mix, subject_kind="mix",
        status=status, value=q[0].value if load is not None else None,
        unit="d" if load is not None else "", basis=(C1074,) + ((REQ,) if load else ()),
        steps=tuple(steps), message=msg, notes=tuple(notes), quantities=tuple(q))


def _interp(a, t, te):
    import numpy as np
    return np.interp(a, t, te)


def _wall_text(wall: dict) -> str:
    return "in the wall: " + "; ".join(f"{k} {v['value']:.3g} MPa [{v['lower']:.3g}, "
                                       f"{v['upper']:.3g}]" for k, v in wall.items())


def _te_step(p, st: sc.Settings, t, te, te2) -> Step:
    site = p.site_temperature
    temp = (f"{site.constant - 273.15:.1f}" if site.constant is not None else
            f"daily means, {len(site.points)} days")
    inputs = (Input("E", "apparent activation energy", round(st.activation_energy / 1000, 3),
                    "kJ/mol", st.energy_source),
              Input("T", "site temperature", temp, "°C", f"site_temperature: {site.source}"),
              Input("T_r", "reference temperature", round(st.t_ref - 273.15, 2), "°C",
                    "maturity_defaults.yaml"),
              Input("T_0", "Nurse-Saul datum", round(st.datum - 273.15, 2), "°C",
                    "project input" if p.dossier.strength.datum_temperature else
                    "maturity_defaults.yaml (common practice)"),
              Input("t_e'", f"equivalent age at {t[-1] / DAY:g} d by the other method "
                    f"({'Nurse-Saul' if st.method == 'arrhenius' else 'Arrhenius'})",
                    round(te2[-1] / DAY, 3), "d", "ASTM C1074, for comparison"))
    formula = (r"t_e = \sum e^{-\frac{E}{R}\left(\frac{1}{T_a} - \frac{1}{T_r}\right)}\,\Delta t"
               if st.method == "arrhenius" else r"t_e = \frac{\sum (T_a - T_0)\,\Delta t}{T_r - T_0}")
    return Step(f"Equivalent age in the wall ({st.method.replace('_', '-')}, ASTM C1074)",
                formula, inputs, rf"t_e({t[-1] / DAY:g}\,\mathrm{{d}}) = {te[-1] / DAY:.2f}\,"
                r"\mathrm{d}", round(te[-1] / DAY, 4), "d", "t_e")


# ---------------------------------------------------------------- classes
@register("STR-CLASS", "Strength class (descriptive)", "mix", order=450)
def class_check(mix, ctx):
    """The 28-d mean compressive strength placed in the mortar classes of the practice."""
    from specgen import practice
    s, title = _comp(ctx, mix.id), "Strength class (descriptive)"
    key = practice.resolve(ctx.project.dossier).mortar_classes
    standard, word, basis = MORTAR_CLASSES[key]
    g28 = _group_at(s, 28 * DAY)
    if g28 is None:
        return not_assessed("STR-CLASS", title, mix.id, "no compressive results at 28 d, the "
                            "age at which the classes are defined", (basis,))
    table = refdata.load("strength_classes").data[key]
    m = g28.summary.mean
    cmp = scl.strongest_minimum(m, scl.classes_from_table(table), standard=standard,
                                source=table["source"])
    text = (f"28-d mean {m / MPA:.3g} MPa: {standard} {word} "
            f"{', '.join(cmp.matches) or 'below the lowest ' + word} (descriptive: the mean of "
            "the laboratory prisms, not a declared or characteristic value)")
    step = Step(f"28-d mean against the {standard} {word}s", r"\bar{f}_{28} \ge f_{min}",
                (Input("f̄28", "28-d mean compressive strength", round(m / MPA, 4), "MPa",
                       "STR-AGG"),),
                r"\bar{f}_{28} = " + f"{m / MPA:.3f}", round(m / MPA, 4), "MPa", "f̄28")
    return CheckResult(
        code="STR-CLASS", title=title, subject=mix.id, subject_kind="mix", status="info",
        value=round(m / MPA, 4), unit="MPa", basis=(basis,), steps=(step,), message=text,
        notes=tuple(cmp.lines) + (f"{standard} table: "
                                  + refdata.shown(cmp.source, table.get("tag", "")),
                                  _binder_class_note(mix, ctx.project)),
        quantities=(Quantity("strength_classes", {"standard": standard, "table": key,
                                                  "classes": list(cmp.matches)}, "",
                             "mortar class met (descriptive)"),))


def _binder_class_note(mix, project) -> str:
    """EN 459-1 classes are the binder's: say which the binders declare, never infer one."""
    declared = []
    for part in mix.binders:
        b = project.binders.get(part.binder)
        if b is not None:
            declared.append(f"{b.id} {b.declared_class or 'no class declared'}")
    return ("EN 459-1 strength classes (NHL 2, 3.5, 5 …) belong to the binder, tested in the "
            "standard mortar of EN 196-1 (EN 459-2), not to this mix; declared: "
            + ("; ".join(declared) or "—"))
