"""End to end: the evidence chapter, the placed photographs and laboratory reports, the method
statement and the glossary in the demo build."""
from __future__ import annotations

import hashlib
import io
import json
from pathlib import Path

import pytest

pytestmark = pytest.mark.e2e

REPORT = "reports/NML-4502.pdf"
REPO = Path(__file__).resolve().parent.parent


def test_register_and_links_from_the_results(demo_build):
    r3 = demo_build / "R3"
    evidence = (r3 / "evidence.html").read_text(encoding="utf-8")
    assert "Sample register" in evidence and 'id="sample-hm1-s1"' in evidence
    assert f'href="./{REPORT}"' in evidence
    assert 'href="evidence.html#sample-hm1-s1"' in (r3 / "fabric.html").read_text(encoding="utf-8")
    assert 'href="evidence.html#sample-bs-3"' in (r3 / "composition.html").read_text(
        encoding="utf-8")
    # the chosen rationale cites the conservation approach on the scope page
    spec = (r3 / "specification.html").read_text(encoding="utf-8")
    assert 'href="scope.html#heritage-context"' in spec
    assert "Heritage impact" in (r3 / "scope.html").read_text(encoding="utf-8")


def test_report_is_published_hashed_and_attached(demo_build):
    from pypdf import PdfReader
    r3 = demo_build / "R3"
    data = (r3 / REPORT).read_bytes()
    assert data == (REPO / "demo_project" / REPORT).read_bytes()     # published as given
    manifest = json.loads((r3 / "manifest.json").read_text(encoding="utf-8"))
    assert manifest["outputs"][REPORT] == hashlib.sha256(data).hexdigest()
    attached = PdfReader(io.BytesIO((r3 / "WEP-2026-R3.pdf").read_bytes())).attachments
    assert any(name.endswith("NML-4502.pdf") for name in attached)


def test_photograph_is_upright_and_carries_no_metadata(demo_build):
    from PIL import Image
    site = demo_build / "R3"
    # demo P1: stored 600 x 900 with EXIF orientation 6 and a GPS block
    with Image.open(site / "images" / "p1.jpg") as im:
        assert im.size == (900, 600) and dict(im.getexif()) == {}
    with Image.open(site / "images" / "p1-thumb.jpg") as im:
        assert im.size == (360, 240)


def test_method_statement_and_glossary(demo_build):
    r3 = demo_build / "R3"
    method = (r3 / "method.html").read_text(encoding="utf-8")
    assert "Rake out the joints by hand" in method and "Who does what" in method
    assert "Throw or firmly lay on each coat" in method     # render in its own words
    # aftercare: inspection intervals, what to look for, when to call the specifier, and the
    # record of the works for deposit with the local heritage record
    assert "Inspections after the works" in method and "after the first winter" in method
    assert "When to call the specifier." in method
    assert "Deposit with the local heritage record" in method
    glossary = (r3 / "glossary.html").read_text(encoding="utf-8")
    assert "cementation index (Eckel)" in glossary and "characteristic strength" in glossary


def test_pdf_drawing_sheet_and_trial_panel_photograph(demo_build):
    from PIL import Image
    r3 = demo_build / "R3"
    # demo D3 is drawn over sheet 2 of images/WH-EP-210-stair-head.pdf: the figure carries it
    svg = (r3 / "figures" / "drawing-d3.svg").read_text(encoding="utf-8")
    assert "data:image/png;base64," in svg
    # the register places the PDF page itself as a 1600 px PNG (print size)
    with Image.open(r3 / "images" / "d3-sheet.png") as im:
        assert im.size == (1600, 1067)          # sheet 2 is 9 x 6 in: 1600 x 1066.7 px
    # TP2's photograph on the trial-panel section, with its register caption and date
    spec = (r3 / "specification.html").read_text(encoding="utf-8")
    assert "Trial panel TP2 (mix M2), inner face bay 3" in spec
    assert "photographed 20 October 2026, by specifier (Calder Vane Conservation)" in spec
    # the site shows the register's thumbnail, linked to the print-size image the PDF prints
    assert ('<a class="sg-screen-only" href="images/tp2-photo.jpg"><img '
            'src="images/tp2-photo-thumb.jpg"') in spec
    assert '<img class="sg-print-only" src="images/tp2-photo.jpg"' in spec
    with Image.open(r3 / "images" / "tp2-photo.jpg") as im:
        assert dict(im.getexif()) == {} and max(im.size) <= 1600
    with Image.open(r3 / "images" / "tp2-photo-thumb.jpg") as im:
        assert max(im.size) == 360


def test_figures_alternative_text_describes_not_repeats(demo_build):
    """Every figure of every page: an alternative text that is there and is not its caption
    (WCAG 2.1, 1.1.1; a screen reader reads both, so a repeat says nothing more)."""
    import html
    import re
    figure = re.compile(r'<figure class="sg-figure[^"]*"[^>]*>(.*?)</figure>', re.S)
    seen = 0
    for page in (demo_build / "R3").glob("*.html"):
        for body in figure.findall(page.read_text(encoding="utf-8")):
            caption = re.search(r"<figcaption>(.*?)</figcaption>", body, re.S).group(1)
            caption = html.unescape(re.sub(r"<[^>]+>|^Figure \d+\. ", "", caption)).strip()
            for alt in re.findall(r'<img [^>]*alt="([^"]*)"', body):
                seen += 1
                alt = html.unescape(alt)
                assert len(alt) > 20 and alt != caption and not caption.startswith(alt), \
                    (page.name, alt)
    assert seen >= 25
    # the demo's drawing D1: its zone and points in words (samples.yaml)
    evidence = (demo_build / "R3" / "evidence.html").read_text(encoding="utf-8")
    assert re.search(r'alt="[^"]*drawing D1, [^"]*zone Z1 outlined[^"]*sample points? marked',
                     evidence)
