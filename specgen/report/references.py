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


def format_entry(entry: dict) -> str:
    """One entry as plain text in a compact author–year style."""
    year = (entry.get("issued", {}).get("date-parts") or [[""]])[0][0]
    parts = [f"{_names(entry)} ({year}).", f"*{entry.get('title', '')}*."]
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
    if entry.get("note"):
        parts.append(f"({entry['note']})")
    return " ".join(parts)


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

    def listing(self) -> list[dict]:
        return [{"n": i + 1, "key": k, "text": format_entry(library()[k])}
                for i, k in enumerate(self.order)]
