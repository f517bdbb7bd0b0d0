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

import hashlib
import re
from dataclasses import dataclass

import jinja2
import yaml

from specgen.errors import PublishError
from specgen.killpoints import reached
from specgen.publish.pdf_assembly import global_anchors
from specgen.publish.pdf_cuts import CHAPTER_WHOLE, PART_SIZE, _cut_points  # noqa: F401
from specgen.refdata import CONTENT_DIR

PRINT_DIR = CONTENT_DIR / "print"
PAGE_SIZES = {"a4": "A4", "letter": "letter"}


#: extensions only the site needs: the ids a reviewer's comment anchors to (figures, table
#: rows) would be thousands of named destinations in the PDF, where nobody comments
SITE_ONLY = {"specgen.report.mdanchors"}


def _extensions() -> tuple[list, dict]:
    """The Markdown extensions of the site configuration (one list for both media, less
    :data:`SITE_ONLY`)."""
    class _Loader(yaml.SafeLoader):
        pass
    _Loader.add_multi_constructor("tag:yaml.org,2002:python/", lambda *a: None)
    _Loader.add_multi_constructor("!", lambda *a: None)
    cfg = yaml.load((CONTENT_DIR.parent / "mkdocs.yml").read_text(encoding="utf-8"), _Loader)
    names, configs = [], {}
    for item in cfg.get("markdown_extensions", []):
        if isinstance(item, str) and item in SITE_ONLY:
            continue
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


def _landscape_wide_tables(html: str) -> str:
    """Wrap each table that cannot be set legibly across a portrait page (its measured
    width, :func:`specgen.publish.widths.needs_landscape`) in a block printed on a
    landscape page (``@page wide``)."""
    from specgen.publish.widths import needs_landscape

    def wrap(m: re.Match) -> str:
        # the table's caption (just above it) turns with it, never left on the page before
        return f'<div class="sg-wide">{m.group(0)}</div>' if needs_landscape(m.group(2)) \
            else m.group(0)
    return re.sub(r'(<p class="sg-table-caption">(?:(?!</p>).)*</p>\s*)?'
                  r"(<table\b[^>]*>.*?</table>)", wrap, html, flags=re.S)


@dataclass(frozen=True)
class Piece:
    """A run of one chapter's HTML that starts a new page (``cont``: not the chapter's first)."""

    id: str
    title: str
    html: str
    cont: bool = False
    volume: str = "main"  # the volume it prints in: "main" or "appendix"


def pieces(pageset, size: int = PART_SIZE) -> list[Piece]:
    """Every chapter of the print in navigation order, long ones cut at top-level headings.

    Each piece starts a new page, in the assembled dossier and in a single-document render
    alike, so the cut points are the same page breaks either way.
    """
    names, configs = _extensions()
    out = []
    for item in pageset.nav:
        body = _print_body(pageset.pages[item.path], _stem(item.path), names, configs)
        bounds = [0, *_cut_points(body, size, sections=item.sections), len(body)]
        for i, (a, b) in enumerate(zip(bounds, bounds[1:])):
            out.append(Piece(_page_id(item.path), item.title, body[a:b], cont=i > 0,
                             volume=item.volume))
    return out


def _print_body(text: str, stem: str, names: list, configs: dict) -> str:
    """A page's Markdown as print HTML: converted with the site's extensions, its links made
    links inside the one document, its wide tables turned.  From the artefact cache when the
    same Markdown was converted before, so a re-issue converts only the pages that changed."""
    from specgen import cache

    def convert() -> bytes:
        import markdown
        from specgen.publish.safety import neutralise_links
        md = markdown.Markdown(extensions=names, extension_configs=configs)
        body = _relink(neutralise_links(md.convert(text)), stem)
        return _landscape_wide_tables(body).encode("utf-8")
    return cache.cached("print-html", [text, stem, names, configs], convert).decode("utf-8")


def _template(name: str):
    from specgen.templating import sandboxed
    env = sandboxed(jinja2.FileSystemLoader(str(PRINT_DIR)))
    return env.get_template(name)


def document_html(context: dict, sections: list[Piece], *, front: bool,
                  toc_pages: dict[str, int] | None = None, toc: list[Piece] = (),
                  elsewhere: list[Piece] = ()) -> str:
    """One print document: the cover and contents (``front``) and/or chapter pieces.

    ``toc_pages`` (chapter id → page number) writes the contents' numbers as text, for a
    front matter printed on its own; without it the contents use the engine's counters.
    ``elsewhere``: the chapters of the other volume, listed (and linked) after this one's.
    """
    Markup = jinja2.utils.markupsafe.Markup
    if not front:  # the assembly takes a part's pages, not its metadata: one chapter, one print
        context = {"title": sections[0].title if sections else ""}
    entries = [{"id": p.id, "title": p.title,
                "page": toc_pages.get(p.id) if toc_pages is not None else None}
               for p in toc if not p.cont]
    return _template("print.html.j2").render(
        front=front, toc=entries,
        elsewhere=[{"id": p.id, "title": p.title} for p in elsewhere if not p.cont],
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


def parts(every: list[Piece]) -> list[list[Piece]]:
    """The pieces as printed: each piece a part of its own (a WeasyPrint document costs
    about 0.05 CPU-s beyond its content), so a part is laid out again only when its own
    HTML changed, never because a neighbour grew and the grouping moved."""
    return [[piece] for piece in every]


# PDF/A-3a: archival, with the inputs attached, and tagged (structure tree, alternative
# texts, language).  WeasyPrint (70) takes one variant per document (``pdf_variant``): of
# pdf/a-1b … pdf/a-4f, pdf/ua-1, pdf/ua-2, pdf/x-*; its pdf/ua-1 and pdf/ua-2 tag with the
# same code as pdf/a-3a (``pdf_tags``) but are not PDF/A (no PDF/A-3 attachments); no variant
# is both.  We keep PDF/A-3a, not claiming PDF/UA: the assembly makes links across parts
# outside the structure tree.  What a screen reader needs: tests/pdf_structure.py.
PDF_OPTIONS = {"pdf_variant": "pdf/a-3a", "custom_metadata": True}
PLACEHOLDER_PAGE = 8888  # the contents laid out once with numbers of this width
#: the words a volume's cover, contents and running heads carry
VOLUME_WORDS = {"main": {"kicker": "Binder specification dossier", "folio": "",
                         "elsewhere": "In the appendix volume"},
                "appendix": {"kicker": "Binder specification dossier — appendices",
                             "folio": "Appendices, ", "elsewhere": "In the main volume"}}


@dataclass
class Volume:
    """One PDF of the dossier: its pieces, where it is written, the name the other links to."""

    key: str
    target: object
    name: str
    pieces: list
    other: list = ()          # the other volume's pieces (listed in the contents)
    other_name: str = ""      # the other volume's file name
    printed: list = None
    front: object = None
    stamps: list = None


def volumes(every: list[Piece], target, appendix) -> list[Volume]:
    """The volumes to print: one with every piece, or (``appendix`` = (path, its file name,
    the main volume's file name)) the report and its appendices apart."""
    if appendix is None or not any(p.volume == "appendix" for p in every):
        return [Volume("main", target, "", every)]
    path, name, main_name = appendix
    main = [p for p in every if p.volume != "appendix"]
    rest = [p for p in every if p.volume == "appendix"]
    return [Volume("main", target, main_name, main, rest, name),
            Volume("appendix", path, name, rest, main, main_name)]


def write_pdf(pageset, context: dict, target, *, attachments: dict[str, bytes],
              page_size: str = "a4", identifier: bytes | None = None, stamp=None,
              workers: int | None = None, on_part=None, appendix=None) -> tuple[int, int]:
    """Print the page set as a tagged PDF/A-3a at ``target`` with ``attachments`` embedded;
    returns (chapter parts taken unchanged from the cache, chapter parts).
    Chapters print in parts on every core, costliest first (each part's CPU time last time,
    kept in the artefact cache; its HTML size when new), the front matter once their page
    numbers are known, the running heads last; :mod:`specgen.publish.pdf_assembly` puts them
    together.  What has not changed (a part, the front matter, the running heads, the whole)
    comes from the artefact cache byte for byte.  ``stamp`` (the revision date) dates the
    attachments: identical inputs, byte-identical PDF.  ``on_part(done, total)`` hears the
    parts come back, counted over both volumes (the report's parts, then its appendices').
    """
    from specgen.publish.pdf_parts import Printer
    from specgen.publish.pdf_schedule import _collect
    if getattr(pageset, "drawing", None):   # placeholders of the live preview's first pages
        raise PublishError(f"{target}: {len(pageset.drawing)} figure(s) not drawn yet ("
                           f"{', '.join(sorted(pageset.drawing)[:3])}); a PDF is never printed "
                           "with a placeholder. Fix: draw them first (PageSet.draw).")
    vols = volumes(pieces(pageset), target, appendix)
    files = [(name, data, stamp) for name, data in sorted(attachments.items())]
    with Printer(pageset, workers) as printer:
        # both volumes' parts queued at once: no core waits between volumes
        jobs = {v.key: _volume_jobs(printer, v, context, page_size) for v in vols}
        for job in jobs.values():
            for cost, submit in job["parts"]:
                submit(cost + job["tail"])
        finals = {}
        for v in vols:
            ident = identifier if v.key == "main" or identifier is None else \
                hashlib.sha256(identifier + b"/appendix").digest()[:16]
            finals[v.key] = dict(attachments=files, pdf_identifier=ident) if v.key == "main" \
                else dict(pdf_identifier=ident)
        _collect(printer, jobs, page_size, on_part, finals, (_stamp_specimen, _stamp_set))
        done = {k: (job["tail_work"].front(), job["printed"], job["tail_work"].stamps())
                for k, job in jobs.items()}
    # put together once the workers have ended: the assembly's memory is not added to theirs
    anchors = {k: global_anchors([d[0], *d[1]]) for k, d in done.items()}
    for v in vols:
        other = [o for o in vols if o is not v]
        foreign = (other[0].name, anchors[other[0].key]) if other else None
        linked = {t for doc in ([done[other[0].key][0], *done[other[0].key][1]] if other else [])
                  for _p, kind, t, _r in doc.links if kind == "internal" and t in anchors[v.key]}
        _assembled(*done[v.key], v.target, foreign, linked)
    reached("pdf-assembled")
    printed = [p for job in jobs.values() for p in job["printed"]]
    return sum(1 for p in printed if not p.seconds), len(printed)


def _volume_jobs(printer, v, context: dict, page_size: str) -> dict:
    """One volume's print: its contents laid out once with placeholder numbers (submitted
    now, first), its parts as (expected CPU seconds, submit(priority)) for the caller to
    queue, and ``tail``: the expected CPU seconds of what waits on all its parts."""
    from specgen.publish.pdf_parts import cached_or_submitted, weight
    from specgen.publish.pdf_schedule import FIRST, Timings
    every = v.pieces
    css = stylesheet(page_size, "parts.css", "control.css")
    ctx = dict(context, volume=VOLUME_WORDS[v.key], other_name=v.other_name)
    groups = parts(every)
    timings = Timings.load([_part_name(g, every) for g in groups],
                           getattr(context.get("project"), "code", "") + v.name)

    def front(numbers, priority=FIRST, **extra):
        return cached_or_submitted(printer, "pdf-front", document_html(
            ctx, [], front=True, toc=every, toc_pages=numbers, elsewhere=v.other), css,
            priority, **PDF_OPTIONS, **extra)
    handles: dict[int, object] = {}
    html = [document_html(ctx, g, front=False) for g in groups]

    def submitter(i):
        def submit(priority):
            handles[i] = cached_or_submitted(printer, "pdf-part", html[i], css, priority,
                                             **PDF_OPTIONS)
        return submit
    costs = timings.costs([weight(h, printer.pageset) for h in html])
    return {"ctx": ctx, "every": every, "groups": groups, "timings": timings, "front": front,
            "guess": front({p.id: PLACEHOLDER_PAGE for p in every}), "handles": handles,
            "parts": [(costs[i], submitter(i)) for i in range(len(groups))],
            "tail": timings.tail()}


def _part_name(group: list[Piece], every: list[Piece]) -> str:
    """A part's name from one build to the next: its first piece's chapter and place in it."""
    first = group[0]
    return f"{first.id}#{sum(1 for p in every[:every.index(first)] if p.id == first.id)}"


def _assembled(front, printed, stamps, target, foreign=None, exported=frozenset()) -> None:
    """The parts put together (:func:`pdf_assembly.assemble`), from the artefact cache when
    the same front matter, parts and stamps were put together before."""
    import hashlib
    import io
    from pathlib import Path

    from specgen import cache
    from specgen.publish.pdf_assembly import assemble

    def produce() -> bytes:
        buffer = io.BytesIO()
        assemble(front, printed, stamps, buffer, foreign=foreign, exported=exported)
        return buffer.getvalue()
    key = [hashlib.sha256(doc.to_bytes()).hexdigest() for doc in (front, *printed)]
    key += [stamps.key()]
    key += [foreign[0] if foreign else "", sorted(exported),
            sorted(foreign[1]) if foreign else []]
    Path(target).write_bytes(cache.cached("pdf-whole", key, produce))


STAMP_SPLIT = 400  # pages per stamp document, where every stamp page is laid out


def _stamp_html(context, pages: list, total) -> str:
    project, revision = context["project"].title, context["revision"].code
    folio = context.get("volume", VOLUME_WORDS["main"])["folio"]
    return _template("stamp.html.j2").render(
        pages=pages, total=total, title=context["title"], project=project, folio=folio,
        revision=revision, mark=context.get("mark", ""))


def _stamp_specimen(printer, context, page_size: str, kinds: list):
    """Submit the stamps' specimen (:mod:`specgen.publish.pdf_stamps`): one page of each
    kind, the same whatever the page count, so a re-issue takes it from the cache."""
    from specgen.publish.pdf_parts import cached_or_submitted
    from specgen.publish.pdf_stamps import DIGITS, specimen_pages
    css = stylesheet(page_size, "stamp.css", "control.css")
    html = _stamp_html(context, specimen_pages(kinds), DIGITS)
    from specgen.publish.pdf_schedule import FIRST
    return cached_or_submitted(printer, "pdf-stamp", html, css, FIRST - 1, **PDF_OPTIONS)


def _stamp_set(printer, context, page_size: str, kinds: list, specimen):
    """The volume's stamps: the specimen with each page's folio written in, or, where the
    specimen cannot be read so, every stamp page laid out (:func:`_stamps`)."""
    from specgen.publish.pdf_stamps import StampSet, folios
    folio = context.get("volume", VOLUME_WORDS["main"])["folio"]
    if folios(specimen.pdf, folio, kinds) is not None:
        return StampSet(kinds, folio, specimen=specimen)
    laid = _stamps(printer, context, page_size, kinds)
    return StampSet(kinds, folio, laid=[s.result() for s in laid])


def _stamps(printer, context, page_size: str, kinds: list) -> list:
    """Submit the running-head stamps laid out in full: one page per page of the dossier."""
    from specgen.publish.pdf_parts import cached_or_submitted
    from specgen.publish.pdf_schedule import FIRST
    total = len(kinds)
    pages = [{"number": i + 1, "kind": k} for i, k in enumerate(kinds)]
    css = stylesheet(page_size, "stamp.css", "control.css")
    return [cached_or_submitted(printer, "pdf-stamp", _stamp_html(
        context, pages[i:i + STAMP_SPLIT], total), css, FIRST - 1, **PDF_OPTIONS)
        for i in range(0, total, STAMP_SPLIT)]
