"""The method statement: per zone, derived from its works and the chosen mortar (each part
replaceable by the project's wording in method.yaml); who does what, from the parties;
aftercare and the record of the works.  Words come from content/data/method_statement.yaml;
numbers from the checks (rake-out depth, gaugings, weather window) — none computed here."""
from __future__ import annotations

from specgen.report.chapters import badge, chapter, sheet_anchor
from specgen.report.fmt import as_given
from specgen.views import family_words

PARTS = (("preparation", "Preparation"), ("sequencing", "Sequence and bays"),
         ("protection", "Protection of the fabric and the public"), ("placing", "Placing"),
         ("finishing", "Finishing"), ("curing", "Curing and protection"),
         ("weather", "Weather limits"))


def _words():
    from specgen import refdata
    return refdata.load("method_statement").data


@chapter("method.md", "Method statement", "method.md.j2")
def method(env) -> dict:
    p, words = env.project, _words()
    window = env.results.value(p.dossier.project.code, "weather_window") or {}
    zones = [_zone(env, z, words, window) for z in p.dossier.zones]
    return {"zones": zones, "responsibilities": _responsibilities(p, words),
            "competence": (p.method.competence if p.method and p.method.competence
                           else words["competence"]),
            "aftercare": words["aftercare"], "general_holds": _holds(p, None)}


def _values(env, zone, window: dict) -> dict:
    """The numbers the wording quotes, as the checks recorded them."""
    from specgen.checks.rules import RuleBook
    r, mix = env.results, env.results.value(zone.id, "selected_mix")
    rake = r.value(zone.id, "rake_out_depth")
    held = getattr(r.check("MTH-RAKE", zone.id), "status", None) == "hold"
    layer = RuleBook(env.project.dossier.rule_overrides)["method.pointing_layer"]
    by_zone = (r.value(mix, "gauging_by_zone") or {}).get(zone.id, {}) if mix else {}
    coats = [f"coat {i} {as_given(round(t * 1e3, 6))} mm" for i, t in enumerate(zone.coats, 1)]
    bay = r.value(zone.id, "bay_area")
    return {"depth": ("a depth agreed on a trial bay with the heritage authority (joints this "
                      "fine cannot meet both rules of practice for the rake-out depth)") if held
            else f"{as_given(rake['depth'])} mm (the rule from the joint width gives "
                 f"{as_given(rake['rule'])} mm)" if rake else "sound mortar",
            "bay": (f"about {_sig(bay['area'], 2)} m² of face (the day's "
                    f"{_sig(bay['per_day_l'], 3)} L of mortar at {_sig(bay['per_m2_l'], 3)} L per "
                    "m² of face)" if bay else
                    "a bay of the size the trial panel shows one crew finishes in a day"),
            "layer": f"{as_given(layer.value)} mm", "coats": ", ".join(coats) or "as specified",
            "gaugings": str(by_zone.get("per_day", "the")),
            "low": as_given(window.get("low")) if window else "the lower limit",
            "high": as_given(window.get("high")) if window else "the upper limit",
            "curing": as_given(window.get("curing_days")) if window else "the specified",
            "protection": as_given(window.get("protection_days")) if window else "the specified"}


def _sig(value: float, digits: int) -> str:
    """``value`` to ``digits`` significant figures, without trailing zeros (48, 3.09, 7.5)."""
    return as_given(float(f"{value:.{digits}g}"))


def _zone(env, zone, words: dict, window: dict) -> dict:
    p = env.project
    mix = env.results.value(zone.id, "selected_mix")
    families = sorted({p.binders[b.binder].type for b in p.mixes[mix].binders
                       if b.binder in p.binders}) if mix in p.mixes else []
    values = _values(env, zone, window)
    kind = words["works"][zone.works]
    derived = {part: kind[part] for part in ("preparation", "sequencing", "placing",
                                              "finishing")}
    derived["protection"] = words["protection"]
    derived["curing"] = " ".join(words["curing"][f] for f in families) if families else (
        "Held: no mortar is chosen for this zone yet, so its curing cannot be stated.")
    derived["weather"] = words["weather"]
    own = next((m for m in (p.method.zones if p.method else []) if m.zone == zone.id), None)
    parts = []
    for key, title in PARTS:
        text = getattr(own, key, "") if own else ""
        parts.append({"title": title, "own": bool(text),
                      "text": text or " ".join(derived[key].split()).format(**values)})
    rake = env.results.check("MTH-RAKE", zone.id)
    return {"id": zone.id, "name": zone.name, "works": zone.works, "mix": mix or "",
            "families": family_words(*families),
            "parts": parts, "holds": _holds(p, zone.id),
            "rake": {"badge": badge(rake.status), "href": f"calculations.md#{sheet_anchor(rake)}"}
            if rake else None}


def _holds(p, zone_id: str | None) -> list[dict]:
    """Hold points whose stage names the zone (``None``: those that name no zone)."""
    spec = p.specification.doc if p.specification else None
    ids = [z.id for z in p.dossier.zones]
    out = []
    for h in spec.hold_points if spec else []:
        named = [z for z in ids if z in f"{h.stage} {h.what}".replace(",", " ").split()]
        if (zone_id in named) if zone_id else not named:
            out.append({"id": h.id, "what": h.what, "stage": h.stage,
                        "by": h.released_by or "—", "state": h.state})
    return out


def _responsibilities(p, words: dict) -> list[dict]:
    roles = {x.role: x for x in p.dossier.parties}
    tasks = [(r.task, r.role) for r in p.method.responsibilities] if p.method and \
        p.method.responsibilities else [(r["task"], r["role"]) for r in words["responsibilities"]]
    spec = p.specification.doc if p.specification else None
    tasks += [(f"releases hold point {h.id}: {h.what}", h.released_by)
              for h in (spec.hold_points if spec else []) if h.released_by]
    out = []
    for task, role in tasks:
        party = roles.get(role)
        who = (f"{party.name}, {party.organisation}" if party and party.organisation
               else party.name if party else "not yet named among the parties of the dossier data")
        out.append({"task": task, "role": role, "who": who, "named": party is not None})
    return out
