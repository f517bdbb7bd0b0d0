"""``specgen lab-workbook``: the laboratory's workbook, pre-filled from the project.

One sheet per kind of test (the sheets of :mod:`specgen.project.workbook`, read back exactly
as the CSV files of the same names), one row per planned specimen or reading that has no
result yet, the units in the headers, data validation on entry, and an instructions sheet.
The laboratory fills in the result cells and returns the file; placed in ``lab/`` it is read
with the project, and rows still empty stay planned.

What is planned:
- strength (EN 1015-11 prisms, flexural then compressive): for every mix a zone may use, at each
  age the project asks about — the ages of ``requirements.min_compressive``, the site test ages
  and the strength rules' later ages (``strength.late_age_1``/``late_age_2``) — unless the
  project already holds results of that mix at that age; ``strength.specimens_per_age`` prisms;
- capillary absorption (EN 1015-18): every such mix without readings;
- colour: every trial panel's colour sample without readings, three readings each
  (``common practice``);
- sieve analysis: every sand and every historic mortar's aggregate sample without one.
"""
from __future__ import annotations

import json
from pathlib import Path

from specgen.errors import PublishError
from specgen.project import Project
from specgen.project.workbook import INSTRUCTIONS, SHEETS
from specgen.project.xlsx_package import LAYOUT_PROPERTY

DAY = 86400.0
CAPILLARY_TIMES_MIN = (5, 10, 15, 30, 60, 90)   # common practice: EN 1015-18 reads 10 and 90 min
COLOUR_READINGS = 3                             # common practice: three spots per sample
MAX_SIEVE_M = 0.00475                            # mortar sands: sieves up to 4.75 mm
HEADERS = {
    "strength": ["specimen", "mix", "age [d]", "test", "value [MPa]", "curing_temperature [degC]",
                 "cast_on", "curing", "notes"],
    "capillary": ["sample", "time [min]", "uptake [kg/m^2]"],
    "colour": ["sample", "L [1]", "a [1]", "b [1]", "illuminant", "observer"],
    "sieves": ["sample", "sieve [mm]", "passing [%]"],
}
CURING = "EN 1015-11: in the mould, then as the standard gives for the binder"


def mixes_in_use(project: Project) -> list[str]:
    """Mixes a zone may use (chosen or candidate), in file order; every mix if no zone names one."""
    used = {m for z in project.dossier.zones for m in [*z.candidates, z.mix] if m}
    return [m for m in project.mixes if m in used] or list(project.mixes)


def planned_ages_d(project: Project, mix: str) -> list[int]:
    """Test ages (days) still without results for ``mix``."""
    from specgen.checks.rules import RuleBook
    rules = RuleBook(project.dossier.rule_overrides)
    ages = {round(m.age / DAY) for m in project.dossier.requirements.min_compressive}
    spec = project.specification.doc if project.specification else None
    ages |= {round(a / DAY) for a in (spec.site_tests.test_ages if spec else [])}
    ages |= {round(rules["strength.late_age_1"].value), round(rules["strength.late_age_2"].value)}
    tested = {round(r.age / DAY) for r in project.strength if r.mix == mix}
    return sorted(a for a in ages if a > 0 and a not in tested)


def planned_rows(project: Project) -> dict[str, list[list]]:
    """The rows of each sheet: one per planned specimen or reading (result cells empty)."""
    from specgen.checks.rules import RuleBook
    n = int(RuleBook(project.dossier.rule_overrides)["strength.specimens_per_age"].value)
    mixes = mixes_in_use(project)
    strength = [[f"{m}-{age:02d}d-{t[0].upper()}{i}", m, age, t, None, 20, None, CURING, None]
                for m in mixes for age in planned_ages_d(project, m)
                for t in ("flexural", "compressive") for i in range(1, n + 1)]
    have_cap = {r.sample for r in project.capillary}
    capillary = [[m, t, None] for m in mixes if m not in have_cap for t in CAPILLARY_TIMES_MIN]
    have_colour = {r.sample for r in project.colours}
    panels = project.specification.doc.trial_panels if project.specification else []
    samples = [tp.colour_sample or tp.id for tp in panels]
    colour = [[s, None, None, None, "D65", "10"] for s in dict.fromkeys(samples)
              if s not in have_colour for _ in range(COLOUR_READINGS)]
    have_sieve = {r.sample for r in project.sieves}
    sieve_samples = list(project.sands) + [h.aggregate_sample for h in
                                           project.historic_mortars.values() if h.aggregate_sample]
    sieves = [[s, round(size * 1000, 3), None] for s in sieve_samples if s not in have_sieve
              for size in sorted(_sieves(), reverse=True)]
    return {"strength": strength, "capillary": capillary, "colour": colour, "sieves": sieves}


def _sieves() -> list[float]:
    from specgen.refdata import load
    return [s for s in load("sieve_series").data["standard"] if s <= MAX_SIEVE_M]


def write_workbook(project: Project, path: Path) -> dict[str, int]:
    """Write the workbook to ``path`` (atomically); returns the planned rows per sheet."""
    from openpyxl import Workbook
    rows = planned_rows(project)
    wb = Workbook()
    _instructions(wb.active, project, rows)
    for name in SHEETS:
        _sheet(wb.create_sheet(name), project, name, rows[name])
    from openpyxl.packaging.custom import StringProperty
    wb.custom_doc_props.append(StringProperty(name=LAYOUT_PROPERTY, value=json.dumps(HEADERS)))
    wb.properties.title = f"{project.dossier.project.code} laboratory workbook"
    wb.properties.creator = "specgen"
    _save(wb, Path(path))
    return {k: len(v) for k, v in rows.items()}


def _save(wb, path: Path) -> None:
    """Write beside the target and rename, so an existing file is never left half-written."""
    tmp = path.with_name(f".{path.name}.part")
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
        wb.save(tmp)
        tmp.replace(path)
    except OSError as exc:
        tmp.unlink(missing_ok=True)
        raise PublishError(f"{path}: cannot be written ({exc.strerror}). Fix: choose a folder "
                           "you can write to.") from None


def _instructions(ws, project: Project, rows: dict) -> None:
    from openpyxl.styles import Alignment, Font
    ws.title = INSTRUCTIONS
    p, rev = project.dossier.project, project.revision
    lines = [
        (f"Laboratory workbook: {p.title} ({p.code})", True),
        (f"Written from dossier revision {rev.code} of {rev.date.isoformat()} ({rev.status}).", False),
        ("", False),
        ("How to fill it in", True),
        ("1. Each sheet is one kind of test; each row is one planned specimen or reading.", False),
        ("2. Enter the measured result in the empty cells (value, uptake, L a b, passing). "
         "Leave a row's result empty while the test is not done: it stays planned.", False),
        ("3. Enter values, never formulas; do not merge cells; enter dates as dates "
         "(e.g. 2026-03-02 in a date-formatted cell), not as text.", False),
        ("4. Keep the sheet names and the headers: the unit in each header (in brackets) is the "
         "unit of the column. Add rows for extra specimens with their own ids.", False),
        ("5. Write remarks on a specimen (broken in handling, not tested) in its notes, "
         "never as a value.", False),
        ("6. Save as 'Excel Workbook (.xlsx)' (no macros) and return the file; the project "
         "keeps it in its lab/ folder.", False),
        ("", False),
        ("Planned in this workbook", True),
        *[(f"{name}: {len(r)} row(s)", False) for name, r in rows.items()],
        ("", False),
        ("Safety", True),
        ("Wet binders are strongly alkaline (skin burns, serious eye damage) and cutting or "
         "crushing prisms makes dust: follow the laboratory's own safety procedures and "
         "local regulations.", False),
    ]
    for i, (text, bold) in enumerate(lines, start=1):
        cell = ws.cell(row=i, column=1, value=text)
        cell.font = Font(bold=bold, size=13 if i == 1 else 11)
        cell.alignment = Alignment(wrap_text=True, vertical="top")
    ws.column_dimensions["A"].width = 110


def _sheet(ws, project: Project, name: str, rows: list[list]) -> None:
    from openpyxl.styles import Font, PatternFill
    from openpyxl.utils import get_column_letter
    headers = HEADERS[name]
    ws.append(headers)
    for c in ws[1]:
        c.font = Font(bold=True)
        c.fill = PatternFill("solid", fgColor="DDE4EE")
    for r in rows:
        ws.append(r)
    ws.freeze_panes = "A2"
    for i, h in enumerate(headers, start=1):
        ws.column_dimensions[get_column_letter(i)].width = max(12, len(h) + 4)
    last = max(len(rows) + 1, 2) + 200   # room for specimens the laboratory adds
    for dv in _validations(project, name, last):
        ws.add_data_validation(dv)
    if name == "strength":
        for row in ws.iter_rows(min_row=2, max_row=last, min_col=7, max_col=7):
            row[0].number_format = "yyyy-mm-dd"


def _validations(project: Project, name: str, last: int) -> list:
    """Checks on entry (the spreadsheet's own); specgen validates again when it reads."""
    from openpyxl.worksheet.datavalidation import DataValidation

    def dv(col: str, kind: str, title: str, prompt: str, **kw) -> DataValidation:
        v = DataValidation(type=kind, allow_blank=True, showErrorMessage=True,
                           errorTitle=title, error=prompt, promptTitle=title, prompt=prompt,
                           showInputMessage=True, **kw)
        v.add(f"{col}2:{col}{last}")
        return v
    mixes = ",".join(project.mixes)
    if name == "strength":
        out = [dv("D", "list", "Test", "compressive or flexural",
                  formula1='"compressive,flexural"'),
               dv("C", "whole", "Age", "age at test in days (whole number > 0)",
                  operator="greaterThan", formula1="0"),
               dv("E", "decimal", "Strength", "strength in MPa, greater than 0",
                  operator="between", formula1="0.001", formula2="200"),
               dv("F", "decimal", "Curing temperature", "in °C", operator="between",
                  formula1="-10", formula2="60"),
               dv("G", "date", "Cast on", "date the prism was cast (a date, not text)",
                  operator="greaterThan", formula1="1"),
               ]
        if mixes and len(mixes) < 250:   # a list validation holds at most 255 characters
            out.append(dv("B", "list", "Mix", "a mix id of the project", formula1=f'"{mixes}"'))
        return out
    if name == "capillary":
        return [dv("B", "decimal", "Time", "minutes since the face touched water",
                   operator="greaterThanOrEqual", formula1="0"),
                dv("C", "decimal", "Uptake", "kg of water per m² of the wetted face",
                   operator="greaterThanOrEqual", formula1="0")]
    if name == "colour":
        return [dv("B", "decimal", "L*", "CIELAB L*, 0 to 100", operator="between",
                   formula1="0", formula2="100"),
                dv("C", "decimal", "a*", "CIELAB a*, -128 to 128", operator="between",
                   formula1="-128", formula2="128"),
                dv("D", "decimal", "b*", "CIELAB b*, -128 to 128", operator="between",
                   formula1="-128", formula2="128"),
                dv("E", "list", "Illuminant", "D65, D50, C, A, F2 or F11",
                   formula1='"D65,D50,C,A,F2,F11"'),
                dv("F", "list", "Observer", "2 or 10 (degrees)", formula1='"2,10"')]
    return [dv("B", "decimal", "Sieve", "aperture in mm", operator="greaterThan", formula1="0"),
            dv("C", "decimal", "Passing", "cumulative % passing, 0 to 100", operator="between",
               formula1="0", formula2="100")]
