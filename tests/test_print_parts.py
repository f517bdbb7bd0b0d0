"""Printing in parts: where a chapter may be cut, that the parts put together read as one
document (folios, contents, links, outline), and that a part taken from the cache is the
part drawn fresh.  The PDFs are read back with pypdf, a reader independent of ours."""
from __future__ import annotations

import re
import shutil
import subprocess
import sys

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from specgen.publish.pdf import _cut_points, parts, Piece

pytestmark = pytest.mark.costly(25)   # CPU s (tests/conftest.py)


def _chapter(blocks: list[tuple[str, int]]) -> str:
    """HTML made of top-level h2 sections and h2 headings nested inside divs and tables."""
    out = []
    for kind, n in blocks:
        text = "x" * n
        if kind == "h2":
            out.append(f'<h2 id="s{len(out)}">Sheet</h2>\n<p>{text}</p>\n')
        elif kind == "div":
            out.append(f'<div class="card"><h2>inside</h2><p>{text}</p></div>\n')
        else:
            out.append(f"<table><tr><td><h2>cell</h2>{text}</td></tr></table>\n")
    return "".join(out)


@settings(max_examples=200, deadline=None)
@given(st.lists(st.tuples(st.sampled_from(["h2", "div", "table"]), st.integers(0, 400)),
                max_size=40),
       st.integers(50, 2000))
def test_cuts_only_before_top_level_headings(blocks, size):
    html = _chapter(blocks)
    cuts = _cut_points(html, size, whole=0)
    assert cuts == sorted(set(cuts))
    for cut in cuts:
        assert html.startswith("<h2 id=", cut)            # never inside a div or a table
    bounds = [0, *cuts, len(html)]
    assert "".join(html[a:b] for a, b in zip(bounds, bounds[1:])) == html
    assert all(b - a >= size for a, b in zip(bounds, bounds[1:-1]))  # not cut finer than asked


def test_each_piece_prints_as_a_part_of_its_own():
    pieces = [Piece(f"page-{i}", f"T{i}", "y" * n) for i, n in enumerate([10, 20, 70, 5, 5, 90])]
    groups = parts(pieces)
    assert [p for g in groups for p in g] == pieces and all(len(g) == 1 for g in groups)


def _sheets(n: int, grow: int | None = None, by: int = 0) -> str:
    """A chapter of ``n`` calculation-sheet-like sections; section ``grow`` has ``by`` more
    characters (a result that moved, a longer note)."""
    return "".join(f'<h2 id="calc-x-{i}">Sheet {i}</h2>\n<p>{"v" * (900 + 37 * (i % 11) + (by if i == grow else 0))}'
                   f"</p>\n<table><tr><td><h2>inside</h2></td></tr></table>\n" for i in range(n))


def _split(html: str, size: int) -> list[str]:
    bounds = [0, *_cut_points(html, size), len(html)]
    return [html[a:b] for a, b in zip(bounds, bounds[1:])]


@pytest.mark.parametrize("grow,by", [(3, 40), (17, -300), (40, 2500), (58, 9)])
def test_a_section_that_changes_moves_no_cut(grow, by):
    """Cuts are chosen by the heading they fall before, not by the length of the text before
    it: after one section changes, every piece but the one holding it is the same string,
    so on a re-issue only that piece is laid out again."""
    before, after = _split(_sheets(60), 6000), _split(_sheets(60, grow, by), 6000)
    assert len(before) >= 4                                    # the chapter was cut
    changed = [p for p in after if p not in before]
    assert len(after) == len(before) and len(changed) == 1
    assert f'id="calc-x-{grow}"' in changed[0]


def test_a_chapter_of_sections_starts_each_section_but_the_first_on_a_page():
    """A chapter declared ``sections=True`` (one section per mix or zone) is cut before each
    top-level heading after the first, however short: one mix's new result changes its own
    piece and no other (nested headings never cut)."""
    def chapter(m1: str) -> str:
        return ('<h1 id="c">4 Strength</h1>\n<p>opening</p>\n'
                + "".join(f'<h2 id="mix-{m}">{m}</h2>\n<p>{text}</p>\n'
                          '<div class="card"><h2>inside</h2></div>\n'
                          for m, text in (("m1", m1), ("m2", "b"), ("m3", "c"))))
    before, after = chapter("a"), chapter("a, and one more result")
    cuts = _cut_points(before, 6000, sections=True)
    assert [before[c:c + 14] for c in cuts] == ['<h2 id="mix-m2', '<h2 id="mix-m3']
    assert _cut_points(before, 6000) == []        # undeclared, the same chapter prints whole
    split = [_split_at(t, _cut_points(t, 6000, sections=True)) for t in (before, after)]
    assert [a == b for a, b in zip(*split)] == [False, True, True]   # the first mix's piece only


def _split_at(html: str, cuts: list[int]) -> list[str]:
    bounds = [0, *cuts, len(html)]
    return [html[a:b] for a, b in zip(bounds, bounds[1:])]


def test_a_chapter_shorter_than_whole_is_not_cut():
    from specgen.publish.pdf import CHAPTER_WHOLE
    html = _sheets(60)
    assert _cut_points(html, 6000, whole=len(html) + 1) == []
    assert len(_sheets(30)) < CHAPTER_WHOLE and _cut_points(_sheets(30), 6000) == []


def _pdf(out):
    """The main volume (the appendix volume beside it is <name>-appendices.pdf)."""
    (pdf,) = (p for p in (out / "R1").glob("*.pdf") if not p.name.endswith("-appendices.pdf"))
    return pdf


def test_assembled_pdf_reads_as_one_document(starter_build):
    from pypdf import PdfReader
    _, out = starter_build
    reader = PdfReader(str(_pdf(out)))
    n = len(reader.pages)
    texts = [p.extract_text() for p in reader.pages]
    for i, text in enumerate(texts):
        assert f"page {i + 1} of {n}" in text, i          # the folio of every page
    # the contents' numbers are the pages the outline (made from the headings) leads to
    toc = dict((m.group(1).strip(), int(m.group(2)))
               for m in re.finditer(r"^(.+?) \.{3,}\s*(\d+)$", texts[1], flags=re.M))
    chapters = {o.title: reader.get_destination_page_number(o) + 1
                for o in reader.outline if not isinstance(o, list)}
    assert len(toc) >= 8
    for title, page in toc.items():
        if title in chapters:
            assert chapters[title] == page, title
    assert sum(1 for t in toc if t in chapters) >= len(toc) - 1  # the summary's bookmark is the project title
    # every link inside the document leads to one of its pages; the contents link to the
    # chapters' first pages
    pages = {p.indirect_reference.idnum: i for i, p in enumerate(reader.pages)}
    contents_targets = set()
    for i, page in enumerate(reader.pages):
        for ref in page.get("/Annots", []):
            annot = ref.get_object()
            if "/Dest" in annot:
                target = pages[annot["/Dest"][0].idnum]
                assert 0 <= target < n
                if i == 1:
                    contents_targets.add(target + 1)
    assert contents_targets == set(toc.values())


def _context() -> dict:
    """The print context of a small invented document (what write_pdf needs of a project)."""
    from types import SimpleNamespace
    project = SimpleNamespace(title="Test pier", site="Nowhere", client="Nobody", code="T-1")
    return {"title": "Test pier — revision A", "author": "specgen tests", "subject": "s",
            "keywords": "k", "date": "2026-01-01", "project": project,
            "revision": SimpleNamespace(code="A"), "state": "draft", "purpose": "preliminary"}


def test_wide_tables_print_landscape_with_the_running_heads(tmp_path):
    from pypdf import PdfReader

    from specgen.publish.pdf import write_pdf
    from specgen.report.pageset import PageSet
    # four columns of 40-digit numbers (that cannot break): wider than a portrait page
    cols = 4
    table = ("| " + " | ".join(f"c{i}" for i in range(cols)) + " |\n"
             + "|" + "---|" * cols + "\n"
             + "".join("| " + " | ".join(str(r * i + 1) * 40 for i in range(cols)) + " |\n"
                       for r in range(1, 6)))
    pages = PageSet()
    pages.add_page("index.md", "Summary", "# Summary\n\nNarrow text.\n")
    pages.add_page("wide.md", "Wide", f"# Wide\n\n{table}\nAfter the table.\n")
    context = _context()
    target = tmp_path / "t.pdf"
    write_pdf(pages, context, target, attachments={"a.txt": b"a"}, workers=1)
    reader = PdfReader(str(target))
    n = len(reader.pages)
    wide = [i for i, p in enumerate(reader.pages) if p.mediabox.width > p.mediabox.height]
    assert wide and len(wide) < n
    for i in wide:
        text = reader.pages[i].extract_text()
        assert f"page {i + 1} of {n}" in text and "Test pier" in text and "Revision A" in text
    assert set(reader.attachments) == {"a.txt"}


def test_parts_from_the_cache_give_the_same_pdf(starter_build, tmp_path):
    """A rebuild into the same output folder takes every part from the cache: same bytes as
    the first build, and no part drawn anew."""
    import os
    root, out = starter_build
    again = tmp_path / "again"
    shutil.copytree(out, again)
    first = _pdf(out).read_bytes()
    parts_before = {p for p in (again / ".cache" / "pdf-part").rglob("*") if p.is_file()}
    assert parts_before
    shutil.rmtree(again / "R1")  # a draft is rebuilt anyway; here nothing is left to reuse but the cache
    # the front matter, the running heads and the assembly are done again from the cached
    # parts (not taken whole from the cache), so the bytes compared are made anew
    for kind in ("pdf-front", "pdf-stamp", "pdf-whole"):
        shutil.rmtree(again / ".cache" / kind)
    env = {k: v for k, v in os.environ.items() if k != "SPECGEN_SHARED_CACHE"}
    done = subprocess.run([sys.executable, "-m", "specgen", "build", str(root), "--out",
                           str(again), "--quiet"], capture_output=True, text=True, env=env)
    assert done.returncode == 0, done.stderr
    assert _pdf(again).read_bytes() == first
    assert {p for p in (again / ".cache" / "pdf-part").rglob("*") if p.is_file()} == parts_before


def test_assembled_pdf_is_tagged(tmp_path):
    """Parts printed apart make one structure tree: language set, every page tied in, the
    figure with its alternative text, real table headers, ids unique across parts
    (PDF/UA-1 requirements as checked by tests/pdf_structure.py, from memory)."""
    from pypdf import PdfReader

    from specgen.publish.pdf import write_pdf
    from specgen.report.pageset import PageSet
    from tests.pdf_structure import structure
    svg = (b'<svg xmlns="http://www.w3.org/2000/svg" width="40" height="20">'
           b'<rect width="40" height="20" fill="#a5662b"/></svg>')
    pages = PageSet()
    pages.add_asset("figures/box.svg", svg)
    table = "| Oxide | Mass % |\n|---|---:|\n| CaO | 57.9 |\n"
    pages.add_page("index.md", "Summary", f"# Summary\n\n{table}\n[Next](two.md)\n")
    pages.add_page("two.md", "Two", '# Two\n\n<figure><img src="figures/box.svg" '
                   f'alt="A brown box"><figcaption>Figure 1</figcaption></figure>\n\n{table}')
    context = _context()
    target = tmp_path / "t.pdf"
    from specgen.publish import pdf as pdfmod
    write_pdf(pages, context, target, attachments={"a.txt": b"a"}, workers=1)
    reader = PdfReader(str(target))
    found = structure(reader)
    assert found.tree and found.marked and found.lang == "en"
    assert found.untied_pages == []
    assert found.types["/Figure"] == 1 and found.figures_without_alt == 0
    # two tables of two header cells, the cover's table of four row headers and its sign-off
    # table of six column headers (no rows: the context names no signatories)
    assert found.types["/TH"] == 14 and found.types["/Table"] == 4, found.types
    assert found.duplicate_ids == []
    assert set(reader.attachments) == {"a.txt"}
    assert pdfmod.PDF_OPTIONS["pdf_variant"] == "pdf/a-3a"


def test_a_raster_inside_a_figure_reaches_the_pdf_and_nothing_else_inline_does(tmp_path):
    """matplotlib writes the raster under a drawing's overlay into the SVG as a base64 data
    URL (its SVG backend's behaviour); the PDF shows it. Inline content of other types, and
    every other URL, stay refused."""
    import io
    import matplotlib
    matplotlib.use("Agg")
    import matplotlib.pyplot as plt
    import numpy as np
    from pypdf import PdfReader

    from specgen.publish.pdf import write_pdf
    from specgen.publish.pdf_parts import _inline_image
    from specgen.report.pageset import PageSet
    fig, ax = plt.subplots(figsize=(2, 1))
    ax.imshow(np.arange(64, dtype=float).reshape(8, 8))
    buf = io.BytesIO()
    fig.savefig(buf, format="svg")
    plt.close(fig)
    svg = buf.getvalue()
    assert b"data:image/png;base64," in svg          # what matplotlib's SVG holds
    pages = PageSet()
    name = pages.add_asset("figures/sheet.svg", svg)
    pages.add_page("index.md", "Summary", f"# Summary\n\n![A drawing sheet]({name})\n")
    context = _context()
    target = tmp_path / "t.pdf"
    write_pdf(pages, context, target, attachments={}, workers=1)
    assert any(len(p.images) for p in PdfReader(str(target)).pages)
    # only PNG and JPEG rasters, base64, within the size limit
    assert _inline_image("https://example.org/x.png") is None
    for bad in ("data:text/html;base64,PHNjcmlwdD4=", "data:image/svg+xml;base64,PHN2Zy8+",
                "data:image/png,raw", "data:image/png;base64,@@@"):
        with pytest.raises(ValueError):
            _inline_image(bad)


def test_report_and_appendices_print_as_two_cross_linked_volumes(tmp_path):
    """The appendices print as a volume of their own: each with its cover, its contents
    (naming the other volume's chapters) and its own folios; a link from one volume to the
    other opens the other file at the place linked (a remote go-to to a named destination,
    read back with pypdf); the main volume alone carries the attachments."""
    from pypdf import PdfReader

    from specgen.publish.pdf import write_pdf
    from specgen.report.pageset import PageSet
    pages = PageSet()
    pages.add_page("index.md", "Summary", "# Summary\n\nSee [the sheet](calc.md#sheet-1).\n")
    pages.add_page("calc.md", "B Calculation sheets", "# B Calculation sheets\n\n"
                   '<h2 id="sheet-1">Sheet one</h2>\n\nBack to [the summary](index.md).\n',
                   volume="appendix")
    context = _context()
    main, app = tmp_path / "T-1-A.pdf", tmp_path / "T-1-A-appendices.pdf"
    write_pdf(pages, context, main, attachments={"a.txt": b"a"}, workers=1,
              appendix=(app, app.name, main.name))
    one, two = PdfReader(str(main)), PdfReader(str(app))
    text_one = "\n".join(p.extract_text() for p in one.pages)
    text_two = "\n".join(p.extract_text() for p in two.pages)
    assert "Sheet one" not in text_one and "Sheet one" in text_two
    assert "See the sheet" in text_one and "See the sheet" not in text_two
    assert f"In the appendix volume ({app.name})" in one.pages[1].extract_text()
    assert f"In the main volume ({main.name})" in two.pages[1].extract_text()
    assert f"Appendices, page 1 of {len(two.pages)}" in two.pages[0].extract_text()
    assert f"page 1 of {len(one.pages)}" in one.pages[0].extract_text()

    def remote(reader):
        return [a["/A"] for p in reader.pages for a in (p.get("/Annots") or [])
                if a.get_object().get("/A", {}).get("/S") == "/GoToR"]
    out_one, out_two = remote(one), remote(two)
    assert {str(a["/F"]) for a in out_one} == {app.name}
    assert {str(a["/F"]) for a in out_two} == {main.name}
    named_two = set(two.named_destinations)
    assert {str(a["/D"]) for a in out_one} <= named_two and "p-calc-sheet-1" in named_two
    assert {str(a["/D"]) for a in out_one} >= {"p-calc-sheet-1", "page-calc"}
    assert {str(a["/D"]) for a in out_two} <= set(one.named_destinations)
    assert set(one.attachments) == {"a.txt"} and not two.attachments


def test_a_chapter_the_same_in_two_revisions_is_printed_once(tmp_path):
    """Two revisions whose chapters read the same share every chapter part through the
    artefact cache (a part's own metadata is not the dossier's, so it carries no revision);
    the covers differ, and each volume still carries its own revision's title."""
    from pypdf import PdfReader

    from specgen import cache
    from specgen.publish.pdf import write_pdf
    from specgen.report.pageset import PageSet
    from types import SimpleNamespace
    pages = PageSet()
    pages.add_page("index.md", "Summary", "# Summary\n\nThe same text in both revisions.\n")
    pages.add_page("notes.md", "Notes", "# Notes\n\nUnchanged between the two.\n")
    def entries(kind):
        return len([f for f in (tmp_path / "cache" / kind).rglob("*") if f.is_file()])
    parts, fronts = [], []
    with cache.using(tmp_path / "cache"):
        for code in ("A", "B"):
            context = dict(_context(), title=f"Test pier — revision {code}",
                           revision=SimpleNamespace(code=code))
            write_pdf(pages, context, tmp_path / f"{code}.pdf", attachments={}, workers=1)
            parts.append(entries("pdf-part"))
            fronts.append(entries("pdf-front"))
            assert PdfReader(str(tmp_path / f"{code}.pdf")).metadata.title == context["title"]
    assert parts[0] == 2 and parts[1] == 2   # revision B printed no chapter anew
    assert fronts[1] > fronts[0]             # but its own cover and contents
