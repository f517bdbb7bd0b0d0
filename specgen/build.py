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
from specgen.killpoints import reached
from specgen.project import Project, load_project
from specgen.project.load import ARCHIVE_DIR


def check(project_dir: Path | str) -> tuple[Project, Results]:
    """Load the project (and its archived issued revisions, validated as a build would)
    and run every check (no output written)."""
    project = load_project(project_dir)
    _load_archive(Path(project_dir), project)
    return project, evaluate(project)


def _quiet(step: str) -> None:
    pass


def build(project_dir: Path | str, out_dir: Path | str, *, page_size: str = "a4",
          progress: Callable[[str], None] = _quiet) -> Path:
    """Build the project's revision (and missing archived ones) into ``out_dir/<revision>/``."""
    progress("load: reading and validating the project folder")
    project = load_project(project_dir)
    archived = _load_archive(Path(project_dir), project)
    out = Path(out_dir)
    from specgen.publish.output import preflight
    preflight(out)  # a read-only or full output folder is found before anything is drawn
    reached("load")
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
    reached("check")
    history = history_for(out, project, results)
    progress("render: pages, figures and calculation sheets")
    pages = render(project, results, history)
    reached("render")
    _fix_dates(project.revision.date)
    return publish(project, results, pages, out, page_size=page_size, progress=progress,
                   changes=history.changes)


def _load_archive(root: Path, current: Project) -> list[Project]:
    """The archived issued revisions, validated, oldest first; the current revision must be
    dated on or after every one of them."""
    folder = root / ARCHIVE_DIR
    if not folder.is_dir():
        return []
    problems, more, found = [], {}, []
    for sub in sorted(p for p in folder.iterdir() if p.is_dir()):
        prefix = f"{ARCHIVE_DIR}/{sub.name}/"
        if not (sub / "dossier.yaml").is_file():
            problems.append(Problem(prefix + "dossier.yaml", "not found: an archived revision "
                                    "folder holds the complete inputs of the revision it is "
                                    "named after.", fix=f"restore the file (the PDF of revision "
                                    f"{sub.name} carries it as the attachment input/dossier.yaml)"
                                    ", or remove the folder if it is not an issued revision."))
            continue
        try:
            old = load_project(sub)
        except InputErrors as exc:
            problems += [Problem(prefix + p.file, p.message, p.line, p.row, p.field, p.fix)
                         for p in exc.problems]
            more.update({prefix + f: n for f, n in exc.more.items()})
            continue
        where = prefix + "dossier.yaml"
        if old.revision.code != sub.name or old.revision.status != "issued":
            problems.append(Problem(where, f"holds revision '{old.revision.code}' "
                                    f"({old.revision.status}); an archive folder holds the issued "
                                    "revision it is named after.", field="revision",
                                    fix=f"set code: {sub.name} and status: issued, or rename the folder."))
        if old.revision.code.lower() == current.revision.code.lower():
            problems.append(Problem("dossier.yaml", f"revision '{current.revision.code}' is already "
                                    f"issued in {ARCHIVE_DIR}/{sub.name}/.", field="revision.code",
                                    fix="raise a new revision code for the current inputs."))
        elif old.revision.date > current.revision.date:
            problems.append(Problem("dossier.yaml", f"revision {current.revision.code} is dated "
                                    f"{current.revision.date}, before revision {old.revision.code} "
                                    f"was issued ({old.revision.date}).", field="revision.date",
                                    fix="date the revision on or after the last issued one.",
                                    line=_line_of_date(root)))
        found.append(old)
    if problems or more:
        raise InputErrors(problems, more)
    return sorted(found, key=lambda p: (p.revision.date, p.revision.code))


def _line_of_date(root: Path) -> int | None:
    from specgen.errors import ProblemLog
    from specgen.project.files import read_yaml
    located = read_yaml(root / "dossier.yaml", "dossier.yaml", ProblemLog())
    return located.line_of(("revision", "date")) if located else None


def verify(path: Path | str, project_dir: Path | str | None = None) -> list[str]:
    """Every difference between built output and what it vouches for; empty when all match.

    ``path`` is a revision folder or an output folder (then every revision in it, and
    versions.json and the root index against the revisions present).  With
    ``project_dir``, the inputs kept for each revision (``issued/<revision>/``, or the
    project folder for its current revision) are checked against the manifest too.
    """
    from specgen.errors import PublishError
    from specgen.publish import verify as v
    path = Path(path)
    if (path / "manifest.json").is_file():
        folders, lines = [path], []
    else:
        folders = v.revisions_in(path) if path.is_dir() else []
        if not folders:
            raise PublishError(f"{path}: neither a revision folder nor an output folder written "
                               "by specgen build. Fix: name OUT or OUT/<revision>.")
        lines = v.folder_differences(path)
    for folder in folders:
        lines += [f"{folder.name}: {d}" for d in v.revision_differences(folder)]
        if project_dir is not None:
            lines += _kept_inputs(Path(project_dir), folder, v)
    return lines


def _kept_inputs(project: Path, folder: Path, v) -> list[str]:
    from specgen.project.load import input_files
    code = folder.name
    kept = project / ARCHIVE_DIR / code
    if not kept.is_dir():
        kept = project if _revision_code(project) == code else None
    if kept is None:
        if v.manifest_of(folder).get("status") == "issued":
            return [f"{code}: the project keeps no inputs of this issued revision "
                    f"({ARCHIVE_DIR}/{code}/)"]
        return []
    return v.input_differences(folder, {f.path: f.sha256 for f in input_files(kept)})


def _revision_code(project: Path) -> str | None:
    from specgen.errors import ProblemLog
    from specgen.project.files import read_yaml
    located = read_yaml(project / "dossier.yaml", "dossier.yaml", ProblemLog())
    data = located.data if located else None
    rev = data.get("revision") if isinstance(data, dict) else None
    return str(rev.get("code")) if isinstance(rev, dict) else None


def _fix_dates(date: dt.date) -> None:
    """Reproducible output: every date stamped by the toolchain is the revision date."""
    epoch = int(dt.datetime(date.year, date.month, date.day, tzinfo=dt.timezone.utc).timestamp())
    os.environ["SOURCE_DATE_EPOCH"] = str(epoch)
