"""The two reading depths: a summary for the client, and the check register in the appendix.

The summary says, per zone, which mortar is chosen, why (the specifier's rationale), what
remains open (hold points, justified shortfalls, trial panels) and what it costs; every
check, with its status, is listed in the appendix's register and shown in full on its
calculation sheet.  Everything here is read from the results and the project.
"""
from __future__ import annotations

from markupsafe import Markup

from specgen.checks.result import STATUS_WORDS
from specgen.report.chapters import badge, chapter, check_rows
from specgen.report.fmt import and_list, count, date_text, qty, rounded
from specgen.report.marks import control_context
from specgen.report.review import open_by_category
from specgen.report.wording import rule_label

PURPOSE_WORDS = {"preliminary": "preliminary", "for_approval": "for approval",
                 "for_construction": "for construction"}
STATE_WORDS = {"draft": "draft", "issued": "issued"}
#: statuses listed with their finding in the register, most severe first
DECIDING = ("fail", "hold", "attention")


@chapter("index.md", "Summary", "summary.md.j2")
def summary(env) -> dict:
    p, r = env.project, env.results
    counts = [{"status": s, "badge": badge(s), "n": n} for s, n in r.counts().items() if n]
    holds = r.value(p.dossier.project.code, "hold_points") or {}
    what = {h.id: h.what for h in p.specification.doc.hold_points} if p.specification else {}
    return {"counts": counts, "zones": [_zone(env, z, holds) for z in p.dossier.zones],
            "purpose": PURPOSE_WORDS[p.revision.purpose], "state": STATE_WORDS[p.revision.status],
            "date": date_text(p.revision.date), "parties": p.dossier.parties,
            "open_comments": sum(1 for c in p.comments if c.status == "open"),
            "previous": env.history.previous if env.history else None,
            "open_holds": [{"id": k, "what": what.get(k, ""), "stage": v["stage"],
                            "role": v["released_by"]} for k, v in holds.items()
                           if v["state"] == "open"],
            "overrides": env.rules_overridden,
            "open_by_category": open_by_category(p.comments), "control": control_context(p, r)}


def _zone(env, zone, holds: dict) -> dict:
    p, r = env.project, env.results
    mix = r.value(zone.id, "selected_mix")
    sel = r.check("SPEC-SELECT", zone.id)
    chosen = p.specification.selection_for(zone.id) if p.specification else None
    out = {"id": zone.id, "name": zone.name, "mix": mix, "badge": Markup(badge(sel.status))
           if sel else "", "mix_name": p.mixes[mix].name if mix in p.mixes else "",
           "why": chosen[1].rationale if chosen else "", "open": [], "cost": ""}
    if not mix:
        # a reader's words, not the check's instruction to the specifier ("add a selection
        # to ..."): an issued revision may rightly come before any choice is made
        named = [f"{m} ({p.mixes[m].name})" if m in p.mixes else m for m in zone.candidates]
        out["candidates"] = and_list(named)
        out["open"].append("the choice of mortar, recorded in the specification")
        return out
    failed = [c.title[0].lower() + c.title[1:] for c in r.checks
              if c.status == "fail" and c.subject in (mix, f"{zone.id}/{mix}")]
    if failed:
        out["open"].append("accepted although it falls short on: " + "; ".join(failed)
                           + " (the specifier's justification is in the specification)")
    zone_ids = [z.id for z in p.dossier.zones]
    for key, h in holds.items():
        ref, stage = h.get("check") or "", h["stage"]
        named = [z for z in zone_ids if z in ref or z in stage]
        # a hold point naming zones is theirs; one naming none, of every zone using its mix
        if h["state"] == "open" and (zone.id in named or not named and (
                not ref or ref.endswith(f"/{mix}") or "/" not in ref)):
            out["open"].append(f"hold point {key}: {stage}")
    panels = [t for t in (p.specification.doc.trial_panels if p.specification else ())
              if t.zone == zone.id and t.mix == mix]
    if not any(t.judgement == "accepted" for t in panels):
        out["open"].append("trial panel not yet accepted" if panels else "no trial panel yet")
    cost = r.value(f"{zone.id}/{mix}", "cost_per_m2")
    if cost is not None and zone.area:
        unit = r.quantities[f"{zone.id}/{mix}"]["cost_per_m2"].unit.split("/")[0]
        out["cost"] = (f"{qty(cost, '', 3)} {unit}/m², about "
                       f"{rounded(round(cost * zone.area, -1), 'count')} {unit} of mortar for "
                       f"{qty(zone.area, 'm²')}")
    return out


@chapter("checks.md", "Check register", "checks.md.j2", volume="appendix")
def register(env) -> dict:
    r = env.results
    counts = [{"status": s, "badge": badge(s), "n": n, "word": STATUS_WORDS[s]}
              for s, n in r.counts().items() if n]
    rows = check_rows(r)
    flagged = sorted((row for row in rows if row["status"] in DECIDING),
                     key=lambda row: DECIDING.index(row["status"]))
    overrides = [{"label": rule_label(o.key), "default": qty(o.default, o.unit),
                  "value": qty(o.value, o.unit), "justification": o.justification}
                 for o in env.rules_overridden]
    return {"counts": counts, "rows": rows, "flagged": flagged, "overrides": overrides,
            "total": count(len(rows), "check result")}
