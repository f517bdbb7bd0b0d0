"""The dossier's typography: one formatting function with a rule per quantity kind, and
the reader's wording of what the checks write (labels, symbols, plurals)."""
from __future__ import annotations

import datetime as dt
import re

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
    # a one-word key of a record is worded like a longer one (dossier.yaml Z1.joint_width)
    ("give dossier.yaml Z2.coats", "give dossier data, Z2 coats"),
    ("4 age(s) 1–28 d", "4 ages 1–28 d"),
    ("1 measure(s)", "1 measure"),
    ("AICc -31.25", f"AICc {MINUS}31.25"),
    ("C2S + 4.3 H -> C1.7-S-H4", "C2S + 4.3 H → C1.7-S-H4"),
    ("at 20 degC", "at 20 °C"),
    ("three 40 x 40 x 160 mm prisms", "three 40 × 40 × 160 mm prisms"),
    ("model two_component", "model two-component model (aluminate + silicate)"),
    # several keys in one text, each once (a label that holds a key is not read again)
    ("hyperbolic, then water_20 and sealed_20; not hyperbolic_x",
     "hyperbolic law, then water curing at 20 °C and sealed curing at 20 °C; not hyperbolic x"),
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


@pytest.mark.parametrize("text, expected", [
    # IUPAC, Nomenclature of Inorganic Chemistry (Red Book, 2005), IR-4: the number of atoms
    # as a right subscript; a multiplier of a hydrate's water stays on the line (from memory)
    ("SiO2, Al2O3+Fe2O3 and CaCO3.",
     "SiO<sub>2</sub>, Al<sub>2</sub>O<sub>3</sub>+Fe<sub>2</sub>O<sub>3</sub> and "
     "CaCO<sub>3</sub>."),
    ("CaSO4·2H2O, Ca(OH)2", "CaSO<sub>4</sub>·2H<sub>2</sub>O, Ca(OH)<sub>2</sub>"),
    # the cement chemist's notation sets its counts as subscripts too (Taylor, Cement
    # Chemistry, 2nd ed., 1.2, from memory)
    ("C2S + 4.3 H → C1.7-S-H4 (C3A, C4AF)",
     "C<sub>2</sub>S + 4.3 H → C<sub>1.7</sub>-S-H<sub>4</sub> (C<sub>3</sub>A, C<sub>4</sub>AF)"),
    # ids, classes and standards stay as written
    ("NC1, NH35, EB1, M1, Z1.1, B2, MX1, ASTM C270, C10/C10M, EN 1015-11, so3_max, MgO, LOI",
     "NC1, NH35, EB1, M1, Z1.1, B2, MX1, ASTM C270, C10/C10M, EN 1015-11, so3_max, MgO, LOI"),
])
def test_chemical_formulas_get_subscript_counts(text, expected):
    from specgen.report.wording import formulas
    assert formulas(text) == expected


@pytest.mark.parametrize("formula", ["SiO2", "Al2O3", "Fe2O3", "SO3", "K2O", "Na2O", "CO2",
                                     "CaCO3", "MgCO3", "CaSO4", "H2O", "Ca(OH)2", "Na2SO4",
                                     "CaCl2", "P2O5", "TiO2", "Mn2O3"])
def test_subscripts_are_the_atom_counts_a_reference_library_reads(formula):
    """Each subscript set is the count periodictable (a reference library) parses from the
    same formula: the digits made small are the right ones, and none is left on the line."""
    import periodictable

    from specgen.report.wording import formulas
    html = formulas(formula)
    counts: dict[str, int] = {}
    group = 1
    for m in re.finditer(r"(\()|\)(?:<sub>(\d+)</sub>)?|([A-Z][a-z]?)(?:<sub>(\d+)</sub>)?", html):
        if m.group(1):
            inner = html[m.end():html.index(")", m.end())]
            after = re.match(r"\)<sub>(\d+)</sub>", html[m.end() + len(inner):])
            group = int(after.group(1)) if after else 1
        elif m.group(0).startswith(")"):
            group = 1
        else:
            counts[m.group(3)] = counts.get(m.group(3), 0) + int(m.group(4) or 1) * group
    expected = {str(el): n for el, n in periodictable.formula(formula).atoms.items()}
    assert counts == expected
    assert not re.search(r"(?<![<\w])\d", re.sub(r"<sub>\d+</sub>", "", html))


def test_formulas_are_set_in_running_text_not_in_code_or_the_input_listing():
    import markdown
    page = ("Uncombined SiO2 and `SiO2` in code.\n\n| Oxide | Mass % |\n|---|---|\n"
            "| Al2O3 | 8.1 |\n\n<div class=\"sg-input-listing\">CaCO3</div>\n\n"
            "<img class=\"sg-math\" alt=\"CO2\" src=\"m.svg\">\n\nmin^½\n")
    html = markdown.markdown(page, extensions=["tables", "md_in_html", "specgen.report.mdtypo"])
    assert "Uncombined SiO<sub>2</sub>" in html and "<code>SiO2</code>" in html
    assert "<td>Al<sub>2</sub>O<sub>3</sub></td>" in html
    assert '<div class="sg-input-listing">CaCO3</div>' in html and 'alt="CO2"' in html
    assert "min<sup>½</sup>" in html


def test_binder_families_read_by_the_trades_names():
    """The EN 459-1 notations of the limes (NHL, FL, HL; from memory) and the cements by
    name: the one table a check and a chapter both read."""
    import typing

    from specgen.project.materials_schema import Binder
    from specgen.views import FAMILY_WORDS, family_words
    keys = typing.get_args(Binder.model_fields["type"].annotation)
    assert set(FAMILY_WORDS) == set(keys)           # every family of the schema has words
    assert family_words("nhl", "portland") == "natural hydraulic lime (NHL), Portland cement"
    assert "(FL)" in family_words("fl") and "(HL)" in family_words("hl")
    assert not any(k in re.findall(r"[\w]+", family_words(*keys)) for k in
                   ("nhl", "fl", "hl", "portland", "air_lime", "natural_cement"))


def test_band_names_never_run_into_each_other(monkeypatch):
    """The hydraulicity bands' names (content/data/hydraulicity_bands.yaml, Boynton's bands
    of the cementation index) each stay inside their band and clear of their neighbours."""
    from specgen import refdata
    from specgen.report import figures
    kept = {}
    monkeypatch.setattr(figures, "to_svg", lambda fig: kept.setdefault("fig", fig) and b"")
    bands = [{"name": b["name"], "low": b["lower"], "high": b["upper"]}
             for b in refdata.load("hydraulicity_bands").data]
    figures.band_chart.__wrapped__([("A", 1.17), ("B", 0.671)], bands, "cementation index")
    fig = kept["fig"]
    fig.canvas.draw()
    renderer = fig.canvas.get_renderer()
    ax = fig.axes[0]
    names = [t for t in ax.texts if t.get_text().replace("\n", " ") in
             {b["name"] for b in bands}]
    boxes = sorted((t.get_window_extent(renderer) for t in names), key=lambda b: b.x0)
    assert len(boxes) == len(bands)
    for left, right in zip(boxes, boxes[1:]):
        assert left.x1 <= right.x0, (left, right)
    figures._pyplot().close(fig)


@pytest.mark.parametrize("text, expected", [
    # SI Brochure, 9th ed., 5.4.3 and ISO 80000-1: value and unit symbol are one expression,
    # separated by a space that must not break a line (from memory); "%" likewise
    ("coverage 95 % of", f"coverage 95{S}% of"),
    ("at 28 d, 3.5 MPa", f"at 28{S}d, 3.5{S}MPa"),
    ("a 1.5 m wide lift", f"a 1.5{S}m wide lift"),
    ("20 °C and 4 m² of panel", f"20{S}°C and 4{S}m² of panel"),
    # not a unit: a word that starts like one, a year, a unit followed by more of a unit
    ("2 mice in 1850 the", "2 mice in 1850 the"),
    ("5 mm/s", "5 mm/s"),
])
def test_rendered_text_binds_a_number_to_its_unit(text, expected):
    from specgen.report.mdtypo import bind_units
    assert bind_units(text) == expected


def test_markdown_pages_bind_units_outside_code():
    import markdown
    html = markdown.markdown("Coverage 95 % at 28 d; `95 %` kept.",
                             extensions=["specgen.report.mdtypo"])
    assert f"95{S}% at 28{S}d" in html
    assert "<code>95 %</code>" in html
