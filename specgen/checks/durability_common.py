"""Shared pieces of the durability checks: the practice the project follows, a zone's
exposure as DUR-EXPOSE recorded it, rules recalled from memory, and the tests a check asks for.

A rule tagged ``memory`` (content/rules/durability.yaml) is shown with its source; in an
issued revision a verdict resting on it is held until the value is confirmed against the
printed text (or overridden in dossier.yaml with a justification).  Every durability check
that cannot decide without a laboratory result records the test in ``tests_asked``; the
clauses and the hold point of DUR-TESTS name them.
"""
from __future__ import annotations

from specgen.checks.registry import declare
from specgen.checks.result import Basis, Input, Quantity

declare("tests_asked", "", "tests a check asks the project to commission: [{test, method, "
        "why, check}]")

def practice(project) -> tuple[str, str]:
    """('european' | 'american', where that came from): the set :func:`specgen.practice.resolve`
    gives for the whole dossier (one default for every check when dossier.yaml states none)."""
    from specgen import practice as pr
    p = pr.resolve(project.dossier)
    if not p.stated:
        return p.key, f"practice not stated in dossier.yaml: {p.title} assumed"
    return p.key, f"dossier.yaml practice: {p.key}"


def rule(ctx, name: str):
    return ctx.rules[f"durability.{name}"]


def rule_input(ctx, symbol: str, name: str, kind: str | None = None, shown=None) -> Input:
    """An Input for the rule ``durability.<name>`` with its source (a value still to be
    confirmed is listed on the Values to confirm page, not marked inline)."""
    r = rule(ctx, name)
    value = r.value if shown is None else shown
    return Input(symbol, r.description, value, r.unit, r.source())


def memory_gate(ctx, status: str, rules, tables=()) -> tuple[str, list[str]]:
    """Hold a pass/fail/attention that rests on an unconfirmed (memory) rule, or on a
    reference table tagged memory (``tables``: their names), in an issued revision; in a
    draft the verdict stands with a note."""
    recalled = ([f"“{r.description}”" for r in rules if r.unconfirmed]
                + list(tables))
    if not recalled or status in ("not_assessed", "info", "hold"):
        return status, []
    if ctx.project.revision.status == "issued":
        return "hold", [f"held: the verdict ({status}) rests on {', '.join(recalled)}, still to "
                        "be confirmed against the printed source (or overridden with a "
                        "justification) before this revision is issued"]
    return status, []     # a draft: the Values to confirm page lists the value


def asked(test: str, method: str, why: str, code: str) -> dict:
    return {"test": test, "method": method, "why": why, "check": code}


def tests_quantity(ctx, subject: str, tests: list[dict]) -> list[Quantity]:
    """``tests_asked`` of ``subject``: the tests asked by earlier checks on the same subject
    kept (a quantity is recorded once per subject), these added."""
    if not tests:
        return []
    prior = ctx.quantity(subject, "tests_asked")
    merged = list(prior.value) if prior else []
    merged += [t for t in tests if t not in merged]
    return [Quantity("tests_asked", merged, "", "tests to commission")]


def exposure(ctx, zone_id: str) -> dict | None:
    """The exposure DUR-EXPOSE recorded for a zone (None when not assessed)."""
    q = ctx.quantity(zone_id, "exposure_class")
    return q.value if q is not None else None


def exposure_meaning(e: dict) -> str:
    """What a zone's exposure classes mean, in words (content/data/exposure_classes.yaml, the
    European wording), e.g. ``saturated salt air, sea water or de-icing salts; moisture or
    wetting plus freeze–thaw cycling`` for MX4 with MX3.1; '' when the table has none."""
    from specgen import refdata
    table = refdata.load("exposure_classes").data["european"]
    return "; ".join(table[c].split(", without")[0].removeprefix("exposed to ")
                     .replace("freeze-thaw", "freeze–thaw")
                     for c in e.get("classes", ()) if c in table)


def exposure_words(e: dict) -> str:
    """A zone's exposure as a reader needs it: its designation with what its classes mean,
    ``MX4 with MX3.1 (saturated salt air, …)``; the designation alone without words."""
    meaning = exposure_meaning(e)
    return f"{e['designation']} ({meaning})" if meaning else e["designation"]


def tex(text: str) -> str:
    """Plain words for a LaTeX \\text{}: the math renderer copies the characters into MathML
    as they stand, so the XML specials are escaped and braces and backslashes kept out."""
    for a, b in (("\\", " "), ("&", "&amp;"), ("<", "&lt;"), (">", "&gt;"), ("{", "("),
                 ("}", ")")):
        text = text.replace(a, b)
    return text


BINDER_CSH = {"natural_cement", "nhl", "hl", "fl", "portland"}
LIME_RICH = {"air_lime", "nhl", "fl"}


def binder_types(mix, project) -> list[tuple[str, str]]:
    """(binder id, family) of each binder of the mix."""
    return [(b.binder, project.binders[b.binder].type) for b in mix.binders
            if b.binder in project.binders]


PRACTICE_BASIS = Basis("reference", "en1996_2", "2.1.2.1 (3) and Annex A, Table A.1")
