"""The dossier's built-in chapters (summary, scope, composition, sheets, cautions, ...)."""
from __future__ import annotations

from specgen.report.cautions import cautions_for
from specgen.report.chapters import badge, chapter, check_rows
from specgen.report.fmt import num, qty
from specgen.report.marks import control_context
from specgen.report.review import open_by_category
from specgen.report.specification_chapters import specification_summary

PURPOSE_WORDS = {"preliminary": "preliminary", "for_approval": "for approval",
                 "for_construction": "for construction"}
STATE_WORDS = {"draft": "draft", "issued": "issued"}
#: Statuses listed with their finding at the top of the summary, most severe first.
DECIDING = ("fail", "hold", "attention")


@chapter("index.md", "Summary", 10, "summary.md.j2")
def summary(env) -> dict:
    p, r = env.project, env.results
    counts = [{"status": s, "badge": badge(s), "n": n} for s, n in r.counts().items() if n]
    rows = check_rows(r)
    flagged = sorted((row for row in rows if row["status"] in DECIDING),
                     key=lambda row: DECIDING.index(row["status"]))
    return {"counts": counts, "rows": rows, "flagged": flagged,
            "purpose": PURPOSE_WORDS[p.revision.purpose], "state": STATE_WORDS[p.revision.status],
            "parties": p.dossier.parties, "overrides": env.rules_overridden,
            "open_comments": sum(1 for c in p.comments if c.status == "open"),
            "open_by_category": open_by_category(p.comments),
            "previous": env.history.previous if env.history else None,
            "control": control_context(p, r), **specification_summary(env)}


@chapter("scope.md", "Scope and zones of work", 20, "scope.md.j2")
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
    reqs = [f"minimum compressive strength {qty(m.value / 1e6, 'MPa', 3)} at {num(m.age / 86400, 3)} d"
            for m in req.min_compressive]
    if req.max_compressive_long_term:
        reqs.append(f"long-term compressive strength at most "
                    f"{qty(req.max_compressive_long_term / 1e6, 'MPa', 3)}")
    return {"zones": rows, "requirements": reqs}


@chapter("calculations.md", "Calculation sheets", 80, "calculations.md.j2")
def calculations(env) -> dict:
    return {"sheets": [env.sheet(c) for c in env.results.checks]}


@chapter("cautions.md", "Cautions", 85, "cautions.md.j2")
def cautions(env) -> dict:
    chosen, closing = cautions_for(env.project)
    return {"cautions": chosen, "closing": closing}


@chapter("inputs.md", "Input files", 95, "inputs.md.j2")
def inputs(env) -> dict:
    return {"files": [{"path": f.path, "sha256": f.sha256, "size": f.size}
                      for f in env.project.inputs]}


@chapter("references.md", "References", 90, "references.md.j2")
def references(env) -> dict:
    # Rendered last so that every citation made by earlier chapters is numbered.
    return {"entries": env.citations.listing()}
