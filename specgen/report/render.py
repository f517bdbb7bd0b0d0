"""Stage 4, render: Project + Results → PageSet (Markdown pages, figures, math SVG).

Templates are Jinja2 files producing Markdown, looked up first in the project's
``templates/`` folder (the project's files win) and then in ``content/templates``.
Autoescaping is on: every string from the project is HTML-escaped, so a name or
note can never inject markup or script into the site or the PDF.  Every template runs
in Jinja's sandbox (``specgen.templating.py``): a project's template is input and
can reach only the context handed to it.
"""
from __future__ import annotations

import re
from dataclasses import dataclass, field

import jinja2
from markupsafe import Markup, escape

from specgen.cache import Later
from specgen.refdata import CONTENT_DIR
from specgen.report.chapters import badge, chapters, sheet_anchor
from specgen.report.fmt import as_given, num, qty, unit_symbol
from specgen.report.mathsvg import MathAssets, drawn_beside
from specgen.report.pageset import PageSet
from specgen.report.references import Citations
from specgen.templating import project_template_errors, project_templates, sandboxed
from specgen.report.wording import reader, rule_label, symbol


def template_env(project_root) -> jinja2.Environment:
    """Sandboxed Jinja environment: project templates first, then ours."""
    loaders = []
    if (own := project_templates(project_root)) is not None:
        loaders.append(jinja2.FileSystemLoader(str(own)))
    loaders.append(jinja2.FileSystemLoader(str(CONTENT_DIR / "templates")))
    env = sandboxed(jinja2.ChoiceLoader(loaders), undefined=jinja2.StrictUndefined,
                    trim_blocks=True, lstrip_blocks=True, keep_trailing_newline=True)
    env.filters["num"] = num
    env.filters["cell"] = lambda v: Markup(str(escape(v)).replace("|", "&#124;").replace("\n", " "))
    env.filters["inert"] = inert
    return env


_MARKDOWN_SIGNS = re.compile(r"([\\`*_{}\[\]()#+\-.!|~])")


def inert(value) -> Markup:
    """Text from outside (a reviewer's comment) shown as text: neither HTML nor Markdown
    can take effect, line breaks become spaces."""
    text = " ".join(str(value).split())
    return Markup(escape(_MARKDOWN_SIGNS.sub(r"\\\1", text)))


@dataclass
class RenderEnv:
    """What a chapter function may use while preparing its context."""

    project: object
    results: object
    pageset: PageSet
    math: MathAssets
    history: object = None
    citations: Citations = field(default_factory=Citations)
    figures: list = field(default_factory=list)
    tables: int = 0
    number: str = ""  # the number of the chapter being prepared ("7"; "B" in the appendix)
    deferred: list = field(default_factory=list)

    def later(self, fn) -> Markup:
        """A placeholder for Markdown that ``fn(pages)`` writes once every page of the
        revision is rendered (e.g. whether a commented passage reads the same now)."""
        from specgen.report.review import later_token
        self.deferred.append(fn)
        return later_token(len(self.deferred))

    @property
    def rules_overridden(self) -> list:
        return self.results.rules_overridden()

    def pageset_paths(self) -> set[str]:
        """Stems of every chapter of the dossier (for links to pages)."""
        return {c.path.rsplit(".", 1)[0] for c in chapters()}

    def figure(self, path: str, svg: bytes, caption: str, alt: str) -> dict:
        """Add a figure asset; figures are numbered in order of appearance.

        ``svg`` is the figure's bytes, or a :class:`specgen.cache.Later` (the live preview's
        first pages): the page set then holds a placeholder saying the figure is being drawn.
        ``caption`` says what the figure is about (printed under it); ``alt`` describes
        what it shows for a reader who cannot see it (the image's alternative text in the
        site and the tagged PDF) and so must not merely repeat the caption."""
        if " ".join(alt.split()).casefold() == " ".join(caption.split()).casefold():
            raise ValueError(f"{path}: the alternative text repeats the caption")
        self.figures.append(path)
        n = len(self.figures)
        if isinstance(svg, Later):   # not drawn yet (cache.drawing_later): a placeholder
            from specgen.report.figures import placeholder
            if path not in self.pageset.drawing:
                self.pageset.add_placeholder(path, placeholder(n), svg.draw)
        else:
            self.pageset.add_asset(path, svg)
        return {"src": path, "caption": caption, "alt": alt, "n": n}

    def unnumbered(self, path: str, data) -> str:
        """An image placed without a figure number (its numbered place is elsewhere):
        ``data`` its bytes or a :class:`specgen.cache.Later`, shown as a placeholder until
        drawn; returns its path."""
        if not isinstance(data, Later):
            return self.pageset.add_asset(path, data)
        if path not in self.pageset.drawing:
            from specgen.report.figures import placeholder
            self.pageset.add_placeholder(path, placeholder(label="This image"), data.draw)
        return path

    def table(self, caption: str) -> Markup:
        """A numbered table caption, placed just above a table in a template:
        ``{{ table("Analyses, mass %") }}``.  Tables are numbered in order of appearance
        over the whole dossier, like figures, so site and PDF carry the same numbers."""
        self.tables += 1
        return Markup('<p class="sg-table-caption">Table {}. {}</p>\n').format(self.tables, caption)

    def cite(self, basis) -> dict | None:
        if basis.kind != "reference":
            return None
        n = self.citations.cite(basis.ref)
        if basis.read_in:          # the summary the value was read in is listed too
            self.citations.cite(basis.read_in)
        return {"n": n, "href": f"references.md#ref-{basis.ref}", "clause": reader(basis.clause)}

    def sheet(self, c) -> dict:
        """Context of one calculation sheet, straight from the check result."""
        # the sheet keeps four significant figures: enough to recompute by hand
        steps = [{"title": reader(s.title), "formula": self.math.img(s.formula),
                  "substituted": self.math.img(s.substituted),
                  "result": qty(s.result, s.unit, 4, s.symbol), "symbol": symbol(s.symbol),
                  "inputs": [{"symbol": symbol(i.symbol), "name": reader(i.name),
                              "value": as_given(i.value) if not isinstance(i.value, str)
                              else reader(i.value), "unit": unit_symbol(i.unit) or "—",
                              "source": reader(i.source)} for i in s.inputs]}
                 for s in c.steps]
        bases = [{"text": reader(b.text()), "cite": self.cite(b), "kind": b.kind}
                 for b in c.basis]
        limit = None
        if c.limit:
            limit = {"text": reader(c.limit.text), "rule": rule_label(c.limit.rule),
                     "overridden": c.limit.overridden}
        return {"anchor": sheet_anchor(c), "code": c.code, "title": c.title, "subject": c.subject,
                "badge": badge(c.status), "message": reader(c.message), "steps": steps,
                "bases": bases, "limit": limit, "value": qty(c.value, c.unit, 4, c.value_symbol),
                "notes": [reader(n) for n in c.notes]}


def render(project, results, history=None, superseded: str | None = None, *,
           later_downloads: bool = False, first: set[str] | None = None) -> PageSet:
    """Render every registered chapter into a page set (narrative placed by file name).

    With ``later_downloads`` the slow downloads (the DOCX exports) are left in
    ``PageSet.later`` for :meth:`PageSet.make_downloads` (the live preview's pages come first).

    With ``first`` (page paths: the live preview's first pages), the pages are laid out only
    up to the last of those in reading order: each of them reads exactly as in a whole
    render, since the pages before it, whose figures, tables and citations number its own,
    are laid out as always.  The pages after it are only named, with their titles, for the
    navigation and the links (a chapter declared as one page, :func:`one_page`, without
    preparing its context; a family of pages from its contexts), their text left empty and
    listed in ``PageSet.unrendered`` (a later whole render lays them out).  A first page
    holding a part written once every page is rendered (``RenderEnv.later``) makes the render
    whole.

    ``history`` (:class:`specgen.publish.history.History`) gives earlier revisions and
    the change report; without it the dossier is rendered as a first revision.
    ``superseded`` names the issued revision that superseded this one (its pages say so).
    """
    pageset = PageSet()
    env = RenderEnv(project, results, pageset, MathAssets(pageset), history)
    jenv = template_env(getattr(project, "root", None))
    jenv.globals["table"] = env.table
    base = {"project": project.dossier.project, "revision": project.revision,
            "narrative": {}}
    from specgen import practice
    from specgen.report.fmt import unit_display
    # every page shows units the way the practice the project follows does
    # the calculation sheets' math, drawn beside the chapters on the second core
    math = [t for c in results.checks for s in c.steps for t in (s.formula, s.substituted)]
    with unit_display(practice.resolve(project.dossier).unit_display), \
            project_template_errors(getattr(project, "root", None)), drawn_beside(math):
        _lay_out(env, jenv, base, first)
        if not pageset.unrendered:   # the parts written last read every page: a whole render
            _resolve_later(env, pageset)
    from specgen.report.review import CONTEXT_ASSET, review_context
    pageset.add_asset(CONTEXT_ASSET, review_context(project))
    from specgen.report.marks import apply_marks
    apply_marks(pageset, project, results, superseded)
    if not later_downloads:
        pageset.make_downloads()
    return pageset


def _lay_out(env: RenderEnv, jenv, base: dict, first: set[str] | None) -> None:
    """Every chapter's pages into ``env.pageset``, in reading order; with ``first``, laid out
    only up to the last of those pages, the rest named (see :func:`render`)."""
    pageset, numbers = env.pageset, chapter_numbers(chapters())
    waiting = set(first) if first is not None else None  # first pages not laid out yet
    done = False   # every first page laid out (and none awaits a part written last)
    for spec in chapters():
        env.number = numbers.get(spec.path, "")
        done = done or waiting is not None and not waiting and not env.deferred
        if done and one_page(spec):   # named by its declaration, its context not prepared
            pageset.add_page(spec.path, f"{env.number} {spec.title}".strip(), "",
                             volume=spec.volume)
            pageset.unrendered.add(spec.path)
            continue
        made = _pages_of(spec, spec.fn(env))
        for i, (path, title, ctx) in enumerate(made, start=1):
            if env.number:  # a family of pages is numbered within its chapter: 6.1, 6.2 …
                title = f"{env.number}.{i} {title}" if len(made) > 1 or path != spec.path \
                    else f"{env.number} {title}"
            done = done or waiting is not None and not waiting and not env.deferred
            if done:
                pageset.add_page(path, title, "", volume=spec.volume)
                pageset.unrendered.add(path)
                continue
            ctx = dict(base, **ctx, title=title)
            stem = path.rsplit(".", 1)[0]
            ctx["narrative"] = _narrative_for(
                env.project, "introduction" if stem == "index" else stem)
            pageset.add_page(path, title, jenv.get_template(spec.template).render(**ctx),
                             volume=spec.volume, sections=spec.sections)
            if waiting is not None:
                waiting.discard(path)


def chapter_numbers(specs) -> dict[str, str]:
    """The dossier's own section numbers: the report's chapters 1, 2, 3 … after the
    summary (which stands before them unnumbered), the appendices A, B, C …"""
    out, main, appendix = {}, 0, 0
    for spec in specs:
        if spec.path == "index.md":
            continue
        if spec.volume == "appendix":
            out[spec.path] = chr(ord("A") + appendix)
            appendix += 1
        else:
            main += 1
            out[spec.path] = str(main)
    return out


def _resolve_later(env: RenderEnv, pageset: PageSet) -> None:
    """Write the deferred parts into the pages that hold their placeholders."""
    from specgen.report.review import later_token, page_sections
    # before the deferred parts are written, so each revision's digests are made alike
    pageset.sections = page_sections(pageset.pages)
    if not env.deferred:
        return
    done = {str(later_token(n)): fn(pageset.pages) for n, fn in enumerate(env.deferred, 1)}
    for path, text in pageset.pages.items():
        if "<!--sg-later-" in text:
            for token, part in done.items():
                text = text.replace(token, part)
            pageset.pages[path] = text


def one_page(spec) -> bool:
    """Whether a chapter declares one page, its own path and title (its function annotated
    ``-> dict``; a family's ``-> list[dict]``): such a page is named without its context."""
    return spec.fn.__annotations__.get("return") in ("dict", dict)


def _pages_of(spec, made) -> list[tuple[str, str, dict]]:
    """(path, title, context) of each page of a chapter.

    A chapter returns one context, or a list of contexts each naming its own ``path``
    and ``title`` (a family of pages, e.g. one batching card per mix; an empty list
    makes no page).  A chapter declared as one page (:func:`one_page`) returns one context.
    """
    if isinstance(made, list) and one_page(spec):
        raise TypeError(f"chapter {spec.path}: declared as one page (-> dict), it returned a "
                        "list of pages; annotate it -> list[dict]")
    if isinstance(made, list):
        return [(m["path"], m["title"], {k: v for k, v in m.items() if k not in ("path", "title")})
                for m in made]
    return [(spec.path, spec.title, made)]


def _narrative_for(project, name: str) -> Markup:
    """The specifier's narrative for a page (``narrative/<page>.md``), as trusted Markdown.

    Raw HTML in the narrative is escaped: the specifier writes Markdown, not markup.
    """
    text = project.narrative.get(name)
    return Markup(escape(text)) if text else Markup("")
