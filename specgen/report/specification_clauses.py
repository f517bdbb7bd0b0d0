"""The clauses of one zone's specification, as data for ``specification_clauses.md.j2``.

Every number a clause states is read from a check result or a quantity that a check
recorded (``source`` names it), or from the project file where it was typed — never
computed or typed here.  The same context renders the chapter's clauses and the plain
exports (Markdown and an HTML fragment) written beside the PDF.
"""
from __future__ import annotations

from specgen.report.fmt import as_given, num, qty, rounded
from specgen.views import family_words



def clause_context(project, results, zone, mix) -> dict:
    """Everything the clause template shows for ``mix`` chosen in ``zone``."""
    return {"zone": zone, "mix": mix, "materials": _materials(project, results, zone, mix),
            "proportions": _proportions(results, zone, mix), "joints": _joints(results, zone),
            "weather": _weather(project, results), "acceptance": _acceptance(results, zone, mix),
            "sampling": _sampling(results.value(zone.id, "sample_sets")),
            "non_conformance": _non_conformance(project),
            "colour": _colour(project, results, zone, mix),
            "durability": _durability(results, zone, mix)}


def _materials(project, results, zone, mix) -> dict:
    binders = []
    for part in mix.binders:
        b = project.binders[part.binder]
        ci = results.check("CHEM-CI", b.analysis) if b.analysis else None
        kind = family_words(b.type)
        binders.append({"id": b.id, "name": b.name,
                        # the family said once, not twice ("NHL 3.5 natural hydraulic lime")
                        "type": "" if kind.split(" (")[0].lower() in b.name.lower() else kind,
                        "declared": b.declared_class, "analysis": b.analysis,
                        "band": ci.limit.text if ci and ci.limit else "",
                        "ci": rounded(ci.value, "CI") if ci and ci.status != "not_assessed" else "",
                        "source": ci.key if ci else ""})
    sands = [{"id": s.sand, "name": project.sands[s.sand].name} for s in mix.sands]
    grad = results.check("COMP-GRAD", f"{zone.id}/{mix.id}")
    grading = None
    if grad is not None and grad.limit is not None:
        curves = results.value(f"{zone.id}/{mix.id}", "grading_curves") or {}
        env = curves.get("envelope")
        envelope = f"{env['title']} — {env['source']}" if env else ""
        grading = {"limit": grad.limit.text, "envelope": envelope, "source": grad.key,
                   "historic": zone.historic_mortar}
    admixtures = [{"name": a.name, "dose": as_given(round(100 * a.dose, 4)), "purpose": a.purpose}
                  for a in mix.admixtures]
    return {"binders": binders, "sands": sands, "grading": grading, "admixtures": admixtures}


def _proportions(results, zone, mix) -> dict:
    volume = " : ".join(as_given(p.parts) for p in mix.binders + mix.sands)
    by_mass = results.value(mix.id, "mass_proportions")
    names = [p.binder for p in mix.binders] + [p.sand for p in mix.sands]
    gauging = results.value(mix.id, "gauging")
    life = results.value(mix.id, "workable_life")
    vmax = (results.value(mix.id, "max_gauging_volume") or {}).get(zone.id)
    gauge = results.check("SITE-GAUGE", mix.id)
    setting = results.check("SITE-SET", mix.id)
    return {"names": " : ".join(names), "volume": volume,
            "mass": " : ".join(num(by_mass[n], 3) for n in names) if by_mass else "",
            "wb": as_given(mix.water_binder_ratio) if mix.water_binder_ratio else "",
            "consistence": as_given(round(mix.consistence * 1000, 6)) if mix.consistence else "",
            "gauging": _gauging(gauging), "vmax": as_given(vmax) if vmax is not None else "",
            "life": as_given(life["value"]) if life else "",
            "life_measured": bool(life and life["measured"]),
            "gauge_message": gauge.message if gauge is not None and not gauging else "",
            "setting": {"initial": as_given(round(mix.setting.initial / 60, 2)),
                        "final": as_given(round(mix.setting.final / 60, 2)),
                        "source": setting.key if setting else ""} if mix.setting else None,
            "sources": {"mass": f"MIX-YIELD/{mix.id}", "gauging": f"SITE-GAUGE/{mix.id}"}}


def _gauging(g: dict | None) -> dict | None:
    """The batching card's gauging as written on the card (no padding zeros)."""
    if not g:
        return None
    return {"binder_measures": g["binder_measures"], "measure_L": as_given(g["measure_L"]),
            "water_L": as_given(g["water_L"]), "volume_L": as_given(g["volume_L"])}


def _joints(results, zone) -> dict:
    """Joint preparation and application numbers as written in dossier.yaml (or the rule in
    force for the checks)."""
    ratio = results.rule("works.joint_depth_ratio").value
    width = as_given(round(zone.joint_width * 1000, 6)) if zone.joint_width else ""
    depth = as_given(round(zone.joint_depth * 1000, 6)) if zone.joint_depth else ""
    return {"width": width, "depth": depth, "ratio": as_given(ratio),
            "coats": [as_given(round(t * 1000, 6)) for t in zone.coats]}


def _weather(project, results) -> dict | None:
    w = results.value(project.dossier.project.code, "weather_window")
    if w is None:
        return None
    return {k: as_given(v) for k, v in w.items()} | {"source": f"SITE-WEATHER/"
                                                   f"{project.dossier.project.code}"}


def _acceptance(results, zone, mix) -> dict | None:
    table = results.value(zone.id, "site_acceptance")
    if table is None:
        return None
    ages = [{"age": k, "fk": as_given(v["characteristic_min"]), "each": as_given(v["individual_min"]),
             "source": v["source"]} for k, v in table.items() if k != "cap"]
    cap = table.get("cap")
    load = results.value(mix.id, "load_strength_day")
    return {"ages": ages, "source": f"SPEC-ACCEPT/{zone.id}",
            "cap": {"age": as_given(cap["age_d"]), "max": as_given(cap["max"]),
                    "source": cap["source"]} if cap else None,
            "load_day": as_given(load) if load is not None else "",
            "load_source": f"STR-SITE/{mix.id}"}


def _colour(project, results, zone, mix) -> dict | None:
    c = results.check("COMP-COLOUR", f"{zone.id}/{mix.id}")
    spec = project.specification.doc if project.specification else None
    panels = [tp.id for tp in (spec.trial_panels if spec else []) if tp.mix == mix.id
              and tp.zone in (None, zone.id) and tp.judgement == "accepted" and tp.judged_dry]
    if c is None and not panels:
        return None
    lim = c.limit if c is not None else None
    # a reading outside the limit is said in the clause itself, never left for the reader to find
    outside = (lim is not None and lim.compare == "<=" and lim.high is not None
               and isinstance(c.value, (int, float)) and c.value > lim.high)
    sel = project.specification.selection_for(zone.id) if project.specification else None
    justified = bool(sel and any(ref in (c.code, c.key) for ref in sel[1].covers)) if c else False
    return {"limit": lim.text if lim else "", "source": c.key if c is not None else "",
            "panels": ", ".join(panels),
            "measured": qty(c.value, "", 3, c.value_symbol) if outside else "",
            "justified": justified}


def _durability(results, zone, mix) -> dict | None:
    """The zone's exposure class and the durability tests asked for (DUR-EXPOSE, DUR-TESTS)."""
    ex = results.check("DUR-EXPOSE", zone.id)
    tests = results.value(zone.id, "durability_tests") or []
    if ex is None and not tests:
        return None
    return {"designation": ex.value if ex is not None and ex.status != "not_assessed" else "",
            "exposure_source": ex.key if ex is not None else "",
            "tests": [dict(t) for t in tests], "tests_source": f"DUR-TESTS/{zone.id}"}


def _sampling(q: dict | None) -> dict | None:
    if not q:
        return None
    return dict(q, ages=", ".join(f"{as_given(a)} d" for a in q["ages_d"]) or "none given")


def _non_conformance(project) -> str:
    spec = project.specification.doc if project.specification else None
    return spec.site_tests.non_conformance if spec else ""
