"""The folios written into the stamp specimen (``publish/pdf_stamps.py``) against the ones
WeasyPrint lays out itself (reference library: WeasyPrint 70, the engine the stamps were laid
out with before, page by page): the same glyphs, the same baseline, the run centred within
0.05 CSS px (0.013 mm; WeasyPrint rounds each glyph's advance to Pango's 1/1024 px, the
widths here come from the font's ``/W`` array, so the two may differ by a few hundredths of a
pixel — far below a printer's dot, 0.16 px at 600 dpi)."""
from __future__ import annotations

import io

import pikepdf
import pytest

from specgen.publish import pdf, pdf_stamps
from specgen.publish.pdf_parts import print_document
from tests.test_print_parts import _context


class _NoAssets:
    assets: dict = {}


CSS = pdf.stylesheet("a4", "stamp.css", "control.css")


def _context_for(folio: str, mark: str) -> dict:
    return dict(_context(), volume={"folio": folio}, mark=mark)


def _laid(context: dict, kinds: list) -> bytes:
    """Every stamp page laid out by WeasyPrint (how the stamps were made before)."""
    pages = [{"number": i + 1, "kind": k} for i, k in enumerate(kinds)]
    return print_document(pdf._stamp_html(context, pages, len(kinds)), CSS, _NoAssets(),
                          **pdf.PDF_OPTIONS).pdf


def _specimen(context: dict, kinds: list) -> bytes:
    html = pdf._stamp_html(context, pdf_stamps.specimen_pages(kinds), pdf_stamps.DIGITS)
    return print_document(html, CSS, _NoAssets(), **pdf.PDF_OPTIONS).pdf


def _folio_run(ops) -> tuple[list[bytes], float, float]:
    """(glyphs, x, y) of the folio: the last text run of the stamp page (the foot)."""
    runs = [(ops[i - 2], inst) for i, inst in enumerate(ops) if str(inst.operator) == "TJ"]
    tm, tj = runs[-1]
    glyphs = [bytes(x) for x in tj.operands[0] if isinstance(x, pikepdf.String)]
    return glyphs, float(tm.operands[4]), float(tm.operands[5])


@pytest.mark.parametrize("folio, mark, n", [("Appendices, ", "DRAFT", 112), ("", "", 14)])
def test_folios_written_into_the_specimen_match_weasyprint_laying_out_each_page(folio, mark, n):
    """112 pages: every digit as the first, middle and last of a page number, numbers of one,
    two and three digits, and landscape pages among portrait ones."""
    kinds = ["cover", None] + [("wide" if i % 9 == 4 else None) for i in range(n - 2)]
    context = _context_for(folio, mark)
    read = pdf_stamps.folios(_specimen(context, kinds), folio, kinds)
    assert read is not None
    laid = pikepdf.Pdf.open(io.BytesIO(_laid(context, kinds)))
    assert len(laid.pages) == n
    worst = 0.0
    for number, (page, kind) in enumerate(zip(laid.pages, kinds), start=1):
        theirs = pikepdf.parse_content_stream(page)
        ours = pikepdf.parse_content_stream(pikepdf.Stream(
            laid, read[kind].content(pdf_stamps.folio_text(folio, number, n))))
        # the same drawing: the running heads untouched, the folio's glyphs and baseline
        assert [str(i.operator) for i in ours] == [str(i.operator) for i in theirs]
        (g1, x1, y1), (g2, x2, y2) = _folio_run(ours), _folio_run(theirs)
        assert g1 == g2, number
        assert y1 == y2
        worst = max(worst, abs(x1 - x2))
    assert worst < 0.05


def test_the_stamped_pages_read_page_x_of_y(tmp_path):
    """A volume printed with the specimen's stamps reads "page x of y" on every page, with
    the running heads (pypdf, a reader independent of ours)."""
    from pypdf import PdfReader

    from specgen.publish.pdf import write_pdf
    from specgen.report.pageset import PageSet
    pages = PageSet()
    pages.add_page("index.md", "Summary", "# Summary\n\nText.\n")
    pages.add_page("long.md", "Long", "# Long\n\n" + "A paragraph of text.\n\n" * 200)
    target = tmp_path / "t.pdf"
    write_pdf(pages, _context(), target, attachments={"a.txt": b"a"}, workers=1)
    reader = PdfReader(str(target))
    n = len(reader.pages)
    assert n > 9   # numbers of two digits
    for i, page in enumerate(reader.pages):
        text = page.extract_text()
        assert f"page {i + 1} of {n}" in text
        if i:
            assert "Test pier" in text and "Revision A" in text


def test_a_specimen_that_cannot_be_read_is_refused():
    """A specimen of the wrong pages, or a font spelled otherwise, is not used: the caller
    lays every stamp page out instead."""
    kinds = ["cover", None, "wide"]
    context = _context_for("", "")
    specimen = _specimen(context, kinds)
    assert pdf_stamps.folios(specimen, "", kinds) is not None
    assert pdf_stamps.folios(specimen, "", ["cover", None]) is None   # a page too many
    assert pdf_stamps.folios(specimen, "Appendices, ", kinds) is None  # another folio


def test_where_the_specimen_cannot_be_read_every_stamp_is_laid_out(tmp_path, monkeypatch):
    """The fallback prints the same text as the specimen's stamps."""
    from pypdf import PdfReader

    from specgen.publish.pdf import write_pdf
    from specgen.report.pageset import PageSet
    pages = PageSet()
    pages.add_page("index.md", "Summary", "# Summary\n\nText.\n")
    pages.add_page("more.md", "More", "# More\n\n" + "Some words.\n\n" * 60)
    texts = []
    for unreadable in (False, True):
        if unreadable:
            monkeypatch.setattr(pdf_stamps, "folios", lambda *a: None)
        target = tmp_path / f"{unreadable}.pdf"
        write_pdf(pages, _context(), target, attachments={"a.txt": b"a"}, workers=1)
        texts.append([p.extract_text() for p in PdfReader(str(target)).pages])
    assert texts[0] == texts[1]
    assert all(f"page {i + 1} of {len(texts[0])}" in t for i, t in enumerate(texts[0]))
