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


# the largest image and report a project may place: a phone photograph is a few MB; a
# larger file is a scan at the wrong resolution, and would swell every revision
IMAGE_MAX_BYTES = 20_000_000
IMAGE_MAX_PIXELS = 50_000_000
REPORT_MAX_BYTES = 40_000_000


@dataclass
class Evidence:
    """The register as loaded: samples, drawings, images and reports."""

    samples: dict = field(default_factory=dict)    # id → schema_evidence.Sample
    drawings: dict = field(default_factory=dict)   # id → schema_evidence.Drawing
    images: dict = field(default_factory=dict)     # id → (schema_evidence.Picture, bytes)
    reports: dict = field(default_factory=dict)    # reference → (LabReport, bytes)


def evidence(project, doc, located: dict, log: ProblemLog, failed) -> Evidence:
    """The register of ``samples.yaml`` (``doc``: the validated file or None) with every
    reference to it checked; problems go to ``log``."""
    from specgen.project.layout import index_of as _index
    ev = Evidence()
    if doc is not None:
        ev.samples = _index(doc.samples, "sample id", SAMPLES_FILE, "samples", located, log)
        ev.drawings = _index(doc.drawings, "drawing id", SAMPLES_FILE, "drawings", located, log)
        _register_refs(project, ev, located, log, failed)
        ev.images = _images(project, doc, located, log, failed)
        registered = {img.id for img in doc.images}
        for i, d in enumerate(ev.drawings.values()):
            if d.image in registered and d.image not in ev.images:
                continue     # an image that could not be read: its own problem is reported
            known = {k: v for k, v in ev.images.items() if not v[0].file.lower().endswith(".svg")}
            _ref(log, located, SAMPLES_FILE, ("drawings", i, "image"), d.image,
                 known if ev.images or not doc.images else SKIP, "JPEG, PNG or PDF drawing")
        ev.reports = _reports(project, doc, located, log)
    # a register with problems of its own (an id given twice may stand for another entry's
    # lost one) is not a reference for the other files: no follow-on errors
    known = SKIP if SAMPLES_FILE in set(failed) | log.files() else ev.samples
    _yaml_refs(project, known, located, log)
    _table_refs(project, known, log)
    if doc is not None:
        for attr in ROW_KINDS:
            setattr(project, attr, _linked(getattr(project, attr), attr, ev.samples))
    _strength_dates(project.strength, log, ev.samples, located.get(SAMPLES_FILE))
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
    # a problem already found in a defining file (its own, or a reference of it) comes first:
    # no follow-on errors here
    seen = set(failed) | log.files()
    zones = SKIP if "dossier.yaml" in seen else {z.id: z for z in project.dossier.zones}
    materials = SKIP if {"materials.yaml", "mixes.yaml", "dossier.yaml"} & seen else {
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


# the kinds of register sample each lab table's rows may be measured on
ROW_KINDS = {"strength": ("prisms",),
             "sieves": ("sand", "historic_aggregate", "historic_mortar", "render"),
             "colours": ("historic_mortar", "render", "masonry_unit", "core", "other"),
             "capillary": ("prisms", "core", "historic_mortar", "render", "masonry_unit")}


def _linked(rows: list, attr: str, samples: dict) -> list:
    """Rows of a lab table with their register sample: a row that names none belongs to the
    sample whose id is the row's sample, else to the one sample of a fitting kind that is *of*
    it (a mix, a material); none or two: it stays unlinked and is listed as naming no sample.
    A strength row takes its series' casting date and curing regime unless it gives its own."""
    from dataclasses import replace
    kinds = ROW_KINDS[attr]
    out = []
    for r in rows:
        key = r.mix if attr == "strength" else r.sample
        found = [samples[r.lab_sample]] if r.lab_sample in samples else \
            [samples[key]] if key in samples and not r.lab_sample else \
            [s for s in samples.values() if s.of == key and s.kind in kinds] \
            if not r.lab_sample else []
        if len(found) == 1:
            s = found[0]
            r = replace(r, lab_sample=s.id)
            if attr == "strength" and s.kind == "prisms":
                r = replace(r, cast_on=r.cast_on or s.taken_on,
                            curing_regime=r.curing_regime or s.curing_regime)
        out.append(r)
    return out


def _strength_dates(strength: list, log: ProblemLog, samples: dict, where=None) -> None:
    """A known curing regime, and test date − casting date = age at test."""
    from specgen import refdata
    with refdata.unrecorded():
        regimes = list(refdata.load("curing_regimes").data["regimes"])
    for i, s in enumerate(samples.values()):
        if s.curing_regime and s.curing_regime not in regimes:
            log.add(SAMPLES_FILE, f"unknown curing regime '{quote(s.curing_regime)}' of sample "
                    f"'{s.id}'.", field=f"samples[{i}].curing_regime",
                    line=where.line_of(("samples", i, "curing_regime")) if where else None,
                    fix=(did_you_mean(s.curing_regime, regimes) or "")
                    + f" Known: {', '.join(regimes)} (content/data/curing_regimes.yaml).")
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


def _file(project, rel: str, key: tuple, located: dict, log: ProblemLog, limit: int):
    """The bytes of a file a register entry names (inside the folder, present, not too big)."""
    from specgen.project.layout import inside
    where = located.get(SAMPLES_FILE)
    line = where.line_of(key) if where else None
    field_ = ".".join(str(k) if not isinstance(k, int) else f"[{k}]" for k in key) \
        .replace(".[", "[")
    path = inside(project.root, rel, SAMPLES_FILE, field_, log, line)
    if path is None:
        return None
    if not path.is_file():
        log.add(SAMPLES_FILE, f"the file '{quote(rel)}' is not in the project folder.",
                line=line, field=field_, fix="copy the file there, or correct the path.")
        return None
    if (size := path.stat().st_size) > limit:
        log.add(SAMPLES_FILE, f"the file '{quote(rel)}' is {size / 1e6:.1f} MB; the limit is "
                f"{limit / 1e6:g} MB.", line=line, field=field_,
                fix="save a smaller copy (an image of about 2000 px on its long side is "
                "enough for print), or split the report.")
        return None
    return path.read_bytes(), line, field_


def _images(project, doc, located: dict, log: ProblemLog, failed) -> dict:
    """Images of the register that Pillow can read (JPEG, PNG), SVG drawings and PDF pages."""
    from specgen.project.layout import index_of as _index
    zones = SKIP if "dossier.yaml" in set(failed) | log.files() else {
        z.id: z for z in project.dossier.zones}
    out = {}
    for i, img in enumerate(_index(doc.images, "image id", SAMPLES_FILE, "images", located,
                                   log).values()):
        _ref(log, located, SAMPLES_FILE, ("images", i, "zone"), img.zone, zones, "zone")
        got = _file(project, img.file, ("images", i, "file"), located, log, IMAGE_MAX_BYTES)
        if got is None:
            continue
        data, line, field_ = got
        if img.file.lower().endswith(".pdf"):
            found = pdf_page_problem(data, img.page)
            if found:
                problem, fix, on_page = found
                where = located.get(SAMPLES_FILE)
                log.add(SAMPLES_FILE, f"the file '{quote(img.file)}' {problem}.", fix=fix,
                        field=f"images[{i}].page" if on_page else field_,
                        line=(where.line_of(("images", i, "page")) if on_page and where
                              else line))
                continue
        elif (problem := image_problem(data, img.file)) or img.page is not None:
            log.add(SAMPLES_FILE, f"the file '{quote(img.file)}' "
                    f"{problem or 'is not a PDF, so it has no page to choose'}.", line=line,
                    field=field_, fix="give a JPEG or PNG photograph, or a drawing as SVG, "
                    "JPEG, PNG or a page of a PDF (file ending .pdf, with its page).")
            continue
        out[img.id] = (img, data)
    return out


def pdf_page_problem(data: bytes, page: int | None) -> tuple[str, str, bool] | None:
    """Why page ``page`` of the PDF ``data`` cannot be placed as a drawing, the fix, and whether
    the page number is at fault; None when it can (pypdfium2 reads it; rendering is the render
    stage's)."""
    if not data.startswith(b"%PDF-"):
        return ("is not a PDF (it does not begin with %PDF-)",
                "give the drawing as a PDF, or as an SVG, PNG or JPEG file.", False)
    import pypdfium2 as pdfium
    import pypdfium2.raw as pdfium_c
    try:
        pdf = pdfium.PdfDocument(data)
    except pdfium.PdfiumError as exc:
        if "password" in str(exc).lower():
            return ("is encrypted (it asks for a password)", _UNLOCK, False)
        return ("cannot be read as a PDF (it is damaged or incomplete)",
                "export the drawing again as a PDF, or as SVG or PNG.", False)
    try:
        if pdfium_c.FPDF_GetSecurityHandlerRevision(pdf.raw) != -1:
            return ("is encrypted (it carries a security handler)", _UNLOCK, False)
        pages = len(pdf)
    finally:
        pdf.close()
    if page is None and pages > 1:
        return (f"has {pages} pages and no page is named",
                f"give 'page:' (1 to {pages}) for the sheet of the drawing.", True)
    if page is not None and page > pages:
        return (f"has {pages} page{'s' if pages > 1 else ''}; page {page} is not in it",
                f"give a page from 1 to {pages}.", True)
    return None


_UNLOCK = "save an unencrypted copy of the drawing (print it to a new PDF, or export the page " \
    "as SVG or PNG) and place that."


def image_problem(data: bytes, name: str) -> str | None:
    """Why ``data`` is not an image specgen can place, or None."""
    if name.lower().endswith(".svg"):
        head = data[:2000].lstrip()
        return None if b"<svg" in head and head[:1] == b"<" else "is not an SVG drawing"
    import io
    import warnings
    from PIL import Image
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("error", Image.DecompressionBombWarning)
            with Image.open(io.BytesIO(data)) as im:
                fmt, pixels = im.format, im.size[0] * im.size[1]
                im.verify()
    except Exception:       # Pillow raises many kinds for a file that is not an image
        return "is not an image (it cannot be read as JPEG or PNG)"
    if fmt not in ("JPEG", "PNG"):
        return f"is a {fmt} image; only JPEG and PNG are placed"
    if pixels > IMAGE_MAX_PIXELS:
        return f"has {pixels / 1e6:.0f} million pixels; the limit is {IMAGE_MAX_PIXELS / 1e6:g}"
    return None


def _reports(project, doc, located: dict, log: ProblemLog) -> dict:
    """Laboratory reports: PDF files, each under its reference."""
    from specgen.project.layout import index_of as _index
    out = {}
    refs = _index(doc.reports, "report", SAMPLES_FILE, "reports", located, log,
                  id_field="reference")
    for i, rep in enumerate(refs.values()):
        got = _file(project, rep.file, ("reports", i, "file"), located, log, REPORT_MAX_BYTES)
        if got is None:
            continue
        data, line, field_ = got
        if not data.startswith(b"%PDF-"):
            log.add(SAMPLES_FILE, f"the file '{quote(rep.file)}' is not a PDF.", line=line,
                    field=field_, fix="give the laboratory's report as a PDF file.")
            continue
        out[rep.reference] = (rep, data)
    return out
