"""Cross-references between project files: every id named must exist.

(The sanity window on analysis totals is derived in the check stage:
:mod:`specgen.checks.intake`.)
"""
from __future__ import annotations

import re

from specgen.errors import ProblemLog, did_you_mean, quote
from specgen.project.files import Located
from specgen.project.schema import ID_PATTERN

SKIP: dict = {}  # stands for the ids of a file that failed to load


def _ref(log, located, rel, path, value, known: dict, what: str) -> None:
    if value is None or value in known or known is SKIP:
        return
    loc = located.get(rel)
    line = loc.line_of(path) if loc else None
    field = ".".join(str(p) if not isinstance(p, int) else f"[{p}]" for p in path).replace(".[", "[")
    hint = did_you_mean(value, known)
    log.add(rel, f"names {what} '{value}', which is not defined.", line=line, field=field,
            fix=hint or (f"define it, or use one of: {', '.join(sorted(known))}." if known
                         else "define it first."))


def _raw_ids(located: dict[str, Located], rel: str, key: str) -> dict:
    """Ids of the list ``key`` as written in ``rel`` (parsed, not validated); SKIP when the
    file could not be parsed, the list is missing or empty, or an entry's id is unreadable,
    not an id or repeated (then the file's own problem is the one to fix — a repeated id may stand for
    another entry's lost one — and no follow-on error is reported)."""
    loc = located.get(rel)
    items = loc.data.get(key) if loc is not None and isinstance(loc.data, dict) else None
    if not isinstance(items, list) or not items:
        return SKIP
    ids = {}
    for item in items:
        ident = item.get("id") if isinstance(item, dict) else None
        if not isinstance(ident, str) or not re.fullmatch(ID_PATTERN, ident) or ident in ids:
            return SKIP
        ids[ident] = item
    return ids


def check_references(project, located: dict[str, Located], log: ProblemLog,
                     failed: set[str] = frozenset(), names=None) -> None:
    """Record a problem for every dangling id.

    References into a file that itself failed to load are not checked: its own
    problems are already reported and would only be repeated here.
    """
    # long: one pass over the files in the order their problems are reported (file by file)
    d = project.dossier
    mat_ok, mix_ok = "materials.yaml" not in failed, "mixes.yaml" not in failed
    an_ok = "analyses.yaml" not in failed
    # a file that parsed but failed validation still tells which ids it defines, so the
    # references into it are checked in the same run (no second round of errors)
    units_ = project.masonry_units if mat_ok else _raw_ids(located, "materials.yaml",
                                                            "masonry_units")
    hist = project.historic_mortars if mat_ok else _raw_ids(located, "materials.yaml",
                                                             "historic_mortars")
    binders = project.binders if mat_ok else _raw_ids(located, "materials.yaml", "binders")
    sands = project.sands if mat_ok else _raw_ids(located, "materials.yaml", "sands")
    mixes = project.mixes if mix_ok else _raw_ids(located, "mixes.yaml", "mixes")
    analyses = project.analyses if an_ok else _raw_ids(located, "analyses.yaml", "analyses")
    for i, z in enumerate(d.zones):
        _ref(log, located, "dossier.yaml", ("zones", i, "mix"), z.mix, mixes, "mix")
        _ref(log, located, "dossier.yaml", ("zones", i, "units"), z.units, units_,
             "masonry unit")
        _ref(log, located, "dossier.yaml", ("zones", i, "historic_mortar"), z.historic_mortar,
             hist, "historic mortar")
        for j, m in enumerate(z.candidates):
            _ref(log, located, "dossier.yaml", ("zones", i, "candidates", j), m, mixes, "mix")
    for i, b in enumerate(project.binders.values()):
        _ref(log, located, "materials.yaml", ("binders", i, "analysis"), b.analysis,
             analyses, "analysis")
    for i, h in enumerate(project.historic_mortars.values()):
        _ref(log, located, "materials.yaml", ("historic_mortars", i, "binder_analysis"),
             h.binder_analysis, analyses, "analysis")
    _compatibility_refs(project, located, log, mixes if mat_ok else SKIP, failed)
    for i, m in enumerate(project.mixes.values()):
        for j, part in enumerate(m.binders):
            _ref(log, located, "mixes.yaml", ("mixes", i, "binders", j, "binder"), part.binder,
                 binders, "binder")
        for j, part in enumerate(m.sands):
            _ref(log, located, "mixes.yaml", ("mixes", i, "sands", j, "sand"), part.sand,
                 sands, "sand")
    for i, a in enumerate(project.analyses.values()):
        _ref(log, located, "analyses.yaml", ("analyses", i, "material"), a.material,
             binders, "binder")
    if mixes is not SKIP:
        _strength_refs(project.strength, mixes, log)
    _comment_refs(project, located.get("comments.yaml"), log, names, failed)
    _sample_refs(project, log, failed)
    if project.specification is not None:
        specification_refs(project, located.get("specification.yaml"), log, mixes, failed,
                           codes=names[0] if names is not None else None)


def known_revisions(project) -> list[str]:
    """This revision and the issued ones kept under ``issued/`` (for an archived revision,
    its sibling folders): the revisions a comment or a release may name."""
    from specgen.project.layout import ARCHIVE_DIR
    root = project.root
    folder = root.parent if root.parent.name == ARCHIVE_DIR else root / ARCHIVE_DIR
    found = sorted(d.name for d in folder.glob("*") if d.is_dir() and not d.name.startswith(".")) \
        if folder.is_dir() else []
    return [project.revision.code] + [r for r in found if r != project.revision.code]


def _comment_refs(project, located, log: ProblemLog, names, failed=frozenset()) -> None:
    """A comment must name an existing check code (optionally /subject) or a page, and
    revisions that exist.

    ``names`` (check codes, page stems) comes from the pipeline, which knows the check and
    chapter registries; loading knows neither.  Without it only the revisions are checked.
    """
    revisions = known_revisions(project)
    # the archive (issued/) is the record of earlier revisions; a project that keeps none
    # cannot say which exist, so its comments' revisions are taken as written
    archived = len(revisions) > 1
    for i, c in enumerate(project.comments):
        for key in ("raised_in", "closed_in"):
            rev = getattr(c, key)
            if archived and rev is not None and rev not in revisions:
                log.add("comments.yaml", f"comment '{c.id}' was {key.replace('_in', '')} in "
                        f"revision '{rev}', which is neither this revision nor an issued one.",
                        line=located.line_of(("comments", i, key)) if located else None,
                        field=f"comments[{i}].{key}", fix=f"use one of: {', '.join(revisions)}.")
        if c.status == "closed" and not c.closed_in:
            log.add("comments.yaml", f"comment '{c.id}' is closed but says not in which revision.",
                    line=located.line_of(("comments", i)) if located else None,
                    field=f"comments[{i}].closed_in", fix="add 'closed_in: <revision>'.")
        if names is None:
            continue
        places = [("about", ("comments", i, "about"), c.about)] + [
            (f"changed[{j}]", ("comments", i, "changed", j), name)
            for j, name in enumerate(c.changed)]
        for key, where, name in places:
            if _names_place(name, project, names, failed):
                continue
            codes, pages = names
            verb = "is about" if key == "about" else "names as changed"
            log.add("comments.yaml", f"comment '{c.id}' {verb} '{name}', which is neither a "
                    "check code nor a page of the dossier.",
                    line=located.line_of(where) if located else None,
                    field=f"comments[{i}].{key}",
                    fix=did_you_mean(name, sorted(codes) + sorted(pages))
                    or f"use a check code ({', '.join(sorted(codes))}) or a page "
                       f"({', '.join(sorted(pages))}).")


def _names_place(name: str, project, names, failed) -> bool:
    """Whether ``name`` is a page, a check code, or a check code with a known subject
    (subjects are not judged while a file defining them has problems)."""
    codes, pages = names
    code, _, subject = name.partition("/")
    return _is_page(name, pages) or (code in codes and (
        not subject or subject in _subjects(project) or bool(set(failed) & SUBJECT_FILES)))


def _is_page(about: str, pages) -> bool:
    """A page stem, or a page of a chapter's family (``card-M1`` of ``card``)."""
    return about in pages or about.partition("-")[0] in pages


# lab table → (the Project fields whose ids its samples may be, in words)
SAMPLE_KINDS = {
    "lab/colour.csv": ("colours", ("historic_mortars", "mixes", "masonry_units", "trial panels",
                                   "panel colour samples"),
                       "a historic mortar, a mix, a masonry unit, a trial panel or a trial "
                       "panel's colour_sample"),
    "lab/sieves.csv": ("sieves", ("sands", "aggregate samples"),
                       "a sand (materials.yaml) or a historic mortar's aggregate_sample"),
    "lab/capillary.csv": ("capillary", ("masonry_units", "historic_mortars", "mixes"),
                          "a masonry unit, a historic mortar or a mix"),
}


def _sample_ids(project, kind: str) -> set[str]:
    if kind in ("trial panels", "panel colour samples"):
        panels = project.specification.doc.trial_panels if project.specification else []
        return {tp.id if kind == "trial panels" else tp.colour_sample for tp in panels} - {None}
    if kind == "aggregate samples":
        return {h.aggregate_sample for h in project.historic_mortars.values()
                if h.aggregate_sample}
    return set(getattr(project, kind))


def _sample_refs(project, log: ProblemLog, failed) -> None:
    """Every sample of a lab table is something the project defines: a reading of an unknown
    sample would otherwise be silently ignored.  One problem per unknown sample, with its rows;
    not checked when a file the ids come from failed (its own problems come first)."""
    if {"materials.yaml", "mixes.yaml", "specification.yaml"} & (set(failed) | log.files()):
        return  # a reference problem found above in a defining file counts too
    for rel, (attr, kinds, words) in SAMPLE_KINDS.items():
        known = set().union(*(_sample_ids(project, k) for k in kinds))
        rows: dict[str, list[int]] = {}
        for r in getattr(project, attr):
            if r.sample not in known:
                rows.setdefault(r.sample, []).append(r.row)
        for sample, where in rows.items():
            more = f" (also rows {', '.join(map(str, where[1:6]))}{' …' if len(where) > 6 else ''})" \
                if len(where) > 1 else ""
            log.add(rel, f"sample '{quote(sample)}' is not defined{more}; a sample here is {words}.",
                    row=where[0], field="sample", fix=did_you_mean(sample, sorted(known))
                    or "correct the id, or define the sample first.")


SUBJECT_FILES = {"analyses.yaml", "materials.yaml", "mixes.yaml", "dossier.yaml"}


def _subjects(project) -> set[str]:
    return (set(project.analyses) | set(project.binders) | set(project.mixes)
            | {z.id for z in project.dossier.zones} | {project.dossier.project.code}
            | {f"{z.id}/{m}" for z in project.dossier.zones for m in z.candidates})


def _compatibility_refs(project, located, log: ProblemLog, mixes, failed) -> None:
    """Mixes of measured mortar properties, and historic aggregate samples in lab/sieves.csv."""
    for i, props in enumerate(project.mortar_properties.values()):
        _ref(log, located, "materials.yaml", ("mortar_properties", i, "mix"), props.mix, mixes, "mix")
    samples = {r.sample for r in project.sieves}
    for i, h in enumerate(project.historic_mortars.values()):
        if h.aggregate_sample and h.aggregate_sample not in samples \
                and "lab/sieves.csv" not in failed:
            loc = located.get("materials.yaml")
            hint = did_you_mean(h.aggregate_sample, sorted(samples))
            log.add("materials.yaml", f"historic mortar '{h.id}' names aggregate sample "
                    f"'{h.aggregate_sample}', which is not in lab/sieves.csv.",
                    line=loc.line_of(("historic_mortars", i, "aggregate_sample")) if loc else None,
                    field=f"historic_mortars[{i}].aggregate_sample",
                    fix=hint or "add its sieve analysis to lab/sieves.csv, or correct the id.")


def _strength_refs(results, mixes: dict, log: ProblemLog) -> None:
    """One problem per unknown mix id in the lab results, listing the rows it is on."""
    rows: dict[str, list[int]] = {}
    for r in results:
        if r.mix not in mixes:
            rows.setdefault(r.mix, []).append(r.row)
    for mix, where in rows.items():
        first = results[0].file
        more = f" (also rows {', '.join(map(str, where[1:6]))}{' …' if len(where) > 6 else ''})" \
            if len(where) > 1 else ""
        hint = did_you_mean(mix, mixes)
        log.add(first, f"names mix '{mix}', which is not defined in mixes.yaml{more}.",
                row=where[0], field="mix", fix=hint or "define the mix, or correct the id.")


# ---------------------------------------------------------------- specification.yaml
SPEC = "specification.yaml"


def specification_refs(project, located, log: ProblemLog, mixes, failed=frozenset(),
                       codes=None) -> None:
    """Selections, hold points, trial panels and prices name zones, mixes, roles that exist.

    ``codes`` (the check codes a hold point may rest on) comes from the pipeline, which knows
    the check registry; without it the hold points' checks are not judged."""
    spec = project.specification.doc
    # dossier.yaml's own reference problems (found above) count too: no follow-on about it
    dossier_bad = "dossier.yaml" in failed or "dossier.yaml" in log.files()
    zones = SKIP if dossier_bad else {z.id: z for z in project.dossier.zones}
    for i, s in enumerate(spec.selections):
        _ref(log, {SPEC: located}, SPEC, ("selections", i, "zone"), s.zone, zones, "zone")
        _ref(log, {SPEC: located}, SPEC, ("selections", i, "mix"), s.mix, mixes, "mix")
    _selection_refs(spec.selections, zones, located, log, mixes)
    _hold_point_refs(project, spec.hold_points, located, log, codes)
    _panel_refs(project, spec.trial_panels, located, log, mixes, zones, failed)
    for i, u in enumerate(spec.unit_prices):
        _ref(log, {SPEC: located}, SPEC, ("unit_prices", i, "mix"), u.mix, mixes, "mix")


def _line(located, *path) -> int | None:
    return located.line_of(path) if located else None


def _selection_refs(selections, zones: dict, located, log: ProblemLog, mixes) -> None:
    """One selection per zone, and the chosen mix is one of the zone's candidates."""
    first: dict[str, int] = {}
    for i, s in enumerate(selections):
        if s.zone in first:
            log.add(SPEC, f"zone {s.zone} is selected twice (also selections[{first[s.zone]}]).",
                    line=_line(located, "selections", i, "zone"), field=f"selections[{i}].zone",
                    fix="keep one selection per zone.")
        first.setdefault(s.zone, i)
        zone = zones.get(s.zone)
        if zone is not None and s.mix in mixes and s.mix not in zone.candidates:
            log.add(SPEC, f"mix '{s.mix}' is not a candidate of zone {s.zone} (candidates: "
                    f"{', '.join(zone.candidates)}).", line=_line(located, "selections", i, "mix"),
                    field=f"selections[{i}].mix", fix=f"choose one of the candidates, or add "
                    f"{s.mix} to the zone's candidates in dossier.yaml so that it is appraised.")


def _roles(project) -> list[str]:
    return sorted({p.role for p in project.dossier.parties})


def _role_ref(project, role, what: str, where: tuple, located, log: ProblemLog) -> None:
    roles = _roles(project)
    field = f"{where[0]}[{where[1]}].{where[2]}"
    if not role:
        log.add(SPEC, f"{what} names no releasing role.", line=_line(located, *where[:2]),
                field=field, fix=f"add '{where[2]}:' with the role of the party who releases "
                f"it (dossier.yaml parties): {', '.join(roles) or 'add a party first'}.")
    elif role not in roles:
        log.add(SPEC, f"{what} names the role '{role}', which is not a party role in "
                "dossier.yaml.", line=_line(located, *where), field=field,
                fix=did_you_mean(role, roles) or f"use one of: {', '.join(roles)}, or add the "
                "party to dossier.yaml.")


def _hold_point_refs(project, hold_points, located, log: ProblemLog, codes=None) -> None:
    """Releasing role of each hold point; a release names its revision and its evidence."""
    revisions = known_revisions(project)
    seen: set[str] = set()
    for i, h in enumerate(hold_points):
        if h.id in seen:
            log.add(SPEC, f"hold point id '{h.id}' is used twice.", field=f"hold_points[{i}].id",
                    line=_line(located, "hold_points", i, "id"), fix="give each one its own id.")
        seen.add(h.id)
        _role_ref(project, h.released_by, f"hold point '{h.id}'", ("hold_points", i,
                  "released_by"), located, log)
        _release_refs(h, i, revisions, located, log)
        if codes is not None and h.check and h.check.partition("/")[0] not in codes:
            log.add(SPEC, f"hold point '{h.id}' rests on check '{h.check}', which is not a "
                    "check code.", line=_line(located, "hold_points", i, "check"),
                    field=f"hold_points[{i}].check", fix=did_you_mean(h.check.partition("/")[0],
                    sorted(codes)) or "give a check code, e.g. STR-MIN or STR-MIN/M2.")


def _release_refs(h, i: int, revisions: list[str], located, log: ProblemLog) -> None:
    where = f"hold_points[{i}]"
    if h.state == "released" and not (h.released_in and h.evidence):
        missing = " and ".join(k for k, v in (("released_in", h.released_in),
                                               ("evidence", h.evidence)) if not v)
        log.add(SPEC, f"hold point '{h.id}' is released but gives no {missing}.",
                line=_line(located, "hold_points", i, "state"), field=f"{where}.state",
                fix="say in which revision it was released and on what evidence, or set "
                    "'state: open'.")
    if h.state == "open" and h.released_in:
        log.add(SPEC, f"hold point '{h.id}' is open but names a revision it was released in.",
                line=_line(located, "hold_points", i, "released_in"),
                field=f"{where}.released_in", fix="set 'state: released', or remove 'released_in'.")
    if h.released_in and h.released_in not in revisions:
        log.add(SPEC, f"hold point '{h.id}' was released in '{h.released_in}', which is neither "
                "this revision nor an issued one.", field=f"{where}.released_in",
                line=_line(located, "hold_points", i, "released_in"),
                fix=f"use one of: {', '.join(revisions)}.")


def _panel_refs(project, panels, located, log: ProblemLog, mixes, zones, failed) -> None:
    """Trial panels: their mix, zone, reviewer role, photo file and colour sample exist."""
    from specgen.project.layout import inside
    samples = {r.sample for r in project.colours}
    for i, tp in enumerate(panels):
        _ref(log, {SPEC: located}, SPEC, ("trial_panels", i, "mix"), tp.mix, mixes, "mix")
        _ref(log, {SPEC: located}, SPEC, ("trial_panels", i, "zone"), tp.zone, zones, "zone")
        if tp.reviewer not in _roles(project):
            _role_ref(project, tp.reviewer, f"trial panel '{tp.id}'",
                      ("trial_panels", i, "reviewer"), located, log)
        if tp.colour_sample and tp.colour_sample not in samples and "lab/colour.csv" not in failed:
            log.add(SPEC, f"trial panel '{tp.id}' names colour sample '{tp.colour_sample}', "
                    "which is not in lab/colour.csv.", field=f"trial_panels[{i}].colour_sample",
                    line=_line(located, "trial_panels", i, "colour_sample"),
                    fix=did_you_mean(tp.colour_sample, sorted(samples))
                    or "add its readings to lab/colour.csv, or correct the id.")
        if tp.photo:
            path = inside(project.root, tp.photo, SPEC, f"trial_panels[{i}].photo", log)
            if path is not None and not path.is_file():
                log.add(SPEC, f"trial panel '{tp.id}': the photo '{tp.photo}' is not in the "
                        "project folder.", field=f"trial_panels[{i}].photo",
                        line=_line(located, "trial_panels", i, "photo"),
                        fix="copy the photo into the project folder, or correct the path.")
