"""The issued revisions a project keeps under ``issued/<revision>/``: each a complete project
folder as it was issued, loaded and validated like the current one (by the loader the
pipeline hands in, which knows the names a comment may be about)."""
from __future__ import annotations

from collections.abc import Callable
from dataclasses import replace
from pathlib import Path

from specgen.errors import InputErrors, Problem
from specgen.project.layout import ARCHIVE_DIR


def load_archive(root: Path, current, load: Callable) -> list:
    """The archived issued revisions, validated (each by ``load``), oldest first; the current
    revision must be dated on or after every one of them."""
    folder = root / ARCHIVE_DIR
    if not folder.is_dir():
        return []
    problems, more, found = [], {}, []
    # a dot-folder is an issue in progress (or one a crash left), not an issued revision
    for sub in sorted(p for p in folder.iterdir() if p.is_dir() and not p.name.startswith(".")):
        prefix = f"{ARCHIVE_DIR}/{sub.name}/"
        if not (sub / "dossier.yaml").is_file():
            problems.append(Problem(prefix + "dossier.yaml", "not found: an archived revision "
                                    "folder holds the complete inputs of the revision it is "
                                    "named after.", fix=f"restore the file (the PDF of revision "
                                    f"{sub.name} carries it as the attachment input/dossier.yaml)"
                                    ", or remove the folder if it is not an issued revision."))
            continue
        try:
            old = load(sub)
        except InputErrors as exc:
            problems += [replace(p, file=prefix + p.file) for p in exc.problems]
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
