"""Putting the printed parts together into the one tagged PDF/A-3a dossier (pikepdf, on qpdf).

The front matter (cover and contents) is the host: WeasyPrint wrote it as PDF/A-3a with
the document's metadata, identifier, output intent and attachments, and every other
part's pages are appended to it.  Then, over the whole document:

* the running heads and "page x of y" are laid over each page from the stamps (one per
  page, the same size: a specimen page drawn by WeasyPrint with the same fonts, its folio
  written for the page, :mod:`specgen.publish.pdf_stamps`);
* every link is made again with an explicit destination (page, x, y), so links between
  parts work like links within one;
* the bookmarks of all parts become one outline, nested by heading level.

qpdf copies and writes the objects in compiled code: the demo's two volumes are put together
in about a tenth of the CPU time pypdf took (DEVELOPERS.md, "Benchmark").  Nothing here
depends on the clock or on chance (the file identifier is the front matter's), so the same
parts give the same bytes.
"""
from __future__ import annotations

import io


def assemble(front, parts: list, stamps, target, *, foreign=None,
             exported=frozenset()) -> None:
    """Write ``front`` + ``parts`` (:class:`~specgen.publish.pdf_parts.Printed`) to
    ``target`` with ``stamps`` (:class:`~specgen.publish.pdf_stamps.StampSet`, one stamp
    per page) laid over the pages in order.

    ``foreign`` ((file name, anchors)) is the other volume of the dossier: a link to one of
    its anchors opens that file at the anchor's named destination; ``exported`` are this
    volume's anchors the other volume links to, each made a named destination."""
    import pikepdf
    docs = [front, *parts]
    pdf = pikepdf.Pdf.open(io.BytesIO(front.pdf))
    for page in pdf.pages:
        _drop(page.obj, "/Annots")
    tree = StructureMerge(pdf)
    for n, part in enumerate(parts, start=1):
        _append(pdf, tree, part, f"p{n}-")   # the part's document is let go on return
    offsets, n = [], 0
    for doc in docs:
        offsets.append(n)
        n += len(doc.pages)
    if len(stamps.kinds) != n or len(pdf.pages) != n:
        raise RuntimeError(f"assembly: {len(pdf.pages)} pages, {len(stamps.kinds)} stamps, "
                           f"{n} expected")
    stamped, opened = 0, {}   # the stamps' documents (one specimen, or the laid stamps)
    resources: dict = {}   # a source page's resources, copied once (shared by its stamps)
    for page, (content, source, src) in zip(pdf.pages, stamps.pages()):
        opened[id(src)] = src   # kept while the resources are keyed by its id
        key = (id(src), source.objgen)
        if key not in resources:
            resources[key] = _copied(pdf, source.obj.Resources, src)
        _lay_over(pdf, page, content, source.mediabox, resources[key])
        stamped += 1
    if stamped != n:
        raise RuntimeError(f"assembly: {stamped} stamps laid over {n} pages")
    tree.finish()
    _show_title(pdf)
    anchors = global_anchors(docs)
    _links(pdf, docs, offsets, anchors, foreign)
    _named(pdf, anchors, exported)
    _outline(pdf, docs, offsets)
    # the identifier stays the front matter's (the revision's), so a build is reproducible
    pdf.save(target, deterministic_id=True, compress_streams=True)
    for src in opened.values():
        src.close()
    pdf.close()


def _append(pdf, tree, part, prefix: str) -> None:
    """Copy ``part``'s pages and structure elements into ``pdf``; its document is opened
    here and let go when this returns.

    qpdf copies a page's objects into ``pdf`` at once but reads a copied stream's data only
    when it writes, from the part's bytes (it keeps the part's input for that, not its
    parsed document).  A part's document holds its cross-reference table and every object
    read (about 1.6 MiB each for a calculation sheet's part): kept open until the volume
    is written, they made the assembly's memory grow with every part at once
    (DEVELOPERS.md, "How the assembly holds memory")."""
    import pikepdf
    src = pikepdf.Pdf.open(io.BytesIO(part.pdf))
    for page in src.pages:
        _drop(page.obj, "/Annots")  # made again across parts (:func:`_links`)
    start = len(pdf.pages)
    pdf.pages.extend(src.pages)
    tree.append(src, [pdf.pages[i] for i in range(start, len(pdf.pages))], prefix)


def _drop(obj, key: str) -> None:
    if key in obj:
        del obj[key]


def _show_title(pdf) -> None:
    """A reader's window shows the document's title, not its file name (as PDF/UA asks)."""
    import pikepdf
    prefs = pdf.Root.get("/ViewerPreferences")
    prefs = pikepdf.Dictionary(dict(prefs.items())) if prefs is not None else pikepdf.Dictionary()
    prefs.DisplayDocTitle = True
    pdf.Root.ViewerPreferences = prefs


def _lay_over(pdf, page, content: bytes, bbox, stamp_resources) -> None:
    """Draw a stamp (its ``content`` stream, media box ``bbox`` and resources, already in
    ``pdf``) over ``page`` as a form XObject.

    The page's own content streams are kept as they are (compressed, untouched) and
    wrapped in q/Q so the stamp starts from the default graphics state.
    """
    import pikepdf
    from pikepdf import Array, Dictionary, Name
    # qpdf compresses the new streams when it writes (compress_streams)
    form = pikepdf.Stream(pdf, content)
    form.Type, form.Subtype = Name.XObject, Name.Form
    form.BBox = Array(bbox)
    form.Resources = stamp_resources
    resources = Dictionary(dict(page.obj.Resources.items()))  # this page's own copy (parts share one)
    xobjects = resources.get("/XObject")
    xobjects = Dictionary(dict(xobjects.items())) if xobjects is not None else Dictionary()
    xobjects.SgStamp = pdf.make_indirect(form)
    resources.XObject = xobjects
    page.obj.Resources = resources
    contents = page.obj.get("/Contents")
    contents = list(contents) if isinstance(contents, Array) else [contents]
    # the running head is a pagination artifact, outside the structure tree (PDF/UA)
    page.obj.Contents = Array([pdf.make_stream(b"q\n"), *contents,
                               pdf.make_stream(b"\nQ\nq /Artifact BMC /SgStamp Do EMC Q\n")])


def _copied(pdf, obj, src=None):
    """``obj`` of another PDF (``src``) in ``pdf``, copied by qpdf in one call (once per
    source document, so references to pages already copied lead to the copies); a direct
    object is made indirect in ``src`` first, so qpdf copies it whole."""
    if not obj.is_indirect:
        obj = src.make_indirect(obj)
    return pdf.copy_foreign(obj)


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


def _named(pdf, anchors: dict, names) -> None:
    """A named destination for each of ``names`` (the other volume's links land there)."""
    import pikepdf
    chosen = [n for n in sorted(names) if n in anchors]
    if not chosen:
        return
    if "/Names" not in pdf.Root:
        pdf.Root.Names = pikepdf.Dictionary()
    if "/Dests" not in pdf.Root.Names:
        pdf.Root.Names.Dests = pdf.make_indirect(pikepdf.Dictionary(Names=pikepdf.Array()))
    tree = pikepdf.NameTree(pdf.Root.Names.Dests)
    for name in chosen:
        page, x, y = anchors[name]
        tree[name] = _xyz(pdf, page, x, y)


def _xyz(pdf, page: int, x: float, y: float):
    """An explicit destination: ``page`` of the document at (x, y), the zoom kept."""
    from pikepdf import Array, Name
    return Array([pdf.pages[page].obj, Name.XYZ, x, y, 0])


def _to_other_volume(foreign, target: str):
    """The action opening the other volume at ``target`` (a remote go-to, allowed in
    PDF/A), or None when ``target`` is not one of its anchors."""
    from pikepdf import Dictionary, Name, String
    if foreign is None or target not in foreign[1]:
        return None
    return Dictionary(Type=Name.Action, S=Name.GoToR, F=String(foreign[0]), D=String(target),
                      NewWindow=False)


def _links(pdf, docs, offsets, anchors, foreign=None) -> None:
    from pikepdf import Array, Dictionary, Name, String

    from specgen.publish.pdf_parts import BASE
    for doc, offset in zip(docs, offsets):
        for page, kind, target, rect in doc.links:
            annot = Dictionary(Type=Name.Annot, Subtype=Name.Link, Rect=Array(rect),
                               BS=Dictionary(W=0),
                               F=4)  # printable, as PDF/A asks
            if kind == "internal" and target not in anchors:
                remote = _to_other_volume(foreign, target)
                if remote is None:
                    continue  # a link to nothing stays plain text, as in a browser
                annot.A = remote
            elif kind == "internal":
                annot.Dest = _xyz(pdf, *anchors[target])
            else:
                if target.startswith(BASE):
                    # a file published beside the PDF (a download: the quantities schedule,
                    # the exports), linked relative to the PDF's own folder instead of the
                    # print engine's private address, which leads nowhere once printed
                    target = target[len(BASE):]
                annot.A = Dictionary(Type=Name.Action, S=Name.URI, URI=String(target))
            on = pdf.pages[offset + page].obj
            if "/Annots" not in on:
                on.Annots = Array()
            on.Annots.append(pdf.make_indirect(annot))


def _outline(pdf, docs, offsets) -> None:
    """Every part's bookmarks as one outline, nested by heading level (each opens its page
    at the heading, the zoom kept)."""
    from pikepdf import Array, Dictionary, Name, String
    root = pdf.Root.get("/Outlines")
    if root is None:
        root = pdf.Root.Outlines = pdf.make_indirect(Dictionary(Type=Name.Outlines))
    stack: list[tuple[int, object]] = [(0, root)]
    counts = {}
    for doc, offset in zip(docs, offsets):
        for page, level, label, x, y in doc.bookmarks:
            while len(stack) > 1 and stack[-1][0] >= level:
                stack.pop()
            parent = stack[-1][1]
            item = pdf.make_indirect(Dictionary(Title=String(label), Parent=parent,
                                                Dest=_xyz(pdf, offset + page, x, y)))
            if "/Last" in parent:
                parent.Last.Next = item
                item.Prev = parent.Last
            else:
                parent.First = item
            parent.Last = item
            counts[parent.objgen] = counts.get(parent.objgen, 0) + 1
            stack.append((level, item))
    _count(root, counts)


def _count(item, counts) -> int:
    """Set /Count of ``item`` and its descendants (every item open): the items visible
    under it; returns that number."""
    n, kid = 0, item.get("/First")
    while kid is not None:
        n += 1 + _count(kid, counts)
        kid = kid.get("/Next")
    if n:
        item.Count = n
    return n


class StructureMerge:
    """The tagged parts' structure trees made one (the front matter's tree is the host).

    The elements under each part's document element move under the host's; the parent
    tree entries (one per page, keyed by the page's ``/StructParents``) are renumbered
    after the host's; structure ids get the part's prefix, so table headers stay unique.
    The link annotations are made again across parts (:func:`_links`), so their object
    references are left out of the tree: the links' text stays tagged as links.
    """

    def __init__(self, pdf):
        self.pdf = pdf
        root = pdf.Root
        self.root = root.StructTreeRoot if "/StructTreeRoot" in root else None
        self.nums: list = []
        self.next = 0
        self.added: list = []   # the parts' elements, set under the document element once
        if self.root is None:
            return
        self.document = _kids(self.root.K)[0]
        _strip_annotations(self.document, "p0-")
        nums = self.root.ParentTree.get("/Nums", [])
        for key, value in zip(nums[::2], nums[1::2]):
            if not _is_annotation_entry(value):
                self.nums += [key, value]
                self.next = max(self.next, int(key) + 1)
        for page in pdf.pages:
            _drop(page.obj, "/StructParent")

    def append(self, src, pages, prefix: str) -> None:
        """Join the tree of ``src`` (a part) whose ``pages`` were added to the document."""
        tagged = src.Root.get("/StructTreeRoot")
        if self.root is None or tagged is None:
            return
        shift = {}
        for page, new in zip(src.pages, pages):
            if page.obj.get("/StructParents") is not None:
                shift[int(page.obj.StructParents)] = self.next
                new.obj.StructParents = self.next
                self.next += 1
        kids = [kid for doc in _kids(tagged.K) for kid in _kids(doc.get("/K", []))]
        for kid in kids:  # all before any is copied: a copy follows its parent to the rest
            _strip_annotations(kid, prefix)
            _drop(kid, "/P")  # set to the host's document element below; not copied
        for kid in kids:
            kid = _copied(self.pdf, kid, src)  # its pages map to those added above
            kid.P = self.document
            self.added.append(kid)
        old = tagged.ParentTree.get("/Nums", [])
        for key, value in zip(old[::2], old[1::2]):
            if int(key) in shift:
                self.nums += [shift[int(key)], _copied(self.pdf, value, src)]

    def finish(self) -> None:
        from pikepdf import Array, Dictionary, Name
        if self.root is None:
            return
        if self.added:  # one array at the end: built again per element it cost n² (issue 25)
            current = self.document.get("/K")
            self.document.K = Array([*(_kids(current) if current is not None else []),
                                     *self.added])
        self.root.K = Array([self.document])
        self.root.ParentTree = self.pdf.make_indirect(Dictionary(Nums=Array(self.nums)))
        self.root.ParentTreeNextKey = self.next
        for page in self.pdf.pages:
            page.obj.Tabs = Name.S  # tab order follows the structure


def _kids(k) -> list:
    import pikepdf
    return list(k) if isinstance(k, pikepdf.Array) else [k]


def _is_annotation_entry(value) -> bool:
    import pikepdf
    return not isinstance(value, pikepdf.Array)  # a page's entry is an array of elements


def _strip_annotations(elem, prefix: str) -> None:
    """Drop object references to annotations (made again later) and prefix ids, through
    ``elem`` and every element under it (a walk, not recursion: the calculation sheets'
    trees are deep and wide)."""
    from pikepdf import Array, Dictionary, Name, String
    stack = [elem]
    while stack:
        elem = stack.pop()
        if not isinstance(elem, Dictionary):
            continue
        if "/ID" in elem:
            elem.ID = String(prefix + str(elem.ID))
        attrs = elem.get("/A")
        if isinstance(attrs, Dictionary) and "/Headers" in attrs:
            attrs.Headers = Array([String(prefix + str(h)) for h in attrs.Headers])
        k = elem.get("/K")
        if k is None or isinstance(k, int):
            continue
        kids = list(k) if isinstance(k, Array) else [k]
        kept = [kid for kid in kids if isinstance(kid, int) or not (
            isinstance(kid, Dictionary) and kid.get("/Type") == Name.OBJR)]
        if len(kept) != len(kids):
            elem.K = Array(kept)
        stack.extend(kid for kid in kept if not isinstance(kid, int))
