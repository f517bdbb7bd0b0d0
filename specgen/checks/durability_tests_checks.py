"""DUR-TESTS (zone): the tests the durability checks ask for, gathered as one hold point.

Every check that cannot decide without a laboratory result records it in ``tests_asked``
(durability_common.asked).  For the mix chosen for a zone (SPEC-SELECT; every candidate
while none is chosen) the tests asked on the zone, the pair, the mix and its binders are
gathered here: the works in the zone are held until their results are in, and the
specification's clauses list them from the ``durability_tests`` this check records.
"""
from __future__ import annotations

from specgen.checks.registry import declare, register
from specgen.checks.result import Basis, CheckResult, Input, Quantity, Step

declare("durability_tests", "", "tests to commission before the works of a zone: [{test, "
        "method, why, check}] for its chosen mix (every candidate while none is chosen)")

TITLE = "Durability tests to commission"
BASIS = Basis("project requirement", note="tests asked for by the durability checks; the "
              "works in the zone wait for their results")


def subjects(zone, mix_id: str, project) -> list[str]:
    mix = project.mixes.get(mix_id)
    binders = [b.binder for b in mix.binders] if mix else []
    return [zone.id, f"{zone.id}/{mix_id}", mix_id] + binders


@register("DUR-TESTS", TITLE, "zone", order=925)
def tests_check(zone, ctx) -> CheckResult:
    """Tests asked for by the durability checks on the zone's chosen mix, as a hold point."""
    chosen = ctx.quantity(zone.id, "selected_mix")
    mixes = [chosen.value] if chosen else list(zone.candidates)
    rows, seen = [], set()
    for m in mixes:
        for sid in subjects(zone, m, ctx.project):
            q = ctx.quantity(sid, "tests_asked")
            for t in (q.value if q else []):
                key = (t["test"], sid)
                if key not in seen:
                    seen.add(key)
                    rows.append(dict(t, check=f"{t['check']}/{sid}"))
    which = f"chosen mix {chosen.value}" if chosen else "the candidates (none chosen yet)"
    if not rows:
        return CheckResult(code="DUR-TESTS", title=TITLE, subject=zone.id, subject_kind="zone",
                           status="pass", value=0, unit="", basis=(BASIS,),
                           message=f"no durability test outstanding for {which}",
                           quantities=(Quantity("durability_tests", [], "", "tests"),))
    inputs = tuple(Input(f"T{i + 1}", r["test"], r["method"], "", r["check"])
                   for i, r in enumerate(rows))
    step = Step(f"Tests asked for {which}", r"n = \text{tests asked by the checks}", inputs,
                rf"n = {len(rows)}", float(len(rows)), "", "n")
    return CheckResult(code="DUR-TESTS", title=TITLE, subject=zone.id, subject_kind="zone",
                       status="hold", value=len(rows), unit="", basis=(BASIS,), steps=(step,),
                       message=f"hold: before the works in zone {zone.id}, the results of "
                       + "; ".join(f"{r['test']} ({r['check']})" for r in rows),
                       quantities=(Quantity("durability_tests", rows, "", "tests"),))
