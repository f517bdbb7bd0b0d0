"""specification.yaml as loaded: the document, where its entries are, and earlier revisions.

Hold points carry their state from one revision to the next.  The inputs of earlier
issued revisions are kept under ``issued/<revision>/``; their ``specification.yaml``
(when they had one) says what state each hold point had when that revision was issued.
"""
from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path

from specgen.errors import ProblemLog
from specgen.project import schema
from specgen.project.files import Located, read_yaml
from specgen.views import SPEC_FILE  # noqa: F401  (one name for the loader and the checks)


@dataclass(frozen=True)
class EarlierState:
    """The hold points of one earlier issued revision: id → (state, released_in)."""

    revision: str
    date: str
    hold_points: dict[str, tuple[str, str | None]]


@dataclass
class SpecificationData:
    """The validated specification.yaml, the lines of its entries and earlier revisions' states."""

    doc: schema.SpecificationFile
    located: Located | None = None
    earlier: list[EarlierState] = field(default_factory=list)

    def line(self, *path) -> int | None:
        return self.located.line_of(tuple(path)) if self.located else None

    def selection_for(self, zone_id: str) -> tuple[int, schema.Selection] | None:
        """(index, selection) of the zone's selection, if any."""
        return next(((i, s) for i, s in enumerate(self.doc.selections) if s.zone == zone_id), None)

    def known_revisions(self) -> list[str]:
        return [e.revision for e in self.earlier]


def specification_data(root: Path, doc, located: Located | None, archive_dir: str,
                       log: ProblemLog) -> SpecificationData | None:
    """The loaded specification (``None`` without the file) with the archive's states."""
    if doc is None:
        return None
    return SpecificationData(doc, located, earlier_states(root, archive_dir, log))


def earlier_states(root: Path, archive_dir: str, log: ProblemLog) -> list[EarlierState]:
    """Hold-point states of each archived revision that had a specification, oldest first."""
    from specgen.project.layout import validate
    folder = root / archive_dir
    if not folder.is_dir():
        return []
    found = []
    for sub in sorted(p for p in folder.iterdir() if p.is_dir() and not p.name.startswith(".")):
        path = sub / SPEC_FILE
        if not path.is_file():
            continue
        rel = f"{archive_dir}/{sub.name}/{SPEC_FILE}"
        loc = read_yaml(path, rel, log)
        doc = validate(loc, schema.SpecificationFile, rel, log) if loc is not None else None
        if doc is None:
            continue
        states = {h.id: (h.state, h.released_in) for h in doc.hold_points}
        found.append(EarlierState(sub.name, _revision_date(sub), states))
    return sorted(found, key=lambda e: (e.date, e.revision))


def _revision_date(folder: Path) -> str:
    """The issue date written in an archived dossier.yaml (its own loader validates it)."""
    log = ProblemLog()
    loc = read_yaml(folder / "dossier.yaml", "dossier.yaml", log)
    data = loc.data if loc is not None and isinstance(loc.data, dict) else {}
    rev = data.get("revision")
    return str(rev.get("date", "")) if isinstance(rev, dict) else ""
