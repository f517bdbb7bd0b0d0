"""Where a chapter of the print is cut into pieces, each starting a page and printed as a part
of its own (:mod:`specgen.publish.pdf`): cuts that stay put when a section's text changes,
so a re-issue lays out again only the pieces whose content changed."""
from __future__ import annotations

import hashlib
import re

PART_SIZE = 6_000  # characters of HTML: the least a piece of a cut chapter holds
CUT_SPREAD = 3     # about one top-level heading in this many past PART_SIZE starts a piece
CUT_MOST = 12      # … and a piece is cut at the first heading past this many PART_SIZE
CHAPTER_WHOLE = 60_000  # characters: a chapter shorter than this prints whole (no page breaks added)


def _cut_points(html: str, size: int, whole: int = CHAPTER_WHOLE,
               sections: bool = False) -> list[int]:
    """Offsets of top-level ``<h2`` at which a chapter is cut into pieces (each starts a page).

    A cut falls before a top-level heading chosen by the heading itself (a hash of its
    tag, which carries its id), at least ``size`` characters after the last cut, not by
    how long the text before it is: a section whose text changes moves no cut, so on a
    re-issue only the piece holding it is laid out again (the others are reused byte for
    byte).  A run with no chosen heading is cut at the first heading past
    ``CUT_MOST × size``.  A chapter shorter than ``whole`` is not cut: the report's chapters
    keep their flow, and only the long appendices (the calculation sheets, the check
    register) gain page breaks.  With ``sections`` (a chapter of one section per mix or
    zone, ``chapters.chapter(sections=True)``) every top-level heading but the first (which
    follows the chapter's opening text on its page) starts a piece, whatever the lengths:
    a new result of one mix re-lays that mix's section alone.
    """
    cuts, depth, last, heads = [], 0, 0, 0
    if len(html) < whole and not sections:
        return cuts
    for m in re.finditer(r"<(/?)(div|details|table|blockquote|figure|ul|ol|h2)\b", html):
        tag = m.group(2)
        if tag == "h2":
            if m.group(1) or depth:
                continue
            heads += 1
            if heads > 1 if sections else _due(html, m.start(), last, size):
                cuts.append(m.start())
                last = m.start()
            continue
        depth += -1 if m.group(1) else 1
    return cuts


def _due(html: str, at: int, last: int, size: int) -> bool:
    """Whether the top-level heading at ``at`` starts a piece of a long chapter cut last at
    ``last``: a chosen heading at least ``size`` on, or any heading ``CUT_MOST × size`` on."""
    return at - last >= size and (_chosen(html[at:html.find(">", at) + 1])
                                  or at - last >= CUT_MOST * size)


def _chosen(heading_tag: str) -> bool:
    """Whether a piece may start at this heading (about one in ``CUT_SPREAD``, stably)."""
    return hashlib.sha256(heading_tag.encode("utf-8")).digest()[0] % CUT_SPREAD == 0
