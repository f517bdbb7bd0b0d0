"""The project folder's layout and the helpers every reader of it shares.

Below the loader (``load.py`` orchestrates; the readers of single inputs — firing records,
site temperatures, the specification, the cross references — import from here), so no
module of ``specgen.project`` imports the loader back.
"""
from __future__ import annotations

from pathlib import Path

from pydantic import BaseModel, ValidationError

from specgen.errors import ProblemLog, did_you_mean, quote
from specgen.project import schema
from specgen.project.files import CONTROL, Located

ARCHIVE_DIR = "issued"  # issued/<revision>/: the inputs of earlier issued revisions
STRENGTH_FILE = "lab/strength.csv"
NARRATIVE_DIR = "narrative"


def field_path(loc: tuple) -> str:
    loc = tuple(p for p in loc if p != "[key]")  # a dict key's own error: the key is the field
    return ".".join(str(p) if not isinstance(p, int) else f"[{p}]" for p in loc).replace(".[", "[")


def _model_fields(model: type[BaseModel], loc: tuple) -> list[str]:
    """Valid keys at ``loc`` inside ``model`` (for 'did you mean')."""
    holder = schema.model_at(model, loc[:-1])
    return list(holder.model_fields) if holder is not None else []


def _give(model: type[BaseModel], loc: tuple) -> str | None:
    """A fix for a zero or negative amount, from the field's own description."""
    keys = [i for i, part in enumerate(loc) if isinstance(part, str)]
    info = _field_info(model, loc[:keys[-1] + 1]) if keys else None
    if info is None or not info.description:
        return None
    return f"give an amount greater than zero, with its unit ({info.description})."


def _field_info(model: type[BaseModel], loc: tuple):
    """The pydantic FieldInfo of the field at ``loc`` (its last string part) in ``model``."""
    holder = schema.model_at(model, loc[:-1])
    return holder.model_fields.get(loc[-1]) if holder is not None else None


def validate(located: Located, model: type[BaseModel], rel: str, log: ProblemLog):
    """Validate a parsed document; translate pydantic errors into located problems."""
    try:
        return model.model_validate(located.data)
    except ValidationError as exc:
        for err in exc.errors():
            loc = tuple(err["loc"])
            line = located.line_of(loc)
            msg = err["msg"].removeprefix("Value error, ")
            fix = None
            if err["type"] == "extra_forbidden":
                fix = did_you_mean(loc[-1], _model_fields(model, loc)) or "remove the key."
                msg = f"unknown key '{quote(loc[-1])}'."
            elif err["type"] == "missing":
                msg = "this required field is missing."
                fix = f"add '{loc[-1]}:'."
            else:
                found = err.get("input")
                msg = quote(msg, 300)
                if isinstance(found, (dict, list)) or repr(found) in msg or str(found) in msg:
                    msg = msg.rstrip(".") + "."
                else:
                    shown = f"'{quote(found)}'" if isinstance(found, str) else quote(repr(found))
                    msg = f"{msg} (found {shown})."
                if msg.startswith("must be greater than zero"):
                    fix = _give(model, loc)
                fix = fix or (err.get("ctx") or {}).get("fix", "").strip() or None
            log.add(rel, msg, line=line, field=field_path(loc), fix=fix)
        return None


def inside(root: Path, rel: str, file: str, field: str, log: ProblemLog,
           line: int | None = None) -> Path | None:
    """Resolve ``rel`` (a path written in a project file) and refuse it if it leaves the folder.

    Absolute paths, ``..`` and symbolic links that point outside the project are refused,
    so a project can never make specgen read (or publish) a file from elsewhere.
    """
    candidate = Path(rel)
    if CONTROL.search(rel):
        log.add(file, f"the path '{quote(rel)}' holds a control character.", field=field,
                line=line, fix="write the file name plainly.")
        return None
    if candidate.is_absolute() or ".." in candidate.parts:
        log.add(file, f"the path '{quote(rel)}' leaves the project folder.", field=field, line=line,
                fix="give a path relative to the project folder, without '..'.")
        return None
    resolved = (root / candidate).resolve()
    if not resolved.is_relative_to(root.resolve()):
        log.add(file, f"the path '{quote(rel)}' points outside the project folder (through a link).",
                field=field, line=line, fix="copy the file into the project folder instead of linking it.")
        return None
    return resolved


def index_of(items, kind: str, rel: str, key, located: dict, log: ProblemLog,
           id_field: str | None = "id") -> dict:
    """``items`` of the list at ``key`` (a name, or a path such as ``("zones", 0,
    "candidates")``) in ``rel`` by their ``id_field`` (``None``: the items themselves);
    a repeated id is a problem located at its line."""
    out = {}
    where = located.get(rel)
    path = key if isinstance(key, tuple) else (key,)
    for i, item in enumerate(items):
        ident = getattr(item, id_field) if id_field else item
        if ident in out:
            loc = path + (i, id_field) if id_field else path + (i,)
            log.add(rel, f"{kind} '{quote(ident)}' is given twice.", field=field_path(loc),
                    line=where.line_of(loc) if where else None,
                    fix="give each one its own id." if id_field == "id"
                    else "merge the two entries into one.")
        out[ident] = item
    return out
