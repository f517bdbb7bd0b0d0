"""Reference data tables shipped under ``content/data/``.

Every table is a YAML file with at least ``source:`` (the published work, or
``common practice``) and ``data:``; optional ``tag:`` (``memory`` when a value was
recalled and awaits confirmation against the source, ``common practice`` for a
rule of thumb) and ``notes:``.  Science functions never read files: callers load
a table here and pass its ``data`` in.

A ``tag:`` may also sit on any entry inside ``data`` (one envelope, one salt table).  While a
:func:`recording` is open, every tagged entry (and every tagged table) that is read is
recorded as a :class:`Use`, so a revision knows which of the values it rested on are still
``memory`` — the one list behind the dossier's *Values to confirm* page and the refusal to
build a revision for construction on them.
"""
from __future__ import annotations

import contextlib
import contextvars
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


UNCONFIRMED = "memory"   # the tag of a value recalled, not yet read in its source


@dataclass(frozen=True)
class Use:
    """A tagged table or entry a check read: where it is, its tag and claimed source."""

    table: str
    path: str              # entry inside ``data`` ('' for the table as a whole)
    tag: str
    source: str
    title: str = ""
    folder: str = "data"       # 'rules' for a rule of content/rules/

    @property
    def where(self) -> str:
        return f"content/{self.folder}/{self.table}.yaml" + (f": {self.path}" if self.path else "")


_RECORDER: contextvars.ContextVar[set | None] = contextvars.ContextVar("refdata_uses",
                                                                      default=None)


@contextlib.contextmanager
def recording():
    """Collect the :class:`Use` of every tagged table and entry read inside the block."""
    uses: set = set()
    token = _RECORDER.set(uses)
    try:
        yield uses
    finally:
        _RECORDER.reset(token)


@contextlib.contextmanager
def unrecorded():
    """Read tables without noting them: for choices (which envelope, which set) that name a
    table entry without resting a value on it."""
    token = _RECORDER.set(None)
    try:
        yield
    finally:
        _RECORDER.reset(token)


def _note(use: Use) -> None:
    uses = _RECORDER.get()
    if uses is not None:
        uses.add(use)


def note_rule(key: str, tag: str, source: str, title: str) -> None:
    """A check read rule ``key`` (``<file stem>.<name>``) tagged ``tag``: noted like a
    tagged table entry, so a value still to be confirmed is listed and refused alike."""
    table, _, name = key.partition(".")
    _note(Use(table, name, tag, source, title, folder="rules"))


class Tracked(dict):
    """A table's mapping that notes, while recording, each tagged entry read from it."""

    def __init__(self, data=(), table: str = "", path: str = "", source: str = ""):
        super().__init__(data)
        self._where = (table, path, source)

    def _child(self, key, value):
        table, path, source = self._where
        sub = f"{path}.{key}" if path else str(key)
        if isinstance(value, dict):
            src = str(value.get("source", source))
            if value.get("tag"):
                _note(Use(table, sub, str(value["tag"]), src, str(value.get("title", ""))))
            return Tracked(value, table, sub, src)
        return value

    def __getitem__(self, key):
        return self._child(key, super().__getitem__(key))

    def get(self, key, default=None):
        return self[key] if key in self else default

    def __reduce__(self):  # pickles as a plain dict
        return (dict, (dict(self),))


def content_yaml(path: Path):
    """One of our own YAML files under ``content/`` (tables, rules, cautions), parsed with
    libyaml when PyYAML has it (the same documents, about 12 times faster than PyYAML's pure
    parser: some 0.25 s of CPU time each command spent reading them)."""
    return yaml.load(path.read_text(encoding="utf-8"),
                     Loader=getattr(yaml, "CSafeLoader", yaml.SafeLoader))


@lru_cache(maxsize=None)
def _load(name: str) -> RefTable:
    """Load ``content/data/<name>.yaml``; refuse a table without a ``source``."""
    path = DATA_DIR / f"{name}.yaml"
    doc = content_yaml(path)
    if not isinstance(doc, dict) or "source" not in doc or "data" not in doc:
        raise ValueError(f"{path}: a reference table needs 'source:' and 'data:' keys")
    extra = {k: v for k, v in doc.items() if k not in {"source", "data", "tag", "notes"}}
    data = doc["data"]
    if isinstance(data, dict):
        data = Tracked(data, name, "", str(doc["source"]))
    return RefTable(name=name, source=str(doc["source"]), data=data,
                    tag=str(doc.get("tag", "")), notes=str(doc.get("notes", "")), extra=extra)


def load(name: str) -> RefTable:
    """Load ``content/data/<name>.yaml`` (once); refuse a table without a ``source``.

    While a :func:`recording` is open, a table tagged as a whole is noted when loaded."""
    table = _load(name)
    if table.tag:
        _note(Use(name, "", table.tag, table.source, str(table.extra.get("title", ""))))
    return table


def unconfirmed(uses) -> list[Use]:
    """The uses still tagged ``memory``, sorted (tables before their entries)."""
    return sorted((u for u in uses if u.tag == UNCONFIRMED), key=lambda u: (u.table, u.path))


def shown(source: str, tag: str) -> str:
    """A source as a sheet shows it: a rule of thumb says so; a value still tagged
    ``memory`` is not marked inline (the *Values to confirm* page lists it, with the checks
    that used it), so clauses and sheets carry no drafting marks."""
    if tag and tag != UNCONFIRMED and tag not in source:
        return f"{source} ({tag})"
    return source


@lru_cache(maxsize=None)
def _bibliography() -> dict[str, dict]:
    import json
    entries = json.loads((CONTENT_DIR / "references.json").read_text(encoding="utf-8"))
    return {e["id"]: e for e in entries}


def reference_label(key: str) -> str:
    """How a text names the work ``key`` of content/references.json: a standard by its number
    (EN 459-1), another work by its first author and year (Eckel 1922); an unknown key as
    written (the reference checks report it)."""
    entry = _bibliography().get(key)
    if entry is None:
        return key
    if entry.get("number"):
        return str(entry["number"])
    author = (entry.get("author") or [{}])[0]
    name = author.get("family") or author.get("literal") or entry.get("title", key)
    year = (entry.get("issued", {}).get("date-parts") or [[""]])[0][0]
    return f"{name} {year}".strip()

