"""The consistency audit (audit_checks: AUD-DESC, AUD-DECIDE, AUD-CLAUSE-LIMIT,
AUD-CLAUSE-SOURCE, AUD-AGES, AUD-CITE, AUD-WORDS, AUD-COMMENT) read whole: the demo's
findings (``demo_checked``), each worked by hand from the demo's files (specification.yaml,
mixes.yaml, dossier.yaml requirements, comments.yaml) and from the results of the checks the
audit reads; the branches the demo never takes on copies of the results made in memory (the
session's results are never changed: each test works on ``dataclasses.replace`` of them)."""
from __future__ import annotations

import dataclasses
from types import SimpleNamespace

from specgen.checks import audit_checks as au
from specgen.checks.result import Basis, CheckResult, Finding, Limit, Quantity
from specgen.checks.run import AuditContext, Previous
from tests.conftest import DEMO
from tests.helpers import Swapped, line_of

LIMIT_FIX = ("justify the choice against this check and name it under covers (the clause then "
             "says so), or choose a mortar that meets the limit, or change the limit with a "
             "justified rule override.")


def _findings(results, code):
    return [f for f in results.findings if f.code == code]


def _copy(results, **changes):
    """A shallow copy of the session's results with some fields replaced (never the original)."""
    return dataclasses.replace(results, findings=[], **changes)


def test_aud_clause_limit_of_the_demo_whole(demo_checked):
    """specification.yaml chooses M2 for Z1 and Z2, and neither selection names COMP-COLOUR
    under covers; COMP-COLOUR's limit is ΔE00 ≤ 2 (content/rules/compatibility.yaml) and its
    value on each zone is above it (read from its own result).  Clause 7 (acceptance:
    appearance) states that limit: one blocking finding per zone, pointing at the line of the
    zone's selection in specification.yaml (line_of, by what is on the line)."""
    _, results = demo_checked
    found = _findings(results, "AUD-CLAUSE-LIMIT")
    # Z1's selection has no covers key: its entry's line; Z2's has one: that line
    lines = {"Z1": line_of(DEMO / "specification.yaml", "- zone: Z1"),
             "Z2": line_of(DEMO / "specification.yaml", "covers: [COMP-MOIST/Z2/M2")}
    expected = []
    for zid, i in (("Z1", 0), ("Z2", 1)):
        col = results.check("COMP-COLOUR", f"{zid}/M2")
        assert col.value > 2 and col.limit.text == "ΔE00 ≤ 2"      # premise
        expected.append(Finding(
            "AUD-CLAUSE-LIMIT", "Clause limit against the chosen mortar",
            f"clause 7 of zone {zid} (Acceptance criteria: appearance) states ΔE00 ≤ 2, but the "
            # ΔE00 as its sheet and register show it, to 0.01 (SYMBOL_PRECISION)
            f"chosen mortar M2 gives {col.value:.2f} (COMP-COLOUR/{zid}/M2: attention), and the "
            "selection's justification does not name that check.",
            (f"specification: zone {zid}, clause 7", f"calculation sheet COMP-COLOUR/{zid}/M2",
             f"specification.yaml, line {lines[zid]}: selections[{i}].covers"),
            LIMIT_FIX, subject=zid, blocking=True))
    assert found == expected
    # the value is the one the colour sheet's substitution ends on, not rounded again
    z2 = results.check("COMP-COLOUR", "Z2/M2")
    shown = z2.steps[-1].substituted.rsplit("= ", 1)[1]
    assert f"gives {shown} (" in found[1].message


def test_aud_clause_source_and_ages_of_the_demo_whole(demo_checked):
    """No chosen mix has a measured workable life (mixes.yaml: only M1 has one), so each zone's
    clause 2 writes the binder family's default: works.workable_life_natural_cement 10 min for
    M2, works.workable_life_nhl 120 min for M3 (content/rules/works.yaml).  The cap of
    dossier.yaml requirements is judged at 365 d; the site regime tests at 28 and 90 d (the
    requirements) and 180 d (STR-MAX's hold age): 365 d is not among them (AUD-AGES)."""
    _, results = demo_checked
    src = _findings(results, "AUD-CLAUSE-SOURCE")
    assert src == [Finding(
        "AUD-CLAUSE-SOURCE", "Clause numbers that are not results",
        f"clause 2 of zone {z} (workable life) writes {life} min into the contract, the default of "
        f"the binder family, not a measurement of {m}; the gauging size rests on it too.",
        (f"specification: zone {z}, clause 2", f"calculation sheet SITE-GAUGE/{m}",
         f"mixes.yaml: {m}.workable_life"),
        f"have the laboratory measure the workable life of {m} (EN 1015-9) and give it with "
        "workable_life_source.", subject=z) for z, m, life in (("Z1", "M2", 10), ("Z2", "M2", 10),
                                                               ("Z3", "M3", 120))]
    ages = _findings(results, "AUD-AGES")
    assert ages == [Finding(
        "AUD-AGES", "Ages the site test regime does not test",
        f"zone {z}: the strength cap of {m} is set at 365 d, but the site test regime tests at "
        "28, 90, 180 d only, so nothing on site would show it.",
        (f"specification: zone {z}, clause 7, and the site test regime",
         "specification.yaml: site_tests.test_ages"),
        "add '365 d' to site_tests.test_ages (the regime is then extended), or change the "
        "requirement's age.", subject=z) for z, m in (("Z1", "M2"), ("Z2", "M2"), ("Z3", "M3"))]


def test_aud_comment_of_the_demo_whole(demo_checked):
    """comments.yaml: C1 closed, C2 (CHEM-CI/NHL-A) and C3 (the composition page) open with no
    response.  The composition page holds the CHEM- checks (PAGE_OF_PREFIX); the changes since
    R2 are those AUD-DESC compared (results.changes): C3 is put to the specifier with the first
    four CHEM- keys that moved, C2 only if CHEM-CI/NHL-A moved."""
    _, results = demo_checked
    ch = results.changes
    moved = [c for c in ch["checks"] if c["old_status"] != c["new_status"]
             or c["old_value"] != c["new_value"]]
    chem = [c for c in moved if c["key"].startswith("CHEM-")]
    word = {None: "—", "not_assessed": "not assessed"}
    said = "; ".join(f"{c['key']} {word.get(c['old_status'], c['old_status'])} → "
                     f"{word.get(c['new_status'], c['new_status'])}" for c in chem[:4])
    c3 = Finding("AUD-COMMENT", "Open comment answered by new evidence?",
                 f"comment C3 (composition) is open with no response, and its subject changed "
                 f"since R2: {said}{' …' if len(chem) > 4 else ''}. Answered by new evidence?",
                 ("review comments: C3", "comments.yaml: C3"),
                 "close it with a response naming the evidence (status: closed, closed_in: R3), "
                 "or keep it open with a response saying why.", subject="C3")
    expected = ([] if not any(c["key"] == "CHEM-CI/NHL-A" for c in moved) else [None]) + [c3]
    assert _findings(results, "AUD-COMMENT")[-1] == c3
    assert len(_findings(results, "AUD-COMMENT")) == len(expected)


def test_aud_comment_about_a_code_a_subject_and_a_page():
    """AUD-COMMENT's _about: 'CODE/subject' matches that key only; 'CODE' every subject of it; a page name its
    prefixes; the summary page (prefix '') every key."""
    assert au._about("CHEM-CI/NHL-A", "CHEM-CI/NHL-A")
    assert not au._about("CHEM-CI/NHL-A", "CHEM-CI/NC1-A")
    assert au._about("CHEM-CI", "CHEM-CI/NC1-A")
    assert not au._about("CHEM-CI", "CHEM-CIX/NC1-A")
    assert au._about("works", "SITE-GAUGE/M2") and au._about("works", "WORKS-QTY/Z1")
    assert not au._about("works", "STR-MIN/M2")
    assert au._about("summary", "STR-MIN/M2")
    assert not au._about("nowhere", "STR-MIN/M2")
    assert (au._w("not_assessed"), au._w(None), au._w("pass")) == ("not assessed", "—", "pass")


def test_aud_comment_none_without_changes_or_when_answered(demo_checked):
    """No comparison (no earlier revision): nothing; an open comment with a response: nothing."""
    project, results = demo_checked
    assert au.comment_rule(AuditContext(project, _copy(results, changes=None))) == []
    answered = [c.model_copy(update={"response": "see NML-4502"}) for c in project.comments]
    sw = Swapped(project, comments=answered)
    assert au.comment_rule(AuditContext(sw, _copy(results))) == []


def _prev(results, project, **change):
    inputs = {f.path: f.sha256 for f in project.inputs}
    inputs.update(change)
    return Previous("R2", "2026-11-16", "", results.to_dict(), inputs)


def test_aud_desc_facts_and_a_refuted_claim(demo_checked):
    """Against a previous revision identical but for lab/sieves.csv (a different hash): the
    facts say one input changed, no strength result; a description claiming 'no new laboratory
    results' is refuted (a lab file changed); 'no changes' is refuted too; a claim that the
    selections are unchanged is not (no selection moved)."""
    project, results = demo_checked
    prev = _prev(results, project, **{"lab/sieves.csv": "0" * 64})
    text = ("No new laboratory results. No changes. Selections unchanged.")
    sw = Swapped(project, revision=project.revision.model_copy(update={"description": text}))
    r = _copy(results)
    found = au.description_rule(AuditContext(sw, r, prev))
    assert r.facts == [
        "Compared with R2 (issued 2026-11-16). Input files changed: lab/sieves.csv.",
        "Strength results (by specimen): 0 added, 0 changed, 0 removed.",
        f"Checks: 0 status changes, {len(r.changes['checks'])} value changes with the same status."
        if r.changes["checks"] else "Checks: 0 status changes, 0 value changes with the same "
        "status.",
        "For the decision: no selection, failure, hold or prediction changed."]
    assert [(f.code, f.title, f.subject, f.places) for f in found] == [
        ("AUD-DESC", "Revision description contradicts the inputs", "R3",
         ("dossier.yaml: revision.description", "summary: This revision"))] * 2
    assert found[0].message == ("the description says “No new laboratory results” (no new "
                                "laboratory results), but since R2: lab files added or changed: "
                                "lab/sieves.csv.")
    assert found[1].message == ("the description says “No changes” (that nothing changed), but "
                                "since R2: 1 input file(s) changed.")
    assert found[0].fix == ("rewrite the description so that it agrees with what changed "
                            "(specgen writes the facts beside it), or withdraw the change.")
    assert results.facts != r.facts          # the session's results are untouched


def test_aud_desc_without_a_previous_revision_and_unrefuted(demo_checked):
    """No previous revision: one fact, no finding; the same inputs as before: a claim of no
    change stands (no finding)."""
    project, results = demo_checked
    r = _copy(results)
    assert au.description_rule(AuditContext(project, r, None)) == []
    assert r.facts == ["No earlier issued revision: there is nothing to compare with."]
    sw = Swapped(project, revision=project.revision.model_copy(
        update={"description": "Inputs unchanged; nothing has changed."}))
    r = _copy(results)
    assert au.description_rule(AuditContext(sw, r, _prev(results, project))) == []
    assert r.facts[0] == "Compared with R2 (issued 2026-11-16). Input files none."


def test_facts_of_counts_comments_and_lab_changes():
    """facts_of and _lab_changes on a hand-made comparison: one lab result added and two
    changed; a status change and a value change; a comment raised and one closed."""
    ch = {"inputs": {"added": ["lab/new.csv"], "changed": ["mixes.yaml"], "removed": []},
          "specimens": {"added": ["M1-X"], "changed": ["M1-A", "M1-B"], "removed": []},
          "checks": [{"old_status": "pass", "new_status": "fail"},
                     {"old_status": "pass", "new_status": "pass"}],
          "decision": {}, "comments": {"new": ["C9"], "closed": ["C1"]}}
    prev = SimpleNamespace(code="R7", date="2027-01-02")
    assert au.facts_of(ch, prev) == [
        "Compared with R7 (issued 2027-01-02). Input files added: lab/new.csv; changed: mixes.yaml.",
        "Strength results (by specimen): 1 added, 2 changed, 0 removed.",
        "Checks: 1 status change, 1 value change with the same status.",
        "For the decision: no selection, failure, hold or prediction changed.",
        "Review comments raised: C9; closed: C1."]
    assert au._lab_changes(ch) == ["lab files added or changed: lab/new.csv",
                                   "1 lab result added and 2 changed"]
    assert au._count(1, "mix") == "1 mix" and au._count(0, "mix") == "0 mixs"


def _result(status="attention", value=2.5, limit=None, unit=""):
    return CheckResult(code="COMP-COLOUR", title="t", subject="Z1/M2", subject_kind="zone",
                       status=status, value=value, unit=unit, basis=(), limit=limit, message="")


def test_outside_on_each_kind_of_limit_and_its_edges():
    """AUD-CLAUSE-LIMIT's _outside by hand: ≤ 2 with 2 inside and 2.0001 outside; ≥ 1 with 1 inside; within
    [1, 3] with both edges inside; a fail always; a hold or not-assessed never; no limit or a
    word value never."""
    le, ge = Limit("<=", high=2.0), Limit(">=", low=1.0)
    within = Limit("within", low=1.0, high=3.0)
    assert not au._outside(_result(value=2.0, limit=le))
    assert au._outside(_result(value=2.0001, limit=le))
    assert not au._outside(_result(value=1.0, limit=ge))
    assert au._outside(_result(value=0.9999, limit=ge))
    assert not au._outside(_result(value=1.0, limit=within))
    assert not au._outside(_result(value=3.0, limit=within))
    assert au._outside(_result(value=3.0001, limit=within))
    assert au._outside(_result(value=0.5, limit=within))
    assert au._outside(_result(status="fail", value=None))
    assert not au._outside(_result(status="hold", value=9.0, limit=le))
    assert not au._outside(_result(status="not_assessed", value=9.0, limit=le))
    assert not au._outside(_result(value=9.0, limit=None))
    assert not au._outside(_result(value="high", limit=le))
    assert not au._outside(_result(value=9.0, limit=Limit("<=", high=None)))
    assert not au._outside(_result(value=9.0, limit=Limit("within", low=1.0, high=None)))


def test_aud_decide_names_each_uncovered_fail(demo_checked):
    """Z2 with its justification but an empty covers list (specification.yaml otherwise as
    the demo's) and the selection recorded as needing a decision: the four failing checks of
    M2 in Z2 (COMP-MOIST, DUR-TSA, DUR-ETT, DUR-RETAIN, read from their results), each 'new
    since R2' where R2 did not already fail it."""
    project, results = demo_checked
    spec = project.specification
    sels = [s.model_copy(update={"covers": []}) if s.zone == "Z2" else s
            for s in spec.doc.selections]
    fake = type(spec)(**{**spec.__dict__, "doc": spec.doc.model_copy(update={"selections": sels})})
    q = dict(results.quantities)
    q["Z2"] = {**q["Z2"], "selection_status": Quantity("selection_status", "needs_decision", "",
                                                       "selection")}
    fails = ["COMP-MOIST/Z2/M2", "DUR-TSA/Z2/M2", "DUR-ETT/Z2/M2", "DUR-RETAIN/Z2/M2"]
    assert all(results.check(*k.split("/", 1)).status == "fail" for k in fails)
    before = {"checks": [{"code": "DUR-TSA", "subject": "Z2/M2", "status": "fail"}]}
    prev = Previous("R2", "2026-11-16", "", before, {})
    ctx = AuditContext(Swapped(project, specification=fake), _copy(results, quantities=q), prev)
    f, = au.decision_rule(ctx)
    titles = {k: results.check(*k.split("/", 1)).title for k in fails}
    names = "; ".join(f"{k} ({titles[k]}" + ("" if k == "DUR-TSA/Z2/M2" else ", new since R2")
                      + ")" for k in fails)
    line = line_of(DEMO / "specification.yaml", "covers: [COMP-MOIST/Z2/M2")
    assert f == Finding(
        "AUD-DECIDE", "Selection needing a decision",
        f"zone Z2: the chosen mortar M2 fails {names}, which the justification does not name; "
        "the selection stays undecided until it does.",
        ("specification: zone Z2", f"specification.yaml, line {line}: selections[1].covers"),
        "answer each failure in the justification and name it under covers, or choose another "
        "candidate.", subject="Z2")
    assert au.decision_rule(AuditContext(project, _copy(results))) == []    # the demo: none


def test_aud_cite_and_words_on_results_made_here(demo_checked):
    """A check citing 'nosuchwork' (not in content/references.json) by six results: named once,
    five places and '…'; a message with 'water_binder_ratio' (a key of mixes.yaml) and 'None'
    are flagged, an ordinary word with an underscore that is no key of ours is not."""
    project, results = demo_checked
    cited = [dataclasses.replace(_result(), subject=f"Z{i}/M2",
                                 basis=(Basis("reference", "nosuchwork", "1"),)) for i in range(6)]
    f, = au.citation_rule(AuditContext(project, _copy(results, checks=results.checks + cited)))
    assert f == Finding("AUD-CITE", "Cited works missing from the reference list",
                        "'nosuchwork' is cited by COMP-COLOUR/Z0/M2, COMP-COLOUR/Z1/M2, "
                        "COMP-COLOUR/Z2/M2, COMP-COLOUR/Z3/M2, COMP-COLOUR/Z4/M2 … but is not in "
                        "the reference list.",
                        tuple(f"calculation sheet COMP-COLOUR/Z{i}/M2" for i in range(5)),
                        "add the work to content/references.json, or cite one that is there.",
                        subject="nosuchwork")
    assert au.citation_rule(AuditContext(project, _copy(results))) == []
    worded = dataclasses.replace(_result(), message="set water_binder_ratio to None; foo_bar")
    found = au.words_rule(AuditContext(project, _copy(results, checks=[worded])))
    assert [(f.subject, f.places) for f in found] == [
        ("None", ("calculation sheet COMP-COLOUR/Z1/M2",)),
        ("water_binder_ratio", ("calculation sheet COMP-COLOUR/Z1/M2",))]
    assert found[1].message == ("'water_binder_ratio' (a name inside specgen or its files) "
                                "appears in text for readers: calculation sheet "
                                "COMP-COLOUR/Z1/M2.")
    assert found[1].fix == ("say it in words a reader knows (the project's own text), or report "
                            "the wording of a check's message as a fault of specgen.")
    assert _findings(results, "AUD-WORDS") == []              # the demo's text: none


def test_aud_words_flags_a_key_of_the_specification_file(demo_checked):
    """AUD-WORDS knows the keys of specification.yaml too ('per_working_day', a field of its
    site_tests and of no other file)."""
    project, results = demo_checked
    worded = dataclasses.replace(_result(), message="set per_working_day")
    found = au.words_rule(AuditContext(project, _copy(results, checks=[worded])))
    assert [f.subject for f in found] == ["per_working_day"]
