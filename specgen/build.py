"""The pipeline in one place: load → compute/check → render → publish.

``build()`` is what ``specgen build`` runs; ``check()`` stops after the checks.
Only ``build()`` imports the rendering and publishing stages (and with them
matplotlib, MkDocs and WeasyPrint), so ``specgen check`` stays light.
"""
from __future__ import annotations

import datetime as dt
import os
from collections.abc import Callable
from pathlib import Path

from specgen.checks.run import Results, evaluate
from specgen.project import Project, load_project


def check(project_dir: Path | str) -> tuple[Project, Results]:
    """Load the project and run every check (no output written)."""
    project = load_project(project_dir)
    return project, evaluate(project)


def _quiet(step: str) -> None:
    pass


def build(project_dir: Path | str, out_dir: Path | str, *, page_size: str = "a4",
          progress: Callable[[str], None] = _quiet) -> Path:
    """Build the project's revision into ``out_dir/<revision>/``; returns that folder."""
    progress("load: reading and validating the project folder")
    project = load_project(project_dir)
    progress("check: running the checks")
    results = evaluate(project)
    from specgen.publish import publish
    from specgen.report.render import render
    progress("render: pages, figures and calculation sheets")
    pages = render(project, results)
    _fix_dates(project.revision.date)
    return publish(project, results, pages, Path(out_dir), page_size=page_size, progress=progress)


def _fix_dates(date: dt.date) -> None:
    """Reproducible output: every date stamped by the toolchain is the revision date."""
    epoch = int(dt.datetime(date.year, date.month, date.day, tzinfo=dt.timezone.utc).timestamp())
    os.environ["SOURCE_DATE_EPOCH"] = str(epoch)
