"""The project folder format reference, generated from the schema (never written twice)."""
from __future__ import annotations

import typing

from pydantic import BaseModel
from pydantic_core import PydanticUndefined

from specgen.project import schema
from specgen.project.load import DOCUMENTS
from specgen.project.tables import (CAPILLARY_COLUMNS, COLOUR_COLUMNS, SIEVE_COLUMNS,
                                    STRENGTH_COLUMNS)

UNIT_OF = {"Pressure": "pressure, e.g. '12 MPa'", "Length": "length, e.g. '10 mm'",
           "Area": "area, e.g. '240 m^2'", "Density": "density, e.g. '850 kg/m^3'",
           "Duration": "time, e.g. '28 d'", "Temperature": "temperature, e.g. '20 degC'",
           "MassPercent": "mass %", "Number": "number"}


def _unit_kind(metadata) -> str | None:
    """The unit kind a quantity field declares (its parser's ``unit_kind``), as words."""
    from specgen import units
    for m in metadata:
        kind = getattr(getattr(m, "func", None), "unit_kind", None)
        if kind in units.KINDS:
            k = units.KINDS[kind]
            return f"{k.name.replace('_', ' ')}, e.g. {k.example.split(' or ')[0]}"
        if kind:
            return kind
    return None


def _type_name(annotation, metadata=()) -> tuple[str, type[BaseModel] | None]:
    if (kind := _unit_kind(metadata)) is not None:
        return kind, None
    for name, alias in vars(schema).items():
        if name in UNIT_OF and annotation == alias:
            return UNIT_OF[name], None
    origin, args = typing.get_origin(annotation), typing.get_args(annotation)
    if origin is typing.Annotated:
        name, model = _type_name(args[0], annotation.__metadata__)
        return ("text" if name == "str" else name), model
    if isinstance(annotation, type) and issubclass(annotation, BaseModel):
        return "mapping", annotation
    if origin is list and args:
        inner, model = _type_name(args[0])
        return f"list of {inner}", model
    if origin is typing.Literal:
        return " / ".join(map(str, args)), None
    if args and type(None) in args:
        inner = [a for a in args if a is not type(None)]
        name, model = _type_name(inner[0])
        return name + " (optional)", model
    if origin is dict:
        if typing.get_origin(args[1]) is dict:
            return "mapping of lumped key → {constituent: fraction}", None
        return "mapping of constituent → mass %", None
    name = getattr(annotation, "__name__", str(annotation)).replace("Annotated", "text")
    return ("number" if name == "float" else name), None


def _rows(model: type[BaseModel], prefix: str, out: list) -> None:
    for name, info in model.model_fields.items():
        kind, sub = _type_name(info.annotation, info.metadata)
        if info.metadata and kind in ("str", "text"):
            kind = "text"
        if info.is_required():
            default = "required"
        elif info.default_factory is not None:
            default = "empty"
        else:
            default = "—" if info.default in (None, PydanticUndefined) else repr(info.default)
        out.append((f"{prefix}{name}", kind, default, info.description or ""))
        if sub is not None:
            _rows(sub, f"{prefix}{name}{'[]' if kind.startswith('list') else ''}.", out)


def markdown() -> str:
    """Every key of every project file: type/unit, default and meaning, as Markdown."""
    lines = ["# Project folder format", "",
             "Generated from the schema by `specgen format`; quantities are written with their unit.", ""]
    for file, (model, required) in DOCUMENTS.items():
        lines += [f"## `{file}`" + (" (required)" if required else ""), "",
                  "| key | type / unit | default | meaning |", "|---|---|---|---|"]
        rows: list = []
        _rows(model, "", rows)
        lines += [f"| `{k}` | {t} | {d} | {m} |" for k, t, d, m in rows] + [""]
    lines += _constituents()
    return "\n".join(lines + lab_lines() + _review_file() + ARCHIVE_NOTE)


def lab_lines() -> list[str]:
    """The laboratory files: CSV columns and the workbook rules, as Markdown lines."""
    lines: list[str] = []
    for file, cols in (("lab/strength.csv", STRENGTH_COLUMNS), ("lab/sieves.csv", SIEVE_COLUMNS),
                       ("lab/colour.csv", COLOUR_COLUMNS),
                       ("lab/capillary.csv", CAPILLARY_COLUMNS)):
        lines += [f"## `{file}`", "", "| column | kind (unit in the header) | required | meaning |",
                  "|---|---|---|---|"]
        lines += [f"| `{c.name}` | {c.kind or ('one of ' + ', '.join(c.choices) if c.choices else 'text')} "
                  f"| {'yes' if c.required else 'no'} | {c.description} |" for c in cols] + [""]
    from specgen.project.workbook import SHEETS
    lines += ["## `lab/*.xlsx` (laboratory workbooks)", "",
              "A workbook's sheets are read as the CSV files of the same names ("
              + ", ".join(f"`{s}`" for s in SHEETS) + "): header in row 1 with the units, one "
              "row per specimen or reading, values (not formulas), dates as dates, no merged "
              "cells. A row whose result cells are empty is a planned test without a report. "
              "`specgen lab-workbook` writes one pre-filled with the tests the project plans; "
              "macro-enabled and old binary files are refused unopened.", ""]
    return lines


ARCHIVE_NOTE = [
    "## `issued/<revision>/`", "",
    "The inputs of each issued revision, exactly as issued (a complete project folder with "
    "`revision.status: issued`). Do not copy files here by hand: `specgen issue DIR` freezes the "
    "current inputs here with the issue date and purpose, builds the issued revision (its "
    "manifest hashes these inputs) and opens the next draft revision in `dossier.yaml`. A later "
    "build stops if an issued input was changed, unless told to rebuild that revision with "
    "`--rebuild-issued REV --reason \"why\"` (the reason is recorded in its manifest).", ""]


def _constituents() -> list[str]:
    """The constituents an analysis may name (content/data/constituents.yaml)."""
    from specgen import refdata
    table = refdata.load("constituents")
    kinds = {"oxide": "stays on ignition", "loss": "volatile: counts as loss",
             "other": "reported beside the oxides"}
    out = ["## Constituents of an analysis (`analyses.yaml`, `mass_percent`)", "",
           "Any other name is refused with the nearest spelling.  Loss on ignition (`LOI`) is "
           "the measured total of the volatile constituents: when it is given, the parts "
           "reported beside it are inside it and counted once.", "",
           "| key | constituent | kind | also written |", "|---|---|---|---|"]
    for key, c in table.data.items():
        also = ", ".join(f"`{n}`" for n in c.get("synonyms", [])) or "—"
        out.append(f"| `{key}` | {c['name']} | {kinds[c['kind']]} | {also} |")
    return out + [""]


def _review_file() -> list[str]:
    """The reviewer's comment file: not part of the project folder, taken in by
    ``specgen import-comments PROJECT FILE``."""
    from specgen.project.review_file import FORMAT, ReviewFile
    lines = ["## Reviewer's comment file (exported from the site)", "",
             f"JSON, format `{FORMAT}`, written by the site's Review comments panel and taken into "
             "`comments.yaml` by `specgen import-comments PROJECT FILE --out OUT` (the comments "
             "are checked against the revision they were made on, published in OUT; a second "
             "import of the same file adds nothing).", "",
             "| key | type / unit | default | meaning |", "|---|---|---|---|"]
    rows: list = []
    _rows(ReviewFile, "", rows)
    return lines + [f"| `{k}` | {t} | {d} | {m} |" for k, t, d, m in rows] + [""]
