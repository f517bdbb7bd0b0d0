"""The laboratory workbook: written from the project, filled in, read back as the CSVs are.

Unit conversions are checked against the SI definitions (1 MPa = 10^6 Pa, 1 d = 86 400 s,
0 °C = 273.15 K: BIPM, The International System of Units, 9th ed., 2019).
"""
from __future__ import annotations

import datetime as dt
import re
import shutil
import zipfile

import openpyxl
import pytest

from specgen.errors import InputErrors
from specgen.labbook import HEADERS, write_workbook
from specgen.build import load as load_project  # as every command reads a project


@pytest.fixture
def workbook(demo_copy, tmp_path):
    """The demo's workbook as written (outside the project) and the project copy."""
    path = tmp_path / "written.xlsx"
    counts = write_workbook(load_project(demo_copy), path)
    return demo_copy, path, counts


def _strength_rows(ws) -> dict[str, int]:
    return {ws.cell(r, 1).value: r for r in range(2, ws.max_row + 1) if ws.cell(r, 1).value}


def test_workbook_holds_the_planned_tests_with_units_validation_and_instructions(workbook):
    project_dir, path, counts = workbook
    wb = openpyxl.load_workbook(path)
    assert wb.sheetnames == ["instructions", "strength", "capillary", "colour", "sieves"]
    for name, headers in HEADERS.items():
        assert [c.value for c in wb[name][1]] == headers
    ws = wb["strength"]
    rows = _strength_rows(ws)
    # the demo has results of every mix to 90 d; the strength rules add 365 d (late_age_2), and
    # each age gets strength.specimens_per_age = 3 prisms flexural and 3 compressive
    assert counts["strength"] == len(rows) == 3 * 1 * 6
    assert {ws.cell(r, 3).value for r in rows.values()} == {365}
    assert {ws.cell(r, 2).value for r in rows.values()} == {"M1", "M2", "M3"}
    assert all(ws.cell(r, 5).value is None for r in rows.values())  # results left to fill in
    kinds = {dv.type for dv in ws.data_validations.dataValidation}
    assert {"list", "whole", "decimal", "date"} <= kinds
    test_list = next(dv for dv in ws.data_validations.dataValidation if "D2" in str(dv.sqref))
    assert test_list.formula1 == '"compressive,flexural"'
    text = " ".join(str(c.value) for c in wb["instructions"]["A"] if c.value)
    assert "never formulas" in text and "do not merge cells" in text and "Safety" in text


def test_round_trip_filled_workbook_reads_as_the_same_rows_in_csv(workbook, tmp_path):
    project_dir, path, _ = workbook
    wb = openpyxl.load_workbook(path)
    ws = wb["strength"]
    rows = _strength_rows(ws)
    filled = {"M1-365d-C1": 7.21, "M1-365d-C2": 7.05, "M1-365d-C3": 7.4}
    for specimen, value in filled.items():
        ws.cell(rows[specimen], 5, value)
        ws.cell(rows[specimen], 7, dt.date(2025, 11, 20))
    wb.save(project_dir / "lab" / "northstead-results.xlsx")
    project = load_project(project_dir)
    new = {r.specimen: r for r in project.strength if r.file == "lab/northstead-results.xlsx"}
    assert set(new) == set(filled)
    r = new["M1-365d-C2"]
    assert r.value == pytest.approx(7.05e6)          # 1 MPa = 1e6 Pa (SI)
    assert r.age == pytest.approx(365 * 86400)       # 1 d = 86 400 s (SI)
    assert r.curing_temperature == pytest.approx(293.15)  # 20 °C = 293.15 K (SI)
    assert r.cast_on == dt.date(2025, 11, 20) and r.test == "compressive"
    assert len([p for p in project.lab_pending if p[1] == "strength"]) == 18 - 3
    # the same three specimens typed into the CSV file give the same typed results
    other = tmp_path / "csv-project"
    shutil.copytree(project_dir, other)
    (other / "lab" / "northstead-results.xlsx").unlink()
    with open(other / "lab" / "strength.csv", "a", encoding="utf-8") as f:
        for specimen, value in filled.items():
            f.write(f"{specimen},M1,365,compressive,{value},20\n")
    via_csv = {r.specimen: r for r in load_project(other).strength}

    def key(x):
        return (x.specimen, x.mix, x.age, x.test, x.value, x.curing_temperature)
    assert {key(new[s]) for s in filled} == {key(via_csv[s]) for s in filled}


def _problems(project_dir) -> list[str]:
    with pytest.raises(InputErrors) as exc:
        load_project(project_dir)
    return [str(p) for p in exc.value.problems]


def _save_changed(workbook, change):
    """The planned workbook with ``change`` made, saved as the project's lab results."""
    project_dir, path, _ = workbook
    wb = openpyxl.load_workbook(path)
    change(wb)
    target = project_dir / "lab" / "results.xlsx"
    wb.save(target)
    return target


def _edit(workbook, change) -> list[str]:
    _save_changed(workbook, change)
    return _problems(workbook[0])


def _read_as_project(target):
    """(sheet, table, letters, pending) of each sheet read, and the located messages."""
    from specgen.errors import ProblemLog
    from specgen.project import workbook as wbmod
    log = ProblemLog()
    sheets = wbmod.read_workbook(target, "lab/results.xlsx", log)
    return ([(s.sheet, s.table, s.letters, s.pending) for s in sheets],
            [str(p) for p in log.problems])


W = "lab/results.xlsx, sheet 'strength'"


def _fill(wb, row: int, value) -> None:
    wb["strength"].cell(row, 5, value)


BAD = [
    ("merged", lambda wb: (_fill(wb, 2, 1.0), _fill(wb, 3, 1.1),
                           wb["strength"].merge_cells("B2:B3")),
     f"{W}, cells B2:B3: these cells are merged. Fix: unmerge them and write the value in every "
     "row it belongs to."),
    ("formula", lambda wb: _fill(wb, 4, "=E2*2"),
     f"{W}, cell E4: value [MPa]: holds a formula (=E2*2) instead of a value. Fix: replace it "
     "by the measured value (copy, then paste as values only)."),
    ("renamed sheet", lambda wb: setattr(wb["capillary"], "title", "capilary"),
     "lab/results.xlsx, sheet 'capilary': is not a sheet specgen knows. Fix: did you mean "
     "'capillary'? Otherwise name each sheet after its test (strength, capillary, colour, "
     "sieves) or delete it."),
    ("missing sheet", lambda wb: wb.remove(wb["colour"]),
     "lab/results.xlsx: the sheet 'colour' is missing (it was in the workbook as written). "
     "Fix: restore the sheet or its name 'colour'; sheet names are how specgen knows which "
     "test a row records."),
    ("unit changed", lambda wb: setattr(wb["strength"]["E1"], "value", "value [psi]"),
     f"{W}, cell E1: value [MPa]: the unit in the header was changed from 'MPa' to 'psi'. "
     "Fix: restore the header 'value [MPa]' and enter the values in MPa: the entry checks and "
     "the instructions are set for that unit."),
    ("date as text", lambda wb: (_fill(wb, 2, 1.2), setattr(wb["strength"]["G2"], "value",
                                                              "20/11/2025")),
     f"{W}, cell G2: cast_on: holds the date as text ('20/11/2025'). Fix: enter it as a date "
     "(a cell formatted as a date, e.g. 2026-03-02), not as text."),
    ("error value", lambda wb: _fill(wb, 3, "#DIV/0!"),
     f"{W}, cell E3: value [MPa]: holds the error value #DIV/0!. Fix: enter the measured "
     "value."),
    # the table layer's own message, the one a CSV gets, located by sheet and cell
    ("not a number", lambda wb: _fill(wb, 5, "7,2,1"),
     f"{W}, cell E5: value [MPa]: expected a number; found '7,2,1'."),
    ("unknown choice", lambda wb: (_fill(wb, 6, 3.0), setattr(wb["strength"]["D6"], "value",
                                                                "compresive")),
     f"{W}, cell D6: test: 'compresive' is not allowed here. Fix: did you mean 'compressive'?"),
]


@pytest.mark.parametrize("case,change,message", BAD, ids=[b[0] for b in BAD])
def test_bad_workbook_gives_a_located_message_with_the_fix(workbook, case, change, message):
    assert message in _edit(workbook, change)


def test_same_message_as_the_csv_for_the_same_bad_value(workbook):
    project_dir, _, _ = workbook
    csv_dir = project_dir.parent / "csv"
    shutil.copytree(project_dir, csv_dir)
    with open(csv_dir / "lab" / "strength.csv", "a", encoding="utf-8") as f:
        f.write("M1-365d-C1,M1,365,compressive,-1,20\n")
    from_csv = [p for p in _problems(csv_dir) if "greater than zero" in p]
    from_wb = [p for p in _edit(workbook, lambda wb: _fill(wb, 2, -1)) if "greater than" in p]
    assert len(from_csv) == len(from_wb) == 1
    assert from_csv[0].split(": ", 1)[1] == from_wb[0].split(": ", 1)[1]


def test_macro_workbooks_are_never_opened(workbook):
    project_dir, path, _ = workbook
    shutil.copyfile(path, project_dir / "lab" / "results.xlsm")
    inside = project_dir / "lab" / "renamed.xlsx"
    with zipfile.ZipFile(path) as src, zipfile.ZipFile(inside, "w") as dst:
        for item in src.infolist():
            dst.writestr(item, src.read(item))
        dst.writestr("xl/vbaProject.bin", b"\x00macro")
    problems = _problems(project_dir)
    assert ("lab/results.xlsm: is a macro-enabled workbook; specgen does not open it, so no "
            "macro runs. Fix: save it from the spreadsheet as 'Excel Workbook (.xlsx)' (macros "
            "are dropped), then delete this file.") in problems
    assert ("lab/renamed.xlsx: holds macros (a macro project inside an .xlsx); specgen does not "
            "open it, so no macro runs. Fix: save it from the spreadsheet as 'Excel Workbook "
            "(.xlsx)' without macros.") in problems


def test_cli_lab_workbook_refuses_to_overwrite(cli, demo_copy, tmp_path):
    target = tmp_path / "lab.xlsx"
    first = cli("lab-workbook", demo_copy, "--out", target)
    assert first.exit_code == 0, first.output
    assert "planned rows 18 strength" in first.output
    before = target.read_bytes()
    again = cli("lab-workbook", demo_copy, "--out", target)
    assert again.exit_code == 2 and "Traceback" not in again.output
    assert f"{target}: already exists. Fix: name another file with --out" in again.output
    assert target.read_bytes() == before


def test_a_specimen_in_both_the_csv_and_a_workbook_is_refused(workbook):
    project_dir, path, _ = workbook
    wb = openpyxl.load_workbook(path)
    wb["strength"]["A2"] = "M1-28d-C1"            # already in lab/strength.csv, row 20
    wb["strength"]["E2"] = 4.7
    wb.save(project_dir / "lab" / "results.xlsx")
    assert ("lab/results.xlsx, sheet 'strength', cell A2: specimen: specimen 'M1-28d-C1' is "
            "also reported in lab/strength.csv, row 20. Fix: report each specimen once: remove "
            "one of the two rows.") in _problems(project_dir)


def test_a_formula_saved_with_its_computed_value_is_still_refused(workbook):
    """A spreadsheet program saves each formula with its last computed value (<f> then <v>);
    the value must not be read as a measurement."""
    project_dir, path, _ = workbook
    wb = openpyxl.load_workbook(path)
    _fill(wb, 2, 7.2)
    _fill(wb, 4, "=E2*2")
    plain = project_dir.parent / "plain.xlsx"
    wb.save(plain)
    target = project_dir / "lab" / "results.xlsx"
    with zipfile.ZipFile(plain) as src, zipfile.ZipFile(target, "w") as dst:
        for item in src.infolist():
            data = src.read(item)
            if item.filename.startswith("xl/worksheets/"):
                data, n = re.subn(rb"<f>E2\*2</f><v\s*/?>(?:</v>)?", b"<f>E2*2</f><v>14.4</v>",
                                  data)
                assert n in (0, 1)
            dst.writestr(item, data)
    with zipfile.ZipFile(target) as z:
        assert any(b"<f>E2*2</f><v>14.4</v>" in z.read(n) for n in z.namelist())
    assert (f"{W}, cell E4: value [MPa]: holds a formula (=E2*2) instead of a value. Fix: "
            "replace it by the measured value (copy, then paste as values only).") in \
        _problems(project_dir)


FAST_READ = [b for b in BAD if b[0] not in ("formula", "error value")]


@pytest.mark.parametrize("case,change", [("filled", lambda wb: [
    (_fill(wb, r, 6.5 + r / 10), wb["strength"].cell(r, 7, dt.date(2025, 11, 20)))
    for r in range(2, 8)])] + [b[:2] for b in FAST_READ], ids=["filled"] + [b[0] for b in
                                                                          FAST_READ])
def test_calamine_and_openpyxl_read_the_same(workbook, monkeypatch, case, change):
    """The fast reader (calamine) and openpyxl, the reference, give the same rows, the same
    planned tests and the same located messages for the same workbook."""
    from specgen.project import workbook as wbmod
    target = _save_changed(workbook, change)
    seen = []
    for reader in (wbmod._grids_calamine, wbmod._grids_openpyxl):
        monkeypatch.setattr(wbmod, "_grids_calamine", reader)
        seen.append(_read_as_project(target))
    assert seen[0] == seen[1]
    tables, problems = seen[0]
    assert tables[0][3] or tables[0][1]   # something was read from the strength sheet


def test_bad_workbooks_at_the_command_line_every_problem_at_once_nothing_written(
        cli, workbook, tmp_path):
    """The bad-input list on the command line: a workbook with merged cells, a formula, a
    renamed sheet, a missing sheet, a unit changed in a header and a date as text, beside a
    macro-enabled copy — every problem in one run, each located (sheet, cell) with its fix,
    exit code 2, no traceback; the output folder of an earlier build is left as it was."""
    project_dir, path, _ = workbook
    wb = openpyxl.load_workbook(path)
    for case, change, _ in BAD:
        if case in ("merged", "formula", "renamed sheet", "missing sheet", "unit changed",
                    "date as text"):
            change(wb)
    wb.save(project_dir / "lab" / "results.xlsx")
    shutil.copyfile(path, project_dir / "lab" / "results.xlsm")
    out = tmp_path / "site"
    (out / "R1").mkdir(parents=True)
    (out / "R1" / "index.html").write_text("the issued page")
    for command in (("check", project_dir), ("build", project_dir, "--out", out)):
        result = cli(*command)
        assert result.exit_code == 2, result.output
        assert "Traceback" not in result.output
        for case, _, message in BAD:
            if case in ("merged", "renamed sheet", "missing sheet", "unit changed",
                        "date as text"):
                assert message in result.output, (case, result.output)
        # the column is named by its header as it now reads
        assert (f"{W}, cell E4: value [psi]: holds a formula (=E2*2) instead of a value. Fix: "
                "replace it by the measured value") in result.output
        assert "lab/results.xlsm: is a macro-enabled workbook; specgen does not open it" in \
            result.output
    assert [p.name for p in out.rglob("*")] == ["R1", "index.html"]
    assert (out / "R1" / "index.html").read_text() == "the issued page"


# Cells of a SpreadsheetML worksheet (ECMA-376 Part 1, the xlsx format): a cell <c> holds a
# formula in a child element <f> (also written with a namespace prefix, <x:f>, where the
# document declares one) and its cell type t="e" marks an error value; a data validation's
# <formula1> sits after <sheetData>, outside the cells.
def _worksheet(cells: bytes, after: bytes = b"", prefix: bytes = b"") -> bytes:
    ns = b"http://schemas.openxmlformats.org/spreadsheetml/2006/main"
    p = prefix + b":" if prefix else b""
    declare = b"xmlns:" + prefix if prefix else b"xmlns"
    return (b"<" + p + b"worksheet " + declare + b'="' + ns + b'"><' + p + b"sheetData>"
            + cells + b"</" + p + b"sheetData>" + after + b"</" + p + b"worksheet>")


VALIDATION = (b'<extLst><ext xmlns:x14="urn:x14"><x14:dataValidations xmlns:xm="urn:xm">'
              b"<x14:dataValidation><x14:formula1><xm:f>lists!$A$1:$A$3</xm:f></x14:formula1>"
              b"</x14:dataValidation></x14:dataValidations></ext></extLst>")
SCAN = [
    ("plain values", _worksheet(b'<row r="1"><c r="A1"><v>1.5</v></c></row>'), False),
    ("formula", _worksheet(b'<row r="2"><c r="E2"><f>E1*2</f><v>3</v></c></row>'), True),
    ("shared formula", _worksheet(b'<row r="3"><c r="E3"><f t="shared" si="0"/><v>3</v>'
                                  b'</c></row>'), True),
    ("prefixed formula", _worksheet(b'<x:row r="2"><x:c r="E2"><x:f>E1*2</x:f></x:c></x:row>',
                                    prefix=b"x"), True),
    ("error value", _worksheet(b'<row r="2"><c r="E2" t="e"><v>#DIV/0!</v></c></row>'), True),
    ("error value, single quotes", _worksheet(b"<row r='2'><c r='E2' t='e'><v>#N/A</v></c>"
                                              b"</row>"), True),
    # a list validation as a spreadsheet program writes it in its extension list, with the
    # range in an element <xm:f>: no formula in a cell
    ("validation formula after the cells", _worksheet(
        b'<row r="1"><c r="A1"><v>1</v></c></row>', after=VALIDATION), False),
    ("no cells", _worksheet(b"", after=VALIDATION).replace(b"<sheetData></sheetData>",
                                                           b"<sheetData/>"), False),
    ("not a worksheet", b'<styleSheet><fonts><font><f>odd</f></font></fonts></styleSheet>', False),
]


@pytest.mark.parametrize("case,part,found", SCAN, ids=[s[0] for s in SCAN])
def test_formula_and_error_search_looks_in_the_cells_only(case, part, found):
    from specgen.project.xlsx_package import _formula_or_error
    assert _formula_or_error(part) is found


def test_parts_inflated_from_memory_are_the_parts_zipfile_reads(workbook):
    """The search reads each part straight from the file's bytes; every part must come out
    as the standard library's zip reader gives it, and a part whose declared size is a lie is
    refused with the workbook named, not read."""
    import io
    import struct
    from specgen.errors import ProblemLog
    from specgen.project import workbook as wbmod
    from specgen.project.xlsx_package import _part
    project_dir, path, _ = workbook
    data = path.read_bytes()
    with zipfile.ZipFile(io.BytesIO(data)) as z:
        items = z.infolist()
        assert {i.compress_type for i in items} == {zipfile.ZIP_DEFLATED}
        for item in items:
            assert _part(z, data, item) == z.read(item), item.filename
    # the central directory's uncompressed size of the first sheet, made 1 byte larger
    sheet = next(i for i in items if i.filename == "xl/worksheets/sheet2.xml")
    # its central directory entry: signature PK\1\2, the file name at byte 46, the
    # uncompressed size at byte 24 (the zip format, PKWARE APPNOTE.TXT 4.3.12)
    at = data.find(b"PK\x01\x02")
    while data[at + 46:at + 46 + len(sheet.filename)] != sheet.filename.encode():
        at = data.find(b"PK\x01\x02", at + 4)
    size = struct.unpack_from("<L", data, at + 24)[0]
    assert size == sheet.file_size
    bad = bytearray(data)
    struct.pack_into("<L", bad, at + 24, size + 1)
    target = project_dir / "lab" / "results.xlsx"
    target.write_bytes(bytes(bad))
    log = ProblemLog()
    assert wbmod.read_workbook(target, "lab/results.xlsx", log) == []
    [problem] = log.problems
    assert str(problem).startswith("lab/results.xlsx: cannot be read as an xlsx workbook "
                                   "(BadZipFile: xl/worksheets/sheet2.xml does not inflate to "
                                   "its declared size).")


@pytest.mark.parametrize("case,change", [("filled", lambda wb: [
    (_fill(wb, r, 6.5 + r / 10), wb["strength"].cell(r, 7, dt.date(2025, 11, 20)))
    for r in range(2, 8)])] + [b[:2] for b in BAD], ids=["filled"] + [b[0] for b in BAD])
def test_column_pass_and_cell_by_cell_read_the_same(workbook, monkeypatch, case, change):
    """Rows are read column by column, a row with an unusual cell again cell by cell; with
    every row sent cell by cell the rows, planned tests and located messages are the same."""
    from specgen.project import workbook as wbmod
    target = _save_changed(workbook, change)
    seen = []
    for every_cell in (False, True):
        if every_cell:
            monkeypatch.setattr(wbmod, "_column_text", lambda cells, *_: [None] * len(cells))
        seen.append(_read_as_project(target))
    assert seen[0] == seen[1]
    assert seen[0][0][0][1] or seen[0][0][0][3]   # the strength sheet gave rows or plans
