"""Chapters about the dossier's life: revision history, changes, review comments."""
from __future__ import annotations

import functools

from specgen.checks.result import STATUS_WORDS
from specgen.report.chapters import badge, chapter, sheet_anchor, sheet_anchor_of
from specgen.report.fmt import qty
from specgen.report.review import (TOP, compare_sections, open_by_category, page_of,
                                   place_markdown, place_of, section_name, where_words)
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
    @functools.cache
    def page_diff() -> dict | None:
        """Page → its changed sections since the previous revision (once, when every page is
        rendered); None when that revision's pages cannot be compared."""
        before = env.history.sections_before if env.history is not None else None
        return None if before is None else {
            d["page"]: d for d in compare_sections(before, env.pageset.sections)}

    return {"previous": ch["from"], "decision": ch.get("decision_lines", []),
            "inputs": ch["inputs"], "specimens": ch["specimens"],
            "checks": rows, "comments": ch["comments"], "answered": _answered(env, page_diff),
            "pages": env.later(lambda pages: _pages_changed(env, page_diff())),
            "status_changes": sum(1 for c in ch["checks"] if c["old_status"] != c["new_status"])}


def _answered(env, page_diff) -> list[dict]:
    """Comments closed in this revision: where each was made, what became of its passage and
    what the response changed (each named page or check checked against the revision before)."""
    code = env.project.revision.code
    return [{"id": c.id, "href": f"comments.md#comment-{c.id.lower()}",
             "category": c.category or "comment",
             "line": env.later(lambda pages, c=c: _answer_words(env, c, pages, page_diff()))}
            for c in env.project.comments if c.status == "closed" and c.closed_in == code]


def _answer_words(env, c, pages, diff: dict | None) -> str:
    from specgen.report.render import inert
    place = place_of(c, pages)
    where = inert(where_words(c, pages, env.pageset.titles, place))
    own = {"changed": "the quoted passage has changed", "gone": "the quoted passage is no "
           "longer in the dossier", "unchanged": "the quoted passage reads the same"}.get(
               place.state)
    changed = [_changed_words(env, name, diff, place.label if c.anchor else "")
               for name in c.changed] or ["the response names no page or check it changed"]
    return f"about {where}{'; ' + own if own else ''}. Changed in answer: {'; '.join(changed)}."


def _changed_words(env, name: str, diff: dict | None, first: str = "") -> str:
    """One place a response says it changed, and whether it did since the revision before
    (``diff``: the page diff, None when not compared; the section called ``first``, where
    the comment was made, named first)."""
    from specgen.report.render import inert
    before = env.results.previous
    code, _, subject = name.partition("/")
    title = env.pageset.titles.get(f"{name}.md")
    if title is None:              # a check, or a family of checks
        moved = [c for c in (env.results.changes or {}).get("checks", [])
                 if c["key"] == name or (not subject and c["code"] == code)]
        if not moved:
            return f"check {inert(name)}: no status or value changed since {before} " \
                   "(**the response says it changed**)"
        return "; ".join(f"check {inert(c['key'])}: {_moved(c)}" for c in moved)
    link = f"[{inert(title)}]({name}.md)"
    if diff is None:
        return f"{link} (not compared: the pages of {before} are not in this output folder)"
    if name not in diff:
        return f"{link} reads the same as in {before} (**the response says it changed**)"
    return f"{link}: {_section_words(diff[name], first)}"


def _moved(c: dict) -> str:
    words = []
    if c["old_status"] != c["new_status"]:
        words.append(f"{STATUS_WORDS.get(c['old_status'], 'not present')} → "
                     f"{STATUS_WORDS.get(c['new_status'], 'not present')}")
    if c["old_value"] != c["new_value"]:
        old, new = (qty(v, c["unit"]) if v is not None else None
                    for v in (c["old_value"], c["new_value"]))
        words.append(f"{old} → {new}" if old and new else f"now {new}" if new
                     else f"no value now (was {old})")
    return ", ".join(words)


def _section_words(d: dict, first: str = "", most: int = 5) -> str:
    """"3 sections changed (Materials; Curing; …), 1 added (…)" for one page; a section
    called ``first`` (numbers aside) is named first."""
    if d["new_page"]:
        return "a new page"
    if d["gone"]:
        return "no longer in the dossier"
    from specgen.report.render import inert
    words = []
    for kind in ("changed", "added", "removed"):
        names = [_short(n, d) for n in d[kind]]
        names.sort(key=lambda n: n != section_name(first))    # stable: page order otherwise
        if names:
            shown = "; ".join(inert(n) for n in names[:most])
            more = f"; and {len(names) - most} more" if len(names) > most else ""
            words.append(f"{len(names)} section{'s' if len(names) != 1 else ''} {kind} "
                         f"({shown}{more})")
    return ", ".join(words) or "changed"


def _short(key: str, d: dict) -> str:
    """A section by its own heading, with its parent's where another listed section of the
    page has the same heading ("M1 — … › Findings" beside "M2 — … › Findings")."""
    if key == TOP:
        return "its opening"
    last = key.split(" › ")[-1]
    listed = [k for kind in ("changed", "added", "removed") for k in d[kind]]
    if sum(1 for k in listed if k.split(" › ")[-1] == last) > 1:
        return " › ".join(key.split(" › ")[-2:])
    return last


def _pages_changed(env, diff: dict | None) -> str:
    """The pages whose text changed since the revision the change report compares with."""
    from specgen.report.render import inert
    before = env.results.previous
    if diff is None:
        return (f"The pages of {before} are not in this output folder, or were published "
                "before specgen compared pages: this revision's pages are not compared with "
                "them (its inputs and checks are).")
    if not diff:
        return f"Every page reads as in {before}."
    return (f"Pages whose text changed since {before}, with the sections that changed (table "
            "and figure numbers left out: they move when another page changes):\n\n") + "\n".join(
        f"- [{inert(env.pageset.titles.get(d['page'] + '.md', d['page']))}]({d['page']}.md): "
        f"{_section_words(d)}" for d in diff.values())


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
                     "href": _comment_href(env, c, checks),
                     "where": env.later(lambda pages, c=c: _where(env, c, pages)),
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
    page = page_of(c.about)
    if f"{page}.md" not in env.pageset.pages and page not in env.pageset_paths():
        return None
    return f"{page}.md" + (f"#{c.anchor}" if c.anchor else "")


def _where(env, c, pages) -> str:
    from specgen.report.render import inert
    return inert(where_words(c, pages, env.pageset.titles))


__all__ = ["STATUS_WORDS"]
