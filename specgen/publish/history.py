"""Revision history, read from what earlier builds left in ``OUT``.

Each revision folder holds ``results.json`` and ``manifest.json``.  The change report
itself is worked out in the check stage (``specgen.checks.revision_delta``) against the
previous issued revision and carried by the results.
"""
from __future__ import annotations

import json
from dataclasses import dataclass
from pathlib import Path

from specgen.errors import UsageError


@dataclass(frozen=True)
class Issued:
    """What an earlier revision left in OUT: its manifest and results."""

    code: str
    manifest: dict
    results: dict

    @property
    def date(self) -> str:
        return self.manifest.get("date", "")


def read_revision(folder: Path) -> Issued | None:
    """The revision in ``folder``, or ``None`` if it is not a complete revision."""
    try:
        manifest = json.loads((folder / "manifest.json").read_text(encoding="utf-8"))
        results = json.loads((folder / "results.json").read_text(encoding="utf-8"))
    except (OSError, ValueError):
        return None
    return Issued(folder.name, manifest, results)


def revisions_in(out: Path) -> list[Issued]:
    """Every complete revision in ``out``, oldest first."""
    found = [r for d in sorted(Path(out).glob("*/")) if not d.name.startswith(".")
             if (r := read_revision(d)) is not None]
    return sorted(found, key=lambda r: (r.date, r.code))


def previous(out: Path, code: str, date: str) -> Issued | None:
    """The newest revision in ``out`` other than ``code`` dated on or before ``date``."""
    earlier = [r for r in revisions_in(out) if r.code != code and r.date <= date]
    return earlier[-1] if earlier else None


@dataclass(frozen=True)
class History:
    """What the dossier shows of its history: earlier revisions and the change report."""

    revisions: list[dict]
    previous: str | None
    changes: dict | None
    earlier: tuple = ()          # (code, results.json as a dict) of each earlier revision
    # the previous revision's section digests (its manifest's "sections"); None when that
    # revision is not in OUT or was built before pages were compared
    sections_before: dict | None = None


def history_for(out: Path, project, results) -> History:
    """Earlier revisions in ``out`` (before this one); the changes since the previous issued
    revision come with the results (the check stage works them out)."""
    rev = project.revision
    _refuse_case_collision(out, rev.code)
    earlier = [r for r in revisions_in(out) if r.code != rev.code and r.date <= rev.date.isoformat()]
    rows = [{"code": r.code, "date": r.date, "status": r.manifest.get("status", ""),
             "description": r.manifest.get("description", ""),
             "facts": r.manifest.get("facts", []), "current": False} for r in earlier]
    rows.append({"code": rev.code, "date": rev.date.isoformat(), "status": rev.status,
                 "description": rev.description, "facts": results.facts, "current": True})
    before = next((r for r in earlier if r.code == results.previous), None)
    return History(rows, results.previous, results.changes,
                   tuple((r.code, r.results) for r in earlier),
                   before.manifest.get("sections") if before else None)


def find(out: Path, code: str) -> Issued:
    """The revision ``code`` built into ``out``; a usage error naming those there if none."""
    found = read_revision(Path(out) / code)
    if found is None:
        known = ", ".join(x.code for x in revisions_in(out)) or "none"
        raise UsageError(f"{out}: no revision '{code}' (revisions there: {known}). "
                         "Fix: give revision codes from that folder.")
    return found


def _refuse_case_collision(out: Path, code: str) -> None:
    """R1 and r1 would share a folder on a case-insensitive disk: refuse the second."""
    for d in Path(out).glob("*/"):
        if d.name != code and d.name.lower() == code.lower() and not d.name.startswith("."):
            from specgen.errors import InputErrors, Problem
            raise InputErrors([Problem("dossier.yaml", f"revision code '{code}' collides with the "
                                       f"existing revision '{d.name}' in {out}.",
                                       field="revision.code",
                                       fix="use a revision code that differs by more than case.")])
