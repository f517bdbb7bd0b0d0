"""The dossier's built-in chapters (summary, scope, composition, sheets, cautions, ...)."""
from __future__ import annotations

from specgen.report.cautions import cautions_for
from specgen.report.chapters import chapter
from specgen.report.fmt import qty

@chapter("scope.md", "Scope and zones of work", "scope.md.j2")
def scope(env) -> dict:
    p = env.project
    rows = []
    for z in p.dossier.zones:
        unit = p.masonry_units.get(z.units) if z.units else None
        hist = p.historic_mortars.get(z.historic_mortar) if z.historic_mortar else None
        rows.append({"id": z.id, "name": z.name, "works": z.works, "exposure": z.exposure or "—",
                     "area": qty(z.area, "m²", 3) if z.area else "—",
                     "units": unit.name if unit else "—", "historic": hist.name if hist else "—",
                     "candidates": ", ".join(z.candidates) or "—"})
    req = p.dossier.requirements
    # each quantity to the precision of its kind (strengths to 0.1 MPa, ages in whole days)
    reqs = [f"minimum compressive strength {qty(m.value / 1e6, 'MPa')} at "
            f"{qty(m.age / 86400, 'd')}" for m in req.min_compressive]
    if req.max_compressive_long_term:
        reqs.append(f"long-term compressive strength at most "
                    f"{qty(req.max_compressive_long_term / 1e6, 'MPa')}")
    return {"zones": rows, "requirements": reqs, "practice": _practice(env),
            "heritage": heritage_context(p)}


def _sentence(text: str) -> str:
    text = text[:1].upper() + text[1:]
    return text if text.endswith((".", "!", "?")) else text + "."


def heritage_context(p) -> dict:
    """The heritage context as the scope page shows it and the selection rationale cites it;
    what a protected building leaves unstated is named, not hidden."""
    h, info = p.dossier.heritage, p.dossier.project
    significance = (h.significance if h and h.significance else "") or info.significance
    rows = [("Designation", h.designation if h else ""), ("Consent", h.consent if h else ""),
            ("Conservation approach", "; ".join(h.approach) if h else ""),
            ("How the approach applies", h.approach_note if h else ""),
            ("Heritage impact", h.impact if h else "")]
    missing = [k for k, v in rows[:3] + rows[4:] if not v] if info.protected_building else []
    return {"given": h is not None or bool(significance), "significance": significance,
            "rows": [{"what": k, "text": _sentence(v)} for k, v in rows if v], "missing": missing,
            "approach": list(h.approach) if h else [], "href": "scope.md#heritage-context"}


def _practice(env) -> dict:
    """The set of standards the dossier follows, each test method cited."""
    from specgen import practice, refdata
    from specgen.checks.result import Basis
    pr = practice.resolve(env.project.dossier)
    with refdata.unrecorded():
        envelope = refdata.load("grading_envelopes").data[pr.grading_envelope]
    with refdata.unrecorded():
        classes = refdata.load("strength_classes").data[pr.mortar_classes]["title"]
    return {"title": pr.title, "stated": pr.stated, "mixed": list(pr.mixed),
            "reason": pr.mixing_reason, "series": practice.series_title(pr.sieve_series),
            "envelope": envelope["title"], "mortar_classes": classes,
            "us_beside": pr.unit_display == "US customary beside SI",
            "methods": [{"what": m["what"], "clause": m.get("clause", ""),
                         "cite": env.cite(Basis("reference", m["ref"], m.get("clause", "")))}
                        for m in pr.test_methods]}


@chapter("calculations.md", "Calculation sheets", "calculations.md.j2", volume="appendix")
def calculations(env) -> dict:
    return {"sheets": [env.sheet(c) for c in env.results.checks]}


@chapter("cautions.md", "Cautions", "cautions.md.j2")
def cautions(env) -> dict:
    chosen, closing = cautions_for(env.project)
    return {"cautions": chosen, "closing": closing}


@chapter("inputs.md", "Input files", "inputs.md.j2", volume="appendix")
def inputs(env) -> dict:
    return {"files": [{"path": f.path, "sha256": f.sha256, "size": f.size}
                      for f in env.project.inputs]}


@chapter("references.md", "References", "references.md.j2")
def references(env) -> dict:
    # Rendered last so that every citation made by earlier chapters is numbered; a standard
    # named in the text of a page (e.g. "EN 1015-11" in a clause) is cited too, so the list
    # holds every standard the dossier names that the bibliography knows.
    from specgen.report.references import named_in
    for key in named_in(env.pageset.pages.values()):
        env.citations.cite(key)
    return {"entries": env.citations.listing()}
