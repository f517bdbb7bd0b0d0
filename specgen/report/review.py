"""Review comments in the dossier: where each was made, and whether that passage still reads
the same in this revision.

A comment made in the site carries its page, the id of the element it is about and the
text the reviewer selected.  Once every page of this revision is rendered, the anchored
section is read again (Markdown → HTML with the site's own extensions) and compared with
the quote, so the comments page and the change report can say "unchanged", "changed"
(with the old and the new text) or "no longer in the dossier".
"""
from __future__ import annotations

import json
from dataclasses import dataclass

import markdown
from markupsafe import Markup, escape

from specgen.pagetext import section_text, squeeze

CONTEXT_ASSET = "assets/review-context.js"
# the Markdown extensions of mkdocs.yml that give headings and elements their ids
EXTENSIONS = ["toc", "tables", "attr_list", "md_in_html", "admonition", "def_list"]
NOW_SHOWN = 600          # characters of a changed section shown beside the old quote
CATEGORY_ORDER = ("required change", "question", "advisory")


@dataclass(frozen=True)
class Place:
    """What became of a comment's passage in this revision."""

    state: str           # "unchanged", "changed", "gone", "page" (whole page), "none"
    now: str = ""        # the section's text now, when it changed


def review_context(project) -> bytes:
    """The small script that tells the comment panel which dossier and revision it is on."""
    data = json.dumps({"project": project.dossier.project.code, "revision": project.revision.code},
                      ensure_ascii=True, sort_keys=True).replace("</", "<\\/")
    return f"window.specgenReview = {data};\n".encode("ascii")


def place_of(comment, pages: dict[str, str]) -> Place:
    """Compare a comment's quote with its anchored section in this revision's pages."""
    if not comment.anchor and not comment.quote:
        return Place("page" if comment.about else "none")
    text = pages.get(f"{comment.about}.md")
    if text is None:
        return Place("gone")
    html = markdown.markdown(text, extensions=EXTENSIONS)
    if comment.anchor:
        now = section_text(html, comment.anchor)
    else:
        from specgen.pagetext import page_facts
        now = page_facts(html)[1]
    if now is None:
        return Place("gone")
    if not comment.quote or squeeze(comment.quote) in squeeze(now):
        return Place("unchanged")
    short = " ".join(now.split())
    return Place("changed", short if len(short) <= NOW_SHOWN else short[:NOW_SHOWN - 1] + "…")


def place_markdown(comment, pages: dict[str, str]) -> str:
    """The comment's passage as the comments page shows it (escaped; never markup)."""
    p = place_of(comment, pages)
    if p.state == "changed":
        return (f"**The passage has changed since {escape(comment.raised_in)}.** "
                f"It now reads: “{escape(p.now)}”")
    if p.state == "gone":
        return "**The passage is no longer in the dossier.**"
    if p.state == "unchanged" and comment.quote:
        return "The quoted passage reads the same in this revision."
    return ""


def open_by_category(comments) -> str:
    """'2 required changes, 1 question' — open comments counted by category."""
    counts: dict[str, int] = {}
    for c in comments:
        if c.status == "open":
            key = c.category or "not categorised"
            counts[key] = counts.get(key, 0) + 1
    order = list(CATEGORY_ORDER) + ["not categorised"]
    words = {"required change": ("required change", "required changes"),
             "question": ("question", "questions"), "advisory": ("advisory", "advisory"),
             "not categorised": ("not categorised", "not categorised")}
    return ", ".join(f"{counts[k]} {words[k][0] if counts[k] == 1 else words[k][1]}"
                     for k in order if k in counts)


def later_token(n: int) -> Markup:
    """A placeholder for text written once every page is rendered."""
    return Markup(f"<!--sg-later-{n}-->")
