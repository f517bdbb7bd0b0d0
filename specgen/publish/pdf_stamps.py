"""The running heads and "page x of y" of a volume, without laying out every page again.

Every page of a volume carries the same running heads (project, revision, the document-
control mark) and its own folio, "page x of y", centred at the foot (``stamp.css``).  When
one new result adds a page, every folio changes with the total, and laying out a stamp page
per page of the volume cost about 20 ms each in WeasyPrint (6 CPU s of a re-issue of the
demo).  So WeasyPrint lays out a *specimen* instead: one stamp page of each kind the volume
has (cover, portrait, landscape), its folio written with every digit
(``page 1234567890 of 1234567890``), so the font subset holds every glyph a folio needs.
Each page's stamp is its kind's specimen page with the folio's glyph run written again for
its own numbers: the digits' glyphs and widths read from the specimen (the font's ``/W``
array), the run moved so that its centre stays where WeasyPrint centred the specimen's
(the margin box is centred on the page, and its text in it).  The specimen does not depend
on the page count, so a re-issue takes it from the artefact cache.

Where the specimen cannot be read so (a folio run not found, letter or word spacing, a
digit kerned against its neighbour), :func:`folios` returns None and the caller lays out
the stamp pages in full as before.  ``tests/test_stamps.py`` compares the folios written
here with the ones WeasyPrint lays out itself.
"""
from __future__ import annotations

import io
from dataclasses import dataclass

DIGITS = "1234567890"
#: the order the specimen's pages come in (a kind of page absent from a volume is left out)
KINDS = ("cover", None, "wide")


def kinds_of(front_pages: int, sizes: list) -> list:
    """The kind of each page of a volume for its stamp: the cover, portrait (None) or wide
    (``sizes``: the chapter pages' (width, height) after ``front_pages`` of front matter)."""
    return ["cover"] + [None] * (front_pages - 1) + ["wide" if w > h else None for w, h in sizes]


def folio_text(folio: str, number, total) -> str:
    """The folio as the stamp template writes it (``stamp.html.j2``)."""
    return f"{folio}page {number} of {total}"


def specimen_pages(kinds: list) -> list[dict]:
    """The specimen's pages for a volume whose pages are of ``kinds``: one of each kind."""
    present = set(kinds)
    return [{"number": DIGITS, "kind": k} for k in KINDS if k in present]


@dataclass
class Folio:
    """One kind's specimen page, read: its content stream cut around the folio's text
    object, the folio's font, size and baseline, and the glyphs of its characters."""

    head: list      # instructions before the folio's Tm
    tail: list      # instructions after its TJ
    font: object    # the font's resource name
    size: float
    centre: float   # x of the run's centre, in the text matrix's units
    y: float
    glyphs: dict    # character → (glyph id bytes, width in glyph space)
    adjust: dict    # character → TJ adjustment written after it (kerning)
    page: object    # the specimen page (resources, media box)

    def content(self, text: str) -> bytes:
        """The stamp page's content stream with ``text`` as its folio."""
        import pikepdf
        from pikepdf import Array, Name, Operator
        run, width = [], 0.0
        for ch in text:
            gid, w = self.glyphs[ch]
            run += [pikepdf.String(gid), self.adjust.get(ch, 0)]
            width += w - self.adjust.get(ch, 0)
        x = self.centre - width * self.size / 2000
        middle = [pikepdf.ContentStreamInstruction([1, 0, 0, -1, round(x, 6), self.y],
                                                   Operator("Tm")),
                  pikepdf.ContentStreamInstruction([Name(self.font), self.size], Operator("Tf")),
                  pikepdf.ContentStreamInstruction([Array(run)], Operator("TJ"))]
        return pikepdf.unparse_content_stream([*self.head, *middle, *self.tail])


def folios(specimen_pdf: bytes, folio: str, kinds: list) -> dict | None:
    """Kind of page → :class:`Folio` read from the specimen, or None where it cannot be read
    safely (the caller then lays out every stamp page)."""
    import pikepdf
    doc = pikepdf.Pdf.open(io.BytesIO(specimen_pdf))
    present = [k for k in KINDS if k in set(kinds)]
    if len(doc.pages) != len(present):
        return None
    text = folio_text(folio, DIGITS, DIGITS)
    out = {}
    for kind, page in zip(present, doc.pages):
        read = _read(page, text)
        if read is None:
            return None
        out[kind] = read
    out["_doc"] = doc   # kept open: the pages' streams are read when the stamps are laid
    return out


def _read(page, text: str) -> Folio | None:
    """The folio of one specimen page (the one text run whose glyphs spell ``text``)."""
    import pikepdf
    ops = pikepdf.parse_content_stream(page)
    found = None
    for i, inst in enumerate(ops):
        if str(inst.operator) != "TJ" or i < 2:
            continue
        tm, tf = ops[i - 2], ops[i - 1]
        if str(tm.operator) != "Tm" or str(tf.operator) != "Tf":
            continue
        run = list(inst.operands[0])
        spelled = _spell(run, text)
        if spelled is not None:
            if found is not None:
                return None     # two runs spell the folio: which one is unclear
            found = (i, tm, tf, spelled)
    if found is None:
        return None
    i, tm, tf, (gids, adjust) = found
    if any(str(op.operator) in ("Tc", "Tw", "Tz", "TL", "Ts") for op in ops):
        return None             # spacing the widths below would not include
    widths = _widths(page.obj.Resources.Font[tf.operands[0]])
    if widths is None or any(adjust.get(d, 0) for d in DIGITS + " "):
        return None             # a digit or space kerned: its neighbours would matter
    size = float(tf.operands[1])
    glyphs = {ch: (g, widths[int.from_bytes(g, "big")]) for ch, g in gids.items()}
    width = sum(glyphs[ch][1] - adjust.get(ch, 0) for ch in text)   # glyph space, as TJ
    return Folio(head=ops[:i - 2], tail=ops[i + 1:], font=str(tf.operands[0]), size=size,
                 centre=float(tm.operands[4]) + width * size / 2000, y=float(tm.operands[5]),
                 glyphs=glyphs, adjust=adjust, page=page)


def _spell(run: list, text: str):
    """(character → glyph bytes, character → adjustment) when the TJ array ``run`` (one
    two-byte glyph per string, each followed by its adjustment) spells ``text`` one glyph
    per character, the same character always the same glyph; else None."""
    import pikepdf
    glyphs, numbers = [], []
    for item in run:
        if isinstance(item, pikepdf.String):
            data = bytes(item)
            if len(data) != 2:
                return None
            glyphs.append(data)
            numbers.append(0)
        elif glyphs:
            numbers[-1] += float(item)
    if len(glyphs) != len(text):
        return None
    gids, adjust = {}, {}
    for ch, g, n in zip(text, glyphs, numbers):
        if gids.setdefault(ch, g) != g or adjust.setdefault(ch, n) != n:
            return None
    if len(set(gids.values())) != len(gids):
        return None
    return gids, adjust


def _widths(font) -> dict[int, float] | None:
    """Glyph id → width (glyph space, 1/1000 em) of a Type0 font's descendant (``/W``)."""
    import pikepdf
    if font.get("/Subtype") != pikepdf.Name.Type0:
        return None
    cid = font.DescendantFonts[0]
    if cid.get("/CIDToGIDMap", pikepdf.Name.Identity) != pikepdf.Name.Identity:
        return None
    default = float(cid.get("/DW", 1000))
    spec, out, i = list(cid.get("/W", [])), {}, 0
    while i < len(spec):
        first = int(spec[i])
        if isinstance(spec[i + 1], pikepdf.Array):
            for n, w in enumerate(spec[i + 1]):
                out[first + n] = float(w)
            i += 2
        else:
            for g in range(first, int(spec[i + 1]) + 1):
                out[g] = float(spec[i + 2])
            i += 3
    return _Default(out, default)


class _Default(dict):
    """Widths with the font's default (``/DW``) for a glyph the array leaves out."""

    def __init__(self, known, default):
        super().__init__(known)
        self.default = default

    def __missing__(self, key):
        return self.default


@dataclass
class StampSet:
    """A volume's stamps, one per page: the specimen's pages with each page's folio written
    in (``specimen`` and the pages' ``kinds``), or, where the specimen cannot be read so,
    every stamp page laid out by WeasyPrint (``laid``, :class:`Printed` documents)."""

    kinds: list
    folio: str
    specimen: object = None   # Printed
    laid: list = ()

    def key(self) -> list:
        """What the stamps are made of, for the assembled PDF's cache key."""
        import hashlib
        if self.specimen is None:
            return ["laid", *(hashlib.sha256(s.to_bytes()).hexdigest() for s in self.laid)]
        return ["folios", hashlib.sha256(self.specimen.to_bytes()).hexdigest(),
                [k or "" for k in self.kinds], self.folio]

    def pages(self):
        """(content stream, the source page whose resources and media box it uses, that
        page's document) for each page of the volume in order."""
        import pikepdf
        if self.specimen is None:
            for printed in self.laid:
                doc = pikepdf.Pdf.open(io.BytesIO(printed.pdf))
                for page in doc.pages:
                    yield _contents(page), page, doc
            return
        read = folios(self.specimen.pdf, self.folio, self.kinds)
        if read is None:
            raise RuntimeError("the stamp specimen could not be read again")
        total = len(self.kinds)
        for number, kind in enumerate(self.kinds, start=1):
            folio = read[kind]
            yield folio.content(folio_text(self.folio, number, total)), folio.page, read["_doc"]


def _contents(page) -> bytes:
    """A page's content streams as one."""
    import pikepdf
    contents = page.obj.Contents
    if isinstance(contents, pikepdf.Array):
        return b"\n".join(c.read_bytes() for c in contents)
    return contents.read_bytes()
