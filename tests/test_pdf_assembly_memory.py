"""How the assembly holds the parts (issue 25, memory): each part's document is let go once
its pages and structure elements are copied, so a volume's assembly does not hold every part
open at once, and the copied pages still carry the parts' content, which qpdf reads from the
parts' bytes only when it writes the volume.

The parts here are small PDFs made with pikepdf (no layout engine): each page's content stream
is compressed and names its part and page, so the written volume shows where every page came
from.  The expected pages are derived in the test from what it makes.
"""
from __future__ import annotations

import io
import sys

import pikepdf
import pytest

from specgen.publish.pdf_parts import Printed
from specgen.publish.pdf_stamps import StampSet

A4 = (595.0, 842.0)   # pt, ISO 216 A4 (210 x 297 mm at 72 pt per inch)


def _doc(marks: list[bytes]) -> bytes:
    """A PDF of one A4 page per mark, each page's (compressed) content stream the mark."""
    pdf = pikepdf.new()
    for mark in marks:
        page = pdf.add_blank_page(page_size=A4)
        page.obj.Contents = pdf.make_stream(b"% " + mark + b"\n0 0 m 10 10 l S\n")
    out = io.BytesIO()
    pdf.save(out, compress_streams=True, deterministic_id=True)
    return out.getvalue()


def _printed(marks: list[bytes]) -> Printed:
    return Printed(pdf=_doc(marks), pages=[list(A4)] * len(marks))


def _volume(parts: int, pages: int):
    """(front, parts, stamps, the mark each page of the volume must show)."""
    front = _printed([b"front 0"])
    printed = [_printed([b"part %d page %d" % (n, k) for k in range(pages)])
               for n in range(parts)]
    marks = [b"front 0"] + [b"part %d page %d" % (n, k) for n in range(parts)
                            for k in range(pages)]
    total = len(marks)
    stamps = StampSet(kinds=["cover"] + [None] * (total - 1), folio="",
                      laid=[_printed([b"stamp %d" % i for i in range(total)])])
    return front, printed, stamps, marks


def _page_text(page) -> bytes:
    """Every content stream of ``page``, the stamp's form included, decoded."""
    contents = page.obj.Contents
    streams = list(contents) if isinstance(contents, pikepdf.Array) else [contents]
    data = b"".join(s.read_bytes() for s in streams)
    stamp = page.obj.Resources.XObject.get("/SgStamp")
    return data + (stamp.read_bytes() if stamp is not None else b"")


def test_no_part_stays_open_while_the_next_is_copied_or_the_volume_written(monkeypatch):
    from specgen.publish.pdf_assembly import assemble
    front, parts, stamps, _ = _volume(parts=6, pages=2)
    by_bytes = {p.pdf: n for n, p in enumerate(parts)}
    opened: list = []          # (part number or None, its document): held here only
    held_at_open: list = []    # earlier parts' documents still referenced elsewhere
    held_at_save: list = []
    real_open, real_save = pikepdf.Pdf.open, pikepdf.Pdf.save

    def referenced_elsewhere() -> list:
        # the list's entry and getrefcount's argument are the only references to a document
        # nobody else keeps
        return [n for n, doc in opened if n is not None and sys.getrefcount(doc) > 3]

    def watched_open(source, *args, **kwargs):
        data = source.getvalue() if isinstance(source, io.BytesIO) else None
        held_at_open.append(referenced_elsewhere())
        doc = real_open(source, *args, **kwargs)
        opened.append((by_bytes.get(data), doc))
        return doc

    def watched_save(self, *args, **kwargs):
        held_at_save.append(referenced_elsewhere())
        return real_save(self, *args, **kwargs)

    monkeypatch.setattr(pikepdf.Pdf, "open", staticmethod(watched_open))
    monkeypatch.setattr(pikepdf.Pdf, "save", watched_save)
    assemble(front, parts, stamps, io.BytesIO())
    assert sorted(n for n, _ in opened if n is not None) == list(range(len(parts)))
    assert held_at_open and all(held == [] for held in held_at_open), held_at_open
    assert held_at_save == [[]]


@pytest.mark.parametrize("parts, pages", [(1, 1), (5, 3)])
def test_pages_copied_from_parts_let_go_keep_their_content(parts, pages):
    from specgen.publish.pdf_assembly import assemble
    front, printed, stamps, marks = _volume(parts, pages)
    out = io.BytesIO()
    assemble(front, printed, stamps, out)
    written = pikepdf.Pdf.open(io.BytesIO(out.getvalue()))
    assert len(written.pages) == 1 + parts * pages      # the front's page and every part's
    for i, (page, mark) in enumerate(zip(written.pages, marks)):
        text = _page_text(page)
        assert b"% " + mark + b"\n" in text, (i, text[:80])
        assert (b"%% stamp %d\n" % i) in text                # its own running head
