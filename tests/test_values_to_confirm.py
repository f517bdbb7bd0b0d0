"""Values still tagged 'memory': recorded where a check reads them, listed on one page of a
draft, and a revision for construction refuses to build while any remains."""
from __future__ import annotations

import json
import re
import shutil

import pytest

from specgen import refdata
from specgen.build import build, check, refuse_unconfirmed
from specgen.errors import InputErrors
from tests.helpers import edit


def test_recording_notes_only_the_entries_read():
    with refdata.recording() as uses:
        refdata.load("grading_envelopes").data["en13139_0_2"]["limits"]
    assert {(u.table, u.path, u.tag) for u in uses} == {
        ("grading_envelopes", "en13139_0_2", "memory")}
    # outside a recording nothing is noted, and the data reads as a plain mapping
    assert refdata.load("salt_load").data["wta_2_9"]["edges"]["chloride"] == [0.2, 0.5]


def test_demo_draft_lists_what_it_rests_on(demo_copy):
    _, r = check(demo_copy)
    where = {v["where"]: v for v in r.unconfirmed()}
    env = where["content/data/grading_envelopes.yaml: astm_c144_natural"]
    assert "COMP-GRAD/Z1/M1" in env["used_by"]
    assert "content/data/hydraulicity_bands.yaml" in where
    # the EN 13139 envelopes are not the project's choice: not read, so not listed
    assert not [w for w in where if "en13139" in w]
    # a rule of thumb is recorded as such, and is not a value to confirm
    tags = {v["where"]: v["tag"] for v in r.values_used}
    assert tags["content/data/kiln_stages.yaml"] == "common practice"
    assert "content/data/kiln_stages.yaml" not in where
    assert json.loads(r.to_json())["values_used"] == r.values_used


def test_sheets_carry_no_drafting_marks(demo_copy):
    _, r = check(demo_copy)
    for c in r.checks:
        text = " ".join((c.message, *c.notes, *(i.source for s in c.steps for i in s.inputs),
                         *(b.note for b in c.basis)))
        assert "(memory)" not in text, c.key


def test_construction_revision_refused_while_values_unconfirmed(demo_copy, tmp_path):
    shutil.rmtree(demo_copy / "issued")      # no archived revisions to build first
    edit(demo_copy / "dossier.yaml", "purpose: for_approval", "purpose: for_construction")
    out = tmp_path / "out"
    with pytest.raises(InputErrors) as exc:
        build(demo_copy, out)
    text = str(exc.value)
    n = len(check(demo_copy)[1].unconfirmed())
    assert text.startswith(
        f"dossier.yaml, line 25: revision.purpose: revision R3 is for construction but rests on "
        f"{n} value(s) still tagged memory (recalled, not read in their source). Fix: confirm "
        "each value listed below against its source, or issue the revision for approval until "
        "then (purpose: for_approval).")
    assert ("content/data/grading_envelopes.yaml: astm_c144_natural: tagged memory (source "
            "named: ASTM C144, 5.1 (grading requirements, natural sand)); used by "
            "COMP-GRAD/Z1/M1, COMP-GRAD/Z1/M2, COMP-GRAD/Z1/M3 and 2 more. Fix: read the value "
            "in the source and cite its clause or table (then remove the tag), or declare it "
            "common practice with its range and reason, or a project requirement "
            "(rule_overrides with a justification).") in text
    assert not out.exists() or not any(out.glob("R3*"))   # nothing written


def test_for_approval_is_not_refused(demo_copy):
    project, r = check(demo_copy)
    assert r.unconfirmed()
    refuse_unconfirmed(project, r)          # for approval: listed, not refused


def test_every_data_table_declares_its_values():
    """Every table and tagged entry says where its values come from: a published source, a
    rule of thumb ('common practice'), or 'memory' awaiting confirmation."""
    allowed = {"", "memory", "common practice"}
    for path in sorted(refdata.DATA_DIR.glob("*.yaml")):
        table = refdata.load(path.stem)
        assert table.source, path.name
        assert table.tag in allowed, path.name
        for m in re.finditer(r"^\s*tag: *(.*)$", path.read_text(encoding="utf-8"), re.M):
            assert m.group(1).strip().strip('"') in allowed, (path.name, m.group(0))


def test_every_value_to_confirm_has_a_title_for_its_reader():
    """A table or entry tagged 'memory' carries a title in words: the Values to confirm page
    names it by that title, never by its key in the data file."""
    import yaml

    def untitled(node, path):
        if isinstance(node, dict):
            if node.get("tag") == "memory" and not node.get("title"):
                yield path or "(the table)"
            for k, v in node.items():
                yield from untitled(v, f"{path}.{k}" if path else str(k))
        elif isinstance(node, list):
            for i, v in enumerate(node):
                yield from untitled(v, f"{path}[{i}]")

    found = {p.name: list(untitled(yaml.safe_load(p.read_text(encoding="utf-8")), ""))
             for p in sorted(refdata.DATA_DIR.glob("*.yaml"))}
    assert {k: v for k, v in found.items() if v} == {}


def test_every_rule_declares_its_basis():
    """A rule is a published value (bibliography key and clause), a rule of thumb with its
    reason (and range where the trade gives one), or a project requirement."""
    from specgen.checks.rules import builtin_rules
    from specgen.report.references import library
    for key, rule in builtin_rules().items():
        b = rule.basis
        if b.kind == "reference":
            assert b.ref in library() and b.clause, key
        elif b.kind == "common practice":
            assert len(b.note) > 20, key
