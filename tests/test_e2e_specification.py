"""End-to-end: the specification page, its exports beside the PDF and the summary (demo R3)."""
from __future__ import annotations

import json

import pytest

pytestmark = pytest.mark.e2e

REV = "R3"
ZONES = ("Z1", "Z2", "Z3")


def _clause() -> str:
    """Clauses are numbered chapter.zone.clause: Z1 is the demo's first zone with a choice,
    acceptance its seventh clause, in the chapter number the specification has."""
    from specgen.report.chapters import chapters
    from specgen.report.render import chapter_numbers
    return f"{chapter_numbers(chapters())['specification.md']}.1.7 Acceptance criteria"


CLAUSE = _clause()


def test_specification_page_and_exports_in_the_build(demo_build, demo_pdf_text):
    rev = demo_build / REV
    page = (rev / "specification.html").read_text(encoding="utf-8")
    for heading in ("Options appraisal", "Selection per zone", "Site test regime", "Hold points",
                    "Trial panels", CLAUSE):
        assert heading in page, heading
    assert "Chosen although it fails checks" in page            # Z2, justified
    manifest = json.loads((rev / "manifest.json").read_text())
    for zone in ZONES:
        for ext in ("md", "html", "docx"):
            rel = f"exports/WEP-2026-{REV}-{zone}-specification.{ext}"
            assert (rev / rel).is_file(), rel
            assert rel in manifest["outputs"], rel
            assert f'href="./{rel}"' in page, rel
    chapter = f"exports/WEP-2026-{REV}-specification.docx"
    assert (rev / chapter).is_file() and chapter in manifest["outputs"]
    assert f'href="./{chapter}"' in page
    html = (rev / f"exports/WEP-2026-{REV}-Z1-specification.html").read_text(encoding="utf-8")
    assert "<script" not in html and "<style" not in html
    summary = (rev / "index.html").read_text(encoding="utf-8")
    assert "The mortar for each zone" in summary and "Hold points still open" in summary
    from pypdf import PdfReader
    pdf = PdfReader(str(rev / f"WEP-2026-{REV}.pdf"))
    text = "\n".join(demo_pdf_text(f"{REV}/WEP-2026-{REV}.pdf"))
    assert CLAUSE in text
    assert f"exports/WEP-2026-{REV}-Z1-specification.md" in (pdf.attachments or {})
