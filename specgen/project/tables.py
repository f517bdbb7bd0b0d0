"""Tabular lab data (CSV): column declarations and typed rows.

A column is declared once with its kind; a quantity column must carry its unit
in the header (``value [MPa]``, ``age [d]``) and is converted to SI here.
"""
from __future__ import annotations

import datetime as dt
from dataclasses import dataclass

from specgen import units
from specgen.errors import ProblemLog, did_you_mean, quote
from specgen.project.files import CsvTable


@dataclass(frozen=True)
class Column:
    """One CSV column: header name, unit kind (``None`` = text), whether required."""

    name: str
    kind: str | None = None
    required: bool = True
    choices: tuple[str, ...] = ()
    description: str = ""


@dataclass(frozen=True)
class StrengthResult:
    """One specimen test: SI values (age s, value Pa, temperature K)."""

    specimen: str
    mix: str
    age: float
    test: str
    value: float
    curing_temperature: float | None
    row: int
    file: str
    cast_on: dt.date | None = None
    curing: str = ""
    notes: str = ""
    tested_on: dt.date | None = None
    curing_regime: str = ""   # a regime of content/data/curing_regimes.yaml
    lab_sample: str = ""      # the specimen series of the register (samples.yaml)


DATE = "date"  # a column kind: an ISO date (YYYY-MM-DD), no unit in the header
LAB_SAMPLE = Column("lab_sample", required=False, description="the sample or specimen "
                    "series of the register (samples.yaml) it was measured on")

STRENGTH_COLUMNS = (
    Column("specimen", description="specimen id, unique in the file"),
    Column("mix", description="mix id (mixes.yaml)"),
    Column("age", "time", description="age at test, header with unit e.g. 'age [d]'"),
    Column("test", choices=("compressive", "flexural"), description="test kind"),
    Column("value", "pressure", description="strength, header with unit e.g. 'value [MPa]'"),
    Column("curing_temperature", "temperature", required=False,
           description="curing temperature, e.g. 'curing_temperature [degC]'"),
    Column("cast_on", DATE, required=False, description="date the prism was cast, YYYY-MM-DD"),
    Column("curing", required=False, description="curing regime, e.g. 'EN 1015-11: 2 d in "
           "the mould, 5 d at 95 % RH, then 65 % RH'"),
    Column("notes", required=False, description="the laboratory's remarks on the specimen"),
    Column("tested_on", DATE, required=False, description="date the prism was tested, "
           "YYYY-MM-DD (with cast_on: their difference must be the age)"),
    Column("curing_regime", required=False, description="curing regime by its key in "
           "content/data/curing_regimes.yaml, e.g. en1015_11_hydraulic (checked against the "
           "binder family)"),
    LAB_SAMPLE,
)


def map_headers(table: CsvTable, columns, rel: str, log: ProblemLog) -> dict[str, tuple[str, str | None]]:
    """Match CSV headers to declared columns: name → (header text, unit text)."""
    found: dict[str, tuple[str, str | None]] = {}
    known = [c.name for c in columns]
    by_name = {c.name: c for c in columns}
    seen: dict[str, int] = {}
    for number, header in enumerate(table.headers, 1):
        name, unit = units.split_header(header)
        if name in seen:  # which of the two would count is a guess: refuse, never pick one
            log.add(rel, f"column '{quote(name)}' appears twice (columns {seen[name]} and "
                    f"{number}).", row=1, field=quote(header), fix="keep one of the two columns.")
            found.pop(name, None)
            continue
        seen[name] = number
        if name not in by_name:
            hint = did_you_mean(name, known)
            log.add(rel, f"unknown column '{quote(name)}'.", row=1, field=quote(header),
                    fix=hint or f"use one of: {', '.join(known)}.")
            continue
        col = by_name[name]
        if col.kind == DATE:
            found[name] = (header, None)
            continue
        if col.kind and unit is None:
            log.add(rel, f"column '{name}' has no unit.", row=1, field=header,
                    fix=f"write the unit in the header, e.g. '{name} [{_example_unit(col.kind)}]'.")
            continue
        if col.kind:
            try:
                units.parse_unit(unit, col.kind)
            except units.UnitProblem as exc:
                log.add(rel, str(exc) + ".", row=1, field=header)
                continue
        found[name] = (header, unit)
    for col in columns:
        if col.required and col.name not in found and not any(
                units.split_header(h)[0] == col.name for h in table.headers):
            log.add(rel, f"required column '{col.name}' is missing.", row=1,
                    fix=f"add a column '{col.name}'" + (" with its unit" if col.kind else "") + ".")
    return found


def _example_unit(kind: str) -> str:
    return {"pressure": "MPa", "time": "d", "temperature": "degC", "length": "mm",
            "fraction": "%", "mass": "g"}.get(kind, units.KINDS[kind].si)


def cell(table_row: dict, col: Column, found, rel: str, row: int, log: ProblemLog):
    """Value of one cell: SI float for quantities, text otherwise; ``None`` if empty/invalid."""
    if col.name not in found:
        return None
    header, unit = found[col.name]
    raw = table_row.get(header, "").strip()
    if raw == "":
        if col.required:
            log.add(rel, "is empty.", row=row, field=header, fix="fill in the value.")
        return None
    if col.kind is None:
        if col.choices and raw not in col.choices:
            hint = did_you_mean(raw, col.choices)
            log.add(rel, f"'{quote(raw)}' is not allowed here.", row=row, field=header,
                    fix=hint or f"use one of: {', '.join(col.choices)}.")
            return None
        return raw
    if col.kind == DATE:
        try:
            return dt.date.fromisoformat(raw)
        except ValueError:
            log.add(rel, f"expected a date written YYYY-MM-DD; found '{raw}'.", row=row,
                    field=header, fix="write the date as year-month-day, e.g. 2026-03-02.")
            return None
    try:
        number = float(raw.replace(",", ".")) if raw.count(",") == 1 and "." not in raw else float(raw)
    except ValueError:
        log.add(rel, f"expected a number; found '{quote(raw)}'.", row=row, field=header)
        return None
    try:  # the one guard on every number read (units.plausible): finite, of a sane size
        return units.plausible(units.to_si(number, unit, col.kind), col.kind, f"{raw} {unit}")
    except units.UnitProblem as exc:
        log.add(rel, f"{exc}.", row=row, field=header)
        return None


def strength_results(table: CsvTable, rel: str, log: ProblemLog) -> list[StrengthResult]:
    """Typed strength results; checks ages > 0, strength > 0 and unique specimens."""
    found = map_headers(table, STRENGTH_COLUMNS, rel, log)
    out: list[StrengthResult] = []
    seen: dict[str, int] = {}
    for row, rec in table.rows:
        v = {c.name: cell(rec, c, found, rel, row, log) for c in STRENGTH_COLUMNS}
        if any(v[c.name] is None for c in STRENGTH_COLUMNS if c.required):
            continue
        if v["age"] <= 0:
            log.add(rel, f"age must be greater than zero; found {rec[found['age'][0]]}.", row=row,
                    field=found["age"][0], fix="give the age at test in days since casting.")
            continue
        if v["value"] <= 0:
            log.add(rel, f"strength must be greater than zero; found {rec[found['value'][0]]}.",
                    row=row, field=found["value"][0],
                    fix="record a failed or untested specimen in the notes, not as a value.")
            continue
        if v["specimen"] in seen:
            log.add(rel, f"specimen '{v['specimen']}' already appears in row {seen[v['specimen']]}.",
                    row=row, field="specimen", fix="give each specimen its own id.")
            continue
        seen[v["specimen"]] = row
        out.append(StrengthResult(v["specimen"], v["mix"], v["age"], v["test"], v["value"],
                                  v["curing_temperature"], row, rel, v["cast_on"],
                                  v["curing"] or "", v["notes"] or "", v["tested_on"],
                                  v["curing_regime"] or "", v["lab_sample"] or ""))
    return out


@dataclass(frozen=True)
class SieveRow:
    """One sieve of a sieve analysis: aperture (m) and mass retained (kg) or fraction passing."""

    sample: str
    sieve: float
    retained: float | None
    passing: float | None
    row: int
    file: str
    lab_sample: str = ""      # the register sample (samples.yaml) it was made on


@dataclass(frozen=True)
class ColourReading:
    """One CIELAB reading of a sample (L*, a*, b*) with its illuminant and observer."""

    sample: str
    L: float
    a: float
    b: float
    illuminant: str
    observer: str
    row: int
    file: str
    lab_sample: str = ""      # the register sample (samples.yaml) it was made on


SIEVE_COLUMNS = (
    Column("sample", description="sample id: a sand (materials.yaml) or a historic aggregate"),
    Column("sieve", "length", description="sieve aperture, e.g. 'sieve [mm]'"),
    Column("retained", "mass", required=False, description="mass retained on the sieve, e.g. 'retained [g]'"),
    Column("passing", "fraction", required=False, description="cumulative passing, e.g. 'passing [%]'"),
    LAB_SAMPLE,
)
COLOUR_COLUMNS = (
    Column("sample", description="sample id: a trial panel, a mix or a historic mortar"),
    Column("L", "dimensionless", description="CIELAB L* (0–100), header 'L [1]'"),
    Column("a", "dimensionless", description="CIELAB a*, header 'a [1]'"),
    Column("b", "dimensionless", description="CIELAB b*, header 'b [1]'"),
    Column("illuminant", required=False, choices=("D65", "D50", "C", "A", "F2", "F11"),
           description="illuminant of the reading (default D65)"),
    Column("observer", required=False, choices=("2", "10"), description="standard observer, degrees"),
    LAB_SAMPLE,
)


def typed_rows(table: CsvTable, columns, rel: str, log: ProblemLog) -> list[tuple[int, dict]]:
    """Rows as {column: SI value or text}; rows missing a required cell are left out."""
    found = map_headers(table, columns, rel, log)
    out = []
    for row, rec in table.rows:
        v = {c.name: cell(rec, c, found, rel, row, log) for c in columns}
        if all(v[c.name] is not None for c in columns if c.required):
            out.append((row, v))
    return out


def first_of_each(rows: list, key, rel: str, what: str, field: str, log: ProblemLog) -> list:
    """``rows`` without repeats of ``key(row)``; each repeat is a problem at its row (a row
    given twice would silently count twice in a grading or a fit)."""
    seen: dict = {}
    out = []
    for r in rows:
        k = key(r)
        if k in seen:
            log.add(rel, f"{what} already appears in row {seen[k]}.", row=r.row, field=field,
                    fix="keep one row per " + what.split(" ", 1)[0] + " (remove the repeat).")
            continue
        seen[k] = r.row
        out.append(r)
    return out


def sieve_rows(table: CsvTable, rel: str, log: ProblemLog) -> list[SieveRow]:
    """Sieve analyses; each row gives a mass retained or a percentage passing (0–100 %)."""
    names = {units.split_header(h)[0] for h in table.headers}
    if not names & {"retained", "passing"}:
        log.add(rel, "needs a column 'retained' (mass on each sieve) or 'passing' (cumulative %).",
                row=1, fix="add e.g. 'retained [g]' or 'passing [%]'.")
        return []
    out = []
    for row, v in typed_rows(table, SIEVE_COLUMNS, rel, log):
        if v["sieve"] <= 0:
            log.add(rel, "sieve aperture must be greater than zero.", row=row, field="sieve")
        elif v["passing"] is not None and not 0 <= v["passing"] <= 1:
            log.add(rel, f"passing must lie between 0 and 100 %; found {v['passing'] * 100:g} %.",
                    row=row, field="passing", fix="give the cumulative percentage passing.")
        elif v["retained"] is not None and v["retained"] < 0:
            log.add(rel, "mass retained cannot be negative.", row=row, field="retained")
        else:
            out.append(SieveRow(v["sample"], v["sieve"], v["retained"], v["passing"], row, rel,
                                v["lab_sample"] or ""))
    return first_of_each(out, lambda r: (r.sample, r.sieve), rel, "sieve of this sample", "sieve",
                         log)


def colour_rows(table: CsvTable, rel: str, log: ProblemLog) -> list[ColourReading]:
    """CIELAB readings; L* must lie in 0–100 and a*, b* within ±128."""
    out = []
    for row, v in typed_rows(table, COLOUR_COLUMNS, rel, log):
        if not 0 <= v["L"] <= 100:
            log.add(rel, f"L* must lie between 0 and 100; found {v['L']:g}.", row=row, field="L",
                    fix="check the column order (L*, a*, b*) and the instrument's export.")
        elif abs(v["a"]) > 128 or abs(v["b"]) > 128:
            log.add(rel, "a* and b* must lie within ±128.", row=row, field="a/b")
        else:
            out.append(ColourReading(v["sample"], v["L"], v["a"], v["b"],
                                     v["illuminant"] or "D65", v["observer"] or "2", row, rel,
                                     v["lab_sample"] or ""))
    return out


@dataclass(frozen=True)
class CapillaryReading:
    """One reading of a capillary absorption test: time (s) and water uptake per area (kg/m²)."""

    sample: str
    time: float
    uptake: float
    row: int
    file: str
    lab_sample: str = ""      # the register sample (samples.yaml) it was made on


CAPILLARY_COLUMNS = (
    Column("sample", description="sample id: a masonry unit, historic mortar or mix"),
    Column("time", "time", description="time since the face touched water, e.g. 'time [min]'"),
    Column("uptake", "areal_mass", description="water taken up per area of the wetted face, "
           "e.g. 'uptake [kg/m^2]'"),
    LAB_SAMPLE,
)


def capillary_rows(table: CsvTable, rel: str, log: ProblemLog) -> list[CapillaryReading]:
    """Capillary absorption readings; time and uptake must not be negative."""
    out = []
    for row, v in typed_rows(table, CAPILLARY_COLUMNS, rel, log):
        if v["time"] < 0:
            log.add(rel, "time cannot be negative.", row=row, field="time",
                    fix="give the time since the specimen's face was placed in water.")
        elif v["uptake"] < 0:
            log.add(rel, "uptake cannot be negative.", row=row, field="uptake",
                    fix="give the mass gained per area of the wetted face.")
        else:
            out.append(CapillaryReading(v["sample"], v["time"], v["uptake"], row, rel,
                                        v["lab_sample"] or ""))
    return first_of_each(out, lambda r: (r.sample, r.time), rel, "time of this sample", "time",
                         log)
