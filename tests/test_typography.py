"""The dossier's typography: one formatting function with a rule per quantity kind, and
the reader's wording of what the checks write (labels, symbols, plurals)."""
from __future__ import annotations

import datetime as dt

import pytest

from specgen.report.fmt import MINUS, UNIT_SPACE, count, date_text, qty, rounded
from specgen.report.wording import plain, reader, rule_label, symbol

S = UNIT_SPACE


@pytest.mark.parametrize("value, unit, expected", [
    # strengths to 0.1 MPa, as EN 1015-11 results are reported (from memory)
    (4.7967, "MPa", f"4.8{S}MPa"),
    # SI Brochure, 9th ed., 5.4.3: the unit symbol follows the value after a space; degree
    # Celsius written °C (from memory)
    (20, "degC", f"20.0{S}°C"),
    (-3.04, "degC", f"{MINUS}3.0{S}°C"),       # ISO 80000-1: a true minus sign (from memory)
    (0.4032, "m^3", f"0.403{S}m³"),            # site volumes to three figures (common practice)
    (1850.4, "kg/m^3", f"1850{S}kg/m³"),       # densities to 1 kg/m³ (common practice)
    (4.32, "d", f"4{S}d"),                     # ages in whole days (common practice)
    (12.345, "%", f"12.3{S}%"),                # ISO 80000-1: a space before % (from memory)
    (0.0312, "kg/(m^2·min^0.5)", f"0.031{S}kg/(m²·min^½)"),
    (1.17883, "", "1.18"),                     # ratios to three figures (common practice)
])
def test_qty_rounds_by_the_kind_of_quantity(value, unit, expected):
    assert qty(value, unit) == expected


def test_sheets_keep_digits_to_recompute():
    assert qty(4.7967, "MPa", 4) == f"4.797{S}MPa"
    assert qty(1.178834, "", 4) == "1.179"
    # but not beyond what the quantity supports: a count is an integer, a site volume
    # three figures (common practice), ages whole days
    assert qty(18.0, "", 4) == "18"
    assert qty(0.40324, "m^3", 4) == f"0.403{S}m³"
    assert qty(4.32, "d", 4) == f"4{S}d"


def test_counts_are_integers_with_their_plural():
    assert rounded(18.0, "count") == "18"
    assert count(1.0, "measure") == "1 measure"
    assert count(2, "coat") == "2 coats"
    assert count(0, "day") == "0 days"


def test_dates_as_dates():
    assert date_text(dt.date(2026, 8, 27)) == "27 August 2026"


@pytest.mark.parametrize("text, expected", [
    ("materials.yaml EB1.compressive_strength", "materials data, EB1 compressive strength"),
    ("lab/strength.csv row 2", "lab strength results row 2"),
    ("content/data/cement_densities.yaml, set 'bentz_nist'",
     "phase density sets, NIST phase densities (Bentz)"),
    ("give joint_width for zone Z1 in dossier.yaml", "give joint width for zone Z1 in dossier data"),
    ("4 age(s) 1–28 d", "4 ages 1–28 d"),
    ("1 measure(s)", "1 measure"),
    ("AICc -31.25", f"AICc {MINUS}31.25"),
    ("C2S + 4.3 H -> C1.7-S-H4", "C2S + 4.3 H → C1.7-S-H4"),
    ("at 20 degC", "at 20 °C"),
    ("three 40 x 40 x 160 mm prisms", "three 40 × 40 × 160 mm prisms"),
    ("model two_component", "model two-component model (aluminate + silicate)"),
])
def test_plain_wording_has_no_internal_names(text, expected):
    assert plain(text) == expected


def test_rules_are_named_by_their_description():
    # the description is the rule file's own (content/rules/works.yaml)
    assert "placing_rate" not in rule_label("works.placing_rate")
    assert plain("rule works.placing_rate (common practice)").startswith("rule “")


def test_symbols_get_subscripts_and_markup_is_escaped():
    assert symbol("f_k") == "f<sub>k</sub>"
    assert symbol("V_m,min") == "V<sub>m,min</sub>"
    assert reader("f_k 4.2 MPa <b>") == "f<sub>k</sub> 4.2 MPa &lt;b&gt;"
    assert reader("kg/(m^2·min^0.5)") == "kg/(m²·min<sup>½</sup>)"


@pytest.mark.parametrize("ages, expected", [
    # a 1-3-7-28-day record with its curve drawn to a year: the test ages of EN 1015-11 and
    # the later ages a natural cement needs (DOMAIN.md §1), as plain numbers of days
    ((1, 3, 7, 28, 365), ["1", "3", "7", "28", "90", "365"]),
    ((7, 28, 90), ["7", "14", "28", "56", "90"]),
])
def test_age_axes_read_in_days_not_powers_of_ten(ages, expected):
    from specgen.report.figures import _pyplot, age_axis
    plt = _pyplot()
    fig, ax = plt.subplots()
    ax.plot(ages, [1.0] * len(ages))
    age_axis(ax, ages)
    fig.canvas.draw()
    labels = [t.get_text() for t in ax.get_xticklabels() if t.get_text()]
    plt.close(fig)
    assert labels == expected
    assert not any("^" in t or "10" in t and t != "10" for t in labels)  # no mathtext 10^n
