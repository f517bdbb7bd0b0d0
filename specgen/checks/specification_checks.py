"""Specification checks: the mortar chosen per zone, sampling, cost, trial panels, hold points.

Codes: ``SPEC-COST`` (zone, one result per priced candidate), ``SPEC-SELECT`` (one result
per zone), ``SPEC-SAMPLING`` (zone), ``SPEC-PANEL`` (zone), ``SPEC-HOLD`` (project).  They run
after every other check: the selection is judged on the results of the checks that apply to
the chosen mortar.  A chosen mortar that fails a check without a written justification is an
input error (the specifier must either justify it or choose again).
"""
from __future__ import annotations

from specgen.checks.registry import declare, register
from specgen.checks.result import STATUS_WORDS, Basis, CheckResult, Input, Quantity, Step
from specgen.errors import InputErrors, Problem
from specgen.project.specification import SPEC_FILE
from specgen.science import site_tests as st

CHOICE = Basis("project requirement", note="specification.yaml selections: a chosen mortar that "
               "fails a check stands only with a written justification")
SAMPLING = Basis("common practice", note="sampling rule of specification.yaml site_tests or "
                 "content/rules/specification.yaml")
COST = Basis("project requirement", note="specification.yaml unit_prices; mortar volume from "
             "WORKS-QTY")
PANELS = Basis("common practice", note="trial panels are judged by eye, dry, in daylight, before "
               "the works proceed")
HOLDS = Basis("project requirement", note="specification.yaml hold_points")

declare("selected_mix", "", "mix chosen for a zone (specification.yaml), by zone")
declare("selection_status", "", "status of a zone's selection: pass, attention (a failing check "
        "justified, or a held one), hold (nothing selected) or not_assessed")
declare("sample_sets", "", "sets of prisms for a zone's works: {sets, by_area, working_days, "
        "prisms, ages_d, per_set}")
declare("cost_per_m2", "currency/m²", "cost of a candidate mortar per m² of the zone's wall, from "
        "its unit price and the zone's mortar volume")
declare("trial_panel", "", "trial panels of a zone's chosen mortar: {id: {judgement, judged_dry, "
        "date}}")
declare("hold_points", "", "hold points with their state, releasing role, revision released in, "
        "evidence and state in each earlier revision")


def spec_of(ctx):
    """The loaded specification.yaml (project/specification.py), or None."""
    return getattr(ctx.project, "specification", None)


def applicable(results, project, zone_id: str, mix_id: str) -> list[CheckResult]:
    """Results of every check that applies to ``mix_id`` in ``zone_id`` (SPEC-* excepted)."""
    mix = project.mixes.get(mix_id)
    binders = {b.binder for b in mix.binders} if mix else set()
    subjects = {mix_id, f"{zone_id}/{mix_id}"} | binders
    return [r for r in results if r.subject in subjects and not r.code.startswith("SPEC-")]


def _result(code, title, subject, status, value, unit, basis, message, **kw) -> CheckResult:
    return CheckResult(code=code, title=title, subject=subject, subject_kind=kw.pop("kind", "zone"),
                       status=status, value=value, unit=unit, basis=(basis,), message=message,
                       **kw)


# ---------------------------------------------------------------- cost per m²
@register("SPEC-COST", "Cost of a candidate per m² of wall", "zone", order=890)
def cost_check(zone, ctx) -> list[CheckResult]:
    """(price / priced quantity) × mortar volume of the zone / wall area, per priced candidate."""
    spec = spec_of(ctx)
    prices = {u.mix: (i, u) for i, u in enumerate(spec.doc.unit_prices)} if spec else {}
    return [_cost_one(zone, m, *prices[m], spec.doc.currency, ctx)
            for m in zone.candidates if m in prices]


def _cost_one(zone, mix_id, i, price, currency, ctx) -> CheckResult:
    title, subject = "Cost of a candidate per m² of wall", f"{zone.id}/{mix_id}"
    vol = ctx.quantity(zone.id, "mortar_volume")
    unit = f"{currency}/m²".strip("/") if currency else "/m²"
    if vol is None or not zone.area:
        why = "no wall area for the zone" if not zone.area else "no mortar volume (WORKS-QTY)"
        return _result("SPEC-COST", title, subject, "not_assessed", None, "", COST,
                       f"not assessed: {why}")
    cost = st.cost_per_area(price.price, price.per, vol.value, zone.area)
    src = price.source or f"{SPEC_FILE} unit_prices[{i}]"
    inputs = (Input("P", f"price of {mix_id}", price.price, currency, src),
              Input("Q", "priced quantity", round(price.per, 9), "m³", f"{SPEC_FILE} unit_prices[{i}].per"),
              Input("V", "mortar volume with wastage", vol.value, "m³", f"WORKS-QTY/{zone.id}"),
              Input("A", "wall area", zone.area, "m²", f"dossier.yaml {zone.id}.area"))
    step = Step("Cost per m² of wall", r"c = \frac{P}{Q}\,\frac{V}{A}", inputs,
                rf"c = \frac{{{price.price:g}}}{{{price.per:g}}} \times \frac{{{vol.value:g}}}"
                rf"{{{zone.area:g}}} = {cost:.2f}", round(cost, 2), unit, "c")
    return _result("SPEC-COST", title, subject, "info", round(cost, 2), unit, COST,
                   f"{cost:.2f} {unit} ({price.price:g} {currency} per {price.per:g} m³ × "
                   f"{vol.value:.3g} m³ / {zone.area:g} m²)", steps=(step,),
                   quantities=(Quantity("cost_per_m2", round(cost, 2), unit, "cost per m²"),))


# ---------------------------------------------------------------- selection
@register("SPEC-SELECT", "Mortar selected for the zone", "project", order=900)
def selection_check(project, ctx) -> list[CheckResult]:
    """One result per zone; unjustified failing choices stop the run with every one named."""
    spec, out, problems = spec_of(ctx), [], []
    for zone in project.dossier.zones:
        res, problem = _select_one(zone, spec, ctx)
        out.append(res)
        if problem:
            problems.append(problem)
    if problems:
        raise InputErrors(problems)
    return out


def _select_one(zone, spec, ctx) -> tuple[CheckResult, Problem | None]:
    title = "Mortar selected for the zone"
    if spec is None:
        return _result("SPEC-SELECT", title, zone.id, "not_assessed", None, "", CHOICE,
                       f"not assessed: no {SPEC_FILE}; add one with a selection for each zone",
                       quantities=(Quantity("selection_status", "not_assessed", "", "selection"),)
                       ), None
    found = spec.selection_for(zone.id)
    if found is None:
        return _result("SPEC-SELECT", title, zone.id, "hold", None, "", CHOICE,
                       f"no mortar selected for zone {zone.id}: add a selection to {SPEC_FILE} "
                       f"(candidates: {', '.join(zone.candidates) or 'none'})",
                       quantities=(Quantity("selection_status", "hold", "", "selection"),)), None
    i, sel = found
    checks = applicable(ctx.results, ctx.project, zone.id, sel.mix)
    failed = [c for c in checks if c.status == "fail"]
    if failed and not sel.justification:
        return _judged(zone, sel, checks, "fail"), _unjustified(zone, i, sel, failed, spec, ctx)
    held = [c for c in checks if c.status == "hold"]
    return _judged(zone, sel, checks, "attention" if failed or held else "pass"), None


def _unjustified(zone, i, sel, failed, spec, ctx) -> Problem:
    codes = _and([c.code for c in failed])
    clean = [m for m in zone.candidates if m != sel.mix and not any(
        c.status == "fail" for c in applicable(ctx.results, ctx.project, zone.id, m))]
    other = (f"choose {' or '.join(clean)}, which fail{'s' if len(clean) == 1 else ''} no check"
             if clean else "no other candidate of the zone fails no check")
    return Problem(SPEC_FILE, f"mix '{sel.mix}' chosen for zone {zone.id} fails {codes}, and no "
                   "justification is given.", line=spec.line("selections", i, "mix"),
                   field=f"selections[{i}].justification",
                   fix=f"add 'justification:' saying why the choice stands despite the failed "
                       f"check{'s' if len(failed) > 1 else ''}, or {other}.")


def _and(items: list[str]) -> str:
    return items[0] if len(items) == 1 else ", ".join(items[:-1]) + " and " + items[-1]


def _judged(zone, sel, checks, status: str) -> CheckResult:
    counts = {s: [c for c in checks if c.status == s] for s in STATUS_WORDS}
    inputs = tuple(Input(c.code, c.title, STATUS_WORDS[c.status], "", c.key) for c in checks)
    inputs += (Input("J", "justification", "given" if sel.justification else "none", "",
                     f"{SPEC_FILE} {zone.id}.justification"),)
    sub = r",\ ".join(rf"\mathrm{{{w.replace(' ', '~')}}}: {len(counts[s])}"
                      for s, w in STATUS_WORDS.items() if counts[s])
    step = Step(f"Checks on {sel.mix} in zone {zone.id}",
                r"\mathrm{status} = \mathrm{pass}\ \mathrm{unless}\ n_{\mathrm{fail}} + "
                r"n_{\mathrm{hold}} > 0\ (\mathrm{then\ attention,\ a\ fail\ only\ with}\ J)",
                inputs, sub or "-", len(counts["fail"]), "", "n_fail")
    msg = f"{sel.mix} selected"
    if counts["fail"]:
        msg += (f" although it fails {_and([c.code for c in counts['fail']])} — justification: "
                f"{sel.justification}")
    elif counts["hold"]:
        msg += f"; decision rests on held check(s) {_and([c.code for c in counts['hold']])}"
    else:
        msg += "; it fails no check"
    notes = tuple(f"{c.key}: {STATUS_WORDS[c.status]} — {c.message}"
                  for c in counts["fail"] + counts["hold"] + counts["attention"])
    return _result("SPEC-SELECT", "Mortar selected for the zone", zone.id, status, sel.mix, "",
                   CHOICE, msg, steps=(step,), notes=notes,
                   quantities=(Quantity("selected_mix", sel.mix, "", "mix selected"),
                               Quantity("selection_status", status, "", "selection")))


# ---------------------------------------------------------------- sampling
def _setting(spec, name: str, rules, kind: str):
    """(value SI, source): the project's site_tests value, else the rule."""
    from specgen import units
    given = getattr(spec.doc.site_tests, name) if spec else None
    if given is not None:
        return given, f"{SPEC_FILE} site_tests.{name}"
    r = rules[f"specification.{name}"]
    value = units.to_si(r.value, r.unit, kind) if r.unit else r.value
    return value, f"rule specification.{name} ({r.basis.text()})"


def test_ages(project, spec) -> list[tuple[float, str]]:
    """(age in s, source) of the site tests: the project's list, else the required ages."""
    if spec and spec.doc.site_tests.test_ages:
        return [(a, f"{SPEC_FILE} site_tests.test_ages") for a in spec.doc.site_tests.test_ages]
    return [(m.age, "dossier.yaml requirements.min_compressive")
            for m in project.dossier.requirements.min_compressive]


@register("SPEC-SAMPLING", "Sets of site prisms for the zone", "zone", order=910)
def sampling_check(zone, ctx) -> CheckResult:
    """n = max(n_min, ⌈A / a⌉, ⌈V / (q T)⌉) sets; prisms = n × per set × test ages."""
    spec, title = spec_of(ctx), "Sets of site prisms for the zone"
    vol = ctx.quantity(zone.id, "mortar_volume")
    by_day = (spec.doc.site_tests.per_working_day if spec else True) and vol is not None
    if not zone.area and not by_day:
        return _result("SPEC-SAMPLING", title, zone.id, "not_assessed", None, "", SAMPLING,
                       f"not assessed: give area for zone {zone.id} in dossier.yaml (or the works "
                       "quantities, so that sets per day's work can be counted)")
    s = _sampling_inputs(zone, spec, ctx.rules)
    n = st.sample_sets(s["n_min"][0], zone.area, s["a"][0], vol.value if by_day else None,
                       s["q"][0], s["T"][0])
    ages = test_ages(ctx.project, spec)
    total = st.prisms(n.sets, s["p"][0], len(ages))
    inputs = [Input("n_min", "fewest sets", s["n_min"][0], "", s["n_min"][1]),
              Input("a", "wall area per set", s["a"][0], "m²", s["a"][1]),
              Input("p", "prisms per set and age", s["p"][0], "", s["p"][1]),
              Input("k", "test ages", ", ".join(f"{t / 86400:g}" for t, _ in ages) or "none",
                    "d", ages[0][1] if ages else "none given")]
    if zone.area:
        inputs.append(Input("A", "wall area", zone.area, "m²", f"dossier.yaml {zone.id}.area"))
    if by_day:
        inputs += [Input("V", "mortar volume with wastage", vol.value, "m³", f"WORKS-QTY/{zone.id}"),
                   Input("q", "placing rate", round(s["q"][0] * 3.6e6, 4), "L/h", s["q"][1]),
                   Input("T", "placing hours per day", s["T"][0] / 3600, "h", s["T"][1])]
    return _sampling_result(zone, n, total, s, ages, inputs, vol)


def _sampling_inputs(zone, spec, rules) -> dict[str, tuple]:
    """The sampling settings as (value, source): per set, minimum, rate, working day."""
    from specgen.checks.works_common import rule_si
    a, n_min, per = (_setting(spec, k, rules, kind) for k, kind in (
        ("area_per_set", "area"), ("min_sets", "dimensionless"), ("prisms_per_set", "dimensionless")))
    rate = rule_si(rules, "placing_rate", "volume_rate")
    q = ((zone.placing_rate, f"dossier.yaml {zone.id}.placing_rate") if zone.placing_rate
         else (rate.value, rate.source))
    day = rule_si(rules, "working_day", "time")
    return {"a": a, "n_min": (int(n_min[0]), n_min[1]), "p": (int(per[0]), per[1]), "q": q,
            "T": (day.value, day.source)}


def _sampling_result(zone, n, total, s, ages, inputs, vol) -> CheckResult:
    terms = [str(s["n_min"][0])]
    if n.by_area is not None:
        terms.append(rf"\lceil {zone.area:g}/{s['a'][0]:g} \rceil = {n.by_area}")
    if n.working_days is not None:
        terms.append(rf"\lceil {vol.value * 1000:.4g}/({s['q'][0] * 3.6e6:g} \times "
                     rf"{s['T'][0] / 3600:g}) \rceil = {n.working_days}")
    per = s["p"][0]
    joined = r",\ ".join(terms)
    sub = (rf"n = \max({joined}) = {n.sets};\ N = {n.sets} \times {per} \times "
           rf"{len(ages)} = {total}")
    step = Step("Sets of prisms and prisms to make",
                r"n = \max\left(n_{\min},\ \lceil A/a \rceil,\ \lceil V/(qT) \rceil\right),"
                r"\quad N = n\,p\,k", tuple(inputs), sub, n.sets, "", "n")
    q = {"sets": n.sets, "by_area": n.by_area, "working_days": n.working_days, "prisms": total,
         "per_set": per, "ages_d": [round(t / 86400, 3) for t, _ in ages]}
    why = [f"{n.by_area} by area" if n.by_area is not None else "",
           f"{n.working_days} day(s) of work" if n.working_days is not None else ""]
    return _result("SPEC-SAMPLING", "Sets of site prisms for the zone", zone.id, "info", n.sets,
                   "", SAMPLING, f"{n.sets} set(s) of {per} prisms per test age "
                   f"({'; '.join(w for w in why if w) or 'the minimum'}): {total} prisms",
                   steps=(step,), quantities=(Quantity("sample_sets", q, "", "site prism sets"),))


# ---------------------------------------------------------------- trial panels
@register("SPEC-PANEL", "Trial panel of the chosen mortar", "zone", order=920)
def panel_check(zone, ctx) -> CheckResult:
    """Accepted panel judged dry → pass; rejected only → fail; pending, wet or none → attention."""
    title, spec = "Trial panel of the chosen mortar", spec_of(ctx)
    chosen = ctx.quantity(zone.id, "selected_mix")
    if spec is None or chosen is None:
        return _result("SPEC-PANEL", title, zone.id, "not_assessed", None, "", PANELS,
                       f"not assessed: no mortar selected for zone {zone.id}")
    mix = chosen.value
    panels = [(i, tp) for i, tp in enumerate(spec.doc.trial_panels)
              if tp.mix == mix and tp.zone in (None, zone.id)]
    inputs = tuple(Input(tp.id, f"panel of {tp.mix} at {tp.location}", _verdict(tp), "",
                         f"{SPEC_FILE} trial_panels[{i}]") for i, tp in panels)
    good = [tp for _, tp in panels if tp.judgement == "accepted" and tp.judged_dry]
    if good:
        status, msg = "pass", f"{_and([tp.id for tp in good])} of {mix} accepted, judged dry"
    elif panels and all(tp.judgement == "rejected" for _, tp in panels):
        status, msg = "fail", f"every trial panel of {mix} was rejected: choose again or build " \
                              "a new panel"
    elif panels:
        status, msg = "attention", f"no panel of {mix} accepted when dry yet (" + "; ".join(
            f"{tp.id} {_verdict(tp)}" for _, tp in panels) + ")"
    else:
        status, msg = "attention", f"no trial panel of {mix} is recorded for zone {zone.id}"
    step = Step(f"Trial panels of {mix}", r"\mathrm{accepted} \wedge \mathrm{judged\ dry}",
                inputs, f"{len(good)}\\ \\mathrm{{of}}\\ {len(panels)}", len(good), "", "n")
    q = {tp.id: {"judgement": tp.judgement, "judged_dry": tp.judged_dry,
                 "date": tp.date.isoformat()} for _, tp in panels}
    return _result("SPEC-PANEL", title, zone.id, status, len(good), "", PANELS, msg,
                   steps=(step,), quantities=(Quantity("trial_panel", q, "", "trial panels"),))


def _verdict(tp) -> str:
    if tp.judgement == "pending":
        return "pending"
    return f"{tp.judgement}{', judged dry' if tp.judged_dry else ', judged before it was dry'}"


# ---------------------------------------------------------------- hold points
@register("SPEC-HOLD", "Hold points", "project", order=930)
def hold_check(project, ctx) -> CheckResult:
    """State of every hold point, carried from earlier revisions; a re-opened one is flagged."""
    title, spec, code = "Hold points", spec_of(ctx), project.dossier.project.code
    if spec is None:
        return _result("SPEC-HOLD", title, code, "not_assessed", None, "", HOLDS,
                       f"not assessed: no {SPEC_FILE}", kind="project")
    rev = project.revision.code
    table, notes = {}, []
    for h in spec.doc.hold_points:
        history = {e.revision: e.hold_points[h.id][0] for e in spec.earlier if h.id in e.hold_points}
        history[rev] = h.state
        notes += _carry_notes(h, spec.earlier, rev)
        table[h.id] = {"state": h.state, "stage": h.stage, "released_by": h.released_by,
                       "released_in": h.released_in, "evidence": h.evidence, "check": h.check,
                       "history": history}
    listed = {h.id for h in spec.doc.hold_points}
    notes += [f"{hid} of {e.revision} is no longer listed: say why it was withdrawn"
              for e in spec.earlier[-1:] for hid in e.hold_points if hid not in listed]
    released = [h for h in spec.doc.hold_points if h.state == "released"]
    opened = [h.id for h in spec.doc.hold_points if h.state == "open"]
    inputs = tuple(Input(h.id, h.what, " → ".join(f"{r} {s}" for r, s in table[h.id]["history"]
                                                  .items()), "", f"{SPEC_FILE} hold_points[{i}]")
                   for i, h in enumerate(spec.doc.hold_points))
    step = Step("Hold points and their state in each revision", r"\mathrm{open} \to "
                r"\mathrm{released\ (once,\ on\ evidence)}", inputs,
                rf"\mathrm{{released}}: {len(released)},\ \mathrm{{open}}: {len(opened)}",
                len(opened), "", "n_open")
    msg = (f"{len(table)} hold point(s): {len(released)} released"
           + (f" ({', '.join(f'{h.id} in {h.released_in}' for h in released)})" if released else "")
           + f", {len(opened)} open" + (f" ({', '.join(opened)})" if opened else ""))
    return _result("SPEC-HOLD", title, code, "attention" if notes else "info", len(opened), "",
                   HOLDS, msg, kind="project", steps=(step,), notes=tuple(notes),
                   quantities=(Quantity("hold_points", table, "", "hold points"),))


def _carry_notes(h, earlier, rev: str) -> list[str]:
    """A hold point released in an earlier revision stays released, in that revision."""
    out = []
    for e in earlier:
        state, released_in = e.hold_points.get(h.id, (None, None))
        if state == "released" and h.state == "open":
            out.append(f"{h.id} was released in {released_in} ({e.revision}) and is open again "
                       f"in {rev}: record why in its evidence")
        elif state == "released" and released_in != h.released_in:
            out.append(f"{h.id} was released in {released_in} according to {e.revision}, but in "
                       f"{h.released_in} according to {rev}")
    return out
