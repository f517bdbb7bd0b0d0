"""Markdown extension giving figures and table rows an id, so a reviewer's comment can be
anchored to one of them (the comment panel anchors a selection to the closest element with
an id) and the comments page can say which figure or row it is about.

Headings get their ids from ``toc``; this gives every ``<figure>`` without one an id made
from its image's file name (``figures/strength-M1.svg`` → ``fig-strength-m1``), and every
body row of a table an id made from the text of its first cell (``row-chem-ci-nhl-a``), so
the id stays the same from one revision to the next while the row does.  Ids are unique
within a page (a repeated one takes ``-2``, ``-3`` …).  Used by the site and the print alike
(listed in mkdocs.yml) and by the comments page when it reads a page again
(:data:`specgen.report.review.EXTENSIONS`).
"""
from __future__ import annotations

import re
import unicodedata
import xml.etree.ElementTree as ET

from markdown import Extension, util
from markdown.treeprocessors import Treeprocessor

FIGURE_PREFIX = "fig-"
ROW_PREFIX = "row-"
HEADINGS = {"h1", "h2", "h3", "h4", "h5", "h6"}
MAX_SLUG = 60


def slug(text: str) -> str:
    """Lower-case ASCII words joined by hyphens (``"CHEM-CI/NHL-A"`` → ``chem-ci-nhl-a``)."""
    plain = unicodedata.normalize("NFKD", text).encode("ascii", "ignore").decode("ascii")
    words = re.findall(r"[a-z0-9]+", plain.lower())
    return "-".join(words)[:MAX_SLUG].strip("-")


def _text(el: ET.Element, stash=None) -> str:
    """The element's text, with inline HTML the parser set aside read as its text."""
    text = "".join(el.itertext())
    if stash is not None:
        def raw(m):
            i = int(m.group(1))
            block = stash.rawHtmlBlocks[i] if i < len(stash.rawHtmlBlocks) else ""
            return re.sub(r"<[^>]*>", "", str(block))
        text = util.HTML_PLACEHOLDER_RE.sub(raw, text)
    return " ".join(text.split())


def _figure_name(fig: ET.Element, stash) -> str:
    """The file name of the figure's image (written in Markdown or as inline HTML), else its
    caption."""
    for img in fig.iter("img"):
        if img.get("src"):
            return img.get("src").rsplit("/", 1)[-1].rsplit(".", 1)[0]
    raw = " ".join(str(b) for b in _stashed(fig, stash))
    m = re.search(r"""<img\b[^>]*\bsrc\s*=\s*["']([^"']+)""", raw)
    if m:
        return m.group(1).rsplit("/", 1)[-1].rsplit(".", 1)[0]
    caption = next(fig.iter("figcaption"), None)
    return _text(caption, stash) if caption is not None else ""


def _stashed(el: ET.Element, stash) -> list:
    """The inline HTML the parser set aside inside ``el``."""
    text = "".join(el.itertext())
    blocks = stash.rawHtmlBlocks
    return [blocks[int(i)] for i in util.HTML_PLACEHOLDER_RE.findall(text) if int(i) < len(blocks)]


def _row_names(rows: list[ET.Element], stash) -> list[str]:
    """A name for each row: its first cell, or as many leading cells as it takes to tell the
    row from every other row of the table (rows grouped by their first n cells, n growing,
    so a register of thousands of rows is named in a few passes)."""
    cells = [tuple(_text(c, stash) for c in row) for row in rows]
    names: list[str | None] = [None] * len(cells)
    left = list(range(len(cells)))
    width = max((len(c) for c in cells), default=0)
    for n in range(1, width + 1):
        groups: dict[tuple, list[int]] = {}
        for i in left:
            groups.setdefault(cells[i][:n], []).append(i)
        left = []
        for prefix, members in groups.items():
            if len(members) == 1 or n == width:
                for i in members:
                    names[i] = slug(" ".join(prefix))
            else:
                left.extend(members)
    return [name or "" for name in names]


class _Anchors(Treeprocessor):
    def run(self, root: ET.Element) -> None:
        taken = {el.get("id") for el in root.iter() if el.get("id")}
        stash = self.md.htmlStash

        def unique(base: str, section: str | None) -> str:
            if base in taken and section:       # the same name under another heading
                base = f"{base[:len(ROW_PREFIX)]}{section}-{base[len(ROW_PREFIX):]}"[:110]
            found, n = base, 1
            while found in taken:
                n += 1
                found = f"{base}-{n}"
            taken.add(found)
            return found

        section = None
        for el in root.iter():
            if el.tag in HEADINGS and el.get("id"):
                section = el.get("id")
            if el.get("id"):
                continue
            if el.tag == "figure":
                el.set("id", unique(FIGURE_PREFIX + (slug(_figure_name(el, stash)) or "figure"), None))
            elif el.tag == "tbody":
                rows = [r for r in el.findall("tr") if not r.get("id")]
                for row, name in zip(rows, _row_names(rows, stash)):
                    row.set("id", unique(ROW_PREFIX + (name or "row"), section))


class AnchorsExtension(Extension):
    def extendMarkdown(self, md):  # noqa: N802 - the Markdown API's name
        # after the inline patterns (priority 20) so a cell's text is final; before the
        # typography postprocessor, which only touches text
        md.treeprocessors.register(_Anchors(md), "specgen-anchors", 4)


def makeExtension(**kwargs):  # noqa: N802 - the Markdown API's name
    return AnchorsExtension(**kwargs)
