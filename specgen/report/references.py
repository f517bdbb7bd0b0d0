"""The bibliography (CSL-JSON in ``content/references.json``) and citation numbering.

Only works the dossier actually cites are listed, numbered in order of first
citation; each calculation sheet links to its entries.
"""
from __future__ import annotations

import json
from functools import lru_cache

from specgen.refdata import CONTENT_DIR


@lru_cache(maxsize=1)
def library() -> dict[str, dict]:
    """All bibliography entries keyed by id."""
    entries = json.loads((CONTENT_DIR / "references.json").read_text(encoding="utf-8"))
    return {e["id"]: e for e in entries}


def _names(entry: dict) -> str:
    out = []
    for a in entry.get("author", []):
        out.append(a.get("literal") or f"{a.get('family', '')}, {a.get('given', '')}".strip(", "))
    return "; ".join(out)


def unconfirmed(entry: dict) -> bool:
    """Bibliographic details recalled, not yet checked: listed on the *Values to confirm*
    page, not printed inside the entry."""
    return "from memory" in entry.get("note", "")


def format_entry(entry: dict) -> str:
    """One entry as plain text in a compact author–year style."""
    year = (entry.get("issued", {}).get("date-parts") or [[""]])[0][0]
    parts = [f"{_names(entry)} ({year or 'n.d.'}).", f"*{entry.get('title', '')}*."]
    if entry.get("number"):
        parts.insert(1, f"{entry['number']}.")
    if entry.get("container-title"):
        vol = entry.get("volume", "")
        parts.append(f"{entry['container-title']}" + (f" {vol}" if vol else "")
                     + (f"({entry['issue']})" if entry.get("issue") else "")
                     + (f", {entry['page']}" if entry.get("page") else "") + ".")
    elif entry.get("publisher"):
        ed = f"{entry['edition']}nd ed., " if entry.get("edition") == "2" else ""
        parts.append(f"{ed}{entry.get('publisher-place', '')}: {entry['publisher']}.".lstrip(": "))
    if entry.get("DOI"):
        parts.append(f"doi:{entry['DOI']}")
    if entry.get("URL"):        # a web page: its address and the day it was read
        read = "-".join(f"{n:02d}" for n in (entry.get("accessed", {}).get("date-parts")
                                             or [[]])[0])
        # as code inside the link: an address is quoted as written (not reader text), and
        # the stylesheets let it break anywhere so a long address never widens the page
        parts.append(f"[`{entry['URL']}`]({entry['URL']})" + (f" (read {read})" if read else "")
                     + ".")
    if entry.get("note") and not unconfirmed(entry):
        parts.append(f"({entry['note']})")
    return " ".join(parts)


def _designations() -> dict[str, str]:
    """Bibliography key of each standard by its designation ('EN 1015-11', 'ASTM C270'),
    the edition suffix ('/C150M') dropped."""
    out = {}
    for key, e in library().items():
        if e.get("type") == "standard" and e.get("number"):
            out[e["number"].split("/")[0].strip()] = key
    return out


def named_in(texts) -> list[str]:
    """Keys of the standards whose designation appears in ``texts``, in order of first
    appearance (a designation followed by a further part number, 'EN 1015-1' in
    'EN 1015-11', is not taken for it)."""
    import re
    found: dict[str, int] = {}
    designations = _designations()
    for n, text in enumerate(texts):
        for number, key in designations.items():
            m = re.search(re.escape(number) + r"(?![\w-]*\d)", text)
            if m and key not in found:
                found[key] = n * 10**7 + m.start()
    return sorted(found, key=found.get)


class Citations:
    """Numbers works in order of first citation."""

    def __init__(self) -> None:
        self.order: list[str] = []

    def cite(self, key: str) -> int:
        """Number of ``key`` (assigned on first citation); unknown keys are an error."""
        if key not in library():
            raise KeyError(f"reference '{key}' is not in content/references.json")
        if key not in self.order:
            self.order.append(key)
        return self.order.index(key) + 1

    def unconfirmed(self) -> list[dict]:
        """Cited entries whose bibliographic details are still from memory."""
        return [{"n": i + 1, "key": k, "text": format_entry(library()[k]),
                 "note": library()[k]["note"]}
                for i, k in enumerate(self.order) if unconfirmed(library()[k])]

    def listing(self) -> list[dict]:
        return [{"n": i + 1, "key": k, "text": format_entry(library()[k])}
                for i, k in enumerate(self.order)]
