"""The specification as a word-processor document (DOCX), for a contract writer to edit.

Built from the clean HTML fragment of the Markdown export (``specification_export.py``), so the
document says exactly what the exports and the Specification chapter say: the clauses are
written once, in ``specification_clauses.md.j2``.  Headings keep real heading styles
(``#`` → Title, ``##`` → Heading 1, ``###`` → Heading 2, ``####`` → Heading 3); each item of a
numbered list under a section heading ``Z1.2 …`` becomes clause ``Z1.2.n`` in the paragraph
style *Clause* (the number is written out, so a reference to a clause survives editing);
tables become Word tables with a repeated header row.  Every page carries the draft or issued
marking in its header and the page number in its footer.  The file is reproducible: its
dates are the revision date and its zip entries carry that date.
"""
from __future__ import annotations

import datetime as dt
import io
import re
import zipfile

from lxml import html as lxml_html

CLAUSE_STYLE = "Clause"
_SECTION = re.compile(r"^(\S+\.\d+)\s")
HEADING_LEVEL = {"h1": 0, "h2": 1, "h3": 2, "h4": 3}


def marking(revision) -> str:
    """The marking every page carries: draft (not for construction) or issued, and for what."""
    purpose = revision.purpose.replace("_", " ")
    if revision.status == "issued":
        return f"revision {revision.code} of {revision.date.isoformat()}: ISSUED {purpose}"
    from specgen.report.marks import DRAFT   # the same words as every page of the dossier
    return f"revision {revision.code} of {revision.date.isoformat()}: {DRAFT}"


def docx_bytes(fragment: str, *, title: str, mark: str, date: dt.date) -> bytes:
    """A DOCX document of the clean HTML ``fragment`` with ``mark`` on every page."""
    from docx import Document
    doc = Document()
    _styles(doc)
    _page_furniture(doc, mark)
    props = doc.core_properties
    props.title, props.subject, props.author = title, mark, "specgen"
    props.last_modified_by, props.revision = "specgen", 1
    stamp = dt.datetime(date.year, date.month, date.day)
    props.created = props.modified = props.last_printed = stamp
    section = None
    for el in lxml_html.fragments_fromstring(fragment):
        if isinstance(el, str):
            if el.strip():
                doc.add_paragraph(el.strip())
            continue
        section = _block(doc, el, section)
    buf = io.BytesIO()
    doc.save(buf)
    return _fixed_dates(buf.getvalue(), date)


def _styles(doc) -> None:
    from docx.enum.style import WD_STYLE_TYPE
    from docx.shared import Cm, Pt
    normal = doc.styles["Normal"]
    normal.font.size = Pt(10.5)
    clause = doc.styles.add_style(CLAUSE_STYLE, WD_STYLE_TYPE.PARAGRAPH)
    clause.base_style = normal
    fmt = clause.paragraph_format
    fmt.left_indent, fmt.first_line_indent = Cm(1.5), Cm(-1.5)
    fmt.tab_stops.add_tab_stop(Cm(1.5))
    fmt.space_after = Pt(4)


def _page_furniture(doc, mark: str) -> None:
    from docx.enum.text import WD_ALIGN_PARAGRAPH
    from docx.oxml import OxmlElement
    from docx.oxml.ns import qn
    sec = doc.sections[0]
    head = sec.header.paragraphs[0]
    head.text = mark
    head.runs[0].bold = True
    head.alignment = WD_ALIGN_PARAGRAPH.RIGHT
    foot = sec.footer.paragraphs[0]
    foot.alignment = WD_ALIGN_PARAGRAPH.CENTER
    foot.add_run("Page ")
    run = foot.add_run()
    for kind, text in (("begin", None), (None, "PAGE"), ("end", None)):
        if kind:
            el = OxmlElement("w:fldChar")
            el.set(qn("w:fldCharType"), kind)
        else:
            el = OxmlElement("w:instrText")
            el.set(qn("xml:space"), "preserve")
            el.text = text
        run._r.append(el)


def _block(doc, el, section: str | None) -> str | None:
    tag = el.tag
    if tag in HEADING_LEVEL:
        text = _plain(el)
        doc.add_heading(text, level=HEADING_LEVEL[tag])
        m = _SECTION.match(text)
        return m.group(1) if m else None
    if tag == "p":
        _runs(doc.add_paragraph(), el)
    elif tag == "ol":
        for i, li in enumerate((c for c in el if c.tag == "li"), start=1):
            para = doc.add_paragraph(style=CLAUSE_STYLE)
            para.add_run(f"{section}.{i}\t" if section else f"{i}.\t")
            _runs(para, li)
    elif tag == "ul":
        for li in (c for c in el if c.tag == "li"):
            _runs(doc.add_paragraph(style="List Bullet"), li)
    elif tag == "table":
        _table(doc, el)
    elif tag == "blockquote":
        for p in el:
            _runs(doc.add_paragraph(style="Quote"), p)
    return section


def _plain(el) -> str:
    return " ".join("".join(el.itertext()).split())


def _runs(para, el, bold=False, italic=False, sub=False, sup=False) -> None:
    """Text and inline emphasis of ``el`` as runs of ``para`` (nested <p> in a list item too)."""
    def add(text):
        if text:
            run = para.add_run(text)
            run.bold, run.italic = bold or None, italic or None
            run.font.subscript, run.font.superscript = sub or None, sup or None
    add(el.text)
    for child in el:
        if child.tag == "br":
            para.add_run().add_break()
        else:
            _runs(para, child, bold or child.tag == "strong", italic or child.tag == "em",
                  sub or child.tag == "sub", sup or child.tag == "sup")
        add(child.tail)


def _table(doc, el) -> None:
    rows = [tr for tr in el.iter("tr")]
    if not rows:
        return
    width = max(len([c for c in tr if c.tag in ("td", "th")]) for tr in rows)
    table = doc.add_table(rows=len(rows), cols=width)
    table.style = "Table Grid"
    for r, tr in enumerate(rows):
        cells = [c for c in tr if c.tag in ("td", "th")]
        for c, cell in enumerate(cells):
            para = table.cell(r, c).paragraphs[0]
            _runs(para, cell, bold=cell.tag == "th")
    from docx.oxml import OxmlElement
    from docx.oxml.ns import qn
    if rows[0].getparent().tag == "thead" or any(c.tag == "th" for c in rows[0]):
        tr_pr = table.rows[0]._tr.get_or_add_trPr()
        el_h = OxmlElement("w:tblHeader")
        el_h.set(qn("w:val"), "true")
        tr_pr.append(el_h)
    doc.add_paragraph()


def _fixed_dates(data: bytes, date: dt.date) -> bytes:
    """The same archive with every entry dated ``date`` (a reproducible file)."""
    src = zipfile.ZipFile(io.BytesIO(data))
    out = io.BytesIO()
    with zipfile.ZipFile(out, "w", zipfile.ZIP_DEFLATED) as dst:
        for info in src.infolist():
            fixed = zipfile.ZipInfo(info.filename, (date.year, date.month, date.day, 0, 0, 0))
            fixed.compress_type = zipfile.ZIP_DEFLATED
            dst.writestr(fixed, src.read(info.filename))
    return out.getvalue()
