"""The specification as DOCX documents: opened with python-docx and read as a contract writer
would (headings, numbered clauses, tables, sources, draft/issued marking).

Expected values come from the demo's own inputs (dossier.yaml requirements: 2 MPa at 28 d,
3 MPa at 90 d, a 9 MPa cap at 365 d) as the checks judged them, read from the results.
"""
from __future__ import annotations

import datetime as dt
import io
import zipfile

import docx
import pytest

from tests.test_specification import render_spec

Z1 = "exports/WEP-2026-R3-Z1-specification.docx"
CHAPTER = "exports/WEP-2026-R3-specification.docx"


@pytest.fixture(scope="module")
def rendered(tmp_path_factory):
    import shutil
    from tests.conftest import DEMO
    project = tmp_path_factory.mktemp("docx") / "project"
    shutil.copytree(DEMO, project)
    _, pages, results = render_spec(project)
    return pages, results


def _doc(pages, path):
    return docx.Document(io.BytesIO(pages.downloads[path]))


def _styled(doc, style):
    return [p.text for p in doc.paragraphs if p.style.name == style]


def test_zone_document_has_headings_clauses_and_marking(rendered):
    pages, results = rendered
    doc = _doc(pages, Z1)
    assert _styled(doc, "Title") == ["Specification of zone Z1: Inner face, repointing of brick "
                                     "courses"]
    headings = _styled(doc, "Heading 1")
    # section numbers are the dossier's own (the chapter numbers its clauses); the titles are
    # those of the clause template for a repointing zone
    titles = ["Materials", "Proportions and batching", "Joint preparation",
              "Application and finishing", "Curing and protection", "Weather limits",
              "Acceptance criteria", "Exposure and durability tests"]
    assert [h.split(" ", 1)[1] for h in headings[:8]] == titles
    assert headings[-2:] == ["Cautions", "Sources"]
    numbers = [h.split(" ", 1)[0] for h in headings[:7]]
    clauses = _styled(doc, "Clause")
    # by the clause template for a repointing zone: 4 materials, 3 batching (the workable life
    # is known), 2 joint preparation, 2 application, 1 curing, 2 weather; acceptance: one per
    # required age (2 in dossier.yaml), the cap, sampling, appearance, loading, non-conformance
    # then exposure and durability: the class, and one hold point per test asked for
    # (freeze–thaw, setting time, soundness in the demo's Z1)
    assert len(clauses) == 4 + 3 + 2 + 2 + 1 + 2 + (2 + 5) + (1 + 3) == 25
    assert clauses[0].startswith(f"{numbers[0]}.1\tBinder.")
    assert [c.split("\t")[0] for c in clauses[-11:-4]] == [f"{numbers[6]}.{i}" for i in range(1, 8)]
    assert [c.split("\t")[0] for c in clauses[-4:]] == [f"{numbers[0].rsplit('.', 1)[0]}.8.{i}" for i in range(1, 5)]
    header = doc.sections[0].header.paragraphs[0].text
    assert header == "WEP-2026, revision R3 of 2026-11-30: DRAFT — not for construction"
    assert doc.core_properties.created == dt.datetime(2026, 11, 30, tzinfo=dt.timezone.utc)


def test_acceptance_table_cells_are_the_results(rendered):
    pages, results = rendered
    table = _doc(pages, Z1).tables[0]
    cells = [[c.text for c in row.cells] for row in table.rows]
    assert cells[0] == ["Test age", "Characteristic strength at least (MPa)",
                        "No set mean below (MPa)", "From"]
    acc = results.quantities["Z1"]["site_acceptance"].value
    for row in cells[1:3]:
        age = row[0]
        assert float(row[1]) == pytest.approx(acc[age]["characteristic_min"])
        assert float(row[2]) == pytest.approx(acc[age]["individual_min"])
    # dossier.yaml: 2 MPa at 28 d and 3 MPa at 90 d; sets at least 80 % of it (common practice
    # rule specification.individual_minimum): 1.6 and 2.4 MPa
    assert cells[1][:3] == ["28 d", "2", "1.6"] and cells[2][:3] == ["90 d", "3", "2.4"]
    cap = results.check("STR-MAX", "M2").limit.high
    assert cells[3][:2] == ["365 d (cap)", f"at most {cap:g}"] and cap == 9


def test_sources_list_every_check_cited_with_its_basis(rendered):
    pages, _ = rendered
    doc = _doc(pages, Z1)
    body = "\n".join(p.text for p in doc.paragraphs)
    cited = {t.split("]")[0] + "]" for t in body.split("[")[1:] if "/" in t.split("]")[0]}
    sources = [p.text for p in doc.paragraphs if p.style.name == "List Bullet"
               and p.text.startswith("[")]
    assert {s.split(" ")[0] for s in sources} == {f"[{c}" if not c.startswith("[") else c
                                                  for c in cited}
    strmin = next(s for s in sources if s.startswith("[STR-MIN/M2]"))
    assert "Annex D" in strmin and "project requirement" in strmin


def test_chapter_document_holds_every_zone_and_the_regime(rendered):
    pages, results = rendered
    doc = _doc(pages, CHAPTER)
    h1 = _styled(doc, "Heading 1")
    assert h1[:4] == ["Mortar chosen for each zone", "Zone Z1: Inner face, repointing of brick "
                      "courses", "Zone Z2: Parapet, rendered coping band",
                      "Zone Z3: Stair head, rebedding of loose gritstone blocks"]
    assert h1[-4:] == ["Site test regime", "Hold points", "Cautions", "Sources"]
    choice = [[c.text for c in row.cells] for row in doc.tables[0].rows]
    for row, zone in zip(choice[1:], ("Z1", "Z2", "Z3")):
        assert row[2].startswith(results.value(zone, "selected_mix") + ":")
    clauses = _styled(doc, "Clause")
    sections = {h.split(" ", 1)[0] for h in _styled(doc, "Heading 2")}
    # every clause is numbered under its own section heading, and each zone has its sections
    assert clauses and all(c.split("\t")[0].rsplit(".", 1)[0] in sections for c in clauses)
    assert len(clauses) == len(set(c.split("\t")[0] for c in clauses))
    regime = next(t for t in doc.tables if t.rows[0].cells[0].text == "Zone"
                  and t.rows[0].cells[1].text == "Wall area")
    for row in regime.rows[1:]:
        zone = row.cells[0].text
        assert row.cells[4].text == f"{results.value(zone, 'sample_sets')['sets']:g}"
    holds = next(t for t in doc.tables if t.rows[0].cells[0].text == "Hold point")
    assert len(holds.rows) - 1 == len(results.value("WEP-2026", "hold_points"))
    text = "\n".join(p.text for p in doc.paragraphs)
    assert "heritage authority" in text and "licensed professionals" in text


def test_docx_is_reproducible(rendered):
    pages, _ = rendered
    with zipfile.ZipFile(io.BytesIO(pages.downloads[CHAPTER])) as z:
        assert {i.date_time for i in z.infolist()} == {(2026, 11, 30, 0, 0, 0)}


def test_issued_marking():
    from specgen.project.schema import Revision
    from specgen.report.specification_docx import marking
    rev = Revision(code="R2", date=dt.date(2026, 6, 1), status="issued", purpose="for_approval",
                   description="second issue")
    assert marking(rev) == "revision R2 of 2026-06-01: ISSUED for approval"
