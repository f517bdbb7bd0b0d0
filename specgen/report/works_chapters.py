"""The works chapter (mixes, quantities and batching) and one batching card per mix.

Every number comes from the works checks' recorded quantities (``MIX-YIELD``,
``WORKS-QTY``, ``SITE-GAUGE``, ``SITE-WEATHER``); this module arranges and formats
them, links each item to its calculation sheet and publishes the quantities
schedule as a CSV beside the PDF (``specgen.report.works_schedule``).
"""
from __future__ import annotations

import datetime as dt

from specgen.report import works_schedule as ws
from specgen.report.cautions import card_cautions
from specgen.report.chapters import badge, chapter, sheet_anchor
from specgen.report.fmt import as_given, date_text, num, rounded
from specgen.report.wording import reader

CALC = "calculations.md"


def _link(c) -> dict | None:
    if c is None:
        return None
    return {"href": f"{CALC}#{sheet_anchor(c)}", "badge": badge(c.status), "message": reader(c.message)}


@chapter("works.md", "Mixes, quantities and batching", "works.md.j2")
def works(env) -> dict:
    p, r = env.project, env.results
    zones = ws.schedule(p, r)
    csv_name = None
    if any(z.mixes for z in zones):
        csv_name = env.pageset.add_download(ws.csv_name(p), ws.to_csv(zones))
    weather = r.value(p.dossier.project.code, "weather_window")
    outside = r.value(p.dossier.project.code, "days_outside_window")
    return {"mixes": [_mix(env, m) for m in p.mixes.values()],
            "zones": [_zone(env, z) for z in zones], "csv": csv_name,
            "weather": _weather(weather, outside),
            "weather_check": _link(env.results.check("SITE-WEATHER", p.dossier.project.code)),
            "cards": [{"id": m.id, "href": card_path(m.id)} for m in p.mixes.values()
                      if r.value(m.id, "gauging")]}


def card_path(mix_id: str) -> str:
    return f"card-{mix_id}.md"


def _mix(env, mix) -> dict:
    r = env.results
    props = r.value(mix.id, "mass_proportions") or {}
    per_m3 = r.value(mix.id, "yield_per_m3") or {}
    parts = {b.binder: b.parts for b in mix.binders} | {s.sand: s.parts for s in mix.sands}
    rows = [{"name": ws.label(env.project, mix, k), "kind": ws.kind_of(mix, k),
             "parts": as_given(parts[k]) if k in parts else "—",
             "mass": num(props[k], 3) if k in props else "—",
             "per_m3": rounded(v, "kg/m³")}
            for k, v in per_m3.items()]
    return {"id": mix.id, "name": mix.name, "rows": rows,
            "wb": as_given(mix.water_binder_ratio) if mix.water_binder_ratio else "—",
            "check": _link(env.results.check("MIX-YIELD", mix.id)),
            "gauge": _link(env.results.check("SITE-GAUGE", mix.id))}


def _zone(env, z: ws.ZoneSchedule) -> dict:
    c = env.results.check("WORKS-QTY", z.zone.id)
    return {"id": z.zone.id, "name": z.zone.name, "works": z.zone.works,
            "net": rounded(z.net, "m³") if z.net is not None else None,
            "total": rounded(z.total, "m³") if z.total is not None else None,
            "wastage": as_given(z.wastage) if z.wastage is not None else None,
            "joint_length": rounded(z.joint_length, "m/m²") if z.joint_length else None,
            "heads": [m.mix_id for m in z.mixes], "rows": _zone_rows(z), "check": _link(c),
            "reason": reader(c.message) if c is not None and c.status == "not_assessed" else ""}


def _zone_rows(z: ws.ZoneSchedule) -> list[dict]:
    """One row per constituent (and per binder's bags), one column per mix."""
    found = {}
    for m in z.mixes:
        for i in m.items:
            found.setdefault((i.kind, i.id), i)
            if i.bags is not None:
                found.setdefault(("bags", i.id), i)
    rows = []
    for (kind, key), i in sorted(found.items(), key=lambda kv: (  # bags under their binder
            ws.KIND_ORDER.index("binder" if kv[0][0] == "bags" else kv[0][0]), kv[0][1],
            kv[0][0] == "bags")):
        cells = []
        for m in z.mixes:
            hit = next((x for x in m.items if x.kind == i.kind and x.id == key), None)
            cells.append("—" if hit is None else
                         str(hit.bags) if kind == "bags" and hit.bags is not None else
                         "—" if kind == "bags" else rounded(hit.mass, "kg"))
        what = (f"{i.id}: bags of {as_given(i.bag_mass)} kg" if kind == "bags"
                else f"{i.label} (kg)")
        rows.append({"what": what, "kind": "bags" if kind == "bags" else kind, "cells": cells})
    return rows


def _when(o: dict) -> str:
    """A day of the site record: its date when the record is dated, else its day number."""
    if o.get("date"):
        return date_text(dt.date.fromisoformat(o["date"]))
    return f"day {as_given(o['day'])}"


def _weather(window, outside) -> dict | None:
    if not window:
        return None
    sides = {side: ", ".join(f"{_when(o)} ({as_given(o['temperature'])} °C)"
                             for o in (outside or []) if o["side"] == side)
             for side in ("cold", "hot")}
    return {"low": as_given(window["low"]), "high": as_given(window["high"]),
            "curing": as_given(window["curing_days"]),
            "protection": as_given(window["protection_days"]),
            "cold": sides["cold"], "hot": sides["hot"], "n_outside": len(outside or []),
            "recorded": outside is not None}


@chapter("card.md", "Batching cards", "card.md.j2")
def cards(env) -> list[dict]:
    """One page per mix that has a gauging (SITE-GAUGE): the printable batching card."""
    pages = []
    for mix in env.project.mixes.values():
        g = env.results.value(mix.id, "gauging")
        if g:
            pages.append(dict(_card(env, mix, g), path=card_path(mix.id),
                              title=f"Batching card {mix.id}"))
    return pages


def _rule(env, key: str) -> float:
    return env.results.rule(key).value


def _card(env, mix, g: dict) -> dict:
    p, r = env.project, env.results
    life = r.value(mix.id, "workable_life")
    cautions, closing = card_cautions(p, mix)
    window = r.value(p.dossier.project.code, "weather_window")
    return {"mix": {"id": mix.id, "name": mix.name}, "measure": as_given(g["measure_L"]),
            "halved_from": as_given(g["halved_from_L"]) if g["halved_from_L"] else None,
            "volume": rounded(g["volume_L"], "L"), "water": rounded(g["water_L"], "L"),
            "life": as_given(life["value"]), "life_measured": life["measured"],
            "steps": ws.card_steps(p, mix, g),
            "zones": ws.card_zones(r, mix.id, _rule(env, "works.max_gaugings_per_day")),
            "most_per_day": as_given(_rule(env, "works.max_gaugings_per_day")),
            "weather": _weather(window, None), "cautions": cautions, "closing": closing,
            "check": _link(env.results.check("SITE-GAUGE", mix.id))}
