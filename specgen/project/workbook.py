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
import json
import zipfile
from dataclasses import dataclass, field, replace
from pathlib import Path

from specgen.errors import Problem, ProblemLog, did_you_mean
from specgen.project.files import MAX_FILE_BYTES, CsvTable
from specgen.project.tables import (CAPILLARY_COLUMNS, COLOUR_COLUMNS, DATE, SIEVE_COLUMNS,
                                    STRENGTH_COLUMNS)
from specgen.units import split_header

LAB_DIR = "lab"
INSTRUCTIONS = "instructions"
# sheet → (its columns, the columns that hold the measured result): a row whose result cells
# are all empty is a planned test without a report yet
SHEETS = {"strength": (STRENGTH_COLUMNS, ("value",)),
          "capillary": (CAPILLARY_COLUMNS, ("uptake",)),
          "colour": (COLOUR_COLUMNS, ("L", "a", "b")),
          "sieves": (SIEVE_COLUMNS, ("retained", "passing"))}
# a workbook written by specgen records its sheets and headers in this document property
LAYOUT_PROPERTY = "specgen-layout"
MACRO_SUFFIXES = {".xlsm", ".xltm", ".xlsb", ".xlam"}
OLD_SUFFIXES = {".xls", ".xlt"}
MAX_UNZIPPED_BYTES = 200 * 1024 * 1024   # a workbook that inflates beyond this is refused
SAVE_AS = "save it from the spreadsheet as 'Excel Workbook (.xlsx)'"


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
    """The test sheets of the workbook at ``path``; problems recorded in ``log``."""
    if not _safe_to_open(path, rel, log):
        return []
    from openpyxl import load_workbook
    try:
        wb = load_workbook(path, data_only=False, keep_vba=False, keep_links=False)
    except Exception as exc:  # openpyxl raises many kinds for a damaged file
        log.add(rel, f"cannot be read as an xlsx workbook ({type(exc).__name__}: "
                f"{str(exc)[:80]}).", fix=SAVE_AS + ", or export each sheet as 'CSV UTF-8'.")
        return []
    layout = _layout(wb)
    out = []
    for ws in wb.worksheets:
        if ws.title == INSTRUCTIONS:
            continue
        if ws.title not in SHEETS:
            hint = did_you_mean(ws.title, list(SHEETS) + [INSTRUCTIONS])
            log.add(rel, "is not a sheet specgen knows.", sheet=ws.title,
                    fix=(f"{hint} Otherwise n" if hint else "N") + "ame each sheet after its "
                    "test (" + ", ".join(SHEETS) + ") or delete it.")
            continue
        out.append(_sheet(ws, rel, layout.get(ws.title), log))
    for name in layout:
        if name in SHEETS and name not in wb.sheetnames:
            log.add(rel, f"the sheet '{name}' is missing (it was in the workbook as written).",
                    fix=f"restore the sheet or its name '{name}'; sheet names are how specgen "
                    "knows which test a row records.")
    return out


def _safe_to_open(path: Path, rel: str, log: ProblemLog) -> bool:
    suffix = path.suffix.lower()
    if suffix in MACRO_SUFFIXES:
        log.add(rel, "is a macro-enabled workbook; specgen does not open it, so no macro runs.",
                fix=SAVE_AS + " (macros are dropped), then delete this file.")
        return False
    if suffix in OLD_SUFFIXES:
        log.add(rel, "is in the old binary spreadsheet format, which specgen does not read.",
                fix=SAVE_AS + ".")
        return False
    if path.stat().st_size > MAX_FILE_BYTES:
        log.add(rel, f"is larger than {MAX_FILE_BYTES // 2**20} MiB.",
                fix="keep only the project's results in the workbook.")
        return False
    if not zipfile.is_zipfile(path):
        log.add(rel, "is not an xlsx workbook (an xlsx file is a zip archive).",
                fix=SAVE_AS + ", or export each sheet as 'CSV UTF-8'.")
        return False
    with zipfile.ZipFile(path) as z:
        names = z.namelist()
        inflated = sum(i.file_size for i in z.infolist())
    if any(n.lower().endswith("vbaproject.bin") for n in names):
        log.add(rel, "holds macros (a macro project inside an .xlsx); specgen does not open it, "
                "so no macro runs.", fix=SAVE_AS + " without macros.")
        return False
    if inflated > MAX_UNZIPPED_BYTES:
        log.add(rel, f"inflates to {inflated / 1e6:.0f} MB; the limit is "
                f"{MAX_UNZIPPED_BYTES // 2**20} MiB.", fix="keep only the project's results.")
        return False
    return True


def _layout(wb) -> dict[str, list[str]]:
    """Sheets and headers as specgen wrote them (empty for a workbook made elsewhere)."""
    for prop in getattr(wb, "custom_doc_props", None) or []:
        if prop.name == LAYOUT_PROPERTY:
            try:
                data = json.loads(prop.value)
            except (TypeError, ValueError):
                return {}
            return {k: [str(h) for h in v] for k, v in data.items()
                    if isinstance(v, list)} if isinstance(data, dict) else {}
    return {}


def _sheet(ws, rel: str, written: list[str] | None, log: ProblemLog) -> SheetTable:
    from openpyxl.utils import get_column_letter
    name = ws.title
    columns, result_cols = SHEETS[name]
    by_name = {c.name: c for c in columns}
    merged = _merged_rows(ws, rel, log)
    header_cells = list(ws.iter_rows(min_row=1, max_row=1))[0] if ws.max_row >= 1 else ()
    headers, letters = [], {}
    for c in header_cells:
        text = "" if c.value is None else str(c.value).strip()
        if text:
            headers.append(text)
            letters[text] = letters[split_header(text)[0]] = get_column_letter(c.column)
    headers_ok = written is None or _same_headers(headers, written, letters, name, rel, log)
    width = len(header_cells)
    rows, pending = [], []
    for cells in ws.iter_rows(min_row=2, max_col=width):
        r = cells[0].row
        values, bad = {}, False
        for c in cells:
            header = "" if header_cells[c.column - 1].value is None else \
                str(header_cells[c.column - 1].value).strip()
            text, problem = _text(c, by_name.get(split_header(header)[0]))
            if problem:
                log.add(rel, problem[0], sheet=name, cell=c.coordinate, field=header or None,
                        fix=problem[1])
                bad = True
            elif text and not header:
                log.add(rel, f"holds '{text[:40]}' in a column without a header.", sheet=name,
                        cell=c.coordinate, fix="give the column its header, or clear it.")
                bad = True
            if header:
                values[header] = text
        if not any(values.values()) or r in merged or bad:
            continue
        if not any(values.get(h) for h in headers if split_header(h)[0] in result_cols):
            pending.append((r, next(iter(values.values()), "")))
            continue
        rows.append((r, values))
    # a changed header leaves the sheet unread (its cells were still checked above)
    table = CsvTable(headers, rows) if rows and headers_ok else None
    return SheetTable(name, table, letters, pending)


def _merged_rows(ws, rel: str, log: ProblemLog) -> set[int]:
    rows: set[int] = set()
    for rng in sorted(ws.merged_cells.ranges, key=str):
        log.add(rel, "these cells are merged.", sheet=ws.title, cell=rng.coord,
                fix="unmerge them and write the value in every row it belongs to.")
        rows.update(range(rng.min_row, rng.max_row + 1))
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


def _text(cell, column) -> tuple[str, tuple[str, str] | None]:
    """The cell as CSV text, or a problem (message, fix) a workbook alone can have."""
    v = cell.value
    if v is None:
        return "", None
    if cell.data_type == "f" or (isinstance(v, str) and v.startswith("=")):
        formula = v if isinstance(v, str) else getattr(v, "text", "a formula")
        return "", (f"holds a formula ({str(formula)[:60]}) instead of a value.",
                    "replace it by the measured value (copy, then paste as values only).")
    if cell.data_type == "e":
        return "", (f"holds the error value {v}.", "enter the measured value.")
    is_date = column is not None and column.kind == DATE
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
        return (str(int(v)) if v.is_integer() and abs(v) < 1e15 else repr(v)), None
    return str(v).strip(), None


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
