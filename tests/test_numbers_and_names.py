"""Numbers that cannot break the science, and names that cannot break a formula.

Every number read from a project passes one guard (``units.plausible``): non-finite and
absurd values are refused at load with file, line or row, and field.  Every project name
that reaches a formula is escaped by one function (``checks.result.tex_name``).
"""
from __future__ import annotations

import xml.etree.ElementTree as ET

import pytest

from specgen import units
from specgen.checks.result import tex_name
from specgen.errors import InputErrors
from specgen.build import load as load_project  # as every command reads a project


def edit(path, old, new):
    text = path.read_text(encoding="utf-8")
    assert old in text, old
    path.write_text(text.replace(old, new, 1), encoding="utf-8")


def problems_of(root) -> list[str]:
    with pytest.raises(InputErrors) as err:
        load_project(root)
    return [str(p) for p in err.value.problems]


@pytest.mark.parametrize("value", [".nan", ".inf", "-.inf", "1e308", "-1e308", "1e-300"])
def test_absurd_parts_are_refused_at_their_line(demo_copy, value):
    edit(demo_copy / "mixes.yaml", "sands: [{sand: S1, parts: 2.0}", f"sands: [{{sand: S1, parts: {value}}}")
    found = problems_of(demo_copy)
    assert len(found) == 1, found
    assert found[0].startswith("mixes.yaml, line 11: mixes[1].sands[0].parts: "), found[0]


@pytest.mark.parametrize("file, old, new, where", [
    ("mixes.yaml", "water_binder_ratio: 0.65", "water_binder_ratio: .nan",
     "mixes.yaml, line 12: mixes[1].water_binder_ratio: "),
    ("dossier.yaml", 'area: "240 m^2"', 'area: "1e308 m^2"',
     "dossier.yaml, line 37: zones[0].area: 1e308 m^2 is not a plausible area"),
    ("dossier.yaml", 'joint_width: "10 mm"', 'joint_width: "1e-300 mm"',
     "dossier.yaml, line 39: zones[0].joint_width: 1e-300 mm is not a plausible length"),
    ("dossier.yaml", 'placing_rate: "8 L/h"', 'placing_rate: "1e308 L/h"',
     "dossier.yaml, line 41: zones[0].placing_rate: 1e308 L/h is not a plausible volume rate"),
])
def test_absurd_yaml_quantities_are_refused(demo_copy, file, old, new, where):
    edit(demo_copy / file, old, new)
    found = problems_of(demo_copy)
    assert any(p.startswith(where) for p in found), found


@pytest.mark.parametrize("cell", ["nan", "inf", "-inf", "1e308", "1e-300"])
def test_absurd_csv_cells_are_refused_at_their_row(demo_copy, cell):
    edit(demo_copy / "lab" / "strength.csv", "M1-01d-C1,M1,1,compressive,1.18,20",
         f"M1-01d-C1,M1,1,compressive,{cell},20")
    found = problems_of(demo_copy)
    assert found[0].startswith("lab/strength.csv, row 2: value [MPa]: "), found


def test_below_absolute_zero_is_refused():
    with pytest.raises(units.UnitProblem, match="below absolute zero"):
        units.parse("-300 degC", "temperature")   # -273.15 °C is absolute zero (SI brochure)


def test_plausible_keeps_real_values():
    # common practice: a weak lime mortar ~0.5 MPa, a granite ~200 MPa, a brick's E ~ 10 GPa
    for text in ("0.5 MPa", "200 MPa", "10 GPa", "1740 psi"):
        assert units.parse(text, "pressure") > 0
    assert units.parse("1740 psi", "pressure") == pytest.approx(11.997e6, rel=1e-3)  # 1 psi = 6894.757 Pa (NIST SP 811)


def test_check_command_exits_2_without_traceback(demo_copy, cli):
    edit(demo_copy / "mixes.yaml", "sands: [{sand: S1, parts: 2.0}", "sands: [{sand: S1, parts: .inf}")
    result = cli("check", demo_copy)
    assert result.exit_code == 2
    assert "Traceback" not in result.output
    assert "mixes.yaml, line 11: mixes[1].sands[0].parts:" in result.output


NAMES = ["lime & pozzolan retarder", "50 % solution", "retarder_{x}", "a \\ b", "#1 $ ~ ^",
         "<b>bold</b>", "}{"]


def test_admixture_names_reach_the_formula_escaped(demo_copy):
    from specgen.checks.run import evaluate
    from specgen.report.mathsvg import _draw
    admixtures = ", ".join('{name: "%s", dose: "0.1 %%"}' % n.replace("\\", "\\\\")
                           for n in NAMES)
    edit(demo_copy / "mixes.yaml", '{name: citric acid solution, dose: "0.2 %", purpose: retarder}',
         admixtures)
    project = load_project(demo_copy)
    assert [a.name for a in project.mixes["M1"].admixtures] == NAMES
    results = evaluate(project)
    formulas = [f for c in results.checks for s in c.steps for f in (s.formula, s.substituted)
                if r"lime\ \&\ pozzolan" in f]
    assert formulas, "the admixtures' names appear in the works quantities"
    for latex in formulas:
        for name in NAMES:
            assert tex_name(name) in latex
        ET.fromstring(_draw(latex))  # draws, and the SVG is well-formed XML
