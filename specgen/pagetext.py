"""Plain text of published pages: element ids, visible text, the text of one section.

Shared by the comment import (which checks a reviewer's anchor and quote against the
revision they were made on) and the comments page (which tells whether the quoted passage
reads the same in the current revision).  Standard library only.
"""
from __future__ import annotations

import html.parser
import re

HEADINGS = ("h1", "h2", "h3", "h4", "h5", "h6")


class _Reader(html.parser.HTMLParser):
    """Every element id, the visible text, and (optionally) the text of one anchored section:
    a heading's section runs to the next heading of the same or a higher level, any other
    element's to its end tag.  Scripts and styles are left out."""

    def __init__(self, anchor: str | None = None):
        super().__init__(convert_charrefs=True)
        self.anchor = anchor
        self.ids: set[str] = set()
        self.parts: list[str] = []
        self.section: list[str] = []
        self._skip = 0
        self._in = None          # ("heading", level) or ("element", depth) while in the section
        self._done = False
        self.tag = ""            # the anchored element's tag
        self.label: list[str] = []   # what names it: a heading's words, a figure's caption,
        self._label = None           # a row's first cells (the tag whose text is being read)
        self._cells = 0

    def handle_starttag(self, tag, attrs):
        found = dict(attrs).get("id")
        if found:
            self.ids.add(found)
        if tag in ("script", "style"):
            self._skip += 1
        if self._in and self._in[0] == "heading" and tag in HEADINGS and int(tag[1]) <= self._in[1]:
            self._in, self._done = None, True
        elif self._in and self._in[0] == "element":
            self._in = ("element", self._in[1] + 1)
        if not self._done and self._in is None and self.anchor and found == self.anchor:
            self._in = ("heading", int(tag[1])) if tag in HEADINGS else ("element", 1)
            self.tag = tag
            if tag in HEADINGS:
                self._label = tag
        elif self._in and self._label is None and (
                (self.tag == "tr" and tag in ("td", "th") and self._cells < 2)
                or (self.tag == "figure" and tag == "figcaption" and not self.label)):
            self._label = tag
            self._cells += 1
            if self._cells == 2:
                self.label.append(" · ")

    def handle_endtag(self, tag):
        if tag == self._label:
            self._label = None
        if tag in ("script", "style") and self._skip:
            self._skip -= 1
        if self._in and self._in[0] == "element":
            depth = self._in[1] - 1
            self._in = ("element", depth) if depth else None
            self._done = self._done or not depth

    def handle_data(self, data):
        if self._skip:
            return
        self.parts.append(data)
        if self._in:
            self.section.append(data)
        if self._label:
            self.label.append(data)


def read(page_html: str, anchor: str | None = None) -> _Reader:
    reader = _Reader(anchor)
    reader.feed(page_html)
    reader.close()
    return reader


def page_facts(page_html: str) -> tuple[set[str], str]:
    """(element ids, visible text) of a page."""
    r = read(page_html)
    return r.ids, " ".join(r.parts)


def anchored(page_html: str, anchor: str) -> tuple[str | None, str | None]:
    """(visible text of the section anchored at ``anchor``, what names that element: a
    heading's words, "Figure: <caption>", "Table row: <first two cells>") from one reading
    of the page; ``(None, None)`` if no element has that id."""
    r = read(page_html, anchor)
    if anchor not in r.ids:
        return None, None
    words = " ".join("".join(r.label).split()).strip(" ·")
    if r.tag == "figure":
        label = f"Figure: {words}" if words else "a figure"
    elif r.tag == "tr":
        label = f"Table row: {words}" if words else "a table row"
    else:
        label = words or "a passage"
    return " ".join(" ".join(r.section).split()), label


def section_text(page_html: str, anchor: str) -> str | None:
    """Visible text of the section anchored at ``anchor``; ``None`` if no element has that id."""
    return anchored(page_html, anchor)[0]


def anchor_label(page_html: str, anchor: str) -> str | None:
    """What names the element with id ``anchor`` (:func:`anchored`)."""
    return anchored(page_html, anchor)[1]


def squeeze(text: str) -> str:
    """Text compared without case or white space (a browser's selection across a table or a
    wrapped line differs from the page source only in those)."""
    return re.sub(r"[\s\u200b\u00ad]+", "", text).casefold()
