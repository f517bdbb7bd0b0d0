"""The specification chapter: options appraisal, the choice per zone, the clauses, the site
test regime, hold points and trial panels; and the plain exports of each zone's clauses.

Statuses, values and clause numbers are read from the check results (SPEC-* and the checks
on each candidate); nothing is recomputed here.
"""
from __future__ import annotations

from markupsafe import Markup, escape

from specgen.checks.result import STATUS_WORDS
from specgen.report.chapters import badge, chapter
from specgen.report.fmt import anchor, as_given, date_text, qty, rounded, unit_symbol
from specgen.report.specification_clauses import clause_context
from specgen.report.wording import reader
from specgen.views import applicable

STATE_CLASS = {"open": "hold", "released": "pass"}


def _href(key: str) -> str:
    code, _, subject = key.partition("/")
    return f"calculations.md#calc-{anchor(code, subject)}"


def _cell(c) -> dict:
    if c is None:
        return {"badge": Markup("—"), "value": "", "href": ""}
    value = "" if c.status == "not_assessed" or c.value is None else qty(
        c.value, c.unit, kind=c.value_symbol)
    return {"badge": Markup(badge(c.status)), "value": value, "href": _href(c.key)}


def state_badge(state: str) -> Markup:
    return Markup(f'<span class="sg-badge sg-{STATE_CLASS[state]}">{escape(state)}</span>')


@chapter("specification.md", "Specification", "specification.md.j2")
def specification(env) -> dict:
    p, r = env.project, env.results
    spec = p.specification
    from specgen.report.render import template_env
    jenv = template_env(p.root)
    # the clauses of each zone's chosen mix, worked out once for the page and the exports
    chosen, clauses = {}, {}
    for z in p.dossier.zones:
        if r.value(z.id, "selected_mix"):
            chosen[z.id] = p.mixes[r.value(z.id, "selected_mix")]
            clauses[z.id] = clause_context(p, r, z, chosen[z.id])
            # clauses numbered within the dossier's sections: chapter.zone.clause (9.2.3)
            clauses[z.id]["number"] = f"{env.number}.{len(clauses)}" if env.number \
                else str(len(clauses))
    zones = [_zone(env, z, jenv, clauses.get(z.id)) for z in p.dossier.zones]
    exports = _exports(env, jenv, chosen, clauses) if spec else []
    regime, holds, panels = _regime(r, p), _hold_points(p, r), _panels(env)
    if spec:
        _chapter_document(env, jenv, zones, clauses, regime, holds)
    return {"has_spec": spec is not None, "zones": zones, "exports": exports,
            "regime": regime, "hold_points": holds, "tests": _tests_asked(p, r),
            "chapter_docx": _chapter_path(p) if spec else "", "panels": panels, "currency": spec.doc.currency if spec else ""}


def _approach(p) -> dict | None:
    """The conservation approach the rationale is read against (scope page)."""
    from specgen.report.builtin_chapters import heritage_context
    h = heritage_context(p)
    return {"words": ", ".join(h["approach"]), "href": h["href"]} if h["approach"] else None


def _zone(env, zone, jenv, clause_ctx) -> dict:
    p, r = env.project, env.results
    sel = r.check("SPEC-SELECT", zone.id)
    chosen = r.value(zone.id, "selected_mix")
    s = p.specification.selection_for(zone.id)[1] if chosen and p.specification else None
    clauses = _clauses(jenv, clause_ctx) if clause_ctx else None
    checks = applicable(r.checks, p, zone.id, chosen) if chosen else []
    failed = [c for c in checks if c.status == "fail"]
    return {"id": zone.id, "name": zone.name, "works": zone.works, "candidates": list(zone.candidates),
            "selected": chosen, "mix_name": p.mixes[chosen].name if chosen else "",
            "badge": Markup(badge(sel.status)) if sel else "", "status": sel.status if sel else "",
            "status_word": STATUS_WORDS[sel.status] if sel else "not assessed",
            "message": reader(sel.message) if sel else "", "href": _href(sel.key) if sel else "",
            "rationale": s.rationale if s else "", "justification": s.justification if s else "",
            "approach": _approach(p),
            "notes": _findings(checks), "clauses": clauses,
            "clause_number": clause_ctx["number"] if clause_ctx else "",
            "n_failed": len(failed), "failed_links": Markup("; ").join(
                _check_link(c) for c in failed)}


def _check_link(c) -> Markup:
    """A check as a reader meets it: its title, linked to its calculation sheet, and its
    register key after it (to find it in the check register)."""
    return Markup('<a href="{}">{}</a> ({})').format(_href(c.key), c.title, c.key)


def _findings(checks) -> list[Markup]:
    """What the works must allow for: the failed, held and attention checks on the chosen
    mix (the ones SPEC-SELECT lists in its notes, in the same order), each by its title and
    link, its status in words and its finding."""
    return [Markup("{} — {}: {}").format(_check_link(c), STATUS_WORDS[c.status],
                                         reader(c.message))
            for status in ("fail", "hold", "attention") for c in checks if c.status == status]


@chapter("options.md", "Options appraised, check by check", "options.md.j2", volume="appendix",
         sections=True)  # a zone a page
def options(env) -> dict:
    """Every candidate of each zone against every check that applies to it (the
    specification chapter gives the choice and its reason; this is the full table)."""
    r = env.results
    return {"zones": [{"id": z.id, "name": z.name, "selected": r.value(z.id, "selected_mix"),
                       "matrix": _matrix(env, z)} for z in env.project.dossier.zones]}


def _matrix(env, zone) -> dict:
    """Candidates × every check that applies to any of them, in run order, with cost per m²."""
    r, cands = env.results, list(zone.candidates)
    per = {m: {c.code: c for c in applicable(r.checks, env.project, zone.id, m)} for m in cands}
    codes = []
    for c in r.checks:
        if c.code not in codes and any(c.code in per[m] for m in cands):
            codes.append(c.code)
    rows = [{"code": code, "title": next(per[m][code].title for m in cands if code in per[m]),
             "cells": [_cell(per[m].get(code)) for m in cands]} for code in codes]
    cost = [_cell(r.check("SPEC-COST", f"{zone.id}/{m}")) for m in cands]
    return {"candidates": cands, "rows": rows,
            "cost": cost if any(c["value"] for c in cost) else None}


def _ref_link(key: str) -> Markup:
    return Markup(f"([{escape(key)}]({_href(key)}))") if key else Markup("")


def _ref_plain(key: str) -> Markup:
    return Markup(f"[{escape(key)}]") if key else Markup("")


def _clauses(jenv, c) -> Markup:
    return Markup(jenv.get_template("specification_clauses.md.j2").render(c=c, h="####",
                                                                          ref=_ref_link))


class _Cited:
    """``ref`` for the plain exports: writes ``[CODE/subject]`` and remembers what it cited,
    so the document can end with the list of its sources."""

    def __init__(self, results) -> None:
        self.results, self.keys = results, []

    def __call__(self, key: str) -> Markup:
        if key and key not in self.keys:
            self.keys.append(key)
        return _ref_plain(key)

    def sources(self) -> list[dict]:
        out = []
        for key in self.keys:
            code, _, subject = key.partition("/")
            c = self.results.check(code, subject)
            if c is not None:
                out.append({"key": key, "title": c.title,
                            "basis": "; ".join(_basis_words(b) for b in c.basis)
                            or "see its calculation sheet"})
        return out


def _basis_words(basis) -> str:
    """A basis as a reader reads it: the work cited in full (with the clause), or its kind."""
    from specgen.report.references import format_entry, library
    entry = library().get(basis.ref) if basis.kind == "reference" else None
    if entry is None:
        return basis.text()
    return format_entry(entry).rstrip(".") + (f", {basis.clause}" if basis.clause else "")


def _plain_document(env, jenv, template: str, stem: str, title: str, **ctx) -> str:
    """Render one plain document (Markdown) and publish it as .md, .html (for the zone
    exports) and .docx, from the same text."""
    from specgen import cache
    from specgen.report.specification_docx import docx_bytes, marking
    from specgen.report.specification_export import html_fragment
    p = env.project
    cited = _Cited(env.results)
    md = jenv.get_template(template).render(
        ref=cited, sources=cited.sources, project=p.dossier.project, revision=p.revision,
        marking=marking(p.revision), **ctx)
    md = md.replace("&#39;", "'").replace("&#34;", '"')  # quotes are plain text here
    mark, date = f"{p.dossier.project.code}, {marking(p.revision)}", p.revision.date
    # the Markdown converted when the DOCX is made (the live preview makes it after the site)
    # kept in the artefact cache by its text: a re-issue that leaves it alone makes it no more
    env.pageset.add_download(f"{stem}.docx", lambda: cache.cached(
        "docx", [md, title, mark, date.isoformat()],
        lambda: docx_bytes(html_fragment(md), title=title, mark=mark, date=date)))
    return md


def _exports(env, jenv, chosen, clauses) -> list[dict]:
    """Per zone with a choice: the clauses as Markdown, a clean HTML fragment and DOCX."""
    from specgen.report.specification_export import html_fragment
    p = env.project
    out = []
    for z in (z for z in p.dossier.zones if z.id in chosen):
        mix, c = chosen[z.id], clauses[z.id]
        stem = f"exports/{p.dossier.project.code}-{p.revision.code}-{z.id}-specification"
        md = _plain_document(env, jenv, "specification_export.md.j2", stem,
                             f"Specification of zone {z.id}: {z.name}", c=c, h="##",
                             cautions=_card_cautions(p, mix))
        env.pageset.add_download(f"{stem}.md", md.encode("utf-8"))
        env.pageset.add_download(f"{stem}.html", html_fragment(md).encode("utf-8"))
        out.append({"zone": z.id, "md": f"{stem}.md", "html": f"{stem}.html",
                    "docx": f"{stem}.docx"})
    return out


def _chapter_path(project) -> str:
    return f"exports/{project.dossier.project.code}-{project.revision.code}-specification.docx"


def _chapter_document(env, jenv, zones, clauses, regime, holds) -> None:
    """The whole chapter as one DOCX: the choices, each zone's clauses, regime, hold points."""
    p = env.project
    everything, closing = _all_cautions(p)
    _plain_document(env, jenv, "specification_document.md.j2",
                    _chapter_path(p).removesuffix(".docx"), f"Specification: {p.dossier.project.title}",
                    zones=zones, clauses=clauses, regime=regime, hold_points=holds,
                    cautions={"items": everything, "closing": closing})


def _all_cautions(project):
    from specgen.report.cautions import cautions_for
    everything, closing = cautions_for(project)
    return [{"title": c["title"], "text": c["text"]} for c in everything], closing


def _card_cautions(project, mix) -> dict:
    from specgen.report.cautions import card_cautions, cautions_for
    chosen, _ = card_cautions(project, mix)
    everything, closing = cautions_for(project)
    # the card wording where the library has one; the dossier's closing notice, which defers to
    # local codes, the heritage authority and licensed practice, always
    return {"items": chosen or [{"title": c["title"], "text": c["text"]} for c in everything],
            "closing": closing}


def _regime(results, project) -> dict:
    """Sets of prisms per zone, the settings they rest on (with sources) and the acceptance."""
    rows, settings = [], []
    for z in project.dossier.zones:
        res = results.check("SPEC-SAMPLING", z.id)
        q = results.value(z.id, "sample_sets")
        if res is None:
            continue
        if not settings and res.steps:
            settings = [{"name": i.name, "value": as_given(i.value), "unit": unit_symbol(i.unit), "source": reader(i.source)}
                        for i in res.steps[0].inputs if i.symbol in ("n_min", "a", "p", "k")]
        rows.append({"zone": z.id, "badge": Markup(badge(res.status)), "href": _href(res.key),
                     "area": qty(z.area, "m²", 3) if z.area else "—",
                     "by_area": as_given(q["by_area"]) if q and q["by_area"] else "—",
                     "days": as_given(q["working_days"]) if q and q["working_days"] else "—",
                     "sets": as_given(q["sets"]) if q else "—",
                     "prisms": as_given(q["prisms"]) if q else "—",
                     "message": reader(res.message)})
    return {"rows": rows, "settings": settings, "acceptance": _acceptance_rows(results, project)}


def _acceptance_rows(results, project) -> list[dict]:
    """One row per zone and test age: characteristic and set minimums, the cap (SPEC-ACCEPT)."""
    rows = []
    for z in project.dossier.zones:
        table = results.value(z.id, "site_acceptance") or {}
        mix, cap = results.value(z.id, "selected_mix"), table.get("cap")
        for age, v in ((k, v) for k, v in table.items() if k != "cap"):
            rows.append({"zone": z.id, "mix": mix, "age": age, "href": _href(f"SPEC-ACCEPT/{z.id}"),
                         "fk": as_given(v["characteristic_min"]), "each": as_given(v["individual_min"]),
                         "cap": f"{as_given(cap['max'])} MPa at {as_given(cap['age_d'])} d"
                         if cap else "—"})
    return rows


def _hold_points(project, results) -> list[dict]:
    """Hold points with who releases them, the state in each revision and the evidence."""
    table = results.value(project.dossier.project.code, "hold_points") or {}
    names = {p.role: p.name + (f", {p.organisation}" if p.organisation else "")
             for p in project.dossier.parties}
    out = []
    for hid, h in table.items():
        spec = next(x for x in project.specification.doc.hold_points if x.id == hid)
        chk = _check_of(results, h["check"]) if h["check"] else None
        out.append({"id": hid, "what": spec.what, "stage": h["stage"], "role": h["released_by"],
                    "party": names.get(h["released_by"], ""), "state": state_badge(h["state"]),
                    "released_in": h["released_in"] or "", "evidence": h["evidence"],
                    "state_word": h["state"],
                    "history": " → ".join(f"{rev}: {s}" for rev, s in h["history"].items()),
                    "check": h["check"] or "", "check_badge": Markup(badge(chk.status))
                    if chk else "", "check_href": _href(chk.key) if chk else ""})
    return out


def _tests_asked(project, results) -> list[dict]:
    """The tests the durability checks ask for, per zone (DUR-TESTS): each holds the zone."""
    rows = []
    for z in project.dossier.zones:
        c = results.check("DUR-TESTS", z.id)
        for t in results.value(z.id, "durability_tests") or []:
            rows.append({"zone": z.id, "test": t["test"], "method": t["method"], "why": t["why"],
                         "check": t["check"], "href": _href(t["check"]),
                         "badge": Markup(badge(c.status)) if c else ""})
    return rows


def _check_of(results, ref: str):
    """The result a hold point rests on: ``CODE/subject``, or the first result of ``CODE``."""
    code, _, subject = ref.partition("/")
    if subject:
        return results.check(code, subject)
    return next((c for c in results.checks if c.code == code), None)


def _panels(env) -> list[dict]:
    p, r = env.project, env.results
    if p.specification is None:
        return []
    out = []
    for tp in p.specification.doc.trial_panels:
        colour = r.check("COMP-COLOUR", f"{tp.zone}/{tp.mix}") if tp.zone else None
        fig = _photo(env, tp)
        out.append({"id": tp.id, "mix": tp.mix, "zone": tp.zone or "—", "date": tp.date.isoformat(),
                    "location": tp.location, "reviewer": tp.reviewer,
                    "judgement": tp.judgement + (", dry" if tp.judged_dry else
                                                 ", not yet dry" if tp.judgement != "pending"
                                                 else ""),
                    "judged_on": tp.judged_on.isoformat() if tp.judged_on else "—",
                    "delta_e": rounded(colour.value, "ΔE00") if colour and colour.status != "not_assessed"
                    else "—", "colour_href": _href(colour.key) if colour else "",
                    "sample": tp.colour_sample or "—", "remarks": tp.remarks or "—", "photo": fig})
    return out


def _photo(env, tp) -> dict | None:
    """The panel's photo as a page asset (the path was checked to lie inside the project).

    A photo that is also in the register (samples.yaml ``images:``) is placed as the register
    places it — upright, at print size, without metadata, a thumbnail on the site — with its
    caption, date and author; one that is not is placed as given, dated by the panel."""
    if not tp.photo:
        return None
    img, data = next(((i, d) for i, d in env.project.images.values() if i.file == tp.photo),
                     (None, None))
    if img is None:
        suffix = tp.photo.rsplit(".", 1)[-1].lower()
        data = (env.project.root / tp.photo).read_bytes()
        path = env.pageset.add_asset(f"panels/{anchor(tp.id)}.{suffix}", data)
        return {"src": path, "thumb": path, "thumb_size": None, "anchor": "", "n": 0,
                "caption": f"Trial panel {tp.id} ({tp.mix}), {tp.location}; panel built "
                           f"{tp.date}",
                "alt": f"Photograph of trial panel {tp.id} of mix {tp.mix}"}
    from specgen.report.evidence_chapters import picture
    words = [w for w in (img.taken_on and f"photographed {date_text(img.taken_on)}",
                         img.by and f"by {img.by}") if w]
    return picture(env, img, data, f"{img.caption} ({', '.join(words)})" if words
                   else img.caption, numbered=False)


def specification_summary(env) -> dict:
    """For the summary page: the mortar chosen per zone and the open hold points."""
    r, p = env.results, env.project
    rows = []
    for z in p.dossier.zones:
        sel = r.check("SPEC-SELECT", z.id)
        if sel is not None and sel.status != "not_assessed":
            rows.append({"zone": z.id, "mix": sel.value or "—", "badge": Markup(badge(sel.status)),
                         "status": STATUS_WORDS[sel.status], "href": "specification.md"})
    holds = r.value(p.dossier.project.code, "hold_points") or {}
    return {"spec_selections": rows,
            "spec_open_holds": [{"id": k, "stage": v["stage"], "role": v["released_by"]}
                                for k, v in holds.items() if v["state"] == "open"]}
