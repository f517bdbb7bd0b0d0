"""Loading the evidence: the sample register (``samples.yaml``) and every reference to it.

Each result may name the sample it was made on (``lab_sample`` in analyses.yaml, the lab
tables and the workbooks, ``lab_samples`` on measured properties); a name the register does
not hold, a sample point outside its drawing, a sample of an unknown zone or material, an
unknown curing regime and a test date that does not match the casting date and the age are
located input errors.  Nothing is computed here (loading computes nothing).
"""
from __future__ import annotations

from dataclasses import dataclass, field

from specgen.errors import ProblemLog, did_you_mean, quote
from specgen.project.crossref import SKIP, _ref

SAMPLES_FILE = "samples.yaml"
DAY = 86400.0
# a prism's age is given in whole days; a test date more than half a day off is a typing error
DATE_SLACK_D = 0.5


@dataclass
class Evidence:
    """The register as loaded: samples and drawings by id."""

    samples: dict = field(default_factory=dict)    # id → schema_evidence.Sample
    drawings: dict = field(default_factory=dict)   # id → schema_evidence.Drawing


def evidence(project, doc, located: dict, log: ProblemLog, failed) -> Evidence:
    """The register of ``samples.yaml`` (``doc``: the validated file or None) with every
    reference to it checked; problems go to ``log``."""
    from specgen.project.load import _index
    ev = Evidence()
    if doc is not None:
        ev.samples = _index(doc.samples, "sample id", SAMPLES_FILE, "samples", located, log)
        ev.drawings = _index(doc.drawings, "drawing id", SAMPLES_FILE, "drawings", located, log)
        _register_refs(project, ev, located, log, failed)
    known = SKIP if SAMPLES_FILE in failed else ev.samples
    _yaml_refs(project, known, located, log)
    _table_refs(project, known, log)
    _strength_dates(project.strength, log)
    if (method := project_doc(located, "method.yaml")) is not None and "dossier.yaml" not in failed:
        zones = {z.id: z for z in project.dossier.zones}
        for i, item in enumerate(method.get("zones") or []):
            if isinstance(item, dict) and isinstance(item.get("zone"), str):
                _ref(log, located, "method.yaml", ("zones", i, "zone"), item["zone"], zones,
                     "zone")
    return ev


def project_doc(located: dict, name: str) -> dict | None:
    """The parsed mapping of a project file (before validation), or None."""
    loc = located.get(name)
    return loc.data if loc is not None and isinstance(loc.data, dict) else None


def _register_refs(project, ev: Evidence, located: dict, log: ProblemLog, failed) -> None:
    zones = SKIP if "dossier.yaml" in failed else {z.id: z for z in project.dossier.zones}
    materials = SKIP if {"materials.yaml", "mixes.yaml"} & set(failed) else {
        **project.masonry_units, **project.historic_mortars, **project.binders,
        **project.sands, **project.mixes}
    where = located.get(SAMPLES_FILE)
    for i, d in enumerate(ev.drawings.values()):
        for j, a in enumerate(d.zones):
            _ref(log, located, SAMPLES_FILE, ("drawings", i, "zones", j, "zone"), a.zone, zones,
                 "zone")
            if not (0 <= a.x and a.x + a.width <= d.width and 0 <= a.y
                    and a.y + a.height <= d.height):
                log.add(SAMPLES_FILE, f"zone '{a.zone}' reaches outside drawing '{d.id}' "
                        f"(0–{d.width:g} by 0–{d.height:g} {d.units}).",
                        field=f"drawings[{i}].zones[{j}]",
                        line=where.line_of(("drawings", i, "zones", j)) if where else None,
                        fix="give x, y, width and height in the drawing's units, from its "
                        "bottom-left corner.")
    for i, s in enumerate(ev.samples.values()):
        _ref(log, located, SAMPLES_FILE, ("samples", i, "zone"), s.zone, zones, "zone")
        _ref(log, located, SAMPLES_FILE, ("samples", i, "of"), s.of, materials,
             "material or mix")
        if s.location is None:
            continue
        path = ("samples", i, "location", "drawing")
        _ref(log, located, SAMPLES_FILE, path, s.location.drawing, ev.drawings, "drawing")
        d = ev.drawings.get(s.location.drawing)
        if d is not None and not (0 <= s.location.x <= d.width and 0 <= s.location.y <= d.height):
            log.add(SAMPLES_FILE, f"sample '{s.id}' is at x = {s.location.x:g}, y = "
                    f"{s.location.y:g} {d.units}, outside drawing '{d.id}' (0–{d.width:g} by "
                    f"0–{d.height:g} {d.units}).", field=f"samples[{i}].location",
                    line=where.line_of(("samples", i, "location")) if where else None,
                    fix="give x and y in the drawing's units, measured from its bottom-left "
                    "corner, or name the drawing the sample is on.")


def _yaml_refs(project, known, located: dict, log: ProblemLog) -> None:
    """``lab_sample`` of each analysis and ``lab_samples`` of each measured material."""
    what = "sample of the register (samples.yaml)"
    for i, a in enumerate(project.analyses.values()):
        _ref(log, located, "analyses.yaml", ("analyses", i, "lab_sample"), a.lab_sample, known,
             what)
    for key, items in (("masonry_units", project.masonry_units),
                       ("historic_mortars", project.historic_mortars),
                       ("mortar_properties", project.mortar_properties)):
        for i, m in enumerate(items.values()):
            for j, s in enumerate(m.lab_samples):
                _ref(log, located, "materials.yaml", (key, i, "lab_samples", j), s, known, what)


def _table_refs(project, known, log: ProblemLog) -> None:
    """The ``lab_sample`` column of every lab table: one problem per unknown id, with its rows."""
    if known is SKIP:
        return
    rows: dict[tuple[str, str], list[int]] = {}
    for attr in ("strength", "sieves", "colours", "capillary"):
        for r in getattr(project, attr):
            if r.lab_sample and r.lab_sample not in known:
                rows.setdefault((r.file, r.lab_sample), []).append(r.row)
    for (rel, sample), where in rows.items():
        more = f" (also rows {', '.join(map(str, where[1:6]))}{' …' if len(where) > 6 else ''})" \
            if len(where) > 1 else ""
        fix = did_you_mean(sample, sorted(known)) if known else None
        log.add(rel, f"names sample '{quote(sample)}', which is not in the sample register{more}.",
                row=where[0], field="lab_sample",
                fix=fix or f"add the sample to {SAMPLES_FILE} (id, kind, description, where "
                "and when it was taken, laboratory and report), or correct the id.")


def _strength_dates(strength: list, log: ProblemLog) -> None:
    """A known curing regime, and test date − casting date = age at test."""
    from specgen import refdata
    with refdata.unrecorded():
        regimes = list(refdata.load("curing_regimes").data["regimes"])
    for r in strength:
        if r.curing_regime and r.curing_regime not in regimes:
            log.add(r.file, f"unknown curing regime '{quote(r.curing_regime)}'.", row=r.row,
                    field="curing_regime", fix=(did_you_mean(r.curing_regime, regimes) or "")
                    + f" Known: {', '.join(regimes)} (content/data/curing_regimes.yaml).")
        if r.cast_on is not None and r.tested_on is not None:
            days = (r.tested_on - r.cast_on).days
            if abs(days - r.age / DAY) > DATE_SLACK_D:
                log.add(r.file, f"tested {r.tested_on.isoformat()} and cast "
                        f"{r.cast_on.isoformat()} is {days} d, but the age at test is "
                        f"{r.age / DAY:g} d.", row=r.row, field="tested_on",
                        fix="check the two dates and the age against the laboratory report.")
