"""Revision history and change reports, read from what earlier builds left in ``OUT``.

Each revision folder holds ``results.json`` and ``manifest.json``; a change report
compares the current revision with the newest earlier one: inputs (by file hash),
lab results (by specimen), every check whose status or value changed, and review
comments opened or closed.  The same comparison serves the dossier page,
``changes.json`` and ``specgen diff``.
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


def _delta(old, new):
    if isinstance(old, (int, float)) and isinstance(new, (int, float)) and not isinstance(old, bool):
        return round(new - old, 6)
    return None


def compare(old: dict, old_inputs: dict, new: dict, new_inputs: dict) -> dict:
    """Differences between two results documents (and their input hashes)."""
    inputs = {
        "added": sorted(set(new_inputs) - set(old_inputs)),
        "removed": sorted(set(old_inputs) - set(new_inputs)),
        "changed": sorted(k for k in set(new_inputs) & set(old_inputs)
                          if new_inputs[k] != old_inputs[k]),
    }
    os_, ns = old.get("specimens", {}), new.get("specimens", {})
    specimens = {
        "added": sorted(set(ns) - set(os_)), "removed": sorted(set(os_) - set(ns)),
        "changed": sorted(k for k in set(ns) & set(os_) if ns[k] != os_[k]),
    }
    oc = {f"{c['code']}/{c['subject']}": c for c in old.get("checks", [])}
    nc = {f"{c['code']}/{c['subject']}": c for c in new.get("checks", [])}
    checks = []
    for key in sorted(set(oc) | set(nc)):
        a, b = oc.get(key), nc.get(key)
        if a and b and a["status"] == b["status"] and a["value"] == b["value"]:
            continue
        checks.append({"key": key, "code": (a or b)["code"], "subject": (a or b)["subject"],
                       "title": (a or b)["title"],
                       "old_status": a["status"] if a else None,
                       "new_status": b["status"] if b else None,
                       # the words the site shows (results.json carries them beside the code)
                       "old_status_word": a.get("status_word", a["status"]) if a else None,
                       "new_status_word": b.get("status_word", b["status"]) if b else None,
                       "old_value": a["value"] if a else None, "new_value": b["value"] if b else None,
                       "unit": (b or a)["unit"],
                       "delta": _delta(a["value"], b["value"]) if a and b else None})
    comments = _comment_changes(old.get("comments", []), new.get("comments", []))
    return {"from": old.get("revision"), "to": new.get("revision"), "inputs": inputs,
            "specimens": specimens, "checks": checks, "comments": comments}


def _comment_changes(old: list, new: list) -> dict:
    o = {c["id"]: c for c in old}
    n = {c["id"]: c for c in new}
    return {"new": sorted(k for k in n if k not in o),
            "closed": sorted(k for k in n if n[k]["status"] == "closed"
                             and (k not in o or o[k]["status"] != "closed"))}


def between(out: Path, a: str, b: str) -> dict:
    """The change report from revision ``a`` to revision ``b`` in ``out``."""
    ra, rb = read_revision(Path(out) / a), read_revision(Path(out) / b)
    for code, r in ((a, ra), (b, rb)):
        if r is None:
            known = ", ".join(x.code for x in revisions_in(out)) or "none"
            raise UsageError(f"{out}: no revision '{code}' (revisions there: {known}). "
                             "Fix: give revision codes from that folder.")
    return compare(ra.results, ra.manifest.get("inputs", {}), rb.results,
                   rb.manifest.get("inputs", {}))


def as_text(changes: dict) -> str:
    """The change report as plain text (what ``specgen diff`` prints)."""
    lines = [f"Changes from {changes['from']} to {changes['to']}"]
    for what, label in (("inputs", "input files"), ("specimens", "lab results (by specimen)")):
        part = changes[what]
        for kind in ("added", "changed", "removed"):
            if part[kind]:
                lines.append(f"  {label} {kind}: {', '.join(part[kind])}")
    for c in changes["checks"]:
        delta = f" (Δ {c['delta']:+g} {c['unit']})".rstrip() if c["delta"] is not None else ""
        was, now = c.get("old_status_word", c["old_status"]), c.get("new_status_word",
                                                                    c["new_status"])
        lines.append(f"  {c['key']}: {was or '—'} → {now or '—'}; "
                     f"{_v(c['old_value'])} → {_v(c['new_value'])} {c['unit']}{delta}".rstrip())
    if changes["comments"]["new"]:
        lines.append(f"  review comments raised: {', '.join(changes['comments']['new'])}")
    if changes["comments"]["closed"]:
        lines.append(f"  review comments closed: {', '.join(changes['comments']['closed'])}")
    if len(lines) == 1:
        lines.append("  no differences")
    return "\n".join(lines)


def _v(value) -> str:
    if value is None:
        return "—"
    return f"{value:.4g}" if isinstance(value, float) else str(value)


@dataclass(frozen=True)
class History:
    """What the dossier shows of its history: earlier revisions and the change report."""

    revisions: list[dict]
    previous: str | None
    changes: dict | None


def history_for(out: Path, project, results) -> History:
    """Earlier revisions in ``out`` (before this one) and the changes since the newest."""
    rev = project.revision
    _refuse_case_collision(out, rev.code)
    earlier = [r for r in revisions_in(out) if r.code != rev.code and r.date <= rev.date.isoformat()]
    rows = [{"code": r.code, "date": r.date, "status": r.manifest.get("status", ""),
             "description": r.manifest.get("description", ""), "current": False} for r in earlier]
    rows.append({"code": rev.code, "date": rev.date.isoformat(), "status": rev.status,
                 "description": rev.description, "current": True})
    if not earlier:
        return History(rows, None, None)
    prev = earlier[-1]
    changes = compare(prev.results, prev.manifest.get("inputs", {}), results.to_dict(),
                      {f.path: f.sha256 for f in project.inputs})
    return History(rows, prev.code, changes)


def _refuse_case_collision(out: Path, code: str) -> None:
    """R1 and r1 would share a folder on a case-insensitive disk: refuse the second."""
    for d in Path(out).glob("*/"):
        if d.name != code and d.name.lower() == code.lower() and not d.name.startswith("."):
            from specgen.errors import InputErrors, Problem
            raise InputErrors([Problem("dossier.yaml", f"revision code '{code}' collides with the "
                                       f"existing revision '{d.name}' in {out}.",
                                       field="revision.code",
                                       fix="use a revision code that differs by more than case.")])
