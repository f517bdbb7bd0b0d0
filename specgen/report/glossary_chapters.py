"""The glossary: every abbreviation and symbol of content/data/glossary.yaml that the pages of
this revision actually print — found once every page is rendered (``RenderEnv.later``)."""
from __future__ import annotations

import re

from specgen.report.chapters import chapter
from specgen.report.wording import reader, symbol

PAGE = "glossary.md"


def printed(entries: list, pages: dict) -> list:
    """The entries whose text (``match``, a pattern, or the term itself) a page prints as a
    whole word; the glossary page itself is not searched."""
    text = "\n".join(t for path, t in pages.items() if path != PAGE)
    out = []
    for e in entries:
        pattern = e.get("match") or re.escape(e["term"])
        if _prints(text, re.compile(rf"(?<![\w-]){pattern}(?![\w-])"),
                   _literal_head(e["match"]) if e.get("match") else e["term"]):
            out.append(e)
    return out


def _prints(text: str, pattern: re.Pattern, head: str) -> bool:
    """Whether ``pattern`` matches in ``text``: tried only where its literal ``head`` stands
    (a match begins there; a pattern led by a look-behind is otherwise tried at every place
    of the pages, a quarter of a second for the glossary)."""
    if not head:
        return pattern.search(text) is not None
    at = text.find(head)
    while at >= 0:
        if pattern.match(text, at):
            return True
        at = text.find(head, at + 1)
    return False


def _literal_head(pattern: str) -> str:
    """The plain characters a match of ``pattern`` must begin with ('' when none)."""
    if "|" in pattern:
        return ""                 # one of several beginnings
    head = re.match(r"[^\\.^$*+?{}\[\]|()]*", pattern).group(0)
    if pattern[len(head):len(head) + 1] in ("?", "*", "{"):
        head = head[:-1]          # the last one may be repeated no times
    return head


@chapter(PAGE, "Glossary", "glossary.md.j2", volume="appendix")
def glossary(env) -> dict:
    from specgen import refdata
    entries = [dict(e) for e in refdata.load("glossary").data]

    def listing(pages) -> str:
        rows = printed(entries, pages)
        if not rows:
            return "No abbreviations or symbols are printed in this revision."
        return "\n".join(["| Term | Meaning |", "|---|---|"] + [
            f"| {symbol(e['term'])} | {reader(e['meaning'])} |" for e in rows])
    return {"listing": env.later(listing)}
