"""``specgen new``: a starter project copied from ``content/starter``.

Each key of the starter YAML files is commented with its description from the schema
(the same source as ``specgen format``), so the comments can never drift from the code.
"""
from __future__ import annotations

import re
import shutil
import typing
from pathlib import Path

from pydantic import BaseModel

from specgen.errors import UsageError
from specgen.project.schema import submodel
from specgen.refdata import CONTENT_DIR

STARTER = CONTENT_DIR / "starter"
_KEY = re.compile(r"^(?P<indent>\s*)(?P<dash>- )?(?P<key>[A-Za-z_][A-Za-z0-9_]*):(?P<rest>.*)$")
COMMENT_COLUMN = 34


def _choices(info) -> str:
    args = [a for a in typing.get_args(info.annotation)] or []
    if typing.get_origin(info.annotation) is typing.Literal:
        return " (" + " | ".join(map(str, args)) + ")"
    return ""


def annotate(text: str, model: type[BaseModel]) -> str:
    """Append ``# description`` to every block-style key line of a YAML document."""
    stack: list[tuple[int, type[BaseModel]]] = [(-1, model)]
    out = []
    for line in text.splitlines():
        m = _KEY.match(line)
        if not m or line.lstrip().startswith("#"):
            out.append(line)
            continue
        col = len(m.group("indent")) + (2 if m.group("dash") else 0)
        while len(stack) > 1 and stack[-1][0] >= col:
            stack.pop()
        current = stack[-1][1]
        key = m.group("key")
        info = current.model_fields.get(key)
        sub = submodel(current, key)
        if sub is not None:
            stack.append((col, sub))
        if info is not None and info.description and "#" not in m.group("rest"):
            line = line.ljust(COMMENT_COLUMN - 1) + f" # {info.description}{_choices(info)}"
        out.append(line)
    return "\n".join(out) + "\n"


def write_starter(directory: Path) -> list[Path]:
    """Copy the starter files into ``directory``; refuse to write into a non-empty folder."""
    from specgen.project.load import DOCUMENTS
    directory = Path(directory)
    if directory.exists() and any(directory.iterdir()):
        raise UsageError(f"{directory}: the folder is not empty. "
                         "Fix: name a new folder, so no existing file is overwritten.")
    written = []
    for src in sorted(STARTER.rglob("*")):
        if src.is_file():
            rel = src.relative_to(STARTER).as_posix()
            dst = directory / rel
            dst.parent.mkdir(parents=True, exist_ok=True)
            if rel in DOCUMENTS:
                dst.write_text(annotate(src.read_text(encoding="utf-8"), DOCUMENTS[rel][0]),
                               encoding="utf-8")
            else:
                shutil.copyfile(src, dst)
            written.append(dst)
    written.append(_lab_readme(directory))
    return written


def _lab_readme(directory: Path) -> Path:
    """``lab/README.md``: the columns of every laboratory file (a CSV carries no comments)."""
    from specgen.project.reference import lab_lines
    path = directory / "lab" / "README.md"
    head = ["# Laboratory files", "", "Results from the laboratory, one file per kind of test "
            "(or one workbook, `lab/*.xlsx`, with a sheet per kind). The unit of a column is "
            "written in its header in brackets; the starter's files show the layout.", ""]
    path.write_text("\n".join(head + lab_lines()),
                    encoding="utf-8")
    return path
