"""Reference data tables shipped under ``content/data/``.

Every table is a YAML file with at least ``source:`` (the published work, or
``common practice``) and ``data:``; optional ``tag:`` (``memory`` when a value was
recalled and awaits confirmation against the source, ``common practice`` for a
rule of thumb) and ``notes:``.  Science functions never read files: callers load
a table here and pass its ``data`` in.
"""
from __future__ import annotations

from dataclasses import dataclass, field
from functools import lru_cache
from pathlib import Path
from typing import Any

import yaml

CONTENT_DIR = Path(__file__).resolve().parent.parent / "content"
DATA_DIR = CONTENT_DIR / "data"


@dataclass(frozen=True)
class RefTable:
    """One reference table: its data and where it comes from."""

    name: str
    source: str
    data: Any
    tag: str = ""
    notes: str = ""
    extra: dict = field(default_factory=dict)


@lru_cache(maxsize=None)
def load(name: str) -> RefTable:
    """Load ``content/data/<name>.yaml``; refuse a table without a ``source``."""
    path = DATA_DIR / f"{name}.yaml"
    doc = yaml.safe_load(path.read_text(encoding="utf-8"))
    if not isinstance(doc, dict) or "source" not in doc or "data" not in doc:
        raise ValueError(f"{path}: a reference table needs 'source:' and 'data:' keys")
    extra = {k: v for k, v in doc.items() if k not in {"source", "data", "tag", "notes"}}
    return RefTable(name=name, source=str(doc["source"]), data=doc["data"],
                    tag=str(doc.get("tag", "")), notes=str(doc.get("notes", "")), extra=extra)
