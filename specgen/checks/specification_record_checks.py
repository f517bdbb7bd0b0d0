"""Specification records: trial panels of the chosen mortars (SPEC-PANEL, zone) and hold
points with their state carried across revisions (SPEC-HOLD, project).
"""
from __future__ import annotations

from specgen.checks.registry import declare, register
from specgen.checks.result import Basis, CheckResult, Input, Quantity, Step
from specgen.checks.specification_checks import _and, _result, spec_of
from specgen.views import SPEC_FILE

PANELS = Basis("common practice", note="trial panels are judged by eye, dry, in daylight, before "
               "the works proceed")
HOLDS = Basis("project requirement", note="specification.yaml hold_points")

declare("trial_panel", "", "trial panels of a zone's chosen mortar: {id: {judgement, judged_dry, "
        "date}}")
declare("hold_points", "", "hold points with their state, releasing role, revision released in, "
        "evidence and state in each earlier revision")


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
                         f"{SPEC_FILE} trial_panels {tp.id}") for _, tp in panels)
    good = [tp for _, tp in panels if tp.judgement == "accepted" and tp.judged_dry]
    status, msg = _panel_verdict(zone.id, mix, [tp for _, tp in panels], good)
    step = Step(f"Trial panels of {mix}", r"\mathrm{accepted} \wedge \mathrm{judged\ dry}",
                inputs, f"{len(good)}\\ \\mathrm{{of}}\\ {len(panels)}", len(good), "", "n")
    q = {tp.id: {"judgement": tp.judgement, "judged_dry": tp.judged_dry,
                 "date": tp.date.isoformat()} for _, tp in panels}
    return _result("SPEC-PANEL", title, zone.id, status, len(good), "", PANELS, msg,
                   steps=(step,), quantities=(Quantity("trial_panel", q, "", "trial panels"),))


def _panel_verdict(zone_id: str, mix: str, panels: list, good: list) -> tuple[str, str]:
    if good:
        return "pass", f"{_and([tp.id for tp in good])} of {mix} accepted, judged dry"
    if panels and all(tp.judgement == "rejected" for tp in panels):
        return "fail", f"every trial panel of {mix} was rejected: choose again or build a new panel"
    if panels:
        return "attention", f"no panel of {mix} accepted when dry yet (" + "; ".join(
            f"{tp.id} {_verdict(tp)}" for tp in panels) + ")"
    return "attention", f"no trial panel of {mix} is recorded for zone {zone_id}"


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
    table, notes = _hold_table(spec, project.revision.code)
    released = [h for h in spec.doc.hold_points if h.state == "released"]
    opened = [h.id for h in spec.doc.hold_points if h.state == "open"]
    inputs = tuple(Input(h.id, h.what, " → ".join(f"{r} {s}" for r, s in table[h.id]["history"]
                                                  .items()), "", f"{SPEC_FILE} hold_points {h.id}")
                   for h in spec.doc.hold_points)
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


def _hold_table(spec, rev: str) -> tuple[dict, list[str]]:
    """Each hold point with its state in every revision that listed it; notes on carry-over."""
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
    return table, notes


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
