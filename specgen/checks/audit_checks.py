"""The consistency audit: rules over the whole revision, run after every check on every build.

A check judges one subject; an audit rule reads the dossier as a heritage reviewer would and
finds where one page contradicts another, or a statement has nothing behind it.  Each rule is
a function registered with ``@audit_rule`` (a code, a title) that returns :class:`Finding`\\ s:
a message for people, the places it points to, and the fix.  A draft lists the findings on
its "Before issue" page; a revision issued for construction (or for approval, when the
project asks for that) refuses to build while a blocking one is open.
"""
from __future__ import annotations

import json
import re

from specgen.precision import SYMBOL_PRECISION, by_symbol
from specgen.checks.registry import audit_rule, quantity_names
from specgen.checks.result import Finding
from specgen.checks.revision_delta import compare, decision_lines
from specgen.checks.specification_checks import SPEC_FILE, applicable, covered
from specgen.refdata import CONTENT_DIR

DAY = 86400.0
#: Checks whose limits the specification clauses state, and the clause that states them
#: (specgen/report/specification_clauses.py reads the same results).
CLAUSE_LIMITS = {"CHEM-CI": ("1", "Materials: binder"), "COMP-GRAD": ("1", "Materials: sand"),
                 "STR-MIN": ("7", "Acceptance criteria: strength"),
                 "STR-MAX": ("7", "Acceptance criteria: strength cap"),
                 "COMP-COLOUR": ("7", "Acceptance criteria: appearance")}
#: The page of the dossier on which the checks of each code prefix are discussed.
PAGE_OF_PREFIX = {"composition": ("CHEM-",), "strength": ("STR-",),
                  "compatibility": ("COMP-",), "works": ("MIX-", "SITE-", "WORKS-"),
                  "specification": ("SPEC-",), "summary": ("",), "index": ("",),
                  "calculations": ("",), "changes": ("",)}


def _sel_place(spec, i: int, key: str) -> str:
    line = spec.line("selections", i, key) if spec else None
    return f"{SPEC_FILE}{f', line {line}' if line else ''}: selections[{i}].{key}"


def _selections(ctx):
    """(zone, index, selection) of every zone whose selection the checks accepted."""
    spec = ctx.project.specification
    for zone in ctx.project.dossier.zones:
        found = spec.selection_for(zone.id) if spec else None
        if found and ctx.results.value(zone.id, "selected_mix"):
            yield zone, found[0], found[1]


# ---------------------------------------------------------------- the description
#: Claims a specifier's free text may make about the revision, and the fact that refutes each.
CLAIMS = (
    (re.compile(r"\bno (?:new |further |additional )?(?:laboratory|lab)\b[^.;]*?"
                r"\b(?:results?|data|tests?|analys[ie]s)\b|\bno new (?:test )?(?:results|data)\b",
                re.I), "lab", "no new laboratory results"),
    (re.compile(r"\bno (?:input )?changes?\b|\binputs? (?:are |were )?unchanged\b|"
                r"\bnothing (?:has )?changed\b", re.I), "inputs", "that nothing changed"),
    (re.compile(r"\b(?:selections?|choices?|decisions?) (?:are |is |remains? |stays? )?"
                r"unchanged\b|\bno change (?:to|in) the (?:selections?|choices?|decisions?)\b",
                re.I), "decisions", "that no decision changed"),
)


def _count(n: int, noun: str) -> str:
    return f"{n} {noun}{'' if n == 1 else 's'}"


def _lab_changes(ch: dict) -> list[str]:
    files = [f for k in ("added", "changed") for f in ch["inputs"][k] if f.startswith("lab/")]
    sp = ch["specimens"]
    out = [f"lab files added or changed: {', '.join(files)}"] if files else []
    if sp["added"] or sp["changed"]:
        out.append(f"{_count(len(sp['added']), 'lab result')} added and "
                   f"{len(sp['changed'])} changed")
    return out


def facts_of(ch: dict, previous) -> list[str]:
    """The factual part of the revision's description, written from the comparison."""
    inp, sp, checks = ch["inputs"], ch["specimens"], ch["checks"]
    files = "; ".join(f"{k}: {', '.join(inp[k])}" for k in ("added", "changed", "removed")
                      if inp[k]) or "none"
    moved = [c for c in checks if c["old_status"] != c["new_status"]]
    facts = [f"Compared with {previous.code} (issued {previous.date}). Input files {files}.",
             f"Strength results (by specimen): {len(sp['added'])} added, {len(sp['changed'])} changed,"
             f" {len(sp['removed'])} removed.",
             f"Checks: {_count(len(moved), 'status change')}, "
             f"{_count(len(checks) - len(moved), 'value change')} with the same status."]
    decisions = decision_lines(ch)
    facts.append("For the decision: " + ("; ".join(decisions) if decisions else
                                         "no selection, failure, hold or prediction changed") + ".")
    cm = ch["comments"]
    if cm["new"] or cm["closed"]:
        facts.append(f"Review comments raised: {', '.join(cm['new']) or 'none'}; closed: "
                     f"{', '.join(cm['closed']) or 'none'}.")
    return facts


@audit_rule("AUD-DESC", "Revision description against the inputs", order=10)
def description_rule(ctx) -> list[Finding]:
    """Write the factual part of the description; a free-text claim it refutes is a finding."""
    r, prev, p = ctx.results, ctx.previous, ctx.project
    if prev is None:
        r.facts = ["No earlier issued revision: there is nothing to compare with."]
        return []
    inputs = {f.path: f.sha256 for f in p.inputs}
    r.changes = compare(prev.results, prev.inputs, r.to_dict(), inputs)
    r.changes["from_date"] = prev.date
    r.changes["decision_lines"] = decision_lines(r.changes)
    r.facts = facts_of(r.changes, prev)
    refuted = {"lab": _lab_changes(r.changes),
               "inputs": [f"{sum(len(v) for v in r.changes['inputs'].values())} input file(s) "
                          "changed"] if any(r.changes["inputs"].values()) else [],
               "decisions": decision_lines(r.changes)[:3] if r.changes["decision"]["selections"]
               else []}
    out = []
    text = p.revision.description
    for pattern, fact, claim in CLAIMS:
        m = pattern.search(text)
        if m and refuted[fact]:
            out.append(Finding("AUD-DESC", "Revision description contradicts the inputs",
                               f"the description says \u201c{m.group(0)}\u201d ({claim}), but since "
                               f"{prev.code}: {'; '.join(refuted[fact])}.",
                               ("dossier.yaml: revision.description", "summary: This revision"),
                               "rewrite the description so that it agrees with what changed "
                               "(specgen writes the facts beside it), or withdraw the change.",
                               subject=p.revision.code))
    return out


# ---------------------------------------------------------------- decisions
@audit_rule("AUD-DECIDE", "Selection needing a decision", order=20)
def decision_rule(ctx) -> list[Finding]:
    """A chosen mortar that fails a check its justification does not name needs a decision."""
    out, spec = [], ctx.project.specification
    before = {f"{c['code']}/{c['subject']}": c["status"]
              for c in (ctx.previous.results.get("checks", []) if ctx.previous else [])}
    for zone, i, sel in _selections(ctx):
        if ctx.results.value(zone.id, "selection_status") != "needs_decision":
            continue
        failed = [c for c in applicable(ctx.results.checks, ctx.project, zone.id, sel.mix)
                  if c.status == "fail" and not covered(c, sel.covers)]
        names = "; ".join(f"{c.key} ({c.title}"
                          + (f", new since {ctx.previous.code}" if ctx.previous
                             and before.get(c.key) != "fail" else "") + ")" for c in failed)
        out.append(Finding("AUD-DECIDE", "Selection needing a decision",
                           f"zone {zone.id}: the chosen mortar {sel.mix} fails {names}, which the "
                           "justification does not name; the selection stays undecided until it "
                           "does.", (f"specification: zone {zone.id}", _sel_place(spec, i,
                                                                                    "covers")),
                           "answer each failure in the justification and name it under covers, "
                           "or choose another candidate.", subject=zone.id))
    return out


# ---------------------------------------------------------------- clauses
def _outside(c) -> bool:
    """Whether a check's own value lies outside the limit it states (or it failed)."""
    if c.status == "fail":
        return True
    lim, v = c.limit, c.value
    if lim is None or not isinstance(v, (int, float)) or c.status in ("hold", "not_assessed"):
        return False
    if lim.compare == "<=" and lim.high is not None:
        return v > lim.high
    if lim.compare == ">=" and lim.low is not None:
        return v < lim.low
    if lim.compare == "within" and lim.low is not None and lim.high is not None:
        return not lim.low <= v <= lim.high
    return False


@audit_rule("AUD-CLAUSE-LIMIT", "Clause limit against the chosen mortar", order=30)
def clause_limit_rule(ctx) -> list[Finding]:
    """A clause's limit agrees with the chosen mortar's result, or the justification names it."""
    out, spec = [], ctx.project.specification
    for zone, i, sel in _selections(ctx):
        for c in applicable(ctx.results.checks, ctx.project, zone.id, sel.mix):
            if c.code not in CLAUSE_LIMITS or not _outside(c) or covered(c, sel.covers):
                continue
            n, what = CLAUSE_LIMITS[c.code]
            # the value as its sheet shows it: by the rule of its kind where one is set
            # (ΔE00 6.35, not 6.3545), else as the check recorded it (never rounded again)
            shown = by_symbol(c.value, c.value_symbol) if c.value_symbol in SYMBOL_PRECISION \
                else f"{c.value:g}"
            value = f"{shown} {c.unit}".strip() if isinstance(c.value, float) else c.value
            out.append(Finding(
                "AUD-CLAUSE-LIMIT", "Clause limit against the chosen mortar",
                f"clause {n} of zone {zone.id} ({what}) states {c.limit.text if c.limit else c.title}, "
                f"but the chosen mortar {sel.mix} gives {value} ({c.key}: {c.status.replace('_', ' ')}),"
                " and the selection's justification does not name that check.",
                (f"specification: zone {zone.id}, clause {n}", f"calculation sheet {c.key}",
                 _sel_place(spec, i, "covers")),
                "justify the choice against this check and name it under covers (the clause "
                "then says so), or choose a mortar that meets the limit, or change the limit "
                "with a justified rule override.", subject=zone.id))
    return out


@audit_rule("AUD-CLAUSE-SOURCE", "Clause numbers that are not results", order=35)
def clause_source_rule(ctx) -> list[Finding]:
    """Every number a clause states comes from a result: a default is not one."""
    out = []
    for zone, _i, sel in _selections(ctx):
        life = ctx.results.value(sel.mix, "workable_life")
        if life and not life.get("measured"):
            out.append(Finding(
                "AUD-CLAUSE-SOURCE", "Clause numbers that are not results",
                f"clause 2 of zone {zone.id} (workable life) writes {life['value']:g} min into the "
                f"contract, the default of the binder family, not a measurement of {sel.mix}; "
                "the gauging size rests on it too.",
                (f"specification: zone {zone.id}, clause 2", f"calculation sheet SITE-GAUGE/{sel.mix}",
                 f"mixes.yaml: {sel.mix}.workable_life"),
                f"have the laboratory measure the workable life of {sel.mix} (EN 1015-9) and give "
                "it with workable_life_source.", subject=zone.id))
        if ctx.results.value(zone.id, "site_acceptance") is None and \
                ctx.project.dossier.requirements.min_compressive:
            out.append(Finding(
                "AUD-CLAUSE-SOURCE", "Clause numbers that are not results",
                f"clause 7 of zone {zone.id} has no strength criteria: no acceptance result for "
                f"{sel.mix}.", (f"specification: zone {zone.id}, clause 7",),
                "give lab strength results for the chosen mortar.", subject=zone.id))
    return out


def _ages_tested(ctx, zone_id: str) -> list[float]:
    sets = ctx.results.value(zone_id, "sample_sets") or {}
    return [float(a) for a in sets.get("ages_d", [])]


@audit_rule("AUD-AGES", "Ages the site test regime does not test", order=40)
def ages_rule(ctx) -> list[Finding]:
    """Hold-point and cap ages are ages at which the site test regime tests prisms."""
    out = []
    for zone, _i, sel in _selections(ctx):
        tested = _ages_tested(ctx, zone.id)
        verdicts = ctx.results.value(sel.mix, "acceptance") or {}
        for key, v in verdicts.items():
            age = v["age_d"]
            if any(abs(age - t) < 0.5 for t in tested):
                continue
            what = "cap" if v["kind"] == "max" else ("hold" if v.get("status") == "hold"
                                                         else "minimum")
            regime = ", ".join(f"{t:g}" for t in tested) or "no"
            out.append(Finding(
                "AUD-AGES", "Ages the site test regime does not test",
                f"zone {zone.id}: the strength {what} of {sel.mix} is set at {age:g} d, but the "
                f"site test regime tests at {regime} d only, so nothing on site would show it.",
                (f"specification: zone {zone.id}, clause 7, and the site test regime",
                 f"{SPEC_FILE}: site_tests.test_ages"),
                f"add '{age:g} d' to site_tests.test_ages (the regime is then extended), or "
                "change the requirement's age.", subject=zone.id))
    return out


# ---------------------------------------------------------------- references and words
def _library() -> set[str]:
    entries = json.loads((CONTENT_DIR / "references.json").read_text(encoding="utf-8"))
    return {e["id"] for e in entries}


@audit_rule("AUD-CITE", "Cited works missing from the reference list", order=50)
def citation_rule(ctx) -> list[Finding]:
    """Every work a check cites is in the reference list."""
    known, missing = _library(), {}
    for c in ctx.results.checks:
        for b in c.basis:
            for ref in (b.ref, b.read_in) if b.kind == "reference" else ():
                if ref and ref not in known:
                    missing.setdefault(ref, []).append(c.key)
    return [Finding("AUD-CITE", "Cited works missing from the reference list",
                    f"'{ref}' is cited by {', '.join(keys[:5])}{' …' if len(keys) > 5 else ''} "
                    "but is not in the reference list.", tuple(f"calculation sheet {k}"
                                                                for k in keys[:5]),
                    "add the work to content/references.json, or cite one that is there.",
                    subject=ref) for ref, keys in sorted(missing.items())]


def _internal_words(project) -> set[str]:
    """Names a reader should never meet: results.json names and the keys of the files (read
    from the models of the loaded project)."""
    import typing
    words = {q.name for q in quantity_names()}
    docs = [project.dossier, *(x for x in (project.specification,) if x is not None)]
    stack = [type(getattr(d, "doc", d)) for d in docs]
    stack += [type(x) for group in (project.mixes, project.binders, project.masonry_units,
                                    project.historic_mortars, project.sands,
                                    project.mortar_properties, project.analyses)
              for x in group.values()]
    seen = set()
    while stack:
        t = stack.pop()
        if t in seen:
            continue
        seen.add(t)
        fields = getattr(t, "model_fields", None)
        if isinstance(t, type) and fields:
            words |= set(fields)
            stack += [f.annotation for f in fields.values()]
        else:
            stack += list(typing.get_args(t))
    return {w for w in words if "_" in w}


def _reader_texts(ctx):
    """(place, text) of everything written for readers: findings of the checks, free text."""
    for c in ctx.results.checks:
        yield f"calculation sheet {c.key}", c.message
        for n in c.notes:
            yield f"calculation sheet {c.key}", n
        if c.limit and c.limit.text:
            yield f"calculation sheet {c.key}", c.limit.text
    p = ctx.project
    yield "dossier.yaml: revision.description", p.revision.description
    spec = p.specification.doc if p.specification else None
    for i, s in enumerate(spec.selections if spec else []):
        yield f"{SPEC_FILE}: selections[{i}]", f"{s.rationale} {s.justification}"
    for i, h in enumerate(spec.hold_points if spec else []):
        yield f"{SPEC_FILE}: hold_points[{i}]", f"{h.what} {h.stage} {h.evidence}"
    for c in p.comments:
        yield f"comments.yaml: {c.id}", f"{c.text} {c.response}"
    for name, text in p.narrative.items():
        yield f"narrative/{name}.md", text


@audit_rule("AUD-WORDS", "Internal identifiers in text for readers", order=60)
def words_rule(ctx) -> list[Finding]:
    """No internal identifier, file key or program value ('None', 'nan') in reader text."""
    words, found = _internal_words(ctx.project), {}
    pattern = re.compile(r"(?<![\w./-])([a-z][a-z0-9]*(?:_[a-z0-9]+)+|None|nan|NaN)(?![\w/-])")
    for place, text in _reader_texts(ctx):
        for m in pattern.finditer(text or ""):
            w = m.group(1)
            if w in words or w in ("None", "nan", "NaN"):
                found.setdefault(w, []).append(place)
    return [Finding("AUD-WORDS", "Internal identifiers in text for readers",
                    f"'{w}' (a name inside specgen or its files) appears in text for readers: "
                    f"{'; '.join(sorted(set(places))[:4])}.", tuple(sorted(set(places))[:4]),
                    "say it in words a reader knows (the project's own text), or report the "
                    "wording of a check's message as a fault of specgen.", subject=w)
            for w, places in sorted(found.items())]


# ---------------------------------------------------------------- comments
def _changed_keys(ch: dict) -> list[dict]:
    return [c for c in ch["checks"] if c["old_status"] != c["new_status"]
            or c["old_value"] != c["new_value"]]


def _about(comment_about: str, key: str) -> bool:
    code, _, subject = comment_about.partition("/")
    if code.isupper() or "-" in code:
        return key == comment_about if subject else key.startswith(code + "/")
    prefixes = PAGE_OF_PREFIX.get(comment_about, ())
    return any(key.startswith(p) for p in prefixes if p) or "" in prefixes


@audit_rule("AUD-COMMENT", "Open comment answered by new evidence?", order=70)
def comment_rule(ctx) -> list[Finding]:
    """An open comment whose subject changed in this revision is put to the specifier."""
    ch = ctx.results.changes
    if not ch:
        return []
    changed = _changed_keys(ch)
    out = []
    for c in ctx.project.comments:
        if c.status != "open" or c.response:
            continue
        moved = [x for x in changed if _about(c.about, x["key"])]
        if not moved:
            continue
        said = "; ".join(f"{x['key']} {_w(x['old_status'])} → {_w(x['new_status'])}"
                         for x in moved[:4]) + (" …" if len(moved) > 4 else "")
        out.append(Finding("AUD-COMMENT", "Open comment answered by new evidence?",
                           f"comment {c.id} ({c.about}) is open with no response, and its subject "
                           f"changed since {ch['from']}: {said}. Answered by new evidence?",
                           (f"review comments: {c.id}", f"comments.yaml: {c.id}"),
                           "close it with a response naming the evidence (status: closed, "
                           f"closed_in: {ctx.project.revision.code}), or keep it open with a "
                           "response saying why.", subject=c.id))
    return out


def _w(status) -> str:
    return status.replace("_", " ") if status else "—"
