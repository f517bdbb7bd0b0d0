"""Chapters about the dossier's life: revision history, changes, review comments."""
from __future__ import annotations

from specgen.checks.result import STATUS_WORDS
from specgen.report.chapters import badge, chapter, sheet_anchor, sheet_anchor_of
from specgen.report.fmt import qty
from specgen.report.review import open_by_category, place_markdown, place_of
from specgen.report.wording import plain


@chapter("changes.md", "Changes in this revision", "changes.md.j2", volume="appendix")
def changes(env) -> dict:
    ch = env.results.changes
    if not ch:
        return {"previous": None}
    rows = []
    for c in ch["checks"]:
        rows.append({"key": c["key"], "title": c["title"],
                     "old": badge(c["old_status"]) if c["old_status"] else "—",
                     "new": badge(c["new_status"]) if c["new_status"] else "—",
                     "old_value": qty(c["old_value"], c["unit"]) if c["old_value"] is not None else "—",
                     "new_value": qty(c["new_value"], c["unit"]) if c["new_value"] is not None else "—",
                     "delta": qty(c["delta"], c["unit"]) if c["delta"] is not None else "—",
                     "href": f"calculations.md#{sheet_anchor_of(c['code'], c['subject'])}"
                     if c["new_status"] else None})
    return {"previous": ch["from"], "decision": ch.get("decision_lines", []),
            "inputs": ch["inputs"], "specimens": ch["specimens"],
            "checks": rows, "comments": ch["comments"], "answered": _answered(env),
            "status_changes": sum(1 for c in ch["checks"] if c["old_status"] != c["new_status"])}


def _answered(env) -> list[dict]:
    """Comments closed in this revision, with whether their passage changed."""
    code = env.project.revision.code
    return [{"id": c.id, "href": f"comments.md#comment-{c.id.lower()}", "where": _where(c),
             "category": c.category or "comment",
             "change": env.later(lambda pages, c=c: _change_words(c, pages))}
            for c in env.project.comments if c.status == "closed" and c.closed_in == code]


def _change_words(c, pages) -> str:
    state = place_of(c, pages).state
    return {"changed": f"the passage on page {c.about} changed",
            "gone": f"the passage was removed from page {c.about}",
            "unchanged": f"page {c.about}: the quoted passage is unchanged"}.get(
                state, f"about {c.about}")


@chapter("history.md", "Revision history", "history.md.j2", volume="appendix")
def history(env) -> dict:
    rows = env.history.revisions if env.history else [
        {"code": env.project.revision.code, "date": env.project.revision.date.isoformat(),
         "status": env.project.revision.status, "description": env.project.revision.description,
         "facts": env.results.facts, "current": True}]
    rows = [{**r, "facts": [plain(f) for f in r.get("facts") or []]} for r in rows]
    return {"revisions": list(reversed(rows))}


@chapter("comments.md", "Review comments", "comments.md.j2")
def comments(env) -> dict:
    checks = {f"{c.code}/{c.subject}": c for c in env.results.checks}
    # open comments whose subject changed in this revision: put to the specifier by the audit
    asked = {f.subject for f in env.results.findings if f.code == "AUD-COMMENT"}
    rows = []
    for c in env.project.comments:
        rows.append({"id": c.id, "slug": c.id.lower(), "raised": c.raised_in, "about": c.about,
                     "href": _comment_href(env, c, checks), "where": _where(c),
                     "category": c.category or "", "role": c.reviewer_role,
                     "who": ", ".join(x for x in (c.author, c.organisation) if x) or c.reviewer_role,
                     "date": c.date.isoformat() if c.date else "", "quote": c.quote,
                     "place": env.later(lambda pages, c=c: place_markdown(c, pages)),
                     "text": c.text, "status": c.status, "response": c.response or "—",
                     "closed": c.closed_in or "", "answered": c.id in asked})
    return {"rows": rows, "open": sum(1 for r in rows if r["status"] == "open"),
            "by_category": open_by_category(env.project.comments)}


def _comment_href(env, c, checks) -> str | None:
    """Where a comment points: its anchor, its check's sheet, or its page."""
    code, _, subject = c.about.partition("/")
    if subject and c.about in checks:
        return f"calculations.md#{sheet_anchor(checks[c.about])}"
    if not subject and any(k.startswith(code + "/") for k in checks):
        return "index.md"
    page = "index" if c.about in ("summary", "index") else c.about
    if f"{page}.md" not in env.pageset.pages and page not in env.pageset_paths():
        return None
    return f"{page}.md" + (f"#{c.anchor}" if c.anchor else "")


def _where(c) -> str:
    return c.about + (f" › {c.anchor}" if c.anchor else "")


__all__ = ["STATUS_WORDS"]
