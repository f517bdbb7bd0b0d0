"""Firing records: the time-temperature CSV a binder's ``firing.record`` names.

The file lives in the project folder (normally under ``lab/``); columns
``time [h]`` and ``temperature [degC]`` (any time and temperature unit), read to
SI: seconds and kelvin.  Problems are reported like every other input problem.
"""
from __future__ import annotations

from dataclasses import dataclass

from specgen.errors import ProblemLog
from specgen.project.files import read_csv
from specgen.project.tables import Column, cell, map_headers

FIRING_COLUMNS = (
    Column("time", "time", description="time since the start of firing, e.g. 'time [h]'"),
    Column("temperature", "temperature", description="kiln temperature, e.g. "
           "'temperature [degC]'"),
)


@dataclass(frozen=True)
class FiringSeries:
    """A firing record read from CSV: (time s, temperature K) pairs and where they came from."""

    file: str
    points: tuple[tuple[float, float], ...]


def firing_series(root, binders: dict, log: ProblemLog) -> dict[str, FiringSeries]:
    """Read the firing CSV of every binder that names one; binder id → series."""
    from specgen.project.layout import inside
    out: dict[str, FiringSeries] = {}
    for i, b in enumerate(binders.values()):
        rel = b.firing.record if b.firing else None
        if not rel:
            continue
        field = f"binders[{i}].firing.record"
        path = inside(root, rel, "materials.yaml", field, log)
        if path is None:
            continue
        if not path.is_file():
            log.add("materials.yaml", f"the firing record '{rel}' does not exist.", field=field,
                    fix="put the CSV in the project folder (e.g. lab/) or correct the path.")
            continue
        table = read_csv(path, rel, log)
        if table is not None:
            points = _points(table, rel, log)
            if points:
                out[b.id] = FiringSeries(rel, points)
    return out


def _points(table, rel: str, log: ProblemLog) -> tuple[tuple[float, float], ...]:
    """Rows as (s, K); times must increase and temperatures be above absolute zero."""
    found = map_headers(table, FIRING_COLUMNS, rel, log)
    points: list[tuple[float, float]] = []
    for row, rec in table.rows:
        t, k = (cell(rec, c, found, rel, row, log) for c in FIRING_COLUMNS)
        if t is None or k is None:
            continue
        if points and t <= points[-1][0]:
            log.add(rel, "times must increase from row to row.", row=row,
                    field=found["time"][0], fix="sort the readings by time; remove repeats.")
            continue
        if k <= 0:
            log.add(rel, "the temperature is at or below absolute zero.", row=row,
                    field=found["temperature"][0], fix="check the unit in the header.")
            continue
        points.append((t, k))
    return tuple(points)
