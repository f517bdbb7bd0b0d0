"""load: a project folder → a validated :class:`Project` (SI units), or every problem at once."""
from __future__ import annotations

import hashlib
from dataclasses import dataclass, field
from pathlib import Path

from pydantic import BaseModel

from specgen.errors import ProblemLog
from specgen.project import schema, schema_evidence
from specgen.project.files import read_csv, read_yaml
# the folder layout and the helpers every reader shares (below the loader: no cycles)
from specgen.project.layout import (ARCHIVE_DIR, NARRATIVE_DIR, STRENGTH_FILE,  # noqa: F401
                                    field_path, index_of as _index, inside,
                                    validate)
from specgen.project.tables import (ColourReading, SieveRow, StrengthResult, capillary_rows,
                                    colour_rows, sieve_rows, strength_results)

ROOT_FILE = "dossier.yaml"
# file name → (model, required); the folder layout is fixed so every project reads alike.
DOCUMENTS: dict[str, tuple[type[BaseModel], bool]] = {
    ROOT_FILE: (schema.Dossier, True),
    "analyses.yaml": (schema.AnalysesFile, False),
    "materials.yaml": (schema.MaterialsFile, False),
    "mixes.yaml": (schema.MixesFile, False),
    "comments.yaml": (schema.CommentsFile, False),
    "specification.yaml": (schema.SpecificationFile, False),
    "samples.yaml": (schema_evidence.SamplesFile, False),
    "method.yaml": (schema_evidence.MethodFile, False),
}
# tabular lab data: file → reader of typed rows (and the Project field it fills)
TABLES = {"lab/sieves.csv": ("sieves", sieve_rows), "lab/colour.csv": ("colours", colour_rows),
          "lab/capillary.csv": ("capillary", capillary_rows)}


@dataclass(frozen=True)
class InputFile:
    """A file read from the project folder (path relative to it) and its SHA-256."""

    path: str
    sha256: str
    size: int


@dataclass
class Project:
    """Everything read from a project folder, validated, in SI units."""

    root: Path
    dossier: schema.Dossier
    analyses: dict[str, schema.Analysis] = field(default_factory=dict)
    binders: dict[str, schema.Binder] = field(default_factory=dict)
    masonry_units: dict[str, schema.MasonryUnit] = field(default_factory=dict)
    historic_mortars: dict[str, schema.HistoricMortar] = field(default_factory=dict)
    sands: dict[str, schema.Sand] = field(default_factory=dict)
    mortar_properties: dict[str, schema.MortarProperties] = field(default_factory=dict)  # by mix
    mixes: dict[str, schema.Mix] = field(default_factory=dict)
    strength: list[StrengthResult] = field(default_factory=list)
    narrative: dict[str, str] = field(default_factory=dict)
    comments: list[schema.Comment] = field(default_factory=list)
    sieves: list[SieveRow] = field(default_factory=list)
    colours: list[ColourReading] = field(default_factory=list)
    capillary: list = field(default_factory=list)  # CapillaryReading rows (project/tables.py)
    gradings: dict = field(default_factory=dict)   # sample id → Grading (derived by checks/intake.py)
    inputs: list[InputFile] = field(default_factory=list)
    firing: dict = field(default_factory=dict)  # binder id → FiringSeries (project/firing.py)
    site_temperature: object = None  # SiteTemperature (project/site_temperature.py) or None
    specification: object = None  # SpecificationData (project/specification.py) or None
    exposure: dict = field(default_factory=dict)  # zone id → ZoneExposure (durability_inputs)
    # planned tests in lab workbooks without a result yet: (file, sheet, row, first cell)
    lab_pending: list = field(default_factory=list)
    samples: dict = field(default_factory=dict)   # id → Sample of samples.yaml (the register)
    drawings: dict = field(default_factory=dict)  # id → Drawing of samples.yaml
    method: object = None  # schema_evidence.MethodFile of method.yaml, or None
    images: dict = field(default_factory=dict)    # id → (Picture, bytes) of samples.yaml
    reports: dict = field(default_factory=dict)   # reference → (LabReport, bytes)

    @property
    def revision(self) -> schema.Revision:
        return self.dossier.revision


def _hash(path: Path, rel: str) -> InputFile:
    data = path.read_bytes()
    return InputFile(rel, hashlib.sha256(data).hexdigest(), len(data))


def _escaping_links(root: Path, log: ProblemLog) -> None:
    for path in sorted(root.rglob("*")):
        if path.is_symlink() and not path.resolve().is_relative_to(root.resolve()):
            rel = path.relative_to(root).as_posix()
            log.add(rel, "is a link to a file outside the project folder.",
                    fix="copy the file into the project folder instead of linking it.")


def load_project(root: Path | str, names=None, derive=None) -> Project:
    """Read and validate a project folder; raise :class:`~specgen.errors.InputErrors` on problems.

    The pipeline hands in what loading must not know (``specgen.build.load``):
    ``names`` — (check codes, page stems) that review comments may be about, from the
    registries; without it comments' subjects are not checked.  ``derive(project, located,
    log)`` — what the check stage derives from the inputs before any check runs (gradings from
    sieve readings, analysis totals: :mod:`specgen.checks.intake`); its problems join the
    loader's in the one raise.  Without it nothing is derived (``project.gradings`` stays empty).
    """
    # long: it reads as the loading sequence (files, tables, workbooks, derived inputs, cross
    # references), each step one call; every problem is collected before one raise
    root = Path(root)
    log = ProblemLog()
    if not (root / ROOT_FILE).is_file():
        log.add(str(root / ROOT_FILE), "not found: a project folder needs this root file.",
                fix=f"run 'specgen new {root}' for a starter project, or check the folder name.")
        log.raise_if_any()
    _escaping_links(root, log)
    log.raise_if_any()
    docs, located = {}, {}
    for name, (model, required) in DOCUMENTS.items():
        path = root / name
        if not path.is_file():
            if required:
                log.add(name, "not found.")
            continue
        loc = read_yaml(path, name, log)
        if loc is not None:
            located[name] = loc
            docs[name] = validate(loc, model, name, log)
    strength = []
    if (root / STRENGTH_FILE).is_file():
        table = read_csv(root / STRENGTH_FILE, STRENGTH_FILE, log)
        if table is not None:
            strength = strength_results(table, STRENGTH_FILE, log)
    tables = {}
    for rel, (attr, reader) in TABLES.items():
        if (root / rel).is_file() and (table := read_csv(root / rel, rel, log)) is not None:
            tables[attr] = reader(table, rel, log)
    pending = _workbooks(root, strength, tables, log)
    if docs.get(ROOT_FILE) is None:
        log.raise_if_any()
    project = _assemble(root, docs, located, strength, log)
    for attr, rows in tables.items():
        setattr(project, attr, rows)
    project.lab_pending = pending
    from specgen.project.practice_inputs import practice_problems
    practice_problems(project, located, log)
    from specgen.project.firing import firing_series
    project.firing = firing_series(root, project.binders, log)
    from specgen.project.site_temperature import curing_temperature_problems, site_temperature
    project.site_temperature = site_temperature(
        root, project.dossier, log, located[ROOT_FILE].line_of(("site_temperature",)))
    curing_temperature_problems(project.strength, log)
    from specgen.project.specification import SPEC_FILE, specification_data
    project.specification = specification_data(root, docs.get(SPEC_FILE), located.get(SPEC_FILE),
                                               ARCHIVE_DIR, log)
    from specgen.project.crossref import check_references
    # a file with problems of its own is not a reference for others: no follow-on errors
    failed = {name for name in DOCUMENTS if (root / name).is_file() and docs.get(name) is None}
    failed |= log.files()
    check_references(project, located, log, failed, names)
    from specgen.project.works_inputs import works_problems
    works_problems(project, located, log, failed)
    from specgen.project.durability_inputs import durability_problems
    project.exposure = durability_problems(project, located, log, failed)
    from specgen.project.evidence import evidence
    ev = evidence(project, docs.get("samples.yaml"), located, log, failed)
    project.samples, project.drawings = ev.samples, ev.drawings
    project.images, project.reports = ev.images, ev.reports
    project.method = docs.get("method.yaml")
    if derive is not None:
        derive(project, located, log)
    log.raise_if_any()
    return project


def _workbooks(root: Path, strength: list, tables: dict, log: ProblemLog) -> list:
    """Read lab/*.xlsx: each sheet through the reader of the CSV file of its name; rows are
    added to those of the CSV files.  Returns the planned tests that have no result yet."""
    from specgen.project.workbook import read_sheet, read_workbook, workbook_files
    readers = {STRENGTH_FILE: ("strength", strength_results)} | TABLES
    pending = []
    for path in workbook_files(root):
        rel = path.relative_to(root).as_posix()
        for sheet in read_workbook(path, rel, log):
            attr, reader = readers[f"lab/{sheet.sheet}.csv"]
            rows = read_sheet(sheet, reader, rel, log)
            if attr == "strength":
                strength.extend(rows)
            else:
                tables[attr] = tables.get(attr, []) + rows
            pending += [(rel, sheet.sheet, row, first) for row, first in sheet.pending]
    _unique_specimens(strength, log)
    return pending


def _unique_specimens(strength: list, log: ProblemLog) -> None:
    """A specimen reported in two files (a CSV and a workbook, or two workbooks) is refused."""
    first: dict[str, StrengthResult] = {}
    for r in strength:
        seen = first.setdefault(r.specimen, r)
        if seen is not r and seen.file != r.file:
            # a workbook's strength rows are on its sheet 'strength', the id in column A
            sheet = {"sheet": "strength", "cell": f"A{r.row}"} if r.file.endswith(".xlsx") else {}
            log.add(r.file, f"specimen '{r.specimen}' is also reported in {seen.file}, row "
                    f"{seen.row}.", row=r.row, field="specimen",
                    fix="report each specimen once: remove one of the two rows.", **sheet)


def _unique_within(p: Project, docs: dict, located: dict, log: ProblemLog) -> None:
    """Ids and names that must not repeat but are not looked up by id (zones, trial panels,
    a zone's candidates, a mix's constituents, rule overrides, unit prices): a second entry
    would silently shadow or double the first."""
    d = p.dossier
    _index(d.zones, "zone id", ROOT_FILE, "zones", located, log)
    _index(d.rule_overrides, "override of rule", ROOT_FILE, "rule_overrides", located, log,
           id_field="rule")
    for i, z in enumerate(d.zones):
        _index(z.candidates, "candidate mix", ROOT_FILE, ("zones", i, "candidates"), located,
               log, id_field=None)
    for i, m in enumerate(docs["mixes.yaml"].mixes if docs.get("mixes.yaml") else ()):
        for part, field_ in (("binders", "binder"), ("sands", "sand"), ("admixtures", "name")):
            _index(getattr(m, part), field_, "mixes.yaml", ("mixes", i, part), located, log,
                   id_field=field_)
    if spec := docs.get("specification.yaml"):
        _index(spec.trial_panels, "trial panel id", "specification.yaml", "trial_panels",
               located, log)
        _index(spec.unit_prices, "unit price of mix", "specification.yaml", "unit_prices",
               located, log, id_field="mix")


def _assemble(root: Path, docs: dict, located: dict, strength: list,
              log: ProblemLog) -> Project:
    p = Project(root=root, dossier=docs[ROOT_FILE], strength=strength)
    if an := docs.get("analyses.yaml"):
        p.analyses = _index(an.analyses, "analysis id", "analyses.yaml", "analyses", located, log)
    if mat := docs.get("materials.yaml"):
        m = "materials.yaml"
        p.binders = _index(mat.binders, "binder id", m, "binders", located, log)
        p.masonry_units = _index(mat.masonry_units, "masonry unit id", m, "masonry_units",
                                 located, log)
        p.historic_mortars = _index(mat.historic_mortars, "historic mortar id", m,
                                    "historic_mortars", located, log)
        p.sands = _index(mat.sands, "sand id", m, "sands", located, log)
        p.mortar_properties = _index(mat.mortar_properties, "mortar_properties of mix", m,
                                     "mortar_properties", located, log, id_field="mix")
    if mx := docs.get("mixes.yaml"):
        p.mixes = _index(mx.mixes, "mix id", "mixes.yaml", "mixes", located, log)
    if cm := docs.get("comments.yaml"):
        p.comments = list(_index(cm.comments, "comment id", "comments.yaml", "comments", located,
                                 log).values())
    _unique_within(p, docs, located, log)
    narrative_dir = root / NARRATIVE_DIR
    if narrative_dir.is_dir():
        from specgen.project.files import read_text
        for md in sorted(narrative_dir.glob("*.md")):
            text = read_text(md, f"{NARRATIVE_DIR}/{md.name}", log)
            if text is not None:
                p.narrative[md.stem] = text
    p.inputs = input_files(root)
    return p


def input_files(root: Path) -> list[InputFile]:
    """Every input file of a project folder with its SHA-256 (the archive under ``issued/``
    and hidden files left out): what a revision's manifest records as its inputs."""
    out = []
    for path in sorted(root.rglob("*")):
        parts = path.relative_to(root).parts
        if path.is_file() and parts[0] != ARCHIVE_DIR and not any(x.startswith(".") for x in parts):
            out.append(_hash(path, path.relative_to(root).as_posix()))
    return out
