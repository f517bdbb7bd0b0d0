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
        if re.search(rf"(?<![\w-]){pattern}(?![\w-])", text):
            out.append(e)
    return out


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
