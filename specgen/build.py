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


def _quiet(step: str) -> None:
    pass


def build(project_dir: Path | str, out_dir: Path | str, *, page_size: str | None = None,
          progress: Callable[[str], None] = _quiet) -> Path:
    """Build the project's revision (and missing archived ones) into ``out_dir/<revision>/``.

    ``page_size`` (``a4`` or ``letter``) overrides the paper of the practice each revision
    states (A4 when a revision states no practice, as before practices were stated)."""
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


def _paper(project: Project, page_size: str | None) -> str:
    """The paper of the PDF: asked for, else the stated practice's, else A4."""
    from specgen import practice
    if page_size:
        return page_size
    p = practice.resolve(project.dossier)
    return p.paper.lower() if p.stated else "a4"


def _build_one(project: Project, out: Path, page_size: str | None, progress) -> Path:
    from specgen.publish import publish
    page_size = _paper(project, page_size)
    from specgen.publish.history import history_for
    from specgen.report.render import render
    progress("check: running the checks")
    results = evaluate(project)
    refuse_unconfirmed(project, results)
    history = history_for(out, project, results)
    progress("render: pages, figures and calculation sheets")
    pages = render(project, results, history)
    _fix_dates(project.revision.date)
    return publish(project, results, pages, out, page_size=page_size, progress=progress,
                   changes=history.changes)


def refuse_unconfirmed(project: Project, results: Results) -> None:
    """A revision for construction may not rest on a value still tagged ``memory``.

    Raises :class:`InputErrors` (exit 2, nothing written) naming the revision's purpose in
    dossier.yaml and every such value with the checks that used it.
    """
    values = results.unconfirmed()
    if project.revision.purpose != "for_construction" or not values:
        return
    from specgen.errors import ProblemLog
    from specgen.project.files import read_yaml
    log = ProblemLog()
    located = read_yaml(Path(project.root) / "dossier.yaml", "dossier.yaml", ProblemLog())
    log.add("dossier.yaml", f"revision {project.revision.code} is for construction but rests on "
            f"{len(values)} value(s) still tagged memory (recalled, not read in their source).",
            line=located.line_of(("revision", "purpose")) if located else None,
            field="revision.purpose",
            fix="confirm each value listed below against its source, or issue the revision "
            "for approval until then (purpose: for_approval).")
    for v in values:
        users = v["used_by"]
        log.add(f"content/data/{v['table']}.yaml", f"tagged memory (source named: {v['source']}); "
                f"used by {', '.join(users[:3])}" + (f" and {len(users) - 3} more" if
                                                     len(users) > 3 else "") + ".",
                field=v["path"] or "(the whole table)",
                fix="read the value in the source and cite its clause or table (then remove the "
                "tag), or declare it common practice with its range and reason, or a project "
                "requirement (rule_overrides with a justification).")
    log.raise_if_any()


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
            problems += [Problem(f"{ARCHIVE_DIR}/{sub.name}/{p.file}", p.message, p.line, p.row,
                                 p.field, p.fix) for p in exc.problems]
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
