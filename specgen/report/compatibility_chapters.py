"""The historic fabric and the compatibility chapter (one section per zone): a matrix of
candidate mortars × criteria with statuses, the grading curves with the envelope, colour
swatches beside ΔE00, the moisture bar chart and the findings linked to their sheets.

Numbers come from the check results (``results.quantities`` and ``checks``): the grading
curves, moisture bars and colour swatches are drawn from what the checks recorded; nothing is
computed here.
"""
from __future__ import annotations

from specgen.checks.registry import in_matrix
from specgen.checks.result import STATUSES
from specgen.report.chapters import badge, chapter, sheet_anchor
from specgen.report.fmt import as_given, num, qty, rounded
from specgen.report.wording import reader
from specgen.units import ROOT_MIN
from specgen.views import pairs as zone_pairs


def _columns(matrix: str) -> dict[str, str]:
    """A matrix's columns, check code → short heading, as the checks declare them
    (``@register(..., matrix=, column=)``), in run order."""
    return {s.code: s.column for s in in_matrix(matrix) if s.column}


def _findings() -> tuple[str, ...]:
    """The checks listed under a zone's findings: the compatibility checks, then the durability
    ones (SITE-SET runs per mix and DUR-SOUND per binder: see :func:`_durability_result`)."""
    return tuple(s.code for m in ("compatibility", "durability") for s in in_matrix(m))


PROPERTIES = (("compressive_strength", "compressive strength", 1e-6, "MPa"),
              ("elastic_modulus", "elastic modulus", 1e-9, "GPa"),
              ("capillary_coefficient", "capillary coefficient", ROOT_MIN, "kg/(m²·min^½)"),
              ("vapour_resistance_factor", "vapour resistance factor μ", 1.0, ""),
              ("thermal_expansion", "thermal expansion", 1e6, "× 10⁻⁶/K"),
              ("hygric_expansion", "hygric expansion", 1e3, "mm/m"))


def _cell(c) -> dict:
    if c is None:
        return {"badge": "—", "value": "", "href": ""}
    value = "" if c.status == "not_assessed" or c.value is None else qty(c.value, c.unit, 3, c.value_symbol)
    return {"badge": badge(c.status), "value": value,
            "href": f"calculations.md#{sheet_anchor(c)}"}


@chapter("fabric.md", "The historic fabric", "fabric.md.j2")
def fabric(env) -> dict:
    """Masonry units and historic mortars with their measured properties, salts and sources."""
    p = env.project
    items = [_material("masonry unit", m) for m in p.masonry_units.values()]
    items += [_material("historic mortar", m) for m in p.historic_mortars.values()]
    return {"items": items}


def _material(kind: str, m) -> dict:
    rows = [{"name": label, "value": f"{as_given(round(getattr(m, attr) * factor, 9))} {unit}".strip()}
            for attr, label, factor, unit in PROPERTIES if getattr(m, attr, None) is not None]
    salts = getattr(m, "salts", None)
    if salts is not None:
        for ion in ("chloride", "nitrate", "sulfate"):
            v = getattr(salts, ion)
            if v is not None:
                rows.append({"name": f"{ion} (soluble)", "value": f"{as_given(v)} mass %"})
    extra = []
    if getattr(m, "binder_analysis", None):
        extra.append(f"binder analysis {m.binder_analysis} (see Binder composition)")
    if getattr(m, "aggregate_sample", None):
        extra.append(f"aggregate recovered by acid digestion: sample {m.aggregate_sample}")
    if m.lab_samples:
        from specgen.report.evidence_chapters import sample_links
        extra.append(f"measured on sample{'s' if len(m.lab_samples) > 1 else ''} "
                     + sample_links(m.lab_samples) + " (see the sample register)")
    return {"kind": kind, "id": m.id, "name": m.name, "rows": rows, "extra": extra,
            "source": m.source or "—",
            "salt_sample": salts.sample if salts is not None and salts.sample else ""}


@chapter("compatibility.md", "Compatibility with the fabric", "compatibility.md.j2",
         sections=True)  # a zone a page
def compatibility(env) -> dict:
    p = env.project
    zones = [_zone(env, z) for z in p.dossier.zones if z.candidates]
    return {"zones": zones, "criteria": list(_columns("compatibility").values()),
            "durability": list(_columns("durability").values()), "decides": DECIDES_TEXT}


DECIDES_TEXT = ("No standard acceptance threshold exists for the colour of repointing: a CIEDE2000 "
                "difference of about 1 is just noticeable and 2–3.5 is visible at a glance "
                "(common practice). The threshold used here is a project rule; trial panels, "
                "judged dry by eye in daylight, decide.")


def _zone(env, z) -> dict:
    p = env.project
    pairs = zone_pairs(z, p)
    matrix = [{"mix": pr.mix_id, "name": pr.mix.name if pr.mix else "unknown mix",
               "cells": [_cell(env.results.check(code, pr.subject)) for code in _columns("compatibility")]}
              for pr in pairs]
    durability = [{"mix": pr.mix_id, "cells": [_cell(_durability_result(env, code, pr))
                                               for code in _columns("durability")]} for pr in pairs]
    findings = [{"code": c.code, "title": c.title, "subject": c.subject, "badge": badge(c.status),
                 "message": reader(c.message), "href": f"calculations.md#{sheet_anchor(c)}"}
                for code in _findings() for pr in pairs if (c := env.results.check(code, pr.subject))]
    expose = env.results.check("DUR-EXPOSE", z.id)
    unit = pairs[0].unit if pairs else None
    hist = pairs[0].historic if pairs else None
    return {"id": z.id, "name": z.name, "works": z.works,
            "unit": f"{unit.id} — {unit.name}" if unit else "none named",
            "historic": f"{hist.id} — {hist.name}" if hist else "none named",
            "matrix": matrix, "findings": findings, "durability": durability,
            "exposure": _cell(expose) | {"text": expose.message if expose else ""},
            # figures are numbered as they are made: make them in the order they are shown
            "figures": [f for f in (_grading_figure(env, z, pairs), _moisture_figure(env, z, pairs),
                                    _colour_figure(env, z, pairs)) if f],
            "has_colour": any(env.results.check("COMP-COLOUR", pr.subject) for pr in pairs)}


def _durability_result(env, code: str, pr):
    """The result shown in the durability matrix: per pair, per mix (SITE-SET) or the most
    severe over the mix's binders (DUR-SOUND)."""
    r = env.results
    if code == "SITE-SET":
        return r.check(code, pr.mix_id)
    if code == "DUR-SOUND":
        found = [c for b in (pr.mix.binders if pr.mix else []) if (c := r.check(code, b.binder))]
        return min(found, key=lambda c: STATUSES.index(c.status)) if found else None
    return r.check(code, pr.subject)


def _grading_figure(env, z, pairs) -> dict | None:
    """Curves from what COMP-GRAD recorded per pair (the figure computes nothing)."""
    recorded = [(pr, env.results.value(pr.subject, "grading_curves")) for pr in pairs]
    recorded = [(pr, v) for pr, v in recorded if v]
    if not recorded:
        return None
    curves = [dict(v["repair"], label=f"{pr.mix_id} sand") for pr, v in recorded]
    first, hist = recorded[0][0], recorded[0][1]["historic"]
    envelope = recorded[0][1].get("envelope")
    from specgen.report.compatibility_figures import grading_curves
    svg = grading_curves(curves, envelope, dict(
        hist, label=f"historic aggregate {first.historic.aggregate_sample}"))
    return env.figure(f"figures/grading-{z.id}.svg", svg,
                      f"Zone {z.id}: grading of each candidate's sand"
                      + " against the historic aggregate"
                      + (f" and the envelope {envelope['title']}" if envelope else ""),
                      "Cumulative per cent passing against sieve aperture in mm on a "
                      "logarithmic axis: a dashed line for the historic aggregate "
                      f"{first.historic.aggregate_sample}, a solid line for the sand of "
                      + ", ".join(pr.mix_id for pr, _ in recorded)
                      + (", over the shaded envelope" if envelope else "") + ".")


def _colour_figure(env, z, pairs) -> dict | None:
    rows = []
    for pr in pairs:
        v = env.results.value(pr.subject, "delta_e_2000")
        if v is None:
            continue
        hist, panel = v["historic_swatch"], v["panel_swatch"]
        rows.append({"label": f"{pr.mix_id} panel", "historic_label": pr.historic.id,
                     "historic_hex": hist["hex"], "panel_hex": panel["hex"],
                     "delta_e": rounded(v["value"], "ΔE00"), "clipped": hist["clipped"] or panel["clipped"]})
    if not rows:
        return None
    from specgen.report.compatibility_figures import colour_swatches
    return env.figure(f"figures/colour-{z.id}.svg", colour_swatches(rows),
                      f"Zone {z.id}: mean colours of the historic mortar and of each trial panel "
                      "(display approximation of the CIELAB means, D65) with ΔE00",
                      "Pairs of colour squares, the historic mortar on the left and the trial "
                      "panel on the right: " + "; ".join(
                          f"{r['historic_label']} beside the {r['label']}, colour difference "
                          f"ΔE00 {r['delta_e']}" for r in rows) + ".")


def _moisture_figure(env, z, pairs) -> dict | None:
    """Bars from what COMP-MOIST recorded per pair (the figure computes nothing)."""
    if not pairs:
        return None
    r = env.results
    caps = [r.value(pr.subject, "capillary_coefficient") or {} for pr in pairs]
    mus = [r.value(pr.subject, "vapour_resistance_factor") or {} for pr in pairs]

    def first(key, found):
        return next((f[key] for f in found if key in f), None)
    bars = [{"label": f"{m.id} ({word})", "role": role, "capillary": first(key, caps),
             "mu": first(key, mus)}
            for role, key, word, m in (("unit", "units", "units", pairs[0].unit),
                                       ("historic", "historic", "historic", pairs[0].historic))
            if m is not None]
    bars += [{"label": pr.mix_id, "role": "repair", "capillary": c.get("repair"),
              "mu": mu.get("repair")} for pr, c, mu in zip(pairs, caps, mus)]
    if not any(b["capillary"] or b["mu"] for b in bars):
        return None
    from specgen.report.compatibility_figures import moisture_bars
    return env.figure(f"figures/moisture-{z.id}.svg", moisture_bars(bars),
                      f"Zone {z.id}: capillary absorption and vapour resistance of the fabric "
                      "and each candidate", _moisture_alt(bars))


def _moisture_alt(bars: list[dict]) -> str:
    """The two bar panels in words, value by value."""
    def values(key):
        return "; ".join(f"{b['label']} {num(b[key], 3) if b[key] is not None else 'not given'}"
                         for b in bars)
    return ("Two panels of horizontal bars, one bar per material. Left, the capillary "
            "absorption coefficient in kg/(m²·√min), higher is more open: " + values("capillary")
            + ". Right, the vapour resistance factor μ, lower is more open: " + values("mu")
            + ".")
