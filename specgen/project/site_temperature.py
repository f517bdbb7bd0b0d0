"""Site curing temperature: a constant or a daily-mean CSV named by ``site_temperature``.

``site_temperature: "8 degC"`` gives a constant temperature; ``site_temperature:
lab/site-temperature.csv`` names a CSV in the project folder with columns ``day [d]``
(time since the mortar was placed, increasing) and ``temperature [degC]`` (daily
mean).  Values are read to SI (s, K).  Temperatures outside the range in which the
maturity method is applied (content/data/maturity_defaults.yaml, -10 °C to 60 °C)
are refused here with the file, row and field, as are lab curing temperatures.
"""
from __future__ import annotations

from dataclasses import dataclass

from specgen import units
from specgen.errors import ProblemLog
from specgen.project.files import read_csv
from specgen.project.tables import Column, cell, map_headers

SITE_COLUMNS = (
    Column("day", "time", description="time since placement, e.g. 'day [d]'"),
    Column("temperature", "temperature", description="daily mean temperature, e.g. "
           "'temperature [degC]'"),
)
ZERO_C = 273.15


@dataclass(frozen=True)
class SiteTemperature:
    """Site temperature: ``constant`` (K) or ``points`` ((s, K) pairs) and where it came from."""

    source: str
    constant: float | None = None
    points: tuple[tuple[float, float], ...] = ()


def valid_range() -> tuple[float, float]:
    """(low, high) in K in which the maturity method is applied (reference data)."""
    from specgen import refdata
    r = refdata.load("maturity_defaults").data["valid_range"]
    return float(r["low"]), float(r["high"])


def out_of_range(kelvin: float) -> str | None:
    """A message when ``kelvin`` lies outside :func:`valid_range`, else None."""
    lo, hi = valid_range()
    if lo <= kelvin <= hi:
        return None
    side = "below" if kelvin < lo else "above"
    return (f"temperature {kelvin - ZERO_C:.1f} °C is {side} the range {lo - ZERO_C:g} to "
            f"{hi - ZERO_C:g} °C in which the maturity method is applied.")


def site_temperature(root, dossier, log: ProblemLog, line: int | None = None
                     ) -> SiteTemperature | None:
    """Read ``dossier.site_temperature`` (constant or CSV; ``line`` is where dossier.yaml
    gives it); None when not given or invalid."""
    text = dossier.site_temperature
    if not text:
        return None
    field = "site_temperature"
    if not text.lower().endswith(".csv"):
        try:
            kelvin = units.parse(text, "temperature")
        except units.UnitProblem as exc:
            log.add("dossier.yaml", f"{exc}.", field=field, line=line,
                    fix="give a constant such as '8 degC' or a CSV path under lab/ ending in .csv.")
            return None
        if msg := out_of_range(kelvin):
            log.add("dossier.yaml", msg, field=field, line=line,
                    fix="check the unit (°C, °F or K).")
            return None
        return SiteTemperature(text, constant=kelvin)
    from specgen.project.layout import inside
    path = inside(root, text, "dossier.yaml", field, log, line)
    if path is None:
        return None
    if not path.is_file():
        log.add("dossier.yaml", f"the site temperature record '{text}' does not exist.",
                field=field, line=line, fix="put the CSV in the project folder (e.g. lab/) or correct the path.")
        return None
    table = read_csv(path, text, log)
    points = _points(table, text, log) if table is not None else ()
    return SiteTemperature(text, points=points) if len(points) >= 2 else None


def _points(table, rel: str, log: ProblemLog) -> tuple[tuple[float, float], ...]:
    """Rows as (s, K): days must increase and temperatures lie in the valid range."""
    found = map_headers(table, SITE_COLUMNS, rel, log)
    points: list[tuple[float, float]] = []
    for row, rec in table.rows:
        t, k = (cell(rec, c, found, rel, row, log) for c in SITE_COLUMNS)
        if t is None or k is None:
            continue
        if t < 0 or (points and t <= points[-1][0]):
            log.add(rel, "days must start at 0 or later and increase from row to row.", row=row,
                    field=found["day"][0], fix="sort the readings by day; remove repeats.")
            continue
        if msg := out_of_range(k):
            log.add(rel, msg, row=row, field=found["temperature"][0],
                    fix="check the unit in the header (°C, °F or K); leave out days the "
                    "method cannot use.")
            continue
        points.append((t, k))
    if len(points) == 1:
        log.add(rel, "needs at least two daily readings.", row=table.rows[0][0],
                fix="add the following days.")
    return tuple(points)


def curing_temperature_problems(results, log: ProblemLog) -> None:
    """Refuse lab curing temperatures outside the valid range (file, row and field named)."""
    for r in results:
        if r.curing_temperature is not None and (msg := out_of_range(r.curing_temperature)):
            log.add(r.file, "curing " + msg, row=r.row, field="curing_temperature",
                    fix="check the unit in the header (e.g. 'curing_temperature [degC]').")
