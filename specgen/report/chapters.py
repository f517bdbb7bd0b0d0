"""Page builders: each chapter registers a template and a function preparing its context.

Templates never compute: everything they show is prepared here (numbers formatted,
rows built).  Chapters run in reading order (:data:`READING_ORDER`, the one list of the
dossier's chapters); a chapter with no data still renders and says so.  Extensions register chapters with the same decorator.
"""
from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

from specgen.checks.result import STATUS_WORDS
from specgen.report.fmt import anchor, num, qty


@dataclass(frozen=True)
class ChapterSpec:
    path: str
    title: str
    order: int  # position in READING_ORDER
    template: str
    fn: Callable
    in_print: bool = True
    volume: str = "main"  # "main" (the report) or "appendix" (register, sheets, listings)
    sections: bool = False  # in print, each top-level section (a mix, a zone) starts a page


_CHAPTERS: dict[str, ChapterSpec] = {}

#: The dossier in reading order, the one list of its chapters: the site's navigation, the
#: PDF and the page names a review comment may be about all follow it.  A chapter an
#: extension registers without a place here comes after these, by path.
READING_ORDER = (
    "index.md",            # summary
    "scope.md",
    "fabric.md",
    "composition.md",
    "strength.md",
    "compatibility.md",
    "works.md",
    "card.md",             # the batching cards, one page per mix
    "specification.md",
    "method.md",           # method statement, responsibilities, aftercare
    "cautions.md",
    "comments.md",
    # the appendices, after every chapter of the report (the PDF's appendix volume)
    "checks.md",           # appendix: check register
    "calculations.md",     # appendix: calculation sheets
    "inputs.md",           # appendix: input files
    "options.md",          # appendix: every candidate against every check, per zone
    "strength-detail.md",  # appendix: the strength record behind the strength chapter
    "evidence.md",         # appendix: samples, drawings, photographs, laboratory reports
    "before-issue.md",     # appendix: what stops the revision from being issued
    "changes.md",          # appendix: changes in this revision
    "confirm.md",          # appendix: values to confirm
    "history.md",          # appendix: revision history
    "glossary.md",         # appendix: the abbreviations and symbols printed
    # rendered last so that every citation, the appendices' included, is numbered; it is
    # the report's last chapter (each volume keeps the chapters of its own in this order)
    "references.md",
)


VOLUMES = ("main", "appendix")


def chapter(path: str, title: str, template: str, in_print: bool = True,
            volume: str = "main", sections: bool = False):
    """Decorator registering a chapter; two chapters may not claim one path.  Its place is
    its position in :data:`READING_ORDER`.

    ``volume`` places it in the report (``main``) or in the appendices (``appendix``):
    the site's navigation and the PDF's two volumes follow it.  ``sections``: in print, each
    top-level section (one per mix or zone) starts a page, so a re-issue that changes one
    mix or zone lays out only that section's pages again (``publish.pdf.pieces``)."""
    if volume not in VOLUMES:
        raise ValueError(f"chapter '{path}': volume must be one of {VOLUMES}")

    def deco(fn):
        if path in _CHAPTERS:
            raise ValueError(f"chapter path '{path}' is already registered")
        order = READING_ORDER.index(path) if path in READING_ORDER else len(READING_ORDER)
        _CHAPTERS[path] = ChapterSpec(path, title, order, template, fn, in_print, volume,
                                          sections)
        return fn
    return deco


def chapters() -> list[ChapterSpec]:
    """Registered chapters in order; importing every ``*_chapters`` module registers ours."""
    import importlib
    import pkgutil

    import specgen.report as pkg
    for info in sorted(pkgutil.iter_modules(pkg.__path__), key=lambda m: m.name):
        if info.name.endswith("_chapters"):
            importlib.import_module(f"specgen.report.{info.name}")
    return sorted(_CHAPTERS.values(), key=lambda c: (c.order, c.path))


def badge(status: str) -> str:
    """HTML for a status badge (our own status words)."""
    return f'<span class="sg-badge sg-{status}">{STATUS_WORDS[status]}</span>'


def sheet_anchor(result) -> str:
    """The id of a check result's calculation sheet."""
    return sheet_anchor_of(result.code, result.subject)


def sheet_anchor_of(code: str, subject: str) -> str:
    return "calc-" + anchor(code, subject)


def check_rows(results, page_of_sheets: str = "calculations.md") -> list[dict]:
    """One row per check result, linking to its calculation sheet."""
    from specgen.report.wording import reader
    return [{"code": c.code, "title": c.title, "subject": c.subject, "badge": badge(c.status),
             "status": c.status, "value": reader(c.value) if isinstance(c.value, str)
             else qty(c.value, c.unit, kind=c.value_symbol),
             "message": reader(c.message),
             "href": f"{page_of_sheets}#{sheet_anchor(c)}"} for c in results.checks]


def fmt_value(value, unit: str) -> str:
    return qty(value, unit) if not isinstance(value, str) else value


__all__ = ["chapter", "chapters", "badge", "check_rows", "sheet_anchor", "num", "qty", "fmt_value"]
