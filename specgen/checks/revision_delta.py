"""What changed between two revisions, from their results and the hashes of their inputs.

One comparison serves the consistency audit (the factual part of a revision's description),
the change page of the dossier, ``changes.json`` and ``specgen diff``.  It opens with what
changed for the decision — selections, new failures and holds, predictions that moved — and
then lists every input file, lab result, check and review comment that changed.
"""
from __future__ import annotations

from specgen.checks.result import STATUS_WORDS

#: A predicted strength is reported as moved when it moves by at least this much (MPa):
#: results are given to 0.01 MPa.
PREDICTION_STEP = 0.005
DECIDING = ("fail", "needs_decision")


def _delta(old, new):
    if isinstance(old, (int, float)) and isinstance(new, (int, float)) and not isinstance(old, bool):
        return round(new - old, 6)
    return None


def _sets(old: set, new: set, same=None) -> dict:
    return {"added": sorted(new - old), "removed": sorted(old - new),
            "changed": sorted(k for k in new & old if same is not None and not same(k))}


def compare(old: dict, old_inputs: dict, new: dict, new_inputs: dict) -> dict:
    """Differences between two results documents (and their input hashes)."""
    inputs = _sets(set(old_inputs), set(new_inputs), lambda k: new_inputs[k] == old_inputs[k])
    os_, ns = old.get("specimens", {}), new.get("specimens", {})
    specimens = _sets(set(os_), set(ns), lambda k: ns[k] == os_[k])
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
                       "old_value": a["value"] if a else None, "new_value": b["value"] if b else None,
                       "unit": (b or a)["unit"],
                       "delta": _delta(a["value"], b["value"]) if a and b else None})
    comments = _comment_changes(old.get("comments", []), new.get("comments", []))
    return {"from": old.get("revision"), "to": new.get("revision"), "inputs": inputs,
            "specimens": specimens, "checks": checks, "comments": comments,
            "decision": decision(old, new, checks)}


def _comment_changes(old: list, new: list) -> dict:
    o = {c["id"]: c for c in old}
    n = {c["id"]: c for c in new}
    return {"new": sorted(k for k in n if k not in o),
            "closed": sorted(k for k in n if n[k]["status"] == "closed"
                             and (k not in o or o[k]["status"] != "closed"))}


def _q(doc: dict, subject: str, name: str):
    return ((doc.get("quantities") or {}).get(subject) or {}).get(name, {}).get("value")


def decision(old: dict, new: dict, checks: list[dict]) -> dict:
    """What changed for the decision: selections, new failures and holds, moved predictions."""
    zones = sorted({s for s, k in (new.get("subjects") or {}).items() if k == "zone"}
                   | {s for s, k in (old.get("subjects") or {}).items() if k == "zone"})
    selections = []
    for z in zones:
        a = (_q(old, z, "selected_mix"), _q(old, z, "selection_status"))
        b = (_q(new, z, "selected_mix"), _q(new, z, "selection_status"))
        if a != b:
            selections.append({"zone": z, "old_mix": a[0], "old_status": a[1],
                               "new_mix": b[0], "new_status": b[1]})
    failures = [c for c in checks if c["new_status"] in DECIDING
                and c["old_status"] != c["new_status"]]
    holds = [c for c in checks if c["new_status"] == "hold" and c["old_status"] != "hold"]
    return {"selections": selections, "new_failures": failures, "new_holds": holds,
            "predictions": _moved_predictions(old, new)}


def _moved_predictions(old: dict, new: dict) -> list[dict]:
    out = []
    for mix in sorted(new.get("quantities") or {}):
        a, b = _q(old, mix, "predicted_strength") or {}, _q(new, mix, "predicted_strength") or {}
        for kind in sorted(b):
            for age in sorted(b[kind], key=_age_days):
                was, now = (a.get(kind) or {}).get(age), b[kind][age]
                if was is None or abs(now["value"] - was["value"]) < PREDICTION_STEP:
                    continue
                out.append({"mix": mix, "kind": kind, "age": age, "unit": "MPa",
                            "old": was["value"], "new": now["value"],
                            "old_band": [was["lower"], was["upper"]],
                            "new_band": [now["lower"], now["upper"]]})
    return out


def _age_days(key: str) -> float:
    try:
        return float(key.split()[0])
    except (ValueError, IndexError):
        return 0.0


def _word(status) -> str:
    return STATUS_WORDS.get(status, "—") if status else "—"


def decision_lines(changes: dict) -> list[str]:
    """'What changed for the decision' as plain sentences (the change page and ``diff``)."""
    if "decision_lines" in changes:
        return list(changes["decision_lines"])
    d = changes.get("decision") or {}
    lines = []
    for s in d.get("selections", []):
        lines.append(f"zone {s['zone']}: selection {s['old_mix'] or 'none'} ({_word(s['old_status'])})"
                     f" → {s['new_mix'] or 'none'} ({_word(s['new_status'])})")
    for c in d.get("new_failures", []):
        lines.append(f"new {_word(c['new_status'])}: {c['key']} {c['title']} "
                     f"(was {_word(c['old_status'])})")
    for c in d.get("new_holds", []):
        lines.append(f"new hold: {c['key']} {c['title']} (was {_word(c['old_status'])})")
    for p in d.get("predictions", []):
        lines.append(f"prediction moved: {p['mix']} {p['kind']} at {p['age']}: "
                     f"{p['old']:.3g} → {p['new']:.3g} {p['unit']} (band {p['old_band'][0]:.3g}–"
                     f"{p['old_band'][1]:.3g} → {p['new_band'][0]:.3g}–{p['new_band'][1]:.3g} "
                     f"{p['unit']})")
    return lines


def as_text(changes: dict) -> str:
    """The change report as plain text (what ``specgen diff`` prints)."""
    lines = [f"Changes from {changes['from']} to {changes['to']}",
             "What changed for the decision:"]
    lines += [f"  {x}" for x in decision_lines(changes)] or ["  nothing"]
    lines.append("Every change:")
    for what, label in (("inputs", "input files"), ("specimens", "strength results (by specimen)")):
        part = changes[what]
        for kind in ("added", "changed", "removed"):
            if part[kind]:
                lines.append(f"  {label} {kind}: {', '.join(part[kind])}")
    for c in changes["checks"]:
        delta = f" (Δ {c['delta']:+g} {c['unit']})".rstrip() if c["delta"] is not None else ""
        # the words the site shows, not the status codes
        lines.append(f"  {c['key']}: {_word(c['old_status'])} → {_word(c['new_status'])}; "
                     f"{_v(c['old_value'])} → {_v(c['new_value'])} {c['unit']}{delta}".rstrip())
    if changes["comments"]["new"]:
        lines.append(f"  review comments raised: {', '.join(changes['comments']['new'])}")
    if changes["comments"]["closed"]:
        lines.append(f"  review comments closed: {', '.join(changes['comments']['closed'])}")
    if len(lines) == 4 and lines[2] == "  nothing":
        lines.append("  no differences")
    return "\n".join(lines)


def _v(value) -> str:
    if value is None:
        return "—"
    return f"{value:.4g}" if isinstance(value, float) else str(value)
