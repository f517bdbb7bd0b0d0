"""The print's memos around WeasyPrint (``specgen.publish.weasyfast``: SVG paths drawn once per
process, lengths parsed once; ``weasyfix.stylesheet``: the print CSS parsed once per
process) write the very bytes WeasyPrint writes without them.  The reference is the
reference library itself: WeasyPrint's own functions, put back by ``weasyfast.bypassed``."""
from __future__ import annotations

from types import SimpleNamespace

import pytest

from specgen.publish import pdf_parts, weasyfast, weasyfix
from specgen.publish.pdf import PDF_OPTIONS
from specgen.publish.pdf_parts import BASE, print_document

# every kind of path command WeasyPrint parses (SVG 1.1 §8.3: moveto, lineto, H/V, cubic,
# smooth cubic, quadratic, smooth quadratic, elliptical arc, closepath; absolute and
# relative; implicit repeats after a moveto), a marker on one path (its vertices), lengths
# in em and % (the length parser), and the same glyph-like outline placed twice
GLYPH = ("M 10.206 -2.61 L 10.53 -2.268 Q 9.612 -1.188 8.406 -0.495 Q 7.2 0.198 5.49 0.198 "
         "C 3.87 0.198 2.898 -0.405 1.503 -2.016 Z")
SVG = f"""<svg xmlns="http://www.w3.org/2000/svg" width="240" height="120"
 viewBox="0 -30 240 120"><defs><marker id="dot" markerWidth="4" markerHeight="4" refX="2"
 refY="2"><circle cx="2" cy="2" r="1.5" fill="red"/></marker></defs>
<path d="{GLYPH}" fill="black"/><path d="{GLYPH}" fill="black"/>
<path d="m 20 10 l 10 5 10 -5 h 8 v 6 H 20 V 10 z" stroke="blue" fill="none"
 marker-mid="url(#dot)"/>
<path d="M 60 10 c 5 -10 15 -10 20 0 s 15 10 20 0 q 5 -8 10 0 t 10 0 T 130 10" fill="none"
 stroke="green" stroke-width="0.5em"/>
<path d="M 150 40 a 20 10 30 1 1 30 10 A 15 15 0 0 0 200 40 a 0 5 0 0 1 5 5" fill="none"
 stroke="black"/>
<rect x="10%" y="50" width="50%" height="2em" fill="none" stroke="gray"/>
</svg>""".encode()
HTML = (f'<html><body><p>A formula twice:</p><img src="{BASE}f.svg" alt="a formula">'
        f'<img src="{BASE}f.svg" alt="the same formula"><p>and once more, smaller:</p>'
        f'<img src="{BASE}f.svg" alt="again" style="width: 80px"></body></html>')
CSS = "@page { size: A4; margin: 20mm; } img { display: block; }"
PAGESET = SimpleNamespace(assets={"f.svg": SVG})


@pytest.fixture
def fresh(monkeypatch):
    """An empty memo (restored empty after), the revision date fixed (same bytes each time)."""
    monkeypatch.setenv("SOURCE_DATE_EPOCH", "1767225600")
    weasyfast.reset()
    yield
    weasyfast.reset()


def _printed() -> bytes:
    return print_document(HTML, CSS, PAGESET, **PDF_OPTIONS).pdf


def test_paths_from_the_memo_are_the_bytes_weasyprint_writes(fresh):
    first = _printed()               # each path drawn once, then put back for its repeats
    drawn = weasyfast.stats()
    again = _printed()               # every path from the memo
    with weasyfast.bypassed():
        theirs = _printed()
    # 4 different paths (the glyph twice in the picture); the picture placed three times
    # (two sizes, one viewBox: the lengths resolve alike): of its 15 path drawings 4 are
    # parsed and 11 put back
    assert drawn["drawn"] == 4 and drawn["reused"] == 11
    assert weasyfast.stats()["drawn"] == 4       # the second print parsed nothing again
    assert first == theirs and again == theirs


def test_the_memo_stays_within_its_bound(fresh, monkeypatch):
    # each of the 4 paths costs 1.2-1.6 kB of the bound: at most two are kept at once, so
    # paths are dropped (oldest first) and parsed again
    monkeypatch.setattr(weasyfast, "PATH_MEMO_BYTES", 3000)
    printed = _printed()
    held = weasyfast.stats()
    assert 0 < held["held"] <= 3000 and held["kept"] <= 2 and held["drawn"] > 4
    with weasyfast.bypassed():
        assert printed == _printed()


def test_lengths_are_parsed_as_weasyprint_parses_them(fresh):
    from weasyprint.svg import utils
    assert utils.size is not None
    cases = [("1em", 12.0, None), ("50%", None, 240.0), ("12pt", None, None), ("3", None, None),
             ("", 12.0, None), ("1em", -0.0, None), ("1em", 0.0, None), ("2ex", 10.0, None)]
    ours = [utils.size(*case) for case in cases] + [utils.size(*case) for case in cases]
    with weasyfast.bypassed():
        theirs = [utils.size(*case) for case in cases] * 2
    # equal values of the same type, and the sign of a zero kept (-0.0 is not 0.0 in a PDF)
    assert [(repr(v), type(v)) for v in ours] == [(repr(v), type(v)) for v in theirs]


def test_the_print_css_is_parsed_once_per_process_and_prints_the_same(fresh, monkeypatch):
    monkeypatch.setattr(weasyfix, "_SHEETS", {})
    first = _printed()                       # the sheet parsed
    sheet = weasyfix._SHEETS[CSS]
    second = _printed()                      # the same sheet object used again
    assert weasyfix._SHEETS == {CSS: sheet} and second == first
    with weasyfast.bypassed():
        from specgen.publish.weasyfix import weasyprint
        alone = weasyprint.HTML(string=HTML, base_url=BASE, url_fetcher=pdf_parts._fetcher(
            PAGESET)).write_pdf(stylesheets=[weasyprint.CSS(string=CSS)], **PDF_OPTIONS)
    assert alone == first


def test_one_font_configuration_per_process_prints_the_same(fresh, monkeypatch):
    from specgen.publish.weasyfix import weasyprint
    monkeypatch.setattr(weasyfix, "_FONTS", [])
    text = ("<html lang='en'><body><h1>Mortar for the north pier</h1><p><b>Bold</b>, "
            "<i>italic</i> and <code>monospace</code> text: 1.5 N/mm² at 28 d.</p></body></html>")
    shared = [print_document(page, CSS, PAGESET, **PDF_OPTIONS).pdf for page in (HTML, text)]
    config = weasyfix._FONTS[0][1]
    assert weasyfix.fonts() is config          # kept: the same object for every part
    # WeasyPrint's default, a font configuration of its own for each document
    alone = [weasyprint.HTML(string=page, base_url=BASE, url_fetcher=pdf_parts._fetcher(
        PAGESET)).write_pdf(stylesheets=[weasyprint.CSS(string=CSS)], **PDF_OPTIONS)
        for page in (HTML, text)]
    assert shared == alone
