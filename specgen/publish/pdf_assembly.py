"""Putting the printed parts together into the one tagged PDF/A-3a dossier (pypdf).

The front matter (cover and contents) is the host: WeasyPrint wrote it as PDF/A-3a with
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


def assemble(front, parts: list, stamps: list, target, *, foreign=None,
             exported=frozenset()) -> None:
    """Write ``front`` + ``parts`` (:class:`~specgen.publish.pdf_parts.Printed`) to
    ``target`` with the ``stamps``' pages laid over the pages in order.

    ``foreign`` ((file name, anchors)) is the other volume of the dossier: a link to one of
    its anchors opens that file at the anchor's named destination; ``exported`` are this
    volume's anchors the other volume links to, each made a named destination."""
    from pypdf import PdfReader, PdfWriter
    from pypdf.generic import NameObject
    docs = [front, *parts]
    writer = PdfWriter(clone_from=PdfReader(io.BytesIO(front.pdf)))
    for page in writer.pages:
        page.pop(NameObject("/Annots"), None)
    tree = StructureMerge(writer)
    for n, part in enumerate(parts, start=1):
        reader = PdfReader(io.BytesIO(part.pdf))
        added = []
        for page in reader.pages:
            page.pop(NameObject("/Annots"), None)  # made again below, across parts
            added.append(writer.add_page(page))
        tree.append(reader, added, f"p{n}-")
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
    tree.finish()
    _show_title(writer)
    anchors = global_anchors(docs)
    _links(writer, docs, offsets, anchors, foreign)
    _named(writer, anchors, exported)
    _outline(writer, docs, offsets)
    writer.write(target)


def _show_title(writer) -> None:
    """A reader's window shows the document's title, not its file name (as PDF/UA asks)."""
    from pypdf.generic import BooleanObject, DictionaryObject, NameObject
    prefs = writer._root_object.get("/ViewerPreferences")
    prefs = DictionaryObject(prefs.get_object()) if prefs is not None else DictionaryObject()
    prefs[NameObject("/DisplayDocTitle")] = BooleanObject(True)
    writer._root_object[NameObject("/ViewerPreferences")] = prefs


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
    # the running head is a pagination artifact, outside the structure tree (PDF/UA)
    after.set_data(b"\nQ\nq /Artifact BMC /SgStamp Do EMC Q\n")
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


def _named(writer, anchors: dict, names) -> None:
    """A named destination for each of ``names`` (the other volume's links land there)."""
    from pypdf.generic import ArrayObject, FloatObject, NameObject, NumberObject, TextStringObject
    for name in sorted(names):
        if name in anchors:
            page, x, y = anchors[name]
            writer.add_named_destination_array(TextStringObject(name), ArrayObject([
                writer.pages[page].indirect_reference, NameObject("/XYZ"), FloatObject(x),
                FloatObject(y), NumberObject(0)]))


def _to_other_volume(foreign, target: str):
    """The action opening the other volume at ``target`` (a remote go-to, allowed in
    PDF/A), or None when ``target`` is not one of its anchors."""
    from pypdf.generic import BooleanObject, DictionaryObject, NameObject, TextStringObject
    if foreign is None or target not in foreign[1]:
        return None
    return DictionaryObject({NameObject("/Type"): NameObject("/Action"),
                             NameObject("/S"): NameObject("/GoToR"),
                             NameObject("/F"): TextStringObject(foreign[0]),
                             NameObject("/D"): TextStringObject(target),
                             NameObject("/NewWindow"): BooleanObject(False)})


def _links(writer, docs, offsets, anchors, foreign=None) -> None:
    from specgen.publish.pdf_parts import BASE
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
            if kind == "internal" and target not in anchors:
                remote = _to_other_volume(foreign, target)
                if remote is None:
                    continue  # a link to nothing stays plain text, as in a browser
                annot[NameObject("/A")] = remote
            elif kind == "internal":
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


class StructureMerge:
    """The tagged parts' structure trees made one (the front matter's tree is the host).

    The elements under each part's document element move under the host's; the parent
    tree entries (one per page, keyed by the page's ``/StructParents``) are renumbered
    after the host's; structure ids get the part's prefix, so table headers stay unique.
    The link annotations are made again across parts (:func:`_links`), so their object
    references are left out of the tree: the links' text stays tagged as links.
    """

    def __init__(self, writer):
        from pypdf.generic import NameObject
        self.writer = writer
        root = writer._root_object
        self.root = root["/StructTreeRoot"].get_object() if "/StructTreeRoot" in root else None
        self.nums: list = []
        self.next = 0
        if self.root is None:
            return
        self.document = _kids(self.root["/K"])[0].get_object()
        _strip_annotations(self.document, "p0-")
        nums = self.root["/ParentTree"].get_object().get("/Nums", [])
        for key, value in zip(nums[::2], nums[1::2]):
            if not _is_annotation_entry(value):
                self.nums += [key, value]
                self.next = max(self.next, int(key) + 1)
        for page in writer.pages:
            page.pop(NameObject("/StructParent"), None)

    def append(self, reader, pages, prefix: str) -> None:
        """Join the tree of ``reader`` (a part) whose ``pages`` were added to the writer."""
        from pypdf.generic import NameObject, NumberObject
        tagged = reader.trailer["/Root"].get("/StructTreeRoot")
        if self.root is None or tagged is None:
            return
        tagged = tagged.get_object()
        shift = {}
        for page, new in zip(reader.pages, pages):
            if page.get("/StructParents") is not None:
                shift[int(page["/StructParents"])] = self.next
                new[NameObject("/StructParents")] = NumberObject(self.next)
                self.next += 1
        kids = [kid for doc in _kids(tagged["/K"]) for kid in _kids(doc.get_object().get("/K", []))]
        for kid in kids:  # all before any is copied: a copy follows its parent to the rest
            _strip_annotations(kid.get_object(), prefix)
        for kid in kids:
            kid = kid.clone(self.writer)  # its pages map to those added above
            kid.get_object()[NameObject("/P")] = self.document.indirect_reference
            _append_kid(self.document, kid)
        old = tagged["/ParentTree"].get_object().get("/Nums", [])
        for key, value in zip(old[::2], old[1::2]):
            if int(key) in shift:
                self.nums += [NumberObject(shift[int(key)]), value.clone(self.writer)]

    def finish(self) -> None:
        from pypdf.generic import ArrayObject, DictionaryObject, NameObject, NumberObject
        if self.root is None:
            return
        self.root[NameObject("/K")] = ArrayObject([self.document.indirect_reference])
        self.root[NameObject("/ParentTree")] = self.writer._add_object(DictionaryObject(
            {NameObject("/Nums"): ArrayObject(self.nums)}))
        self.root[NameObject("/ParentTreeNextKey")] = NumberObject(self.next)
        for page in self.writer.pages:
            page[NameObject("/Tabs")] = NameObject("/S")  # tab order follows the structure


def _kids(k) -> list:
    from pypdf.generic import ArrayObject
    k = k.get_object() if hasattr(k, "get_object") else k
    return list(k) if isinstance(k, (list, ArrayObject)) else [k]


def _append_kid(parent, kid) -> None:
    from pypdf.generic import ArrayObject, NameObject
    current = parent.get("/K")
    items = _kids(current) if current is not None else []
    parent[NameObject("/K")] = ArrayObject([*items, kid])


def _is_annotation_entry(value) -> bool:
    value = value.get_object()
    return not isinstance(value, list)  # a page's entry is an array of elements


def _strip_annotations(elem, prefix: str) -> None:
    """Drop object references to annotations (made again later) and prefix ids."""
    from pypdf.generic import ArrayObject, DictionaryObject, NameObject, TextStringObject
    if not isinstance(elem, DictionaryObject):
        return
    if "/ID" in elem:
        elem[NameObject("/ID")] = TextStringObject(prefix + str(elem["/ID"]))
    attrs = elem.get("/A")
    if isinstance(attrs, DictionaryObject) and "/Headers" in attrs:
        attrs[NameObject("/Headers")] = ArrayObject(
            TextStringObject(prefix + str(h)) for h in attrs["/Headers"])
    k = elem.get("/K")
    if k is None:
        return
    kept = []
    for kid in _kids(k):
        obj = kid.get_object() if hasattr(kid, "get_object") else kid
        if isinstance(obj, DictionaryObject) and obj.get("/Type") == "/OBJR":
            continue
        _strip_annotations(obj, prefix)
        kept.append(kid)
    elem[NameObject("/K")] = ArrayObject(kept)
