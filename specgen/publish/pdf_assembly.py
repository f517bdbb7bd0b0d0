"""Putting the printed parts together into the one PDF/A-3b dossier (pypdf).

The front matter (cover and contents) is the host: WeasyPrint wrote it as PDF/A-3b with
the document's metadata, identifier, output intent and attachments, and every other
part's pages are appended to it.  Then, over the whole document:

* the running heads and "page x of y" are laid over each page from the stamp pages
  (one stamp page per page, the same size, drawn by WeasyPrint with the same fonts);
* every link is made again with an explicit destination (page, x, y), so links between
  parts work like links within one;
* the bookmarks of all parts become one outline, nested by heading level.

Nothing here depends on the clock or on chance, so the same parts give the same bytes.
"""
from __future__ import annotations

import io


def assemble(front, parts: list, stamps: list, target) -> None:
    """Write ``front`` + ``parts`` (:class:`~specgen.publish.pdf_parts.Printed`) to
    ``target`` with the ``stamps``' pages laid over the pages in order."""
    from pypdf import PdfReader, PdfWriter
    from pypdf.generic import NameObject
    docs = [front, *parts]
    writer = PdfWriter(clone_from=PdfReader(io.BytesIO(front.pdf)))
    for page in writer.pages:
        page.pop(NameObject("/Annots"), None)
    for part in parts:
        for page in PdfReader(io.BytesIO(part.pdf)).pages:
            page.pop(NameObject("/Annots"), None)  # made again below, across parts
            writer.add_page(page)
    offsets, n = [], 0
    for doc in docs:
        offsets.append(n)
        n += len(doc.pages)
    stamp_pages = [p for s in stamps for p in PdfReader(io.BytesIO(s.pdf)).pages]
    if len(stamp_pages) != n or len(writer.pages) != n:
        raise RuntimeError(f"assembly: {len(writer.pages)} pages, {len(stamp_pages)} stamps, "
                           f"{n} expected")
    for page, stamp in zip(writer.pages, stamp_pages):
        _lay_over(writer, page, stamp)
    anchors = global_anchors(docs)
    _links(writer, docs, offsets, anchors)
    _outline(writer, docs, offsets)
    writer.write(target)


def _lay_over(writer, page, stamp) -> None:
    """Draw ``stamp`` (a page of another PDF) over ``page`` as a form XObject.

    The page's own content streams are kept as they are (compressed, untouched) and
    wrapped in q/Q so the stamp starts from the default graphics state.
    """
    from pypdf.generic import ArrayObject, DecodedStreamObject, DictionaryObject, NameObject
    form = DecodedStreamObject()
    form.set_data(stamp.get_contents().get_data())
    form.update({NameObject("/Type"): NameObject("/XObject"),
                 NameObject("/Subtype"): NameObject("/Form"),
                 NameObject("/BBox"): stamp.mediabox,
                 NameObject("/Resources"): stamp["/Resources"].clone(writer)})
    form = form.flate_encode()
    resources = DictionaryObject(page["/Resources"])  # this page's own copy (parts share one)
    xobjects = DictionaryObject(resources.get("/XObject", DictionaryObject()))
    xobjects[NameObject("/SgStamp")] = writer._add_object(form)
    resources[NameObject("/XObject")] = xobjects
    page[NameObject("/Resources")] = resources
    contents = page.get("/Contents")
    contents = list(contents) if isinstance(contents, ArrayObject) else [page.raw_get("/Contents")]
    before, after = DecodedStreamObject(), DecodedStreamObject()
    before.set_data(b"q\n")
    after.set_data(b"\nQ\nq /SgStamp Do Q\n")
    page[NameObject("/Contents")] = ArrayObject(
        [writer._add_object(before), *contents, writer._add_object(after)])


def global_anchors(docs, start: int = 0) -> dict[str, tuple[int, float, float]]:
    """Anchor id → (page of the whole document, x, y), the ``docs`` following ``start``
    pages; the first occurrence wins."""
    found: dict[str, tuple[int, float, float]] = {}
    offset = start
    for doc in docs:
        for name, (page, x, y) in doc.anchors.items():
            found.setdefault(name, (offset + page, x, y))
        offset += len(doc.pages)
    return found


def _links(writer, docs, offsets, anchors) -> None:
    from specgen.publish.pdf import BASE
    from pypdf.generic import (ArrayObject, DictionaryObject, FloatObject, NameObject,
                               NumberObject, TextStringObject)
    pages = writer.pages
    for doc, offset in zip(docs, offsets):
        for page, kind, target, rect in doc.links:
            annot = DictionaryObject({
                NameObject("/Type"): NameObject("/Annot"),
                NameObject("/Subtype"): NameObject("/Link"),
                NameObject("/Rect"): ArrayObject(FloatObject(v) for v in rect),
                NameObject("/BS"): DictionaryObject({NameObject("/W"): NumberObject(0)}),
                NameObject("/F"): NumberObject(4),  # printable, as PDF/A asks
            })
            if kind == "internal":
                if target not in anchors:
                    continue  # a link to nothing stays plain text, as in a browser
                to_page, x, y = anchors[target]
                annot[NameObject("/Dest")] = ArrayObject([
                    pages[to_page].indirect_reference, NameObject("/XYZ"), FloatObject(x),
                    FloatObject(y), NumberObject(0)])
            else:
                if target.startswith(BASE):
                    # a file published beside the PDF (a download: the quantities schedule,
                    # the exports), linked relative to the PDF's own folder instead of the
                    # print engine's private address, which leads nowhere once printed
                    target = target[len(BASE):]
                annot[NameObject("/A")] = DictionaryObject({
                    NameObject("/Type"): NameObject("/Action"),
                    NameObject("/S"): NameObject("/URI"),
                    NameObject("/URI"): TextStringObject(target)})
            on = pages[offset + page]
            if "/Annots" not in on:
                on[NameObject("/Annots")] = ArrayObject()
            on["/Annots"].append(writer._add_object(annot))


def _outline(writer, docs, offsets) -> None:
    from pypdf.generic import Fit
    stack: list[tuple[int, object]] = []
    for doc, offset in zip(docs, offsets):
        for page, level, label, x, y in doc.bookmarks:
            while stack and stack[-1][0] >= level:
                stack.pop()
            parent = stack[-1][1] if stack else None
            item = writer.add_outline_item(title=label, page_number=offset + page, parent=parent,
                                           fit=Fit.xyz(left=x, top=y, zoom=0))
            stack.append((level, item))
