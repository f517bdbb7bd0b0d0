"""The life of a revision end to end: issue → new lab results → build → issue again.

A starter project (``specgen new``) keeps the builds small, and with one candidate mix
smaller still: the test builds five revisions (R1 issued, R2 as draft and issued, R1 rebuilt,
R3), and a revision's marks and dates change its pages, so most of each PDF is laid out
anew.  The starter's second mix is taken out first (``specgen check`` lists 95 checks of the
starter, 68 without M2: fewer calculation sheets to lay out five times); nothing asserted
here names M2.  Check values are the project's own inputs: the dates given to ``issue``, the
specimens added to lab/strength.csv.
"""
from __future__ import annotations

import json

import pytest

from specgen.publish.output import sha256_file
from tests.helpers import edit

pytestmark = [pytest.mark.e2e, pytest.mark.costly(115)]


def _one_mix(proj) -> None:
    """The starter with its first mix only: M2's entry, its specimens and its candidacy out."""
    mixes = proj / "mixes.yaml"
    text = mixes.read_text(encoding="utf-8")
    assert text.count("  - id: M") == 2 and "  - id: M2" in text
    mixes.write_text(text[:text.index("  - id: M2")], encoding="utf-8")
    csv = proj / "lab" / "strength.csv"
    rows = csv.read_text(encoding="utf-8").splitlines(keepends=True)
    kept = [r for r in rows if not r.startswith("M2-")]
    assert len(kept) < len(rows)
    csv.write_text("".join(kept), encoding="utf-8")
    edit(proj / "dossier.yaml", "candidates: [M1, M2]", "candidates: [M1]")


def test_issue_new_results_build_issue(tmp_path, cli):
    proj, out = tmp_path / "project", tmp_path / "out"
    assert cli("new", proj).exit_code == 0
    _one_mix(proj)
    first = cli("issue", proj, "--out", out, "--date", "2026-01-20", "--quiet")
    assert first.exit_code == 0, first.output
    assert "Issued R1" in first.output and "the project is now draft R2" in first.output
    frozen = (proj / "issued" / "R1" / "dossier.yaml").read_text()
    assert "  status: issued" in frozen and "  date: 2026-01-20" in frozen
    assert "# draft or issued" in frozen                    # the specifier's comments stay
    now = (proj / "dossier.yaml").read_text()
    assert "  code: R2" in now and "  status: draft" in now
    manifest = json.loads((out / "R1" / "manifest.json").read_text())
    assert manifest["status"] == "issued" and manifest["date"] == "2026-01-20"
    for path, digest in manifest["inputs"].items():       # the issued inputs, hashed
        assert sha256_file(proj / "issued" / "R1" / path) == digest, path

    csv = proj / "lab" / "strength.csv"
    csv.write_text(csv.read_text() + "M1-90-1,M1,90,compressive,3.9,20\n"
                   "M1-90-2,M1,90,compressive,4.1,20\nM1-90-3,M1,90,compressive,4.0,20\n")
    built = cli("build", proj, "--out", out, "--quiet")
    assert built.exit_code == 0, built.output
    changes = json.loads((out / "R2" / "changes.json").read_text())
    assert changes["from"] == "R1" and changes["specimens"]["added"] == ["M1-90-1", "M1-90-2",
                                                                         "M1-90-3"]
    assert changes["inputs"]["changed"] == ["dossier.yaml", "lab/strength.csv"]
    page = (out / "R2" / "changes.html").read_text()
    assert page.index("What changed for the decision") < page.index("Every change")
    assert "DRAFT — not for construction" in (out / "R2" / "strength.html").read_text()
    root = (out / "index.html").read_text()
    assert "url=R1/index.html" in root and 'A draft, <a href="R2/index.html">R2</a>' in root
    status = cli("status", proj)
    assert "revision R2: draft" in status.output and "last issued revision: R1" in status.output
    assert "Strength results (by specimen): 3 added, 0 changed, 0 removed." in status.output

    second = cli("issue", proj, "--out", out, "--date", "2026-02-03", "--quiet")
    assert second.exit_code == 0, second.output
    assert json.loads((out / "R2" / "manifest.json").read_text())["status"] == "issued"
    assert "url=R2/index.html" in (out / "index.html").read_text()
    assert "superseded by R2" in (out / "revisions.html").read_text()
    text = cli("diff", out, "--from", "R1", "--to", "R2").output
    assert text.startswith("Changes from R1 to R2\nWhat changed for the decision:\n")
    assert "strength results (by specimen) added: M1-90-1, M1-90-2, M1-90-3" in text

    # an input of an issued revision edited afterwards stops the build until told why
    old = proj / "issued" / "R1" / "lab" / "strength.csv"
    edit(old, "M1-28d-C1,M1,28,compressive,3.4,20", "M1-28d-C1,M1,28,compressive,3.5,20")
    stopped = cli("build", proj, "--out", out, "--quiet")
    assert stopped.exit_code == 2
    assert "issued/R1/lab/strength.csv: was changed after revision R1 was issued" in stopped.output
    rebuilt = cli("build", proj, "--out", out, "--quiet", "--rebuild-issued", "R1", "--reason",
                  "copying error in one 28 d result corrected")
    assert rebuilt.exit_code == 0, rebuilt.output
    assert "Superseded by R2" in (out / "R1" / "index.html").read_text()
    record = json.loads((out / "R1" / "manifest.json").read_text())["rebuilds"]
    assert record == [{"reason": "copying error in one 28 d result corrected",
                       "changed": ["lab/strength.csv"]}]
