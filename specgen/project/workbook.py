"""Laboratory workbooks (``lab/*.xlsx``): each sheet is read as the CSV file of its name.

A sheet named ``strength`` holds what ``lab/strength.csv`` would hold, and so on for
``sieves``, ``colour`` and ``capillary``.  This module only turns a sheet into the same
:class:`~specgen.project.files.CsvTable` the CSV reader makes — header in row 1, one row per
specimen or reading, numbers written out in full — and leaves every check of the values to the
readers of :mod:`specgen.project.tables`, so a workbook and a CSV are validated by one code path
with the same messages.  What only a workbook can get wrong is refused here, located by sheet
and cell: merged cells, formulas and error values instead of measured values, a date typed as
text, a renamed, missing or unknown sheet, a header (or its unit) changed from the one specgen
wrote, and macro-enabled files, which are never opened (so no macro can run).

A row with an empty result (the planned specimens ``specgen lab-workbook`` writes) is a test not
yet reported: it is counted in :attr:`SheetTable.pending`, not read as a result.
"""
from __future__ import annotations

import datetime as dt
import io
from dataclasses import dataclass, field, replace
from pathlib import Path

from specgen.errors import Problem, ProblemLog, did_you_mean
from specgen.project.files import CsvTable
from specgen.project.tables import (CAPILLARY_COLUMNS, COLOUR_COLUMNS, DATE, SIEVE_COLUMNS,
                                    STRENGTH_COLUMNS)
from specgen.project.xlsx_package import MACRO_SUFFIXES, OLD_SUFFIXES, SAVE_AS, inspect
from specgen.units import split_header

LAB_DIR = "lab"
INSTRUCTIONS = "instructions"
# sheet → (its columns, the columns that hold the measured result): a row whose result cells
# are all empty is a planned test without a report yet
SHEETS = {"strength": (STRENGTH_COLUMNS, ("value",)),
          "capillary": (CAPILLARY_COLUMNS, ("uptake",)),
          "colour": (COLOUR_COLUMNS, ("L", "a", "b")),
          "sieves": (SIEVE_COLUMNS, ("retained", "passing"))}


@dataclass
class SheetTable:
    """One sheet as a CSV-like table, with the column letter of each header (for locations)."""

    sheet: str
    table: CsvTable | None
    letters: dict[str, str] = field(default_factory=dict)
    pending: list[tuple[int, str]] = field(default_factory=list)  # (row, first cell) untested


def workbook_files(root: Path) -> list[Path]:
    """The spreadsheet files in ``lab/`` (Excel's own lock files ``~$…`` left out)."""
    folder = Path(root) / LAB_DIR
    if not folder.is_dir():
        return []
    return sorted(p for p in folder.iterdir() if p.is_file() and not p.name.startswith("~$")
                  and p.suffix.lower() in {".xlsx", ".xltx"} | MACRO_SUFFIXES | OLD_SUFFIXES)


def read_workbook(path: Path, rel: str, log: ProblemLog) -> list[SheetTable]:
    """The test sheets of the workbook at ``path``; problems recorded in ``log``.

    A workbook without formulas or error values — every workbook a laboratory returns as asked —
    is read by calamine (a compiled reader, about as fast as the CSV reader on the same rows);
    one that holds any is read by openpyxl, which gives each formula's text and each error
    value for the message.  Both readers hand :func:`_sheet` the same grid, so the checks,
    messages and locations are the same whichever read the file.
    """
    inside = inspect(path, rel, log)
    if inside is None:
        return []
    data, layout, formulas = inside
    try:
        names, grids = (_grids_openpyxl if formulas else _grids_calamine)(io.BytesIO(data))
    except Exception as exc:  # either reader raises many kinds for a damaged file
        log.add(rel, f"cannot be read as an xlsx workbook ({type(exc).__name__}: "
                f"{str(exc)[:80]}).", fix=SAVE_AS + ", or export each sheet as 'CSV UTF-8'.")
        return []
    out = []
    for title, grid in grids:
        if title == INSTRUCTIONS:
            continue
        if title not in SHEETS:
            hint = did_you_mean(title, list(SHEETS) + [INSTRUCTIONS])
            log.add(rel, "is not a sheet specgen knows.", sheet=title,
                    fix=(f"{hint} Otherwise n" if hint else "N") + "ame each sheet after its "
                    "test (" + ", ".join(SHEETS) + ") or delete it.")
            continue
        out.append(_sheet(grid, rel, layout.get(title), log))
    for name in layout:
        if name in SHEETS and name not in names:
            log.add(rel, f"the sheet '{name}' is missing (it was in the workbook as written).",
                    fix=f"restore the sheet or its name '{name}'; sheet names are how specgen "
                    "knows which test a row records.")
    return out


@dataclass
class _Grid:
    """One worksheet as a reader gives it: cell values by row (row 1 first, every row as wide
    as the sheet), the cells holding a formula or an error value, and the merged ranges."""

    title: str
    rows: list[list]
    flagged: dict[tuple[int, int], tuple[str, str]] = field(default_factory=dict)  # (row, col)
    merged: list[tuple[str, int, int]] = field(default_factory=list)  # (A1:B2, first, last row)


def _grids_calamine(file: io.BytesIO) -> tuple[list[str], list[tuple[str, _Grid | None]]]:
    """All sheet names, and each worksheet (a test sheet's grid read, other sheets by title)."""
    from openpyxl.utils import get_column_letter as letter
    from python_calamine import CalamineWorkbook, SheetTypeEnum
    with CalamineWorkbook.from_filelike(file) as wb:
        out = []
        for meta in wb.sheets_metadata:
            if meta.typ != SheetTypeEnum.WorkSheet:
                continue
            if meta.name not in SHEETS:
                out.append((meta.name, None))
                continue
            ws = wb.get_sheet_by_name(meta.name)
            merged = [(f"{letter(c0 + 1)}{r0 + 1}:{letter(c1 + 1)}{r1 + 1}", r0 + 1, r1 + 1)
                      for (r0, c0), (r1, c1) in ws.merged_cell_ranges or []]
            out.append((meta.name, _Grid(meta.name, ws.to_python(skip_empty_area=False),
                                         merged=merged)))
        return list(wb.sheet_names), out


def _grids_openpyxl(file: io.BytesIO) -> tuple[list[str], list[tuple[str, _Grid | None]]]:
    """As :func:`_grids_calamine`, with each formula's text and each error value flagged."""
    from openpyxl import load_workbook
    wb = load_workbook(file, data_only=False, keep_vba=False, keep_links=False)
    out = []
    for ws in wb.worksheets:
        if ws.title not in SHEETS:
            out.append((ws.title, None))
            continue
        rows, flagged = [], {}
        for cells in ws.iter_rows():
            values = []
            for c in cells:
                v = c.value
                if c.data_type == "f":
                    flagged[c.row, c.column] = ("f", v if isinstance(v, str)
                                                else getattr(v, "text", "a formula"))
                    v = None
                elif c.data_type == "e":
                    flagged[c.row, c.column] = ("e", str(v))
                    v = None
                values.append(v)
            rows.append(values)
        merged = [(r.coord, r.min_row, r.max_row) for r in ws.merged_cells.ranges]
        out.append((ws.title, _Grid(ws.title, rows, flagged, merged)))
    return list(wb.sheetnames), out


def _sheet(grid: _Grid, rel: str, written: list[str] | None, log: ProblemLog) -> SheetTable:
    from openpyxl.utils import get_column_letter as letter
    name = grid.title
    columns, result_cols = SHEETS[name]
    by_name = {c.name: c for c in columns}
    merged = _merged_rows(grid, rel, log)
    heads = ["" if v is None else str(v).strip() for v in (grid.rows[0] if grid.rows else [])]
    names = {h: split_header(h)[0] for h in heads if h}   # header → column name, once each
    headers, letters = [], {}
    for i, text in enumerate(heads):
        if text:
            headers.append(text)
            letters[text] = letters[names[text]] = letter(i + 1)
    headers_ok = written is None or _same_headers(headers, written, letters, name, rel, log)
    # (column number, header, column), for each column
    columns_at = [(i, h, by_name.get(names[h]) if h else None)
                  for i, h in enumerate(heads, start=1)]
    results = [h for h in headers if names[h] in result_cols]
    first = headers[0] if headers else None
    rows, pending = [], []
    for r, values in _rows(grid, columns_at, rel, log):
        if values is None or r in merged or not any(values.values()):
            continue
        if not any(values.get(h) for h in results):
            pending.append((r, values.get(first, "") if first else ""))
            continue
        rows.append((r, values))
    # a changed header leaves the sheet unread (its cells were still checked above)
    table = CsvTable(headers, rows) if rows and headers_ok else None
    return SheetTable(name, table, letters, pending)


def _rows(grid: _Grid, columns_at: list, rel: str, log: ProblemLog
          ) -> list[tuple[int, dict[str, str] | None]]:
    """(row number, {header: CSV text}) of each data row; ``None`` for a row with a refused
    cell (the reason logged, located).

    Column by column first: the cells a CSV would hold as they are — empty, a number or a text
    not starting with ``=`` in a text or number column, a date in a date column — become their
    text in one pass per column.  A row holding any other cell (a date where a number is
    expected, a flagged cell, a value under no header or under a header specgen does not know)
    is then read again cell by cell by :func:`_row_by_cells`, which has the messages, in row
    order.  Either way a row comes out the same; the column pass saves the Python work per
    cell that made a workbook cost twice its CSV."""
    body = grid.rows[1:]
    width = len(columns_at)
    if not body or not width:
        return []
    texts = [_column_text(cells, header, column) for (_, header, column), cells in
             zip(columns_at, zip(*(row if len(row) == width else
                                   list(row[:width]) + [None] * (width - len(row))
                                   for row in body)))]
    for (r, c) in grid.flagged:
        if 2 <= r <= len(body) + 1 and c <= width:
            texts[c - 1][r - 2] = None
    again = sorted({k for column in texts if None in column
                    for k, text in enumerate(column) if text is None})
    named = [(h, t) for (_, h, _), t in zip(columns_at, texts) if h]
    if named:
        headers = [h for h, _ in named]
        out = [(k, dict(zip(headers, cells)))
               for k, cells in enumerate(zip(*(t for _, t in named)), start=2)]
    else:
        out = [(k, {}) for k in range(2, len(body) + 2)]
    for k in again:
        out[k] = (k + 2, _row_by_cells(k + 2, body[k], columns_at, grid, rel, log))
    return out


def _column_text(cells, header: str, column) -> list[str | None]:
    """The cells of one column as CSV text; ``None`` where a cell needs a closer look."""
    if not header or column is None:   # empty cells only, or the row is read cell by cell
        return ["" if v is None or v == "" else None for v in cells]
    if column.kind == DATE:
        return ["" if v is None or v == "" else v.isoformat() if type(v) is dt.date
                else None for v in cells]
    # the common cells inline (as _text reads them): a call per cell is what this pass saves
    return ["" if v is None or v == "" else _number(v) if type(v) is float
            else v.strip() if type(v) is str and v[0] != "=" else None for v in cells]


def _row_by_cells(r: int, row: list, columns_at: list, grid: _Grid, rel: str,
                  log: ProblemLog) -> dict[str, str] | None:
    """One row read cell by cell, each refused cell logged; ``None`` if any was refused."""
    from openpyxl.utils import get_column_letter as letter
    values, bad = {}, False
    for (i, header, column), v in zip(columns_at, row):
        flag = grid.flagged.get((r, i))
        if flag is None and (v is None or v == ""):
            if header:
                values[header] = ""
            continue
        text, problem = _text(v, flag, column)
        if problem:
            log.add(rel, problem[0], sheet=grid.title, cell=f"{letter(i)}{r}",
                    field=header or None, fix=problem[1])
            bad = True
        elif text and not header:
            log.add(rel, f"holds '{text[:40]}' in a column without a header.", sheet=grid.title,
                    cell=f"{letter(i)}{r}", fix="give the column its header, or clear it.")
            bad = True
        if header:
            values[header] = text
    return None if bad else values


def _merged_rows(grid: _Grid, rel: str, log: ProblemLog) -> set[int]:
    rows: set[int] = set()
    for coord, first, last in sorted(grid.merged):
        log.add(rel, "these cells are merged.", sheet=grid.title, cell=coord,
                fix="unmerge them and write the value in every row it belongs to.")
        rows.update(range(first, last + 1))
    return rows


def _same_headers(headers: list[str], written: list[str], letters: dict, sheet: str, rel: str,
                  log: ProblemLog) -> bool:
    from openpyxl.utils import get_column_letter
    ok = True
    for i, want in enumerate(written):
        got = headers[i] if i < len(headers) else ""
        if got == want:
            continue
        ok = False
        (wname, wunit), (gname, gunit) = split_header(want), split_header(got)
        if gname == wname and wunit:
            msg = f"the unit in the header was changed from '{wunit}' to '{gunit or ''}'."
            fix = (f"restore the header '{want}' and enter the values in {wunit}: the entry "
                   "checks and the instructions are set for that unit.")
        else:
            msg = f"the header reads '{got}'; the workbook was written with '{want}'."
            fix = f"restore the header '{want}' (columns may not be renamed, moved or deleted)."
        log.add(rel, msg, sheet=sheet, cell=f"{get_column_letter(i + 1)}1", field=want, fix=fix)
    return ok


def _text(v, flag: tuple[str, str] | None, column) -> tuple[str, tuple[str, str] | None]:
    """A cell's value as CSV text, or a problem (message, fix) a workbook alone can have."""
    is_date = column is not None and column.kind == DATE
    if flag is not None and flag[0] == "e":
        return "", (f"holds the error value {flag[1]}.", "enter the measured value.")
    if flag is not None or (isinstance(v, str) and v.startswith("=")):
        formula = flag[1] if flag is not None else v
        return "", (f"holds a formula ({str(formula)[:60]}) instead of a value.",
                    "replace it by the measured value (copy, then paste as values only).")
    if v is None:
        return "", None
    if isinstance(v, (dt.datetime, dt.date)):
        if not is_date:
            return "", (f"holds a date ({v:%Y-%m-%d}) where a "
                        f"{'number' if column and column.kind else 'text'} is expected.",
                        "format the cell as a number or text and re-enter the value (the "
                        "spreadsheet turned it into a date).")
        return (v.date() if isinstance(v, dt.datetime) else v).isoformat(), None
    if is_date:
        if isinstance(v, str):
            return "", (f"holds the date as text ('{v[:40]}').",
                        "enter it as a date (a cell formatted as a date, e.g. 2026-03-02), not "
                        "as text.")
        return "", (f"holds the number {v} where a date is expected.",
                    "enter the date in a cell formatted as a date.")
    if isinstance(v, bool):
        return str(v).lower(), None
    if isinstance(v, float):
        return _number(v), None
    return str(v).strip(), None


def _number(v: float) -> str:
    """A number as the CSV would hold it: whole numbers without a decimal point."""
    return str(int(v)) if v.is_integer() and abs(v) < 1e15 else repr(v)


def located(problems: list[Problem], sheet: SheetTable) -> list[Problem]:
    """Problems the table readers found in ``sheet``, located by sheet and cell."""
    out = []
    for p in problems:
        letter = sheet.letters.get(p.field or "")
        cell = f"{letter}{p.row}" if letter and p.row is not None else None
        out.append(replace(p, sheet=sheet.sheet, cell=cell))
    return out


def read_sheet(sheet: SheetTable, reader, rel: str, log: ProblemLog) -> list:
    """Rows of ``sheet`` read by ``reader`` — the same function that reads the CSV file."""
    if sheet.table is None:
        return []
    sub = ProblemLog()
    rows = reader(sheet.table, rel, sub)
    log.problems.extend(located(sub.problems, sheet))
    return rows
