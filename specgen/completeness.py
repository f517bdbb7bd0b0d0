"""``specgen missing``: what the dossier still lacks to be complete for issue.

Read from the loaded project and the check results (nothing is judged twice): every check
that could not be assessed or is held names what it needs; beside them, the tests the
requirements call for with no result, planned laboratory tests without a report, zones
without a chosen mortar, open review comments and the revision's own status.  Listed in the
order a specifier works: fabric, binders, laboratory tests, mixes and works, the choice per
zone, the review, the issue.
"""
from __future__ import annotations

from dataclasses import dataclass

DAY = 86400.0
# (stage title, check-code prefixes it gathers), in the order the work is done; a code goes
# to the first stage with a prefix it starts with, so a named check (DUR-SOUND, a test of the
# binder) is placed before the family it belongs to; other codes (the verdicts on a mix in a
# zone: DUR-TSA, DUR-ETT, DUR-CARB) go with the choice of mortar
STAGES = (
    ("Fabric and compatibility data", ("COMP-", "DUR-EXPOSE")),
    # the binder's own tests: soundness (Le Chatelier) and setting time (Vicat) on the paste
    ("Binder analyses and firing", ("CHEM-", "BIND-", "DUR-SOUND", "SITE-SET")),
    # the prisms of the candidate mixes: strength, freeze-thaw, water retention, render bond,
    # the curing evidence, and the durability tests a zone holds for
    ("Laboratory tests of the candidate mixes", ("STR-", "DUR-FROST", "DUR-RETAIN", "DUR-BOND",
                                                 "DUR-TESTS", "EVD-")),
    ("Proportions, batching and works quantities", ("MIX-", "WORKS-", "SITE-", "MTH-")),
    ("Choice of mortar, trial panels and costs", ("SPEC-",)),
    ("Review comments", ()),
    ("Issue", ()),
)
# an attention here is something still to do (a justified failing choice is a decision, not
# a gap: SPEC-SELECT is listed only when nothing is chosen, as a hold or not assessed)
SPEC_ATTENTION = ("SPEC-PANEL",)


@dataclass(frozen=True)
class Missing:
    """One thing the dossier lacks: its stage, what it concerns and what to do."""

    stage: str
    subject: str
    what: str


def missing(project, results) -> list[Missing]:
    """Everything still missing for issue, ordered by stage (then as found)."""
    items = _from_checks(results) + _untested_requirements(project) + _pending(project)
    items += _comments(project)
    items += _issue(project, items)
    order = [s for s, _ in STAGES]
    return sorted(items, key=lambda m: order.index(m.stage))


def _stage(code: str) -> str:
    """The stage a check belongs to, by its code's prefix (other codes: the choice stage)."""
    for title, prefixes in STAGES:
        if prefixes and code.startswith(prefixes):
            return title
    return STAGES[4][0]


def _from_checks(results) -> list[Missing]:
    """Not-assessed and held checks (and open specification steps), same message merged."""
    merged: dict[tuple[str, str], list[str]] = {}
    for c in results.checks:
        todo = c.status in ("not_assessed", "hold") or (
            c.code in SPEC_ATTENTION and c.status == "attention")
        if not todo:
            continue
        text = c.message.removeprefix("not assessed: ")
        merged.setdefault((c.code, text), []).append(c.subject)
    out, said = [], []
    for (code, text), subjects in merged.items():
        # one cause reported by several checks (no mortar chosen → no acceptance, no panel)
        # is listed once, under the first check that gives it in full
        if any(t.startswith(text) and s == subjects for t, s in said):
            continue
        said.append((text, subjects))
        out.append(Missing(_stage(code), f"{code} {', '.join(subjects)}", text))
    return out


def _untested_requirements(project) -> list[Missing]:
    """Candidate mixes without compressive results at an age the requirements name."""
    out = []
    ages = sorted({round(m.age / DAY) for m in project.dossier.requirements.min_compressive})
    for mix in _candidates(project):
        tested = {round(r.age / DAY) for r in project.strength
                  if r.mix == mix and r.test == "compressive"}
        for age in ages:
            if age not in tested:
                out.append(Missing(STAGES[2][0], mix, f"no compressive results at {age} d, an "
                                   "age of requirements.min_compressive (test prisms of this "
                                   "mix at that age: 'specgen lab-workbook' lists them)"))
    return out


def _candidates(project) -> list[str]:
    seen = {m for z in project.dossier.zones for m in z.candidates}
    return [m for m in project.mixes if m in seen]


def _pending(project) -> list[Missing]:
    """Planned tests in lab workbooks without a result (samples without reports)."""
    groups: dict[tuple[str, str], list[str]] = {}
    for file, sheet, _row, first in getattr(project, "lab_pending", []):
        groups.setdefault((file, sheet), []).append(str(first))
    out = []
    for (file, sheet), ids in groups.items():
        shown = ", ".join(dict.fromkeys(ids))
        out.append(Missing(STAGES[2][0], f"{file}, sheet '{sheet}'",
                           f"{len(ids)} planned test(s) without a result: {shown}"))
    return out


def _comments(project) -> list[Missing]:
    return [Missing(STAGES[5][0], c.id, f"open comment raised in {c.raised_in} about "
                    f"{c.about}: answer it (response) and close it (status: closed, closed_in)")
            for c in project.comments if c.status == "open"]


def _issue(project, found: list[Missing]) -> list[Missing]:
    rev = project.revision
    if rev.status == "issued":
        return []
    return [Missing(STAGES[6][0], rev.code, "the revision is a draft: when the items above are "
                    "settled, set revision.status: issued in dossier.yaml and build" if found
                    else "the revision is a draft: set revision.status: issued in dossier.yaml "
                    "and build")]


def as_text(items: list[Missing], code: str, revision: str) -> str:
    """Numbered list under each stage heading, for the terminal."""
    if not items:
        return f"{code} revision {revision}: nothing missing for issue."
    lines, stage, n = [], None, 0
    for m in items:
        if m.stage != stage:
            stage = m.stage
            lines += ["", f"{stage}:"] if lines else [f"{stage}:"]
        n += 1
        lines.append(f"  {n}. {m.subject}: {m.what}")
    lines += ["", f"{code} revision {revision}: {n} thing(s) missing for issue."]
    return "\n".join(lines)
