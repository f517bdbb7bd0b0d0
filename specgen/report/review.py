"""Review comments in the dossier: where each was made, and whether that passage still reads
the same in this revision.

A comment made in the site carries its page, the id of the element it is about and the
text the reviewer selected.  Once every page of this revision is rendered, the anchored
section is read again (Markdown → HTML with the site's own extensions) and compared with
the quote, so the comments page and the change report can say "unchanged", "changed"
(with the old and the new text) or "no longer in the dossier".
"""
from __future__ import annotations

import functools
import hashlib
import json
import re
from dataclasses import dataclass

import markdown
from markupsafe import Markup, escape

from specgen.pagetext import anchored, page_facts, squeeze

CONTEXT_ASSET = "assets/review-context.js"
# the Markdown extensions of mkdocs.yml that give headings and elements their ids
EXTENSIONS = ["toc", "tables", "attr_list", "md_in_html", "admonition", "def_list",
              "specgen.report.mdanchors"]
NOW_SHOWN = 600          # characters of a changed section shown beside the old quote
CATEGORY_ORDER = ("required change", "question", "advisory")


@dataclass(frozen=True)
class Place:
    """What became of a comment's passage in this revision."""

    state: str           # "unchanged", "changed", "gone", "page" (whole page), "none"
    now: str = ""        # the section's text now, when it changed
    label: str = ""      # what names the anchored element now (heading, figure, table row)


def review_context(project) -> bytes:
    """The small script that tells the comment panel which dossier and revision it is on."""
    data = json.dumps({"project": project.dossier.project.code, "revision": project.revision.code},
                      ensure_ascii=True, sort_keys=True).replace("</", "<\\/")
    return f"window.specgenReview = {data};\n".encode("ascii")


def page_of(about: str) -> str:
    """The page stem a comment's ``about`` names ("summary" is the index page)."""
    return "index" if about in ("summary", "index") else about


@functools.lru_cache(maxsize=4)
def _page_html(text: str) -> str:
    """A page's Markdown as the site makes it: kept for the few pages comments are on, as
    each comment's place, words and change are read from it."""
    return markdown.markdown(text, extensions=EXTENSIONS)


def place_of(comment, pages: dict[str, str]) -> Place:
    """Compare a comment's quote with its anchored section in this revision's pages."""
    if not comment.anchor and not comment.quote:
        return Place("page" if comment.about else "none")
    text = pages.get(f"{page_of(comment.about)}.md")
    if text is None:
        return Place("gone")
    html = _page_html(text)
    now, label = anchored(html, comment.anchor) if comment.anchor else (page_facts(html)[1], "")
    if now is None:
        return Place("gone")
    if not comment.quote or squeeze(comment.quote) in squeeze(now):
        return Place("unchanged", label=label)
    short = " ".join(now.split())
    return Place("changed", short if len(short) <= NOW_SHOWN else short[:NOW_SHOWN - 1] + "…",
                 label)


def where_words(comment, pages: dict[str, str], titles: dict[str, str],
                place: Place | None = None) -> str:
    """Where a comment was made, in words: "8 Specification › 8.1.1 Materials", "4 Strength
    development › Table row: compressive · 28 d", or its check code; never an element id.
    ``place``: :func:`place_of` the comment, when the caller has it."""
    title = titles.get(f"{page_of(comment.about)}.md")
    if title is None:              # not a page: a check code (comments.yaml is checked so)
        return f"check {comment.about}"
    if not comment.anchor:
        return title
    label = (place or place_of(comment, pages)).label
    return f"{title} › {label or 'a passage no longer in this revision'}"


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


# ------------------------------------------------ what changed on the pages since a revision
_HEADING = re.compile(r"^(#{1,6})[ \t]+(.*?)[ \t]*(?:\{[^}\n]*\})?[ \t]*$", re.M)
_NUMBER = re.compile(r"^(?:[A-Z]|\d+)(?:\.\d+)*\.?\s+")   # "8.1.1 ", "B ": a section's number
_LATER = re.compile(r"<!--sg-later-\d+-->")
_COUNTED = re.compile(r"\b(Table|Figure) \d+\.")             # numbers that move with other pages
TOP = "(opening)"


def page_sections(pages: dict[str, str]) -> dict[str, dict[str, str]]:
    """For each page, a digest of the text of each of its sections, keyed by the section's
    headings without their numbers ("Zone Z1 … › Materials"; :data:`TOP` before the first
    sub-heading).  Two revisions' digests tell which sections' text changed: written into
    each revision's manifest, read by the next revision's change report.  Table and figure
    numbers and the parts written once every page is rendered are left out (they move when
    another page changes)."""
    out = {}
    for path, text in pages.items():
        if not path.endswith(".md"):
            continue
        parts: dict[str, list[str]] = {}
        trail: list[tuple[int, str]] = []
        key, pos = TOP, 0
        for m in _HEADING.finditer(text):
            parts.setdefault(key, []).append(text[pos:m.start()])
            level = len(m.group(1))
            trail = [t for t in trail if t[0] < level] + [(level, section_name(m.group(2)))]
            key = " › ".join(t for _, t in trail[1:]) or TOP
            pos = m.end()
        parts.setdefault(key, []).append(text[pos:])
        out[path[:-3]] = {k: _digest(" ".join(v)) for k, v in parts.items()}
    return out


def section_name(heading: str) -> str:
    """A heading's words without its number, as :func:`page_sections` keys it."""
    return _NUMBER.sub("", " ".join(heading.split()))


def _digest(text: str) -> str:
    text = _COUNTED.sub(r"\1 #.", _LATER.sub("", text))
    return hashlib.sha256(" ".join(text.split()).encode("utf-8")).hexdigest()[:16]


def compare_sections(old: dict, new: dict) -> list[dict]:
    """Pages whose text changed between two revisions' :func:`page_sections`, in the new
    revision's page order: page, and the sections changed, added and removed."""
    found = []
    for page in list(new) + [p for p in old if p not in new]:
        a, b = old.get(page), new.get(page)
        if a == b:
            continue
        a, b = a or {}, b or {}
        found.append({"page": page, "new_page": page not in old, "gone": page not in new,
                      "changed": [k for k in b if k in a and a[k] != b[k]],
                      "added": [k for k in b if k not in a],
                      "removed": [k for k in a if k not in b]})
    return found
