"""Units are shown the way the practice a project follows shows them: SI in European
practice, the US customary value beside the SI one in American practice (the calculation
sheets stay in SI)."""
from __future__ import annotations

import re

import pytest

from specgen import practice
from specgen.report import fmt

NB = "\u202f"


@pytest.mark.parametrize("value, unit, expected", [
    # ASTM C270 type N: 750 psi = 5.2 MPa as the standard prints it; 1 psi = 6.894757 kPa
    # (NIST SP 811, B.8): 5.2 MPa = 754.2 psi, shown to three figures
    (5.2, "MPa", f"5.2{NB}MPa (754{NB}psi)"),
    # 7.6 MPa = 1102.3 psi: three figures, 1100 psi
    (7.6, "MPa", f"7.6{NB}MPa (1100{NB}psi)"),
    # °F = °C x 9/5 + 32 (NIST SP 811, B.9): 20 °C = 68 °F, 5 °C = 41 °F
    (20.0, "degC", f"20.0{NB}°C (68{NB}°F)"),
    (5.0, "degC", f"5.0{NB}°C (41{NB}°F)"),
    # 1 in = 25.4 mm exactly: 10 mm = 0.3937 in
    (10.0, "mm", f"10.0{NB}mm (0.39{NB}in)"),
    # 1 yd = 0.9144 m exactly: 1 m³ = 1.308 yd³
    (1.0, "m^3", f"1.00{NB}m³ (1.31{NB}yd³)"),
    # 1 lb = 0.45359237 kg exactly: 25 kg = 55.1 lb
    (25.0, "kg", f"25.0{NB}kg (55.1{NB}lb)"),
    # a ratio, a percentage and an age read the same in both systems
    (12.5, "%", f"12.5{NB}%"), (28, "d", f"28{NB}d"),
])
def test_us_customary_beside_si(value, unit, expected):
    with fmt.unit_display(fmt.US_BESIDE):
        assert fmt.qty(value, unit) == expected
    # in SI only, and on a calculation sheet (digits given), the SI value alone
    assert fmt.qty(value, unit) == expected.split(" (")[0]
    with fmt.unit_display(fmt.US_BESIDE):
        assert "(" not in fmt.qty(value, unit, 4)


def test_each_practice_names_a_display_the_render_knows():
    shown = {k: s["unit_display"] for k, s in practice.sets().items()}
    assert shown == {"european": fmt.SI_ONLY, "american": fmt.US_BESIDE}
    with pytest.raises(ValueError, match="unknown unit display 'imperial'"):
        with fmt.unit_display("imperial"):
            pass


def _render(project_dir, monkeypatch):
    """Render the scope, specification and options pages only (the wiring, not every figure)."""
    from specgen.build import check
    from specgen.report import render as rnd
    wanted = [s for s in rnd.chapters() if s.path in ("scope.md", "specification.md",
                                                      "options.md")]
    monkeypatch.setattr(rnd, "chapters", lambda: wanted)
    project, results = check(project_dir)
    return rnd.render(project, results).pages


US = re.compile(r"\(\d[\d.,]*\u202f(psi|°F|in|ft|ft²|yd³|lb|US gal|ksi|lb/ft³)\)")


def test_american_project_reads_us_customary_beside_si(demo_copy, monkeypatch):
    from tests.test_practice import _follow
    _follow(demo_copy, "practice:\n  follows: american\n")
    pages = _render(demo_copy, monkeypatch)
    assert ("Quantities are given in SI units, with the US customary value beside each "
            "reading in the text (the calculation sheets stay in SI") in pages["scope.md"]
    # demo NC1 firing peak 930 °C = 1706 °F (x 9/5 + 32), beside it in the options appraisal
    assert f"930.0{NB}°C (1706{NB}°F)" in pages["options.md"]
    # the display is set for the render only: afterwards SI alone again
    assert fmt.qty(930.0, "degC") == f"930.0{NB}°C"


def test_european_project_reads_si_only(demo_copy, monkeypatch):
    pages = _render(demo_copy, monkeypatch)        # the demo follows European practice
    assert "Quantities are given in SI units." in pages["scope.md"]
    assert not US.search(pages["specification.md"]) and not US.search(pages["options.md"])
    assert f"930.0{NB}°C" in pages["options.md"]
