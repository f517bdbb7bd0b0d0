"""Document-control marks: what tells a reader which revision they hold and whether to rely
on it — the mark on every page (a draft, a superseded revision), the findings banner of the
summary, the sign-off block and the distribution list.

The marks are laid on the pages after every chapter is rendered, so each page carries them
in the site; the PDF carries the same mark in its running head (the page set's ``marks``).
"""
from __future__ import annotations

from markupsafe import Markup, escape

from specgen.report.wording import plain

DRAFT = "DRAFT — not for construction"
SIGNATURES = (("prepared", "Prepared"), ("checked", "Checked"), ("approved", "Approved"))


def mark_text(status: str, superseded: str | None) -> str:
    """The mark on every page: a draft, or an issued revision a later one superseded."""
    if status != "issued":
        return DRAFT
    return f"Superseded by {superseded} — do not use for the works" if superseded else ""


def sign_off_rows(project) -> list[dict]:
    """Prepared, checked, approved: name, role, organisation, date — empty boxes on a draft."""
    rev = project.revision
    rows = []
    for key, label in SIGNATURES:
        s = getattr(rev.sign_off, key) if rev.status == "issued" else None
        rows.append({"label": label, "name": s.name if s else "", "role": s.role if s else "",
                     "organisation": s.organisation if s else "",
                     "date": s.date.isoformat() if s and s.date else ""})
    return rows


def control_context(project, results) -> dict:
    """What the summary shows of document control: banner, facts, sign-off, distribution."""
    blocking = results.blocking()
    return {"draft": project.revision.status != "issued", "findings": len(results.findings),
            "blocking": len(blocking), "facts": [plain(f) for f in results.facts],
            "sign_off": sign_off_rows(project),
            "distribution": [r.model_dump() for r in project.dossier.distribution]}


def _banner(text: str, kind: str) -> str:
    return str(Markup('<div class="sg-mark sg-mark-{}" role="note"><strong>{}</strong></div>\n\n')
               .format(kind, text))


def apply_marks(pageset, project, results, superseded: str | None) -> None:
    """Lay the revision's mark on every page and record the print marks in the page set."""
    text = mark_text(project.revision.status, superseded)
    kind = "draft" if project.revision.status != "issued" else "superseded"
    for path, page in list(pageset.pages.items()):
        head = _banner(text, kind) if text else ""
        if path == "index.md" and results.findings:
            head += findings_banner(project, results)
        if head:
            pageset.pages[path] = _after_title(page, head)
    pageset.marks = {"mark": text, "sign_off": sign_off_rows(project),
                     "distribution": [r.model_dump() for r in project.dossier.distribution]}


def findings_banner(project, results) -> str:
    n, blocking = len(results.findings), len(results.blocking())
    word = "Before issue" if project.revision.status != "issued" else "Open findings"
    return str(Markup('<div class="sg-mark sg-mark-findings" role="note">The consistency audit '
                      'lists {} finding{} ({} to resolve before this revision may be issued for '
                      'construction): see <a href="before-issue.md">{}</a>.</div>\n\n')
               .format(n, "s" if n != 1 else "", blocking, word))


def _after_title(page: str, head: str) -> str:
    """Place ``head`` after the page's first heading line (a page opens with its title)."""
    first, sep, rest = page.partition("\n")
    if first.startswith("# "):
        return f"{first}\n\n{head}{rest.lstrip(chr(10))}"
    return head + page


__all__ = ["DRAFT", "apply_marks", "control_context", "mark_text", "sign_off_rows", "escape"]
