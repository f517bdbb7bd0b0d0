"""DUR-SOUND (binder): soundness of the binder — late-slaking free lime and periclase.

Measured results decide: the expansion test (Le Chatelier, EN 196-3 / EN 459-2; or autoclave,
ASTM C151) against the limit of the binder's family, free CaO and free MgO against limits of
common practice.  When nothing is measured, the risk is read from the potential phases (the
range of free lime over the aluminate assignments, all MgO as periclase) and the firing
peak against the kiln stages, and the test is asked for: the verdict is *hold*.  A slaked
lime carries its lime as hydrate, so for limes the phase estimate says nothing about
soundness and only the test (behind a declared EN 459-1 class, or run for the project) does.
"""
from __future__ import annotations

from dataclasses import replace

from specgen import refdata
from specgen.checks import durability_common as dc
from specgen.checks.chemistry_common import atomic_weights, binder_analysis, prepared
from specgen.checks.registry import declare, register
from specgen.checks.result import Basis, CheckResult, Input, Limit, Quantity, Step, worst
from specgen.science import soundness as sd
from specgen.science.oxides import ChemistryInputError

declare("free_oxide_range", "%", "free lime of the phase estimate under each aluminate "
        "assignment {assignment: %} and the periclase upper bound, with the firing position")

TITLE = "Soundness of the binder (free lime, expansion)"
SLAKED = {"nhl", "hl", "fl", "air_lime"}
EXPANSION_TEST = dc.asked(
    "soundness (expansion)", "Le Chatelier expansion (EN 196-3; EN 459-2 for building limes), "
    "with free CaO by ethylene-glycol extraction and free MgO (periclase) by XRD",
    "late slaking of free lime or periclase bursts joints", "DUR-SOUND")


@register("DUR-SOUND", TITLE, "binder", order=158, matrix="durability", column="binder soundness")
def soundness_check(binder, ctx) -> CheckResult:
    """Measured expansion and free oxides against limits; else the risk and the test asked for."""
    s = binder.soundness
    if s is not None and any(v is not None for v in (s.expansion, s.autoclave_expansion,
                                                     s.free_cao, s.free_mgo)):
        return _measured(binder, s, ctx)
    return _unmeasured(binder, ctx)


def _limits(binder, ctx):
    """The rules of the binder's family: a building lime's (EN 459-1), a natural cement's
    (ASTM C10/C10M where it gives one, else EN 197-1's cement limit), a portland cement's."""
    lime = binder.type in SLAKED
    auto = ("autoclave_expansion_max_natural_cement" if binder.type == "natural_cement"
            else "autoclave_expansion_max")
    return (dc.rule(ctx, "expansion_max_lime" if lime else "expansion_max_cement"),
            dc.rule(ctx, "free_cao_max_lime" if lime else "free_cao_max_cement"),
            dc.rule(ctx, "free_mgo_max"), dc.rule(ctx, auto))


def _so3(binder, ctx):
    """(SO3 %, analysis id) of a natural cement, whose standard limits it; else None."""
    if binder.type != "natural_cement":
        return None
    an = binder_analysis(binder, ctx.project)
    if an is None or "SO3" not in an.mass_percent:
        return None
    return an.mass_percent["SO3"], an.id


def _measured(binder, s, ctx) -> CheckResult:
    exp_r, cao_r, mgo_r, auto_r = _limits(binder, ctx)
    src = f"materials.yaml {binder.id}.soundness ({s.laboratory or 'laboratory not named'})"
    rows = [("E", "Le Chatelier expansion", None if s.expansion is None else s.expansion * 1e3,
             "mm", exp_r, src),
            ("E_a", "autoclave expansion", None if s.autoclave_expansion is None
             else 100 * s.autoclave_expansion, "%", auto_r, src),
            ("CaO_f", "free CaO", s.free_cao, "%", cao_r, src),
            ("MgO_f", "free MgO", s.free_mgo, "%", mgo_r, src)]
    so3 = _so3(binder, ctx)
    if so3 is not None:
        rows.append(("SO3", "SO3", so3[0], "%", dc.rule(ctx, "so3_max_natural_cement"),
                     f"analysis {so3[1]}"))
    inputs, words, verdicts, used = [], [], {}, []
    for sym, name, val, unit, r, where in rows:
        if val is None:
            continue
        inputs += [Input(sym, name, round(val, 4), unit, where),
                   dc.rule_input(ctx, sym + ",max", r.key.split(".")[1])]
        ok = val <= r.value
        verdicts[sym] = "pass" if ok else "fail"
        used.append(r)
        words.append(f"{name} {val:g} {unit} {'≤' if ok else '>'} {r.value:g} {unit}")
    expansion = [verdicts[k] for k in ("E", "E_a") if k in verdicts]
    oxides = [verdicts[k] for k in ("CaO_f", "MgO_f", "SO3") if k in verdicts]
    tests = []
    if expansion:
        status = worst(expansion)
        if "fail" in oxides and status == "pass":
            status = "attention"
            words.append("oxides above the limit although the expansion is within it: "
                         "watch the trial panel for pop-outs")
    else:
        status = "fail" if "fail" in oxides else "attention"
        tests.append(EXPANSION_TEST)
        words.append("no expansion test: commission " + EXPANSION_TEST["method"])
    status, notes = dc.memory_gate(ctx, status, used)
    step = Step("Measured soundness against the limits of the binder's family",
                r"E \le E_{max},\ CaO_f \le CaO_{f,max},\ MgO_f \le MgO_{f,max}", tuple(inputs),
                r",\ ".join(rf"\text{{{dc.tex(w)}}}" for w in words[:5]), float(len(verdicts)),
                "", "n")
    head = next((i for i in inputs if i.symbol in ("E", "E_a")), inputs[0])
    # the limit shown is the one of the value shown: the autoclave's (%) when only it was run
    lim_r, lim_w, lim_u = ((auto_r, "autoclave expansion", "%") if head.symbol == "E_a"
                           else (exp_r, "expansion", "mm"))
    return CheckResult(code="DUR-SOUND", title=TITLE, subject=binder.id, subject_kind="binder",
                       status=status, value=head.value, unit=head.unit,
                       basis=tuple(dict.fromkeys(r.basis for r in used)), steps=(step,),
                       limit=Limit("<=", high=lim_r.value, unit=lim_u, text=f"{lim_w} ≤ "
                                   f"{lim_r.value:g} {lim_u}", rule=lim_r.key),
                       message="; ".join(words), notes=tuple(notes),
                       quantities=tuple(dc.tests_quantity(ctx, binder.id, tests)))


def _unmeasured(binder, ctx) -> CheckResult:
    steps, risks, notes, q = [], [], [], {}
    if binder.type in SLAKED:
        notes.append("a slaked lime holds its lime as hydrate: the phase estimate's free lime is "
                     "not late-slaking lime, so only the soundness test tells")
        if binder.declared_class:
            risks.append(f"declared {binder.declared_class}: ask for the soundness result "
                         "behind the declared EN 459-1 class")
    else:
        steps, risks, q = _phase_risk(binder, ctx)
    fire = _firing(binder, ctx)
    if fire:
        steps.append(fire[0])
        if fire[1] != "within":
            risks.append(fire[2])
        q["firing"] = fire[2]
    status = "hold" if risks and binder.type not in SLAKED else "attention"
    msg = ("nothing measured; " + ("; ".join(risks) if risks else "no risk indicated by the "
                                   "analysis or the firing") + f" — commission "
           f"{EXPANSION_TEST['method']}")
    quantities = dc.tests_quantity(ctx, binder.id, [EXPANSION_TEST])
    if q.get("free_lime"):
        quantities.append(Quantity("free_oxide_range", q, "%", "free lime range"))
    return CheckResult(code="DUR-SOUND", title=TITLE, subject=binder.id, subject_kind="binder",
                       status=status, value=None, unit="",
                       basis=(Basis("common practice", note="late-slaking free lime and "
                                    "periclase; EN 196-3 / EN 459-2 soundness tests"),),
                       steps=tuple(steps), message=msg, notes=tuple(notes),
                       quantities=tuple(quantities))


def _phase_risk(binder, ctx):
    an = binder_analysis(binder, ctx.project)
    if an is None:
        return [], ["no analysis: free lime cannot be bounded"], {}
    try:
        rng = sd.free_oxide_range(prepared(an).ox, atomic_weights())
    except ChemistryInputError as exc:
        return [], [f"free lime cannot be bounded ({exc})"], {}
    cao_r, mgo_r = dc.rule(ctx, "free_cao_max_cement"), dc.rule(ctx, "free_mgo_max")
    inputs = tuple(Input(f"f_{i + 1}", f"free lime, assignment {k}", round(v, 3), "%",
                         f"phase estimate of analysis {an.id}")
                   for i, (k, v) in enumerate(rng.free_lime.items()))
    inputs += (Input("M", "MgO, all as periclase (upper bound)", round(rng.periclase, 3), "%",
                     f"analysis {an.id}"), dc.rule_input(ctx, "CaO_f,max", "free_cao_max_cement"),
               dc.rule_input(ctx, "MgO_f,max", "free_mgo_max"))
    step = Step("Free lime and periclase the analysis allows (no measurement)",
                r"CaO_f \in [\min_a f_a,\ \max_a f_a],\quad MgO_f \le MgO", inputs,
                rf"CaO_f \in [{rng.low:.2f},\ {rng.high:.2f}]\,\%,\ MgO_f \le {rng.periclase:.2f}\,\%",
                round(rng.high, 3), "%", "CaO_f")
    risks = []
    if rng.high > cao_r.value:
        risks.append(f"free lime could reach {rng.high:.1f} % (range {rng.low:.1f}–{rng.high:.1f} "
                     f"% over the aluminate assignments) > {cao_r.value:g} %")
    if rng.periclase > mgo_r.value:
        risks.append(f"periclase could reach {rng.periclase:.1f} % > {mgo_r.value:g} %")
    so3 = _so3(binder, ctx)
    if so3 is not None:
        so3_r = dc.rule(ctx, "so3_max_natural_cement")
        rel = ">" if so3[0] > so3_r.value else r"\le"
        step = replace(step, title="Free lime, periclase and SO3 the analysis allows (no "
                       "measurement of soundness)", inputs=step.inputs + (
            Input("SO3", "SO3", so3[0], "%", f"analysis {so3[1]}"),
            dc.rule_input(ctx, "SO3,max", "so3_max_natural_cement")),
            formula=step.formula + r",\quad SO_3 \le SO_{3,max}",
            substituted=step.substituted
            + rf",\ SO_3 = {so3[0]:g} {rel} {so3_r.value:g}\,\%")
        if so3[0] > so3_r.value:
            risks.append(f"SO3 {so3[0]:g} % > {so3_r.value:g} % (ASTM C10/C10M)")
    q = {"free_lime": {k: round(v, 3) for k, v in rng.free_lime.items()},
         "periclase_max": round(rng.periclase, 3)}
    return [step], risks, q


def _firing(binder, ctx):
    peak = ctx.quantity(binder.id, "firing_peak")
    if peak is None:
        return None
    stages = refdata.load("kiln_stages")
    where, why = sd.firing_position(float(peak.value), stages.data)
    step = Step("Firing peak against the kiln stages", r"T_{peak}\ \text{against the stages}",
                (Input("T_peak", "peak temperature of the firing", peak.value, "°C",
                       f"CHEM-FIRING/{binder.id}"),
                 Input("stages", "kiln stages", stages.source, "", "content/data/kiln_stages.yaml")),
                rf"\text{{{dc.tex(why)}}}", float(peak.value), "°C", "T_peak")
    return step, where, why
