"""End-to-end, read as its readers would: no internal names, accessible pages, screenshots.

All on the one shared demo build (``demo_build``).  The screenshots are kept as test
artefacts in ``test-artefacts/screenshots/`` (or ``$SPECGEN_ARTEFACTS``) to be looked at.
"""
from __future__ import annotations

import os
import re
from pathlib import Path

import pytest

from tests.conftest import REPO
from tests.reader_text import internal_names, reader_text

pytestmark = [pytest.mark.e2e, pytest.mark.costly(170)]

REV = "R3"
#: the page whose subject is the input as it is written: the input listing; and the web
#: server's "not found" page, which is no page of the dossier (its addresses are the
#: server's, so opened as a file it finds none of its assets)
LISTINGS = {"inputs.html", "404.html"}


def _pages(demo_build) -> list[Path]:
    return [p for p in sorted((demo_build / REV).glob("*.html")) if p.name not in LISTINGS]


def test_the_scan_finds_what_it_is_for():
    """The scan itself, on text made for it: each kind of name found in running text and in
    an alternative text, none inside code or the input listing."""
    html = ('<article><p>Give the joint_width<br /> in dossier.yaml (rule works.placing_rate).</p>'
            '</span><img alt="natural_cement binder"><p><code>joint_depth</code> NH35 (nhl), NHL 3.5 '
            '<img class="sg-math" alt="f_k = 2"></p>'
            '&lt;http://example.org/baustoffe_moertel&gt; '
            '<div class="sg-input-listing">mixes.yaml</div></article>'
            '<nav>outside_article</nav>')
    assert sorted(internal_names(reader_text(html))) == [
        ("choice key", "nhl"), ("file name", "dossier.yaml"),
        ("rule key", "rule works.placing_rate"), ("snake_case", "joint_width"),
        ("snake_case", "natural_cement"), ("snake_case", "placing_rate")]


def test_no_list_is_run_into_a_paragraph(demo_build):
    """A Markdown list written without the blank line before it reads as one run-on
    paragraph of "- item - item" (it did under each analysis of the composition chapter)."""
    run_on = re.compile(r"<p>(?:(?!</p>).)*?\n[-*] \S", re.S)
    found = {p.name: len(run_on.findall(p.read_text(encoding="utf-8")))
             for p in (demo_build / REV).glob("*.html")}
    assert {k: v for k, v in found.items() if v} == {}


def test_units_and_signs_are_typeset(demo_build):
    """Symbols, not ASCII spellings (SI Brochure, 9th ed., 5.4: unit symbols, a space
    between value and unit, from memory); ½ as a superscript, not ``^0.5``."""
    for page in _pages(demo_build):
        text = re.sub(r"\s+", " ", reader_text(page.read_text(encoding="utf-8")))
        for ascii_form in ("degC", "m^2", "m^3", "min^0.5", " -> ", "(s)", "^½"):
            assert ascii_form not in text, (page.name, ascii_form)
    sheets = (demo_build / REV / "calculations.html").read_text(encoding="utf-8")
    assert "min<sup>½</sup>" in sheets
    assert "\u202f°C" in sheets or "\u202fMPa" in sheets


#: the pages checked at the phone width in the default run (--full: every page)
PHONE_PAGES = {"index.html", "strength.html", "compatibility.html", "specification.html",
               "card-M1.html", "revisions.html"}
SHOTS = {"home": "index.html", "chapter": "composition.html",
         "calculation-sheet": "calculations.html#calc-chem-ci-nc1-a", "batching-card": "card-M1.html"}
#: the window of each width: a desktop screen, a phone's (390 × 844 CSS px)
WINDOWS = {1400: 1000, 390: 844}


@pytest.fixture(scope="module")
def browsed(demo_build, request):
    """The demo's pages opened in Debian's Chromium, each once per width, and what the
    tests below read of each opening.  A load is the costly part (the calculation sheets,
    one page of about 290 000 px, take seconds to load and most of axe's time), so one
    opening serves every test that needs the page: its title, console errors and outside
    requests (every page of R3 at the desktop width), the screenshot (``SHOTS``), then
    axe-core (every page at the desktop width; at the phone width the key pages, every
    page with --full).  Console errors and outside requests are kept from every opening."""
    from tests.browser import axe_script, axe_violations, browser_or_skip, open_browser
    browser_or_skip()
    from tests.conftest import full_run
    full, rev = full_run(request.config), demo_build / REV
    folder = Path(os.environ.get("SPECGEN_ARTEFACTS", REPO / "test-artefacts")) / "screenshots"
    folder.mkdir(parents=True, exist_ok=True)
    shots = {rev / t.partition("#")[0]: (name, t.partition("#")[2]) for name, t in SHOTS.items()}
    seen = {"titles": {}, "errors": [], "outside": [], "axed": set(), "violations": {},
            "shots": {}}
    script = axe_script()
    for width, height in WINDOWS.items():
        wide = width > 500
        axe = {p for p in _axe_pages(demo_build) if full or wide or p.name in PHONE_PAGES}
        titled = _titled_pages(demo_build) if wide else set()
        with open_browser(width=width, height=height) as page:
            now = {"page": None, "axe": False}
            # axe reads the style sheets itself (refused from a file:// page: a console
            # error of axe's, not the page's), so its run is not listened to
            page.on("console", lambda m: seen["errors"].append((now["page"], m.text))
                    if m.type == "error" and not now["axe"] else None)
            page.on("request", lambda r: seen["outside"].append((now["page"], r.url))
                    if not r.url.startswith(("file:", "data:", "blob:")) else None)
            for html in sorted(axe | titled | set(shots)):
                now.update(page=f"{html.relative_to(demo_build)}@{width}", axe=False)
                page.goto(html.as_uri())
                page.wait_for_load_state("load")
                if html in titled:
                    seen["titles"][html.name] = page.title()
                if wide and html == rev / "index.html":
                    seen["index"] = (page.inner_text("body"), len(page.screenshot(full_page=True)))
                if html in shots:
                    name, frag = shots[html]
                    if frag:    # the same document, scrolled to the sheet
                        page.goto(f"{html.as_uri()}#{frag}")
                    shot = folder / f"{name}-{width}.png"
                    page.screenshot(path=str(shot), full_page=not frag)
                    seen["shots"][(name, width)] = (
                        shot, shot.stat().st_size,
                        page.evaluate("document.documentElement.scrollWidth"))
                if html in axe:
                    now["axe"] = True
                    seen["axed"].add(f"{html.name}@{width}")
                    for v in axe_violations(page, script):
                        seen["violations"].setdefault(f"{html.name}@{width}", []).append(
                            (v["id"], [n["target"] for n in v["nodes"][:3]]))
    return seen


def _axe_pages(demo_build) -> set[Path]:
    """The pages axe checks: every page of R3 but the server's "not found" page, and the
    revision list of the root."""
    return {*_pages(demo_build), demo_build / REV / "inputs.html", demo_build / "revisions.html"}


def _titled_pages(demo_build) -> set[Path]:
    return {p for p in (demo_build / REV).glob("*.html") if p.name != "404.html"}


def test_pages_in_real_browser(browsed, demo_build):
    """Every page loads in Debian's Chromium with no console error and no outside request."""
    assert browsed["errors"] == []
    assert browsed["outside"] == []
    assert set(browsed["titles"]) == {p.name for p in _titled_pages(demo_build)}
    assert all(browsed["titles"].values()), browsed["titles"]
    body, shot = browsed["index"]
    assert "The mortar for each zone" in body and "check register" in body
    assert shot > 20_000  # a blank page compresses to a few kB


def test_axe_finds_no_wcag_violation_on_any_page(browsed, demo_build, full):
    """axe-core (WCAG 2.0/2.1 A and AA rule sets) in Debian's Chromium, every page at the
    desktop width; at the phone width the key pages (every page with --full)."""
    every = _axe_pages(demo_build)
    assert browsed["axed"] == ({f"{p.name}@1400" for p in every}
                               | {f"{p.name}@390" for p in every if full or p.name in PHONE_PAGES})
    assert browsed["violations"] == {}


def test_screenshots_of_the_key_pages(browsed):
    """Home, a chapter, a calculation sheet and a batching card at 1400 and 390 px, kept
    for a person to look at; each must show more than a blank page."""
    assert sorted(browsed["shots"]) == sorted((n, w) for n in SHOTS for w in WINDOWS)
    for (name, width), (shot, size, overflow) in browsed["shots"].items():
        assert size > 20_000, shot  # a blank page is a few kB
        # nothing wider than the screen except inside a scrolling region
        assert overflow <= width + 1, (name, width, overflow)


def test_pdf_is_tagged_for_a_screen_reader(demo_build):
    """One structure tree over the parts printed apart, language set, every page tied in,
    every figure with an alternative text, tables with header cells (tests/pdf_structure.py)."""
    from pypdf import PdfReader

    from tests.pdf_structure import structure
    main = PdfReader(str(demo_build / REV / f"WEP-2026-{REV}.pdf"))
    found = structure(main)
    assert found.tree and found.marked and found.lang == "en"
    assert found.untied_pages == []
    assert found.types["/Figure"] >= 5 and found.figures_without_alt == 0
    assert found.types["/TH"] > 100 and found.types["/H1"] >= 15
    assert found.duplicate_ids == []
    # the appendix volume the same way (its sheets' formulas are figures with their text)
    appendix = PdfReader(str(demo_build / REV / f"WEP-2026-{REV}-appendices.pdf"))
    found = structure(appendix)
    assert found.tree and found.marked and found.lang == "en"
    assert found.untied_pages == [] and found.duplicate_ids == []
    assert found.figures_without_alt == 0 and found.types["/TH"] > 100
    # a reader's window shows each volume's title (PDF/UA-1 7.1, from memory); the variant
    # is PDF/A-3a (WeasyPrint has no variant both PDF/A-3 and PDF/UA: specgen/publish/pdf.py)
    for reader in (main, appendix):
        assert reader.trailer["/Root"]["/ViewerPreferences"]["/DisplayDocTitle"] == True  # noqa: E712
        assert b"pdfaid:part=\"3\"" in reader.trailer["/Root"]["/Metadata"].get_object().get_data()


# last in the file: the PDFs' prose is taken apart after the demo build (conftest.py),
# while the tests above run
def test_no_internal_name_reaches_a_reader(demo_build, demo_pdf_prose):
    """Every page of the site (what a screen reader says of it too: alternative texts,
    labels) and every page of both PDF volumes, but the input listing and code (a file or
    key named as written, for the person editing the project, is set as code).  The PDFs'
    prose is taken apart once per run (``demo_pdf_prose``)."""
    from pypdf import PdfReader

    from tests.reader_text import pdf_reader_pages
    found = {}
    pages = [*_pages(demo_build), demo_build / "index.html", demo_build / "revisions.html"]
    for page in pages:
        names = internal_names(reader_text(page.read_text(encoding="utf-8")))
        if names:
            found[page.name] = sorted(set(names))[:8]
    pdfs = sorted((demo_build / REV).glob("*.pdf"))
    assert len(pdfs) == 2                    # the main volume and the appendix volume
    for pdf in pdfs:
        prose = demo_pdf_prose(pdf.relative_to(demo_build).as_posix())
        for n, text in pdf_reader_pages(PdfReader(str(pdf)), prose=prose):
            if names := internal_names(text):
                found[f"{pdf.name} p. {n}"] = sorted(set(names))[:8]
    assert found == {}
    assert len(pages) >= 25  # the demo: 27 pages of R3 and the two of the root
