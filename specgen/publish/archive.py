"""Issuing a revision: its inputs frozen into ``issued/<revision>/``, the next draft opened.

The archive copy is written into a staging folder beside the archive and renamed into
place only once the issued revision has been checked and built, so a refused or failed
issue leaves the project folder as it was.  ``dossier.yaml`` is edited line by line (its
comments and layout are the specifier's), and written by a rename.
"""
from __future__ import annotations

import datetime as dt
import os
import re
import shutil
from pathlib import Path

import yaml

from specgen.errors import UsageError

ROOT_FILE = "dossier.yaml"


def next_code(code: str) -> str:
    """The next revision code: the trailing number raised by one (R3 → R4, P09 → P10)."""
    m = re.fullmatch(r"(.*?)(\d+)", code)
    if not m:
        raise UsageError(f"cannot work out the revision after '{code}'. Fix: name it with "
                         "--next CODE.")
    return f"{m.group(1)}{int(m.group(2)) + 1:0{len(m.group(2))}d}"


def freeze(project, archive_dir: str, values: dict) -> Path:
    """Copy the project's inputs into a staging folder of the archive, with ``dossier.yaml``'s
    revision fields set to ``values``; returns the staging folder."""
    root = project.root
    staging = root / archive_dir / f".staging-{project.revision.code}"
    if staging.exists():
        shutil.rmtree(staging)
    for f in project.inputs:
        dst = staging / f.path
        dst.parent.mkdir(parents=True, exist_ok=True)
        shutil.copy2(root / f.path, dst)
    set_revision(staging / ROOT_FILE, values)
    return staging


def commit(staging: Path, code: str) -> Path:
    """Rename the staging folder to ``issued/<code>`` (refused if that exists)."""
    target = staging.parent / code
    if target.exists():
        raise UsageError(f"{target} already exists: revision {code} was issued before. Fix: "
                         "raise a new revision code in dossier.yaml.")
    os.replace(staging, target)
    return target


def open_next(root: Path, code: str, date: dt.date, after: str) -> None:
    """Turn the project's ``dossier.yaml`` into the next draft revision ``code``."""
    set_revision(root / ROOT_FILE, {
        "code": code, "status": "draft", "date": date.isoformat(),
        "description": f"Draft following {after}: say what changes and why."})


def set_revision(path: Path, values: dict[str, str]) -> None:
    """Set keys of the ``revision:`` block of a dossier.yaml in place (block style only)."""
    lines = path.read_text(encoding="utf-8").split("\n")
    head, _ = _revision_keys(path, lines)
    for key, value in values.items():
        _, keys = _revision_keys(path, lines)
        text = _scalar(value)
        if key not in keys:
            lines.insert(head, f"{_child_indent(lines, head)}{key}: {text}")
            continue
        at = keys[key]
        indent = re.match(r"^(\s*)", lines[at - 1]).group(1)
        end = at
        while end < len(lines) and (not lines[end].strip()
                                    or len(lines[end]) - len(lines[end].lstrip()) > len(indent)):
            end += 1
        while end > at and not lines[end - 1].strip():
            end -= 1
        # a comment after a one-line value is the specifier's: keep it
        note = re.search(r"\s+#[^'\"]*$", lines[at - 1]) if end == at else None
        lines[at - 1:end] = [f"{indent}{key}: {text}{note.group(0) if note else ''}"]
    tmp = path.with_name(f".{path.name}.tmp-{os.getpid()}")
    tmp.write_text("\n".join(lines), encoding="utf-8")
    os.replace(tmp, path)


def _revision_keys(path: Path, lines: list[str]) -> tuple[int, dict[str, int]]:
    """Line of ``revision:`` and the line of each of its keys (1-based)."""
    try:
        node = yaml.compose("\n".join(lines), Loader=yaml.SafeLoader)
    except yaml.YAMLError as exc:
        raise UsageError(f"{path}: cannot be read as YAML ({exc}). Fix: run specgen check "
                         "first.") from exc
    for k, v in (node.value if isinstance(node, yaml.MappingNode) else []):
        if k.value == "revision":
            if not isinstance(v, yaml.MappingNode) or v.flow_style:
                break
            return k.start_mark.line + 1, {kk.value: kk.start_mark.line + 1 for kk, _ in v.value}
    raise UsageError(f"{path}: the revision is not written as a block ('revision:' on a line "
                     "of its own, one key per line). Fix: write it that way.")


def _child_indent(lines: list[str], head: int) -> str:
    for line in lines[head:]:
        if line.strip() and not line.lstrip().startswith("#"):
            return re.match(r"^(\s*)", line).group(1) or "  "
    return "  "


def _scalar(value: str) -> str:
    """A YAML scalar on one line: quoted unless it is plainly safe."""
    if re.fullmatch(r"[A-Za-z0-9][A-Za-z0-9._-]*", value):
        return value
    return '"' + value.replace("\\", "\\\\").replace('"', '\\"') + '"'
