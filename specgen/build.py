"""The pipeline in one place: load → compute/check → render → publish.

``build()`` is what ``specgen build`` runs; ``check()`` stops after the checks.
Only ``build()`` imports the rendering and publishing stages (and with them
matplotlib, MkDocs and WeasyPrint), so ``specgen check`` stays light.

A project folder may keep the inputs of its earlier issued revisions under
``issued/<revision>/`` (each a complete project folder as it was issued); a build
first builds any of those missing from the output folder, oldest first, so the
full revision history can be published anywhere from the project alone.
"""
from __future__ import annotations

import datetime as dt
import os
from collections.abc import Callable
from dataclasses import dataclass, replace
from pathlib import Path

from specgen.checks.run import Results, evaluate
from specgen.errors import InputErrors, Problem
from specgen.project import Project, load_project
from specgen.project.load import ARCHIVE_DIR


def reference_names() -> tuple[set[str], set[str]]:
    """What a review comment may be about: every check code and every page of the dossier
    (the check and chapter registries; loading knows neither)."""
    from specgen.checks.registry import checks
    from specgen.report.chapters import chapters
    return ({s.code for s in checks()},
            {c.path.rsplit(".", 1)[0] for c in chapters()} | {"summary"})


def _load(project_dir) -> Project:
    return load_project(project_dir, names=reference_names())


def check(project_dir: Path | str) -> tuple[Project, Results]:
    """Load the project and run every check (no output written)."""
    project = _load(project_dir)
    return project, evaluate(project)


def import_comments(project_dir: Path | str, review_file: Path | str,
                    out_dir: Path | str) -> list[str]:
    """Take a reviewer's exported comment file into the project's ``comments.yaml``.

    The comments are checked against the revision they were made on, as published in
    ``out_dir``; those already taken in are skipped.  Returns the ids given to new comments.
    """
    from specgen.project.review_file import take_in
    project = _load(project_dir)
    return take_in(project, Path(review_file), Path(out_dir))


def missing(project_dir: Path | str):
    """What the dossier still lacks to be complete for issue (``completeness.Missing`` items,
    in the order a specifier works), with the project and results it was read from."""
    from specgen.completeness import missing as lacking
    project, results = check(project_dir)
    return lacking(project, results), project


def lab_workbook(project_dir: Path | str, path: Path | str | None = None, *,
                 overwrite: bool = False) -> tuple[Path, dict[str, int]]:
    """Write the laboratory workbook of the project (planned tests without results yet);
    returns where and the rows per sheet.  Default file: ``<code>-<revision>-lab.xlsx``."""
    from specgen.errors import UsageError
    from specgen.labbook import write_workbook
    project = _load(project_dir)
    code = project.dossier.project.code
    target = Path(path or f"{code}-{project.revision.code}-lab.xlsx")
    if target.exists() and not overwrite:
        raise UsageError(f"{target}: already exists. Fix: name another file with --out, or "
                         "add --force to replace it.")
    return target, write_workbook(project, target)


def _quiet(step: str, done: int | None = None, total: int | None = None) -> None:
    pass


def build(project_dir: Path | str, out_dir: Path | str, *, page_size: str = "a4",
          progress: Callable[..., None] = _quiet) -> Path:
    """Build the project's revision (and missing archived ones) into ``out_dir/<revision>/``.

    ``progress(step, done=None, total=None)`` hears each stage as it starts and, where the
    work is counted (the PDF's parts), how much of it is done."""
    progress("load: reading and validating the project folder")
    project = _load(project_dir)
    archived = _load_archive(Path(project_dir), project)
    out = Path(out_dir)
    from specgen.report import cache
    # unchanged figures and math are reused from the output folder's artefact cache;
    # after a complete build it keeps only what this build used
    with cache.using(out / cache.CACHE_DIR) as used:
        for old in archived:
            if not (out / old.revision.code / "manifest.json").is_file():
                progress(f"revision {old.revision.code} (issued, from {ARCHIVE_DIR}/)")
                _build_one(old, out, page_size, progress)
        built = _build_one(project, out, page_size, progress)
    cache.prune(out / cache.CACHE_DIR, used)
    return built


def _build_one(project: Project, out: Path, page_size: str, progress) -> Path:
    from specgen.publish import publish
    from specgen.publish.history import history_for
    from specgen.report.render import render
    progress("check: running the checks")
    results = evaluate(project)
    history = history_for(out, project, results)
    progress("render: pages, figures and calculation sheets")
    pages = render(project, results, history)
    _fix_dates(project.revision.date)
    return publish(project, results, pages, out, page_size=page_size, progress=progress,
                   changes=history.changes)


# --------------------------------------------------------------------- live preview
TEXT_ONLY = ("narrative/", "templates/")  # inputs whose change leaves the check results as they are


@dataclass
class Prepared:
    """A revision loaded, checked and rendered, ready to publish (the preview's unit of work)."""

    project: Project
    results: Results
    pages: object
    data_key: tuple   # hashes of the inputs the checks read (all but narrative and templates)


def _data_key(project: Project) -> tuple:
    return tuple((f.path, f.sha256) for f in project.inputs if not f.path.startswith(TEXT_ONLY))


def prepare(project_dir: Path | str, out_dir: Path | str, *, reuse: Prepared | None = None,
            cache_dir: Path | str | None = None, progress: Callable[..., None] = _quiet
            ) -> Prepared:
    """Load, check and render; the checks are reused from ``reuse`` when only narrative or
    templates changed, and figures and math come from the artefact cache."""
    from specgen.publish.history import history_for
    from specgen.report import cache
    from specgen.report.render import render
    progress("load: reading and validating the project folder")
    project = _load(project_dir)
    key = _data_key(project)
    if reuse is not None and reuse.data_key == key:
        results = reuse.results
    else:
        progress("check: running the checks")
        results = evaluate(project)
    progress("render: pages, figures and calculation sheets")
    with cache.using(cache_dir or Path(out_dir) / cache.CACHE_DIR):
        pages = render(project, results, history_for(Path(out_dir), project, results))
    _fix_dates(project.revision.date)
    return Prepared(project, results, pages, key)


def preview_site(prepared: Prepared, out_dir: Path | str) -> Path:
    """Publish the prepared revision's site (no PDF) into ``out_dir/<revision>/``."""
    from specgen.publish.preview import site_only
    return site_only(prepared.project, prepared.results, prepared.pages, Path(out_dir))


def preview_pdf(prepared: Prepared, target: Path, *, cache_dir: Path | str | None = None,
                progress: Callable[..., None] = _quiet) -> Path:
    """Print the prepared revision's PDF into ``target`` (parts from the artefact cache)."""
    from specgen.publish.preview import pdf_only
    from specgen.report import cache
    with cache.using(cache_dir or target.parent / cache.CACHE_DIR):
        return pdf_only(prepared.project, prepared.results, prepared.pages, target,
                        on_part=lambda done, total: progress("PDF parts", done, total))


def _load_archive(root: Path, current: Project) -> list[Project]:
    """The archived issued revisions, validated, oldest first."""
    folder = root / ARCHIVE_DIR
    if not folder.is_dir():
        return []
    problems, found = [], []
    for sub in sorted(p for p in folder.iterdir() if p.is_dir()):
        try:
            old = _load(sub)
        except InputErrors as exc:
            problems += [replace(p, file=f"{ARCHIVE_DIR}/{sub.name}/{p.file}")
                         for p in exc.problems]
            continue
        where = f"{ARCHIVE_DIR}/{sub.name}/dossier.yaml"
        if old.revision.code != sub.name or old.revision.status != "issued":
            problems.append(Problem(where, f"holds revision '{old.revision.code}' "
                                    f"({old.revision.status}); an archive folder holds the issued "
                                    "revision it is named after.", field="revision",
                                    fix=f"set code: {sub.name} and status: issued, or rename the folder."))
        if old.revision.code.lower() == current.revision.code.lower():
            problems.append(Problem("dossier.yaml", f"revision '{current.revision.code}' is already "
                                    f"issued in {ARCHIVE_DIR}/{sub.name}/.", field="revision.code",
                                    fix="raise a new revision code for the current inputs."))
        found.append(old)
    if problems:
        raise InputErrors(problems)
    return sorted(found, key=lambda p: (p.revision.date, p.revision.code))


def _fix_dates(date: dt.date) -> None:
    """Reproducible output: every date stamped by the toolchain is the revision date."""
    epoch = int(dt.datetime(date.year, date.month, date.day, tzinfo=dt.timezone.utc).timestamp())
    os.environ["SOURCE_DATE_EPOCH"] = str(epoch)
