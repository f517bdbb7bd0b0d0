"""Specification checks: the mortar chosen per zone, sampling, cost, trial panels, hold points.

Codes: ``SPEC-COST`` (zone, one result per priced candidate), ``SPEC-SELECT`` (one result
per zone), ``SPEC-SAMPLING`` and ``SPEC-ACCEPT`` (zone); trial panels and hold points are in
``specification_record_checks``.  They run
after every other check: the selection is judged on the results of the checks that apply to
the chosen mortar.  A chosen mortar that fails a check without a written justification is an
input error (the specifier must either justify it or choose again).
"""
from __future__ import annotations

from specgen.checks.registry import declare, register
from specgen.checks.result import STATUS_WORDS, Basis, CheckResult, Input, Quantity, Step
from specgen.checks.strength_checks import DAY, age_key
from specgen.errors import InputErrors, Problem
from specgen.science import site_tests as st
from specgen.views import SPEC_FILE, applicable

CHOICE = Basis("project requirement", note="specification.yaml selections: a chosen mortar that "
               "fails a check stands only with a written justification")
SAMPLING = Basis("common practice", note="sampling rule of specification.yaml site_tests or "
                 "content/rules/specification.yaml")
COST = Basis("project requirement", note="specification.yaml unit_prices; mortar volume from "
             "WORKS-QTY")

declare("selected_mix", "", "mix chosen for a zone (specification.yaml), by zone")
declare("selection_status", "", "status of a zone's selection: pass, attention (a failing check "
        "justified, or a held one), needs_decision (a failing check the justification does not "
        "name), hold (nothing selected) or not_assessed")
declare("sample_sets", "", "sets of prisms for a zone's works: {sets, by_area, working_days, "
        "prisms, ages_d, per_set}")
declare("site_acceptance", "MPa", "site acceptance criteria of a zone's chosen mortar by test "
        "age {characteristic_min, individual_min, source} and the long-term cap")
declare("cost_per_m2", "currency/m²", "cost of a candidate mortar per m² of the zone's wall, from "
        "its unit price and the zone's mortar volume")


def spec_of(ctx):
    """The loaded specification.yaml (project/specification.py), or None."""
    return getattr(ctx.project, "specification", None)


def _result(code, title, subject, status, value, unit, basis, message, **kw) -> CheckResult:
    return CheckResult(code=code, title=title, subject=subject, subject_kind=kw.pop("kind", "zone"),
                       status=status, value=value, unit=unit, basis=(basis,), message=message,
                       **kw)


# ---------------------------------------------------------------- cost per m²
@register("SPEC-COST", "Cost of a candidate per m² of wall", "zone", order=890)
def cost_check(zone, ctx) -> list[CheckResult]:
    """(price / priced quantity) × mortar volume of the zone / wall area, per priced candidate."""
    spec = spec_of(ctx)
    prices = {u.mix: u for u in spec.doc.unit_prices} if spec else {}
    return [_cost_one(zone, m, prices[m], spec.doc.currency, ctx)
            for m in zone.candidates if m in prices]


def _cost_one(zone, mix_id, price, currency, ctx) -> CheckResult:
    title, subject = "Cost of a candidate per m² of wall", f"{zone.id}/{mix_id}"
    vol = ctx.quantity(zone.id, "mortar_volume")
    unit = f"{currency}/m²".strip("/") if currency else "/m²"
    if vol is None or not zone.area:
        why = "no wall area for the zone" if not zone.area else "no mortar volume (WORKS-QTY)"
        return _result("SPEC-COST", title, subject, "not_assessed", None, "", COST,
                       f"not assessed: {why}")
    cost = st.cost_per_area(price.price, price.per, vol.value, zone.area)
    src = price.source or f"{SPEC_FILE} unit_prices {mix_id}.price"
    inputs = (Input("P", f"price of {mix_id}", price.price, currency, src),
              Input("Q", "priced quantity", round(price.per, 9), "m³", f"{SPEC_FILE} unit_prices {mix_id}.per"),
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
    open_ = [c for c in failed if not covered(c, sel.covers)]
    if open_:
        return _judged(zone, sel, checks, "needs_decision", open_), None
    held = [c for c in checks if c.status == "hold"]
    return _judged(zone, sel, checks, "attention" if failed or held else "pass"), None


def covered(result, covers) -> bool:
    """Whether a justification's ``covers`` list names ``result`` (by CODE or CODE/subject)."""
    return any(ref == result.code or ref == result.key for ref in covers)


def _unjustified(zone, i, sel, failed, spec, ctx) -> Problem:
    codes = _and([c.code for c in failed])
    clean = [m for m in zone.candidates if m != sel.mix and not any(
        c.status == "fail" for c in applicable(ctx.results, ctx.project, zone.id, m))]
    other = (f"choose {' or '.join(clean)}, which fail{'s' if len(clean) == 1 else ''} no check"
             if clean else "choose another candidate (each of the others fails a check too)")
    return Problem(SPEC_FILE, f"mix '{sel.mix}' chosen for zone {zone.id} fails {codes}, and no "
                   "justification is given.", line=spec.line("selections", i, "mix"),
                   field=f"selections[{i}].justification",
                   fix=f"add 'justification:' saying why the choice stands despite the failed "
                       f"check{'s' if len(failed) > 1 else ''}, or {other}.")


def _and(items: list[str]) -> str:
    return items[0] if len(items) == 1 else ", ".join(items[:-1]) + " and " + items[-1]


def _judged(zone, sel, checks, status: str, uncovered=()) -> CheckResult:
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
    if uncovered:
        msg += (f"; it fails {_and([c.key for c in uncovered])}, which the justification does "
                f"not name: the selection needs a decision (answer it in the justification and "
                f"name it under covers, or choose again)")
    elif counts["fail"]:
        msg += (f" although it fails {_and([c.code for c in counts['fail']])} — justification: "
                f"{sel.justification}")
    elif counts["hold"]:
        held = counts['hold']
        msg += (f"; decision rests on held check{'s' if len(held) != 1 else ''} "
                f"{_and([c.code for c in held])}")
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
    given = getattr(spec.doc.site_tests, name) if spec else None
    if given is not None:
        return given, f"{SPEC_FILE} site_tests.{name}"
    r = rules[f"specification.{name}"]
    return r.si(kind), r.source()


def site_test_ages(project, spec, holds=()) -> list[tuple[float, str]]:
    """(age in s, source) of the site tests: the project's list, else the required ages;
    plus the ages that strength holds name (``holds``: (age s, source)), when not listed."""
    if spec and spec.doc.site_tests.test_ages:
        ages = [(a, f"{SPEC_FILE} site_tests.test_ages") for a in spec.doc.site_tests.test_ages]
    else:
        ages = [(m.age, "dossier.yaml requirements.min_compressive")
                for m in project.dossier.requirements.min_compressive]
    have = {round(a / DAY, 6) for a, _ in ages}
    for a, src in holds:
        if round(a / DAY, 6) not in have:
            ages.append((a, src))
            have.add(round(a / DAY, 6))
    return sorted(ages)


def strength_holds(ctx, zone_id: str) -> list[tuple[float, str]]:
    """(age s, source) that held strength verdicts of the zone's chosen mix name for testing."""
    chosen = ctx.quantity(zone_id, "selected_mix")
    acc = ctx.quantity(chosen.value, "acceptance") if chosen else None
    out = []
    for key, v in sorted((acc.value if acc else {}).items()):
        if v.get("hold_age_d"):
            code = "STR-MIN" if v["kind"] == "min" else "STR-MAX"
            out.append((v["hold_age_d"] * DAY, f"{code}/{chosen.value} hold ({key}): the age "
                        "that would decide"))
    return out


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
    ages = site_test_ages(ctx.project, spec, strength_holds(ctx, zone.id))
    total = st.prisms(n.sets, s["p"][0], len(ages))
    inputs = [Input("n_min", "fewest sets", s["n_min"][0], "", s["n_min"][1]),
              Input("a", "wall area per set", s["a"][0], "m²", s["a"][1]),
              Input("p", "prisms per set and age", s["p"][0], "", s["p"][1]),
              Input("k", "test ages", ", ".join(f"{t / DAY:g}" for t, _ in ages) or "none",
                    "d", _age_sources(ages))]
    if zone.area:
        inputs.append(Input("A", "wall area", zone.area, "m²", f"dossier.yaml {zone.id}.area"))
    if by_day:
        inputs += [Input("V", "mortar volume with wastage", vol.value, "m³", f"WORKS-QTY/{zone.id}"),
                   Input("q", "placing rate", round(s["q"][0] * 3.6e6, 4), "L/h", s["q"][1]),
                   Input("T", "placing hours per day", s["T"][0] / 3600, "h", s["T"][1])]
    return _sampling_result(zone, n, total, s, ages, inputs, vol)


def _age_sources(ages) -> str:
    """Where the test ages come from: each source once, with the ages it gives when there is
    more than one (an age a strength hold adds is not the dossier's requirement)."""
    by_source: dict[str, list[str]] = {}
    for t, src in ages:
        by_source.setdefault(src, []).append(f"{t / DAY:g}")
    if len(by_source) < 2:
        return next(iter(by_source), "none given")
    return "; ".join(f"{', '.join(d)} d: {src}" for src, d in by_source.items())


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
         "per_set": per, "ages_d": [round(t / DAY, 3) for t, _ in ages]}
    why = [f"{n.by_area} by area" if n.by_area is not None else "",
           f"{n.working_days} day(s) of work" if n.working_days is not None else ""]
    return _result("SPEC-SAMPLING", "Sets of site prisms for the zone", zone.id, "info", n.sets,
                   "", SAMPLING, f"{n.sets} set(s) of {per} prisms per test age "
                   f"({'; '.join(w for w in why if w) or 'the minimum'}): {total} prisms",
                   steps=(step,), quantities=(Quantity("sample_sets", q, "", "site prism sets"),))


# ---------------------------------------------------------------- site acceptance
@register("SPEC-ACCEPT", "Site acceptance criteria for the chosen mortar", "zone", order=915)
def acceptance_check(zone, ctx) -> CheckResult:
    """Per test age: f_k ≥ f_req (STR-MIN's limit) and every set mean ≥ r · f_req; cap from STR-MAX."""
    title, spec = "Site acceptance criteria for the chosen mortar", spec_of(ctx)
    chosen = ctx.quantity(zone.id, "selected_mix")
    verdicts = ctx.quantity(chosen.value, "acceptance") if chosen else None
    if chosen is None or verdicts is None:
        why = "no mortar selected" if chosen is None else "no strength requirement was judged"
        return _result("SPEC-ACCEPT", title, zone.id, "not_assessed", None, "", SAMPLING,
                       f"not assessed: {why} for zone {zone.id}")
    mix, (r, r_src) = chosen.value, _setting(spec, "individual_minimum", ctx.rules, "fraction")
    table, inputs, subs = _acceptance_rows(site_test_ages(ctx.project, spec, strength_holds(ctx, zone.id)), mix, r,
                                           verdicts.value)
    inputs.insert(0, Input("r", "individual minimum / required", round(100 * r, 4), "%", r_src))
    step = Step(f"Site acceptance of {mix} in zone {zone.id}",
                r"f_k \ge f_{req},\quad \bar f_{set} \ge r\,f_{req}", tuple(inputs),
                r",\ ".join(subs) or "-", len(subs), "", "ages")
    return _result("SPEC-ACCEPT", title, zone.id, "info", len(subs), "", SAMPLING,
                   _acceptance_message(table), steps=(step,),
                   quantities=(Quantity("site_acceptance", table, "MPa",
                                        "site acceptance criteria"),))


def _acceptance_rows(ages, mix: str, r: float, verdicts: dict) -> tuple[dict, list, list]:
    """The criteria per test age that has a requirement, and the cap (table, inputs, steps)."""
    table, inputs, subs = {}, [], []
    for age, _src in ages:
        key, d = age_key(age), f"{age / DAY:g}"
        if f"min {key}" not in verdicts:
            continue
        req = verdicts[f"min {key}"]["limit"]
        table[key] = {"characteristic_min": req, "individual_min": round(r * req, 4),
                           "source": f"STR-MIN/{mix}"}
        inputs.append(Input(f"f_req,{d}", f"required minimum at {d} d", req, "MPa",
                            f"STR-MIN/{mix} (dossier.yaml requirements)"))
        subs.append(rf"{d}\,\mathrm{{d}}: {r:g} \times {req:g} = {r * req:.3g}")
    cap = next(((k, v) for k, v in verdicts.items() if v["kind"] == "max"), None)
    if cap:
        age = cap[1]["age_d"]
        table["cap"] = {"age_d": age, "max": cap[1]["limit"], "source": f"STR-MAX/{mix}"}
        inputs.append(Input("f_max", f"cap at {age:g} d", cap[1]["limit"], "MPa",
                            f"STR-MAX/{mix} (dossier.yaml requirements)"))
    return table, inputs, subs


def _acceptance_message(table: dict) -> str:
    msg = "; ".join(f"{k}: f_k ≥ {v['characteristic_min']:g} MPa, each set ≥ "
                    f"{v['individual_min']:.3g} MPa" for k, v in table.items() if k != "cap")
    if "cap" in table:
        msg += f"; at {table['cap']['age_d']:g} d at most {table['cap']['max']:g} MPa"
    return msg or "no strength requirement at the site test ages"
