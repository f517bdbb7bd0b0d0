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


def test_findings_on_the_chosen_mortar_name_each_check_by_its_title(demo_build):
    """The specification lists, per zone, the findings the works must allow for: the same
    checks, in the same order, as SPEC-SELECT's notes in results.json — each shown by its
    title linked to its calculation sheet, with its register key after it, never as a bare
    key ("DUR-SOUND/NC1: hold — ...")."""
    import html
    import re
    rev = demo_build / REV
    page = (rev / "specification.html").read_text(encoding="utf-8")
    results = json.loads((rev / "results.json").read_text(encoding="utf-8"))
    titles = {"/".join(filter(None, (c["code"], c["subject"]))): c["title"]
              for c in results["checks"]}
    for sel in (c for c in results["checks"] if c["code"] == "SPEC-SELECT"):
        zone = sel["subject"]
        part = page[page.index('<h2 id="selection-per-zone"'):]     # past the contents
        part = part[part.index(f">{zone} —"):]
        part = part[part.index("must allow for"):]
        items = re.findall(r"<li>(.*?)</li>", part[:part.index("</ul>")], re.S)
        assert len(items) == len(sel["notes"]) > 0, zone
        for item, note in zip(items, sel["notes"]):
            key, status = re.match(r"(\S+): (\w[\w ]*?) — ", note).groups()
            code, _, subject = key.partition("/")
            link = re.match(r'<a href="calculations\.html#calc-([^"]+)">(.*?)</a> \((.*?)\) — '
                            r'(.*?):', item)
            assert link, item
            assert html.unescape(link.group(2)) == titles[key]
            assert link.group(3) == key and link.group(4) == status
            assert link.group(1).startswith(code.lower())
