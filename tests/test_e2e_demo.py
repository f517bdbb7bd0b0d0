"""End-to-end: the demo project built once (session fixture), read as its users would."""
from __future__ import annotations

import json
import shutil

import pytest

pytestmark = [pytest.mark.e2e, pytest.mark.costly(10)]

REV = "R3"  # the demo's current (draft) revision; R1 and R2 are archived under issued/

CHROMIUM = shutil.which("chromium") or "/usr/bin/chromium"


def test_revision_layout(demo_build):
    rev = demo_build / REV
    for name in ("index.html", "calculations.html", "composition.html", "results.json",
                 "manifest.json", f"WEP-2026-{REV}.pdf"):
        assert (rev / name).is_file(), name
    versions = json.loads((demo_build / "versions.json").read_text())
    assert [v["version"] for v in versions] == ["R3", "R2", "R1"]
    # the root opens the latest issued revision (R2) and names the draft R3 beside it
    assert versions[0]["aliases"] == ["draft"] and versions[1]["aliases"] == ["current"]
    root = (demo_build / "index.html").read_text()
    assert 'url=R2/index.html' in root and 'A draft, <a href="R3/index.html">R3</a>' in root
    assert "R1 (issued, 2026-10-05)</a> — superseded by R2" in \
        (demo_build / "revisions.html").read_text()
    assert 'href="R1/index.html"' in (demo_build / "revisions.html").read_text()


def test_results_json_names_and_units(demo_build):
    data = json.loads((demo_build / REV / "results.json").read_text())
    q = data["quantities"]["NC1-A"]
    # by hand: (2.8*21.5 + 1.1*8.1 + 0.7*4.2)/(57.9 + 1.4*2.3) = 72.05/61.12 = 1.17883
    assert q["cementation_index"]["value"] == pytest.approx(1.17883, abs=1e-4)
    assert q["cementation_index"]["unit"] == ""
    assert q["loss_on_ignition"] == {"value": 3.2, "unit": "%", "label": "loss on ignition"}
    assert {c["code"] for c in data["checks"]} >= {"CHEM-CLOSURE", "CHEM-CI"}


def test_manifest_hashes_match_files(demo_build):
    import hashlib
    rev = demo_build / REV
    manifest = json.loads((rev / "manifest.json").read_text())
    for path, digest in manifest["outputs"].items():
        assert hashlib.sha256((rev / path).read_bytes()).hexdigest() == digest, path
    assert "dossier.yaml" in manifest["inputs"]


def test_calculation_sheet_in_site(demo_build):
    html = (demo_build / REV / "calculations.html").read_text()
    assert 'id="calc-chem-ci-nc1-a"' in html
    assert "CHEM-CI · NC1-A — Cementation index" in html
    assert 'alt="CI = \\frac{2.8\\,S + 1.1\\,A + 0.7\\,F}{C + 1.4\\,M}"' in html
    assert "2.8 \\times 21.50" in html             # substituted values
    assert "Result: <strong>CI = 1.179</strong>" in html
    assert 'href="references.html#ref-eckel1922"' in html


def test_site_makes_no_outside_request(demo_build):
    for page in (demo_build / REV).glob("*.html"):
        text = page.read_text()
        for bad in ("https://fonts.", "unpkg.com", "cdn.jsdelivr", "googletagmanager"):
            assert bad not in text, (page.name, bad)


def test_pdf_text_and_structure(demo_build, demo_pdf_text):
    from pypdf import PdfReader
    reader = PdfReader(str(demo_build / REV / f"WEP-2026-{REV}.pdf"))
    appendix = PdfReader(str(demo_build / REV / f"WEP-2026-{REV}-appendices.pdf"))
    text = "\n".join(demo_pdf_text(f"{REV}/WEP-2026-{REV}.pdf"))
    sheets = "\n".join(demo_pdf_text(f"{REV}/WEP-2026-{REV}-appendices.pdf"))
    for needle in (f"Revision {REV}", "does not replace", "Eckel", "page 2 of"):
        assert needle in text, needle
    for needle in ("CHEM-CLOSURE", "CHEM-CI", f"Revision {REV}", "B Calculation sheets",
                   "Appendices, page 2 of"):
        assert needle in sheets, needle
    assert reader.metadata.title.startswith("Repair of the East Pier masonry")
    top = [o.title for o in reader.outline if not isinstance(o, list)]
    assert top[0].startswith("Repair of the East Pier")  # the summary page carries the title
    # the report's chapters numbered 1, 2 … after the summary, the appendices A, B, C, each
    # in its volume
    from specgen.report.chapters import chapters
    from specgen.report.render import chapter_numbers
    n = chapter_numbers(chapters())
    assert {f"{n['scope.md']} Scope and zones of work", f"{n['composition.md']} Binder "
            "composition", f"{n['cautions.md']} Cautions",
            f"{n['references.md']} References"} <= set(top)
    in_appendix = [o.title for o in appendix.outline if not isinstance(o, list)]
    assert {"A Check register", "B Calculation sheets", "C Input files"} <= set(in_appendix)
    assert not {t for t in top if t[:2] in ("A ", "B ", "C ", "D ")}
    names = set(reader.attachments)
    assert {"results.json", "input/dossier.yaml", "input/lab/strength.csv"} <= names


def test_summary_fits_two_pages_and_the_main_volume_is_short(demo_build, demo_pdf_text):
    """Two reading depths: the client's summary on at most two pages, the report (main
    volume) about 60 pages, the calculation sheets in the appendix volume."""
    from pypdf import PdfReader
    reader = PdfReader(str(demo_build / REV / f"WEP-2026-{REV}.pdf"))
    top = [(o.title, reader.get_destination_page_number(o)) for o in reader.outline
           if not isinstance(o, list)]
    (first, start), (_next, after) = top[0], top[1]
    assert first.startswith("Repair of the East Pier")            # the summary
    assert 1 <= after - start <= 2, (start, after)
    summary = "\n".join(demo_pdf_text(f"{REV}/WEP-2026-{REV}.pdf")[start:after])
    for zone in ("Z1", "Z2", "Z3"):
        assert f"{zone} —" in summary
    for words in ("Mortar chosen:", "Why:", "Still open:"):
        assert summary.count(words) == 3, words
    # the cost where the zone gives its wall area: Z1 and Z2 (demo dossier.yaml); Z3, the
    # rebedding of blocks, gives none
    assert summary.count("Cost of the mortar:") == 2
    # "about 60" (issue 21); 66 until the demo's fourth review comment (made on R2's site,
    # answered in R3, its passage's old and new text shown) ran chapter 11 onto a second page,
    # and the specification's exposure clauses gained what each class means (chapter 8 a page
    # longer)
    assert len(reader.pages) <= 68, len(reader.pages)
    # the site mirrors the split: the appendix chapters in a section of their own, and both
    # volumes linked from the report bar of every page
    page = (demo_build / REV / "index.html").read_text(encoding="utf-8")
    nav = page[page.index("Appendices"):]
    for name in ("checks.html", "calculations.html", "strength-detail.html", "options.html"):
        assert f'href="{name}"' in nav, name
    assert page.index('href="scope.html"') < page.index("Appendices")
    assert f'href="./WEP-2026-{REV}.pdf"' in page
    assert f'href="./WEP-2026-{REV}-appendices.pdf"' in page


def test_search_finds_a_known_term_offline(demo_build):
    """The vendored search shim lets search work from the folder (file://)."""
    playwright = pytest.importorskip("playwright.sync_api")
    if not shutil.which("chromium"):
        pytest.skip("Debian chromium is not installed")
    with playwright.sync_playwright() as pw:
        browser = pw.chromium.launch(executable_path=CHROMIUM, args=[
            "--no-sandbox", "--disable-gpu", "--disable-background-networking"])
        page = browser.new_page()
        page.goto((demo_build / REV / "index.html").as_uri())
        page.fill("input.md-search__input", "Blackscar")
        page.wait_for_selector(".md-search-result__item", timeout=15000)
        meta = page.inner_text(".md-search-result__meta")
        browser.close()
    assert "matching document" in meta


# a second demo build from a cold cache (--full); the default run shows determinism on
# the starter (test_print_parts: a rebuild gives the same PDF bytes) and on the render
# (test_render_cache: a cached render equals a fresh one, byte for byte)
@pytest.mark.full
def test_two_builds_are_byte_identical(demo_build, tmp_path, monkeypatch):
    from specgen.build import build
    from tests.conftest import DEMO
    monkeypatch.delenv("SPECGEN_SHARED_CACHE")  # cold: nothing drawn before is reused
    # the issued revisions as published (built only once); R3 drawn again from a cold cache
    for rev in ("R1", "R2"):
        shutil.copytree(demo_build / rev, tmp_path / rev)
    again = build(DEMO, tmp_path)
    first = demo_build / REV
    names = sorted(p.relative_to(first).as_posix() for p in first.rglob("*") if p.is_file())
    assert names == sorted(p.relative_to(again).as_posix() for p in again.rglob("*") if p.is_file())
    for name in names:
        assert (first / name).read_bytes() == (again / name).read_bytes(), name


def test_strength_chapter_says_why_no_wall_strength_is_estimated(demo_build):
    """R1 and R2 give no site temperature and no load strength (their issued dossier.yaml):
    the chapter says so instead of naming an empty method and activation energy; R3 gives
    both and names the method, the temperature-dependent energy and its source."""
    for rev in ("R1", "R2"):
        html = (demo_build / rev / "strength.html").read_text()
        assert "activation energy ." not in html and " method (ASTM" not in html
        assert ("Strength in the wall from the site temperature (ASTM C1074): not estimated — "
                "this revision gives neither a site temperature nor a load strength.") in html
    html = (demo_build / REV / "strength.html").read_text()
    # the value and its unit bound by the narrow no-break space (mdtypo.bind_units)
    assert ("Equivalent age: Arrhenius method (ASTM C1074), activation energy 33.5\u202fkJ/mol"
            in html)


def test_reference_titles_are_set_in_italics(demo_build):
    """Titles in the reference list are emphasised, not shown with their Markdown asterisks."""
    html = (demo_build / REV / "references.html").read_text()
    assert "<em>Cements, Limes and Plasters" in html and "*Cements" not in html
    assert 'id="ref-eckel1922"' in html


def test_draft_marks_and_before_issue_page(demo_build, demo_pdf_text):
    from pypdf import PdfReader
    rev = demo_build / REV
    pages = [p for p in rev.glob("*.html") if p.name != "404.html"]
    for page in pages:                                   # the draft mark on every page
        assert "DRAFT — not for construction" in page.read_text(), page.name
    before = (rev / "before-issue.html").read_text()
    # demo data: M2 reads ΔE00 3.66 against the clause's ΔE00 ≤ 2 (COMP-COLOUR/Z1/M2), and C3's
    # subject (the firing record) changed since R2; both are left for the audit to show
    assert "clause 7 of zone Z1 (Acceptance criteria: appearance) states ΔE00 ≤ 2" in before
    assert "comment C3 (composition) is open with no response" in before
    summary = (rev / "index.html").read_text()
    assert "sg-mark-findings" in summary and 'href="before-issue.html"' in summary
    assert "Sign-off (draft: not signed)" in summary
    assert "answered by new evidence?" in (rev / "comments.html").read_text()
    changes = (rev / "changes.html").read_text()
    assert changes.index("What changed for the decision") < changes.index("Every change")
    texts = demo_pdf_text(f"{REV}/WEP-2026-{REV}.pdf")
    for text in texts:                                    # and on every page of the PDF
        assert "DRAFT — not for construction" in text
    assert "Sign-off (draft: not signed)" in texts[0]
    # R1 was superseded by R2 when the demo was built: its pages and PDF say so
    assert "Superseded by R2" in (demo_build / "R1" / "scope.html").read_text()
    r1 = PdfReader(str(demo_build / "R1" / "WEP-2026-R1.pdf"))
    assert "Superseded by R2" in r1.pages[-1].extract_text()


def test_distribution_list_is_printed_as_the_project_states_it(demo_build, demo_pdf_text):
    """Every recipient of the demo's distribution list (demo_project/dossier.yaml, read here
    independently with PyYAML) appears on the summary, in the site and in the PDF, in order."""
    import yaml
    from tests.conftest import DEMO
    recipients = yaml.safe_load((DEMO / "dossier.yaml").read_text())["distribution"]
    assert len(recipients) == 3
    summary = (demo_build / REV / "index.html").read_text()
    table = summary[summary.index("Distribution</"):]      # the table under its caption
    rows = [table.index(f"<td>{r['organisation']}</td>") for r in recipients]
    assert rows == sorted(rows)
    for r in recipients:
        assert f"<td>{r['name']}</td>" in table and f"<td>{r['purpose']}</td>" in table
    text = " ".join(" ".join(t.split()) for t in demo_pdf_text(f"{REV}/WEP-2026-{REV}.pdf")[:6])
    for r in recipients:
        assert r["organisation"] in text, r
