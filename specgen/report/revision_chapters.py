"""Chapters about the dossier's life: revision history, changes, review comments."""
from __future__ import annotations

from specgen.checks.result import STATUS_WORDS
from specgen.report.chapters import badge, chapter, sheet_anchor, sheet_anchor_of
from specgen.report.fmt import qty


@chapter("changes.md", "Changes in this revision", 12, "changes.md.j2")
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
            "checks": rows, "comments": ch["comments"],
            "status_changes": sum(1 for c in ch["checks"] if c["old_status"] != c["new_status"])}


@chapter("history.md", "Revision history", 92, "history.md.j2")
def history(env) -> dict:
    rows = env.history.revisions if env.history else [
        {"code": env.project.revision.code, "date": env.project.revision.date.isoformat(),
         "status": env.project.revision.status, "description": env.project.revision.description,
         "facts": env.results.facts, "current": True}]
    return {"revisions": list(reversed(rows))}


@chapter("comments.md", "Review comments", 88, "comments.md.j2")
def comments(env) -> dict:
    checks = {f"{c.code}/{c.subject}": c for c in env.results.checks}
    # open comments whose subject changed in this revision: put to the specifier by the audit
    asked = {f.subject for f in env.results.findings if f.code == "AUD-COMMENT"}
    rows = []
    for c in env.project.comments:
        code, _, subject = c.about.partition("/")
        if subject and c.about in checks:
            href = f"calculations.md#{sheet_anchor(checks[c.about])}"
        elif not subject and any(k.startswith(code + "/") for k in checks):
            href = "index.md"
        else:
            page = "index" if c.about in ("summary", "index") else c.about
            href = f"{page}.md" if page in env.pageset_paths() else None
        rows.append({"id": c.id, "raised": c.raised_in, "about": c.about, "href": href,
                     "answered": c.id in asked,
                     "role": c.reviewer_role, "text": c.text, "status": c.status,
                     "response": c.response or "—", "closed": c.closed_in or "—"})
    return {"rows": rows, "open": sum(1 for r in rows if r["status"] == "open")}


__all__ = ["STATUS_WORDS"]
