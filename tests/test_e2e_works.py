"""End to end: the works page, the batching cards and the quantities CSV in the demo build."""
from __future__ import annotations

import hashlib
import io
import json

import pytest

pytestmark = pytest.mark.e2e

CSV = "WEP-2026-R3-quantities.csv"


def test_works_page_cards_and_csv_exist(demo_build):
    r3 = demo_build / "R3"
    works = (r3 / "works.html").read_text(encoding="utf-8")
    assert "Mixes, quantities and batching" in works
    assert f'href="./{CSV}"' in works
    assert 'href="card-M1.html"' in works
    for mix in ("M1", "M2", "M3"):
        card = (r3 / f"card-{mix}.html").read_text(encoding="utf-8")
        assert f"Batching card {mix}" in card
        assert "safety data sheet" in card and "competent person" in card
    assert (r3 / CSV).read_bytes().startswith(b"zone,works,mix,kind,item,description,value,unit\r\n")


def test_csv_is_in_the_manifest_with_its_hash(demo_build):
    r3 = demo_build / "R3"
    manifest = json.loads((r3 / "manifest.json").read_text(encoding="utf-8"))
    assert manifest["outputs"][CSV] == hashlib.sha256((r3 / CSV).read_bytes()).hexdigest()


def test_card_is_a_page_of_its_own_in_the_pdf(demo_build, demo_pdf_text):
    from pypdf import PdfReader
    reader = PdfReader(io.BytesIO((demo_build / "R3" / "WEP-2026-R3.pdf").read_bytes()))
    pages = demo_pdf_text("R3/WEP-2026-R3.pdf")
    hits = [i for i, text in enumerate(pages) if "Batching card M1" in text
            and "What to do" in text]
    assert len(hits) == 1, "the card's heading and its steps share one page"
    text = pages[hits[0]]
    assert "Wet mortar is strongly alkaline" in text and "safety data sheet" in text
    assert "Batching card M2" not in text
    assert CSV in reader.attachments
