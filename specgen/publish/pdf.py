"""The PDF: the same rendered pages, assembled with our print template and print CSS.

Markdown is converted with the same extensions as the site; links between pages
become links inside the one document.  Long chapters are cut at top-level headings
into pieces that each start a page; pieces are grouped into parts, printed on every
core by :mod:`specgen.publish.pdf_parts` (the only WeasyPrint import; images are served
from the page set in memory and every other URL is refused, so the PDF never reaches
the network) and put together by :mod:`specgen.publish.pdf_assembly` (pypdf).
``to_html`` gives the same print as one document (the benchmark's floor renders it).
"""
from __future__ import annotations

import re
from dataclasses import dataclass

import jinja2
import yaml

from specgen.errors import PublishError
from specgen.killpoints import reached
from specgen.publish.pdf_assembly import global_anchors
from specgen.refdata import CONTENT_DIR

PRINT_DIR = CONTENT_DIR / "print"
PAGE_SIZES = {"a4": "A4", "letter": "letter"}


def _extensions() -> tuple[list, dict]:
    """The Markdown extensions of the site configuration (one list for both media)."""
    class _Loader(yaml.SafeLoader):
        pass
    _Loader.add_multi_constructor("tag:yaml.org,2002:python/", lambda *a: None)
    _Loader.add_multi_constructor("!", lambda *a: None)
    cfg = yaml.load((CONTENT_DIR.parent / "mkdocs.yml").read_text(encoding="utf-8"), _Loader)
    names, configs = [], {}
    for item in cfg.get("markdown_extensions", []):
        if isinstance(item, dict):
            (name, conf), = item.items()
            names.append(name)
            configs[name] = conf or {}
        else:
            names.append(item)
    return names, configs


def _page_id(path: str) -> str:
    return "page-" + _stem(path)


def _stem(path: str) -> str:
    return path.rsplit(".", 1)[0].replace("/", "-")


def _relink(html: str, stem: str) -> str:
    """One document now: namespace every id by its page and point links at the new ids.

    ``x.md#a`` → ``#p-x-a``; ``#a`` → ``#p-<this page>-a``; ``x.md`` → ``#page-x``.
    """
    html = re.sub(r'id="([^"]+)"', lambda m: f'id="p-{stem}-{m.group(1)}"', html)
    html = re.sub(r'href="([\w/-]+)\.md#([^"]+)"',
                  lambda m: f'href="#p-{_stem(m.group(1))}-{m.group(2)}"', html)
    html = re.sub(r'href="#(?!p-|page-)([^"]+)"', lambda m: f'href="#p-{stem}-{m.group(1)}"', html)
    return re.sub(r'href="([\w/-]+)\.md"', lambda m: f'href="#{_page_id(m.group(1) + ".md")}"', html)


WIDE_COLUMNS = 12  # tables with more columns than this go on a landscape page


def _landscape_wide_tables(html: str) -> str:
    """Wrap wide tables in a block printed on a landscape page (``@page wide``)."""
    def wrap(m: re.Match) -> str:
        header = re.search(r"<tr>(.*?)</tr>", m.group(0), flags=re.S)
        cols = len(re.findall(r"<th\b", header.group(1))) if header else 0
        return f'<div class="sg-wide">{m.group(0)}</div>' if cols > WIDE_COLUMNS else m.group(0)
    return re.sub(r"<table>.*?</table>", wrap, html, flags=re.S)


PART_SIZE = 80_000  # characters of HTML: a chapter longer than this prints in parts


@dataclass(frozen=True)
class Piece:
    """A run of one chapter's HTML that starts a new page (``cont``: not the chapter's first)."""

    id: str
    title: str
    html: str
    cont: bool = False


def _cut_points(html: str, size: int) -> list[int]:
    """Offsets of top-level ``<h2`` at which a long chapter is cut, about every ``size``."""
    cuts, depth, last = [], 0, 0
    for m in re.finditer(r"<(/?)(div|details|table|blockquote|figure|ul|ol|h2)\b", html):
        tag = m.group(2)
        if tag == "h2":
            if not m.group(1) and depth == 0 and m.start() - last >= size:
                cuts.append(m.start())
                last = m.start()
            continue
        depth += -1 if m.group(1) else 1
    return cuts


def pieces(pageset, size: int = PART_SIZE) -> list[Piece]:
    """Every chapter of the print in navigation order, long ones cut at top-level headings.

    Each piece starts a new page, in the assembled dossier and in a single-document render
    alike, so the cut points are the same page breaks either way.
    """
    import markdown
    from specgen.publish.safety import neutralise_links
    names, configs = _extensions()
    out = []
    for item in pageset.nav:
        md = markdown.Markdown(extensions=names, extension_configs=configs)
        body = _relink(neutralise_links(_unmarked(md.convert(pageset.pages[item.path]))),
                       _stem(item.path))
        body = _landscape_wide_tables(body)
        bounds = [0, *_cut_points(body, size), len(body)]
        for i, (a, b) in enumerate(zip(bounds, bounds[1:])):
            out.append(Piece(_page_id(item.path), item.title, body[a:b], cont=i > 0))
    return out


# the site's per-page banners (draft, superseded, findings: report/marks.py), which print
# hides (control.css: the running head carries the mark); left out of the print HTML, so a
# chapter prints the same, and comes from the cache, whatever the revision's state
_SCREEN_MARK = re.compile(r'<div class="sg-mark sg-mark-\w+" role="note">.*?</div>\n*', re.S)


def _unmarked(html: str) -> str:
    return _SCREEN_MARK.sub("", html)


def _template(name: str):
    from specgen.templating import sandboxed
    env = sandboxed(jinja2.FileSystemLoader(str(PRINT_DIR)))
    return env.get_template(name)


def document_html(context: dict, sections: list[Piece], *, front: bool,
                  toc_pages: dict[str, int] | None = None, toc: list[Piece] = ()) -> str:
    """One print document: the cover and contents (``front``) and/or chapter pieces.

    ``toc_pages`` (chapter id → page number) writes the contents' numbers as text, for a
    front matter printed on its own; without it the contents use the engine's counters.
    """
    Markup = jinja2.utils.markupsafe.Markup
    entries = [{"id": p.id, "title": p.title,
                "page": toc_pages.get(p.id) if toc_pages is not None else None}
               for p in toc if not p.cont]
    return _template("print.html.j2").render(
        front=front, toc=entries,
        sections=[{"id": p.id, "cont": p.cont, "html": Markup(p.html)} for p in sections],
        **context)


def to_html(pageset, context: dict) -> str:
    """The whole print as one HTML document (cover, contents, every chapter in order)."""
    every = pieces(pageset)
    return document_html(context, every, front=True, toc=every)


def stylesheet(page_size: str, *extra: str) -> str:
    """The print CSS for ``page_size`` (``a4`` or ``letter``), with ``extra`` sheets after it."""
    css = "\n".join((PRINT_DIR / name).read_text(encoding="utf-8")
                    for name in ("print.css", *extra))
    css = css.replace("size: A4;", f"size: {PAGE_SIZES[page_size]};", 1)
    return css.replace("size: A4 landscape;", f"size: {PAGE_SIZES[page_size]} landscape;")


def parts(every: list[Piece], size: int = PART_SIZE) -> list[list[Piece]]:
    """Consecutive pieces grouped into parts of about ``size`` characters each."""
    out: list[list[Piece]] = []
    for piece in every:
        if out and sum(len(p.html) for p in out[-1]) + len(piece.html) <= size:
            out[-1].append(piece)
        else:
            out.append([piece])
    return out


# PDF/A-3a: archival, with the inputs attached, and tagged (structure tree, alternative
# texts, language).  WeasyPrint takes one variant per document: its PDF/UA-1 variant
# tags the same way but is not PDF/A, so it could not carry the attachments as PDF/A-3.
PDF_OPTIONS = {"pdf_variant": "pdf/a-3a", "custom_metadata": True}
PLACEHOLDER_PAGE = 8888  # the contents laid out once with numbers of this width


def write_pdf(pageset, context: dict, target, *, attachments: dict[str, bytes],
              page_size: str = "a4", identifier: bytes | None = None, stamp=None,
              workers: int | None = None, on_part=None) -> tuple[int, int]:
    """Print the page set as a tagged PDF/A-3a at ``target`` with ``attachments`` embedded;
    returns (chapter parts taken unchanged from the cache, chapter parts).

    The chapters are printed in parts on every core, the costliest first (the CPU time each
    part took last time, kept in the artefact cache; its HTML size when new), the front
    matter once their page numbers are known, the running heads last;
    :mod:`specgen.publish.pdf_assembly` puts them together.  Whatever has not changed — a
    part, the front matter, the running heads, the assembled whole — comes from the
    artefact cache, byte for byte as it was drawn.  ``stamp`` (a datetime, the revision
    date) dates the attachments, so identical inputs give a byte-identical PDF.
    ``on_part(done, total)`` is called as the chapter parts come back (for a progress
    display).
    """
    from specgen.publish.pdf_parts import Printer, Timings, cached_or_submitted
    every = pieces(pageset)
    css = stylesheet(page_size, "parts.css", "control.css")
    files = [(name, data, stamp) for name, data in sorted(attachments.items())]
    groups = parts(every)
    timings = Timings.load([_part_name(g, every) for g in groups],
                           getattr(context.get("project"), "code", ""))
    with Printer(pageset, workers) as printer:
        def front(numbers, **extra):
            return cached_or_submitted(printer, "pdf-front", document_html(
                context, [], front=True, toc=every, toc_pages=numbers), css, **PDF_OPTIONS,
                **extra)
        guess = front({p.id: PLACEHOLDER_PAGE for p in every})
        handles = {i: cached_or_submitted(printer, "pdf-part", document_html(
            context, groups[i], front=False), css, **PDF_OPTIONS)
            for i in timings.order([sum(len(p.html) for p in g) for g in groups])}
        printed = []
        for i in range(len(groups)):
            printed.append(handles[i].result())
            reached(f"pdf-part-{i + 1}")
            if on_part is not None:
                on_part(i + 1, len(groups))
        timings.keep([p.seconds for p in printed])
        done, stamps = _front_and_stamps(front, printer, context, page_size, every, printed,
                                         len(guess.result().pages),
                                         dict(attachments=files, pdf_identifier=identifier))
    _assembled(done, printed, stamps, target)
    reached("pdf-assembled")
    return sum(1 for p in printed if not p.seconds), len(printed)


def _part_name(group: list[Piece], every: list[Piece]) -> str:
    """A part's name from one build to the next: its first piece's chapter and place in it."""
    first = group[0]
    return f"{first.id}#{sum(1 for p in every[:every.index(first)] if p.id == first.id)}"


def _front_and_stamps(front, printer, context, page_size, every, printed, length, final):
    """The front matter with the chapters' page numbers, and the running-head stamps."""
    sizes = [size for doc in printed for size in doc.pages]
    for _ in range(3):  # the contents' length does not depend on its numbers, but check
        anchors = global_anchors(printed, start=length)
        numbers = {p.id: anchors[p.id][0] + 1 for p in every if p.id in anchors}
        handle = front(numbers, **final)
        stamps = _stamps(printer, context, page_size, length, sizes)
        done = handle.result()
        if len(done.pages) == length:
            break
        length = len(done.pages)
    else:
        raise PublishError("the contents pages changed length with their page numbers "
                           "three times; nothing was changed in the output folder. Fix: "
                           "report this with the project.")
    reached("pdf-front")
    return done, [s.result() for s in stamps]


def _assembled(front, printed, stamps, target) -> None:
    """The parts put together (:func:`pdf_assembly.assemble`), from the artefact cache when
    the same front matter, parts and stamps were put together before."""
    import hashlib
    import io
    from pathlib import Path

    from specgen import cache
    from specgen.publish.pdf_assembly import assemble

    def produce() -> bytes:
        buffer = io.BytesIO()
        assemble(front, printed, stamps, buffer)
        return buffer.getvalue()
    key = [hashlib.sha256(doc.to_bytes()).hexdigest() for doc in (front, *printed, *stamps)]
    Path(target).write_bytes(cache.cached("pdf-whole", key, produce))


STAMP_SPLIT = 400  # pages per stamp document


def _stamps(printer, context, page_size: str, front_pages: int, sizes: list) -> list:
    """Submit the running-head stamps: one page per page of the dossier."""
    from specgen.publish.pdf_parts import cached_or_submitted
    total = front_pages + len(sizes)
    kinds = ["cover"] + [None] * (front_pages - 1) + ["wide" if w > h else None for w, h in sizes]
    pages = [{"number": i + 1, "kind": k} for i, k in enumerate(kinds)]
    css = stylesheet(page_size, "stamp.css", "control.css")
    tpl = _template("stamp.html.j2")
    project, revision = context["project"].title, context["revision"].code
    return [cached_or_submitted(printer, "pdf-stamp", tpl.render(
        pages=pages[i:i + STAMP_SPLIT], total=total, title=context["title"], project=project,
        revision=revision, mark=context.get("mark", "")), css, **PDF_OPTIONS)
        for i in range(0, total, STAMP_SPLIT)]
