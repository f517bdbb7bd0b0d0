"""Units at the edge, checked against published exact conversion factors."""
import pytest

from specgen import units


@pytest.mark.parametrize("text, kind, expected", [
    # 1 psi = 6894.757 Pa (NIST SP 811, appendix B.8): 1740 psi = 11.9969 MPa
    ("1740 psi", "pressure", 1740 * 6894.757293168),
    ("12 MPa", "pressure", 12e6),
    ("28 d", "time", 28 * 86400.0),
    ("20 degC", "temperature", 293.15),             # ITS-90 offset 273.15 K
    ("68 degF", "temperature", 293.15),             # (68 - 32) * 5/9 + 273.15
    ("240 m^2", "area", 240.0),
    ("1300 ft^2", "area", 1300 * 0.09290304),       # 1 ft = 0.3048 m exactly (NIST SP 811)
    ("25 %", "fraction", 0.25),
    ("850 kg/m^3", "density", 850.0),
    ("55 lb", "mass", 55 * 0.45359237),             # 1 lb = 0.45359237 kg exactly
])
def test_parse_to_si(text, kind, expected):
    assert units.parse(text, kind) == pytest.approx(expected, rel=1e-9)


@pytest.mark.parametrize("text, kind, expected", [
    ("1740 psi", "pressure", 1740 * 0.45359237 * 9.80665 / 0.0254 ** 2),  # lbf/in², exact defs
    ("90 min", "time", 5400.0),                  # 1 min = 60 s (SI brochure, table 8)
    ("0.5 in", "length", 0.0127),                # 1 in = 0.0254 m exactly (NIST SP 811)
    ("20 L", "volume", 0.020),                   # 1 L = 1 dm³ = 1e-3 m³ (CGPM 1964)
])
def test_parse_against_exact_definitions(text, kind, expected):
    # the conversion factors are the published exact definitions, not a unit library's table
    assert units.parse(text, kind) == pytest.approx(expected, rel=1e-12)


def test_bare_number_needs_a_unit():
    with pytest.raises(units.UnitProblem, match="has no unit; write it with its unit, e.g. '12 MPa'"):
        units.parse(12, "pressure")


def test_wrong_kind_of_unit():
    with pytest.raises(units.UnitProblem, match="'m' is not a pressure unit"):
        units.parse("12 m", "pressure")


def test_header_split():
    assert units.split_header("compressive [MPa]") == ("compressive", "MPa")
    assert units.split_header("specimen") == ("specimen", None)
