"""The *Values to confirm* page: every value this revision rested on that is still tagged
``memory`` (recalled while drafting, not yet read in the source it names), with the checks
that used it; and the cited works whose bibliographic details are still from memory.  The page exists only while such values remain; a revision for construction is
refused before rendering while any remains (specgen.build.refuse_unconfirmed), so an issued
construction dossier never carries it and no clause carries a drafting mark.
"""
from __future__ import annotations

from specgen.report.chapters import chapter, sheet_anchor_of
from specgen.report.wording import plain


def _link(key: str) -> dict:
    code, _, subject = key.partition("/")
    return {"text": key, "href": f"calculations.md#{sheet_anchor_of(code, subject)}"}


# after the reference list (90): every citation is known by then
@chapter("confirm.md", "Values to confirm", "confirm.md.j2", volume="appendix")
def values_to_confirm(env) -> list[dict]:
    rows = [{"where": v["where"], "title": v["title"] or v["path"] or v["table"],
             "source": plain(v["source"]), "used_by": [_link(k) for k in v["used_by"]]}
            for v in env.results.unconfirmed()]
    books = env.citations.unconfirmed()
    if not rows and not books:
        return []
    return [{"path": "confirm.md", "title": "Values to confirm", "rows": rows, "books": books,
             "purpose": env.project.revision.purpose.replace("_", " ")}]
