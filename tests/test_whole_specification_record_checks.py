"""SPEC-PANEL and SPEC-HOLD (specification_record_checks) read whole: the demo's results
(``demo_checked``), each value by hand from the demo's specification.yaml (trial_panels,
hold_points, selections) beside it; the branches the demo never takes (every panel rejected,
one judged wet, none recorded, a hold point re-opened or released in another revision, one
withdrawn) on specifications changed in memory (no copy checked)."""
from __future__ import annotations

from specgen.checks import specification_record_checks as sr
from specgen.checks.result import Basis, Input
from specgen.checks.rules import RuleBook
from specgen.checks.run import Context
from specgen.project.specification import EarlierState
from tests.helpers import Swapped

PANELS = Basis("common practice", note="trial panels are judged by eye, dry, in daylight, before "
               "the works proceed")
HOLDS = Basis("project requirement", note="specification.yaml hold_points")


def _ctx(demo_checked, spec=None, drop=False):
    project, results = demo_checked
    p = project
    if spec is not None or drop:
        p = Swapped(project, specification=None if drop else spec)
    return Context(p, RuleBook(project.dossier.rule_overrides), quantities=results.quantities,
                   results=results.checks), p


def _spec(project, **doc):
    s = project.specification
    return type(s)(**{**s.__dict__, "doc": s.doc.model_copy(update=doc)})


def _zone(project, zid):
    return next(z for z in project.dossier.zones if z.id == zid)


def test_spec_panel_of_the_demo_whole(demo_checked):
    """specification.yaml: Z1 chooses M2 and TP2 (M2, Z1, 2026-09-15) was accepted judged dry
    (trial_panels TP2): pass, 1 of 1; TP1 is of M1, not counted.  Z2 chooses M2: TP4 (Z2)
    pending: attention; TP2 is of zone Z1, not Z2.  Z3 chooses M3: TP3 pending."""
    _, results = demo_checked
    z1 = results.check("SPEC-PANEL", "Z1")
    assert (z1.title, z1.status, z1.value, z1.unit, z1.basis) == (
        "Trial panel of the chosen mortar", "pass", 1, "", (PANELS,))
    step, = z1.steps
    assert (step.title, step.formula, step.substituted, step.result, step.unit, step.symbol) == (
        "Trial panels of M2", r"\mathrm{accepted} \wedge \mathrm{judged\ dry}",
        r"1\ \mathrm{of}\ 1", 1, "", "n")
    assert step.inputs == (Input("TP2", "panel of M2 at inner face, bay 3, middle",
                                 "accepted, judged dry", "", "specification.yaml trial_panels TP2"),)
    assert z1.message == "TP2 of M2 accepted, judged dry"
    assert [(q.name, q.value, q.unit, q.label) for q in z1.quantities] == [
        ("trial_panel", {"TP2": {"judgement": "accepted", "judged_dry": True,
                                 "date": "2026-09-15"}}, "", "trial panels")]
    z2 = results.check("SPEC-PANEL", "Z2")
    assert (z2.status, z2.value, z2.message) == (
        "attention", 0, "no panel of M2 accepted when dry yet (TP4 pending)")
    assert z2.steps[0].inputs == (
        Input("TP4", "panel of M2 at parapet, coping band beside the lamp standard", "pending", "",
              "specification.yaml trial_panels TP4"),)
    assert z2.steps[0].substituted == r"0\ \mathrm{of}\ 1"
    assert z2.quantities[0].value == {"TP4": {"judgement": "pending", "judged_dry": False,
                                              "date": "2026-11-10"}}
    z3 = results.check("SPEC-PANEL", "Z3")
    assert (z3.status, z3.message, z3.steps[0].title) == (
        "attention", "no panel of M3 accepted when dry yet (TP3 pending)", "Trial panels of M3")


def test_spec_panel_rejected_wet_none_and_no_selection(demo_checked):
    """Z1's M2 panels made: TP2 accepted but judged before it was dry, and another rejected
    dry: attention naming both; both rejected: fail; none of M2 at all: attention; no
    specification: not assessed."""
    project, _ = demo_checked
    tp = project.specification.doc.trial_panels
    wet = tp[1].model_copy(update={"judged_dry": False})
    rej = tp[1].model_copy(update={"id": "TP9", "judgement": "rejected", "zone": None})
    ctx, _ = _ctx(demo_checked, _spec(project, trial_panels=[tp[0], wet, rej]))
    c = sr.panel_check(_zone(project, "Z1"), ctx)
    assert (c.code, c.status, c.value) == ("SPEC-PANEL", "attention", 0)
    assert c.message == ("no panel of M2 accepted when dry yet (TP2 accepted, judged before it "
                         "was dry; TP9 rejected, judged dry)")
    # each panel by its id (TP2, and TP9 that replaced TP3's place), not its position
    assert [i.source for i in c.steps[0].inputs] == ["specification.yaml trial_panels TP2",
                                                     "specification.yaml trial_panels TP9"]
    both = tp[1].model_copy(update={"judgement": "rejected"})
    ctx, _ = _ctx(demo_checked, _spec(project, trial_panels=[both, rej]))
    c = sr.panel_check(_zone(project, "Z1"), ctx)
    assert (c.status, c.message) == ("fail", "every trial panel of M2 was rejected: choose again "
                                             "or build a new panel")
    ctx, _ = _ctx(demo_checked, _spec(project, trial_panels=[tp[0]]))
    c = sr.panel_check(_zone(project, "Z1"), ctx)
    assert (c.status, c.value, c.message) == (
        "attention", 0, "no trial panel of M2 is recorded for zone Z1")
    assert c.steps[0].substituted == r"0\ \mathrm{of}\ 0"
    ctx, _ = _ctx(demo_checked, drop=True)
    c = sr.panel_check(_zone(project, "Z1"), ctx)
    assert (c.status, c.value, c.message, c.title) == (
        "not_assessed", None, "not assessed: no mortar selected for zone Z1",
        "Trial panel of the chosen mortar")


def test_spec_hold_of_the_demo_whole(demo_checked):
    """specification.yaml lists HP1 to HP5; HP1 released in R3 (the demo's revision,
    dossier.yaml), the others open; no earlier issued revision lists them: one state each."""
    project, results = demo_checked
    c = results.check("SPEC-HOLD", "WEP-2026")
    holds = project.specification.doc.hold_points
    assert (c.title, c.status, c.value, c.unit, c.subject_kind, c.basis, c.notes) == (
        "Hold points", "info", 4, "", "project", (HOLDS,), ())
    step, = c.steps
    assert (step.title, step.formula, step.substituted, step.result, step.unit, step.symbol) == (
        "Hold points and their state in each revision",
        r"\mathrm{open} \to \mathrm{released\ (once,\ on\ evidence)}",
        r"\mathrm{released}: 1,\ \mathrm{open}: 4", 4, "", "n_open")
    assert c.quantities[0].unit == ""
    assert step.inputs == tuple(
        Input(f"HP{i + 1}", h.what, "R3 released" if i == 0 else "R3 open", "",
              f"specification.yaml hold_points {h.id}") for i, h in enumerate(holds))
    assert step.inputs[0].name == ("Trial panels of the chosen mortars judged dry and accepted "
                                   "by the heritage service")
    assert c.message == "5 hold point(s): 1 released (HP1 in R3), 4 open (HP2, HP3, HP4, HP5)"
    table = c.quantities[0].value
    assert (c.quantities[0].name, c.quantities[0].label) == ("hold_points", "hold points")
    assert table["HP1"] == {
        "state": "released", "stage": "before any pointing, rendering or rebedding",
        "released_by": "reviewer", "released_in": "R3",
        "evidence": "Panel TP2 accepted at the site meeting of 2026-10-20 (heritage service "
                    "note WDHS/EP/14).", "check": "SPEC-PANEL/Z1", "history": {"R3": "released"}}
    assert table["HP4"]["check"] is None
    assert table["HP5"] == {"state": "open", "stage": "before rendering Z2",
                            "released_by": "laboratory", "released_in": None, "evidence": "",
                            "check": "COMP-SALT/Z2/M2", "history": {"R3": "open"}}


def test_spec_hold_carried_from_earlier_revisions(demo_checked):
    """Earlier issued revisions R1 (HP1 open, HP9 open) and R2 (HP1 released in R2, HP2
    released in R2, HP9 absent — so only R2, the last, is asked about withdrawals): HP1 now
    released in R3 disagrees with R2; HP2 open again in R3.  Notes make it attention."""
    project, _ = demo_checked
    spec = project.specification
    earlier = [EarlierState("R1", "2026-06-01", {"HP1": ("open", None), "HP9": ("open", None)}),
               EarlierState("R2", "2026-09-01", {"HP1": ("released", "R2"), "HP2": ("released", "R2"),
                                   "HP7": ("open", None)})]
    fake = type(spec)(**{**spec.__dict__, "earlier": earlier})
    ctx, p = _ctx(demo_checked, fake)
    c = sr.hold_check(p, ctx)
    assert c.status == "attention"
    assert c.notes == (
        "HP1 was released in R2 according to R2, but in R3 according to R3",
        "HP2 was released in R2 (R2) and is open again in R3: record why in its evidence",
        "HP7 of R2 is no longer listed: say why it was withdrawn")
    assert c.steps[0].inputs[0].value == "R1 open → R2 released → R3 released"
    assert c.steps[0].inputs[1].value == "R2 released → R3 open"
    assert c.quantities[0].value["HP1"]["history"] == {"R1": "open", "R2": "released",
                                                       "R3": "released"}


def test_spec_hold_without_a_specification_and_with_none_released(demo_checked):
    """No specification.yaml: not assessed; every hold point open: no '(… in …)' list."""
    project, _ = demo_checked
    ctx, p = _ctx(demo_checked, drop=True)
    c = sr.hold_check(p, ctx)
    assert (c.code, c.status, c.value, c.subject, c.subject_kind, c.message) == (
        "SPEC-HOLD", "not_assessed", None, "WEP-2026", "project",
        "not assessed: no specification.yaml")
    holds = [h.model_copy(update={"state": "open", "released_in": None, "evidence": ""})
             for h in project.specification.doc.hold_points[:2]]
    ctx, p = _ctx(demo_checked, _spec(project, hold_points=holds))
    c = sr.hold_check(p, ctx)
    assert c.message == "2 hold point(s): 0 released, 2 open (HP1, HP2)"
    assert c.steps[0].substituted == r"\mathrm{released}: 0,\ \mathrm{open}: 2"
    ctx, p = _ctx(demo_checked, _spec(project, hold_points=[]))
    assert sr.hold_check(p, ctx).message == "0 hold point(s): 0 released, 0 open"
