"""The composition chapter: analyses, indices and class, raw stone, and per binder the
calcination balance, firing, potential phases and hydration volumes.

Every number shown comes from the check results (``results.quantities``) — the
chapter formats and arranges, it does not compute.
"""
from __future__ import annotations

from specgen.report.chapters import badge, chapter, sheet_anchor
from specgen.report.fmt import as_given, num, rounded
from specgen.report.wording import plain, reader
from specgen.views import binder_analysis, family_words, oxide_order, raw_analyses

MAJOR = ("SiO2", "Al2O3", "Fe2O3", "CaO", "MgO", "SO3")
INDEX_COLUMNS = (("cementation_index", "CI"), ("hydraulic_index", "HI"),
                 ("lime_saturation_factor", "LSF"), ("silica_ratio", "SR"),
                 ("alumina_ratio", "AR"))


def _findings(env, subject: str) -> list[dict]:
    return [{"code": c.code, "title": c.title, "badge": badge(c.status), "message": reader(c.message),
             "href": f"calculations.md#{sheet_anchor(c)}"}
            for c in env.results.checks if c.subject == subject and c.code.startswith("CHEM-")]


@chapter("composition.md", "Binder composition", "composition.md.j2")
def composition(env) -> dict:
    p, r = env.project, env.results
    oxides = sorted({k for a in p.analyses.values() for k in a.mass_percent}, key=oxide_order)
    rows = [{"id": a.id, "kind": a.kind.replace("_", " "), "cells": [
        as_given(a.mass_percent[k]) if k in a.mass_percent else "—" for k in oxides]}
        for a in p.analyses.values()]
    ci = [c for c in r.checks if c.code == "CHEM-CI" and isinstance(c.value, float)]
    figure = None
    if ci:
        from specgen import refdata
        from specgen.report.figures import band_chart
        bands = [{"name": b["name"], "low": b["lower"], "high": b["upper"]}
                 for b in refdata.load("hydraulicity_bands").data]
        svg = band_chart([(c.subject, c.value) for c in ci], bands, "cementation index (Eckel)")
        figure = env.figure(
            "figures/cementation-index.svg", svg,
            "Cementation index of each analysis on the hydraulicity bands",
            "Scale of the cementation index shaded in bands from "
            f"{bands[0]['name']} to {bands[-1]['name']}, with a diamond for each analysis: "
            + "; ".join(f"{c.subject} at {rounded(c.value, 'CI')}" for c in ci) + ".")
    indices = [{"id": a.id, "class": env.results.value(a.id, "hydraulicity_class") or "—",
                # each index by its kind's rule (fmt.SYMBOL_PRECISION), as its sheet shows it
                "cells": [rounded(v, h) if (v := env.results.value(a.id, k)) is not None
                          else "—" for k, h in INDEX_COLUMNS]} for a in p.analyses.values()]
    from specgen.report.evidence_chapters import sample_links
    analyses = [{"id": a.id, "kind": a.kind.replace("_", " "), "description": a.description,
                 "sample": sample_links([a.lab_sample]) if a.lab_sample else "",
                 "laboratory": a.laboratory,
                 "findings": _findings(env, a.id)} for a in p.analyses.values()]
    binders = [_binder(env, b) for b in p.binders.values()]
    return {"oxides": oxides, "rows": rows, "figure": figure, "indices": indices,
            "index_heads": [h for _, h in INDEX_COLUMNS], "analyses": analyses,
            "binders": binders, "phases_figure": _phase_figure(env, p),
            "hydration": _hydration(env, p)}


def _binder(env, b) -> dict:
    p = env.project
    expected = env.results.value(b.id, "expected_fired_composition")
    balance = []
    if expected:
        raw = raw_analyses(b, p)[0]
        measured = binder_analysis(b, p)
        lf = env.results.value(measured.id, "loss_free_composition") or {}
        for ox in (k for k in MAJOR if k in expected or k in lf):
            e, m = expected.get(ox), lf.get(ox)
            balance.append({"oxide": ox, "raw": num(raw.mass_percent.get(ox, 0.0), 3),
                            "expected": num(e, 3) if e is not None else "—",
                            "measured": num(m, 3) if m is not None else "—",
                            "delta": f"{(m or 0.0) - (e or 0.0):+.2f}"})
    return {"id": b.id, "name": b.name, "type": family_words(b.type), "balance": balance,
            "findings": _findings(env, b.id)}


def _phase_figure(env, p):
    rows = [(b.id, ph) for b in p.binders.values()
            if (ph := env.results.value(b.id, "potential_phases"))]
    if not rows:
        return None
    from specgen.report.composition_figures import phase_bars
    return env.figure("figures/potential-phases.svg", phase_bars(rows),
                      "Potential phases of each binder (mass %); assignment as declared",
                      "Horizontal stacked bars, one per binder, each divided into its "
                      "potential phases in mass %: " + "; ".join(
                          f"{bid}: " + ", ".join(f"{k} {num(v, 2)} %" for k, v in ph.items()
                                                 if v and v >= 1)
                          for bid, ph in rows) + ".")


def _hydration(env, p) -> dict | None:
    volumes = next((v for b in p.binders.values()
                    if (v := env.results.value(b.id, "hydration_volumes"))), None)
    if volumes is None:
        return None
    from specgen.report.composition_figures import hydration_bars
    # the project's density set and the other one the check computed beside it
    name = p.dossier.chemistry.density_set
    other = next(k for k in volumes if k != name)
    fig = env.figure("figures/hydration-volumes.svg",
                     hydration_bars([(k, volumes[k]["volumes"]) for k in (name, other)]),
                     "Belite hydration by volume, before and after, with each density set",
                     "Pairs of stacked bars, one pair per density set ("
                     + " and ".join(plain(k) for k in (name, other)) + "): before, one volume "
                     "of belite with its water; after, the calcium silicate hydrate and "
                     "portlandite formed, lower by the hatched chemical shrinkage ("
                     + " and ".join(num(volumes[k]["chemical_shrinkage"], 3)
                                    for k in (name, other)) + " of the belite's volume).")
    sets = []
    for k in (name, other):
        v = volumes[k]["volumes"]
        sets.append({"name": plain(k), "chosen": k == name, "h": num(v["H"], 3),
                     "csh": num(v["C1.7SH4"], 3), "ch": num(v["CH"], 3),
                     "shrinkage": num(volumes[k]["chemical_shrinkage"], 3),
                     "increase": num(volumes[k]["solid_volume_increase"], 3)})
    per_binder = [{"id": b.id, "c2s": num(env.results.value(b.id, "c2s_potential"), 3),
                   "water": num(env.results.value(b.id, "water_for_full_hydration"), 3),
                   "ch": num(env.results.value(b.id, "ch_from_hydration"), 3)}
                  for b in p.binders.values() if env.results.value(b.id, "water_for_full_hydration")]
    mixes = [{"id": m.id, "wb": num(m.water_binder_ratio, 3),
              "porosity": num(env.results.value(m.id, "capillary_porosity"), 3),
              "x": num(env.results.value(m.id, "gel_space_ratio"), 3),
              "findings": _findings(env, m.id)}
             for m in p.mixes.values() if env.results.value(m.id, "capillary_porosity") is not None]
    return {"figure": fig, "sets": sets, "binders": per_binder, "mixes": mixes}
