"""What a reader sees of the checks' sources and numbers: words for every file, key and entry
(never a data path such as ``coats[0]`` or ``unit_prices[0].per``), and one displayed
precision for a quantity on every page (register, finding, calculation sheet)."""
from __future__ import annotations

import re

import pytest

from specgen.report.fmt import SYMBOL_PRECISION, UNIT_SPACE, qty, rounded
from specgen.report.wording import key_words, ordinal, plain, singular

#: the shapes of an internal data path: an entry by its index, a key path into a list, a
#: dotted path of keys, a file name
INTERNAL = {
    "index": re.compile(r"\w\[\d+\]"),
    "key into a list": re.compile(r"\.\w+\["),
    "dotted key path": re.compile(r"\b[a-z][a-z0-9_]+\.[a-z][a-z0-9_]+\b"),
    "file name": re.compile(r"\b[\w/-]+\.(?:ya?ml|csv|json)\b"),
}


@pytest.mark.parametrize("text, expected", [
    # the expectations are the reader's words the brief asks for ("never an internal
    # identifier"), written out by hand from the demo's own entries
    ("dossier.yaml Z2.coats[0]", "dossier data, Z2 first coat"),
    ("mixes.yaml M1.admixtures[0]; volume neglected", "mix designs, M1 first admixture; volume "
     "neglected"),
    ("materials.yaml mortar_properties M3.carbonation[1]",
     "materials data, mortar properties of M3, second carbonation depth reading"),
    ("specification.yaml unit_prices M2.per",
     "specification data, unit price of M2, quantity priced per"),
    ("specification.yaml unit_prices[2].per",
     "specification data, third unit price, quantity priced per"),
    ("specification.yaml hold_points HP3", "specification data, hold point HP3"),
    ("specification.yaml trial_panels[11]", "specification data, 12th trial panel"),
    ("materials.yaml binders NC1.firing.peak", "materials data, binder NC1, peak firing temperature"),
    ("materials.yaml mortar_properties M1.freeze_thaw (laboratory report)",
     "materials data, mortar properties of M1, freeze–thaw test (laboratory report)"),
    ("dossier.yaml requirements.min_compressive",
     "dossier data, required minimum compressive strength"),
    ("dossier.yaml durability.lowest_temperature", "dossier data, durability, lowest temperature"),
    # what read well before stays as it was
    ("materials.yaml EB1.compressive_strength", "materials data, EB1 compressive strength"),
    ("lab/strength.csv row 2", "lab strength results row 2"),
    ("materials.yaml M3.", "materials data, M3."),
])
def test_a_source_reads_as_words(text, expected):
    assert plain(text) == expected
    assert not any(p.search(plain(text)) for p in INTERNAL.values())


@pytest.mark.parametrize("n, expected", [
    # English ordinals: words to tenth, then figures with st/nd/rd/th, 11th-13th irregular
    # (from memory)
    (1, "first"), (3, "third"), (10, "tenth"), (11, "11th"), (12, "12th"), (13, "13th"),
    (21, "21st"), (22, "22nd"), (23, "23rd"), (111, "111th"),
])
def test_ordinals(n, expected):
    assert ordinal(n) == expected


@pytest.mark.parametrize("plural, one", [
    # English plurals of the lists' names (from memory)
    ("hold points", "hold point"), ("analyses", "analysis"), ("mixes", "mix"),
    ("properties", "property"), ("coats", "coat"), ("glass", "glass"), ("batches", "batch"),
])
def test_one_entry_of_a_list(plural, one):
    assert singular(plural) == one


def test_a_key_path_reads_key_by_key():
    assert key_words("coats[1]") == "second coat"
    assert key_words("unit_prices[0].per") == "first unit price, quantity priced per"
    assert key_words("placing_rate") == "placing rate"


def test_every_source_of_the_demo_reads_as_words(demo_checked):
    """Every input source of every check of the demo, as its sheet shows it, holds no data
    path: the brief's "never an internal identifier"."""
    _, results = demo_checked
    found = {}
    texts = 0
    for c in results.checks:
        for s in c.steps:
            for i in s.inputs:
                texts += 1
                shown = plain(i.source)
                for shape, pattern in INTERNAL.items():
                    if pattern.search(shown):
                        found.setdefault(f"{c.key} {i.symbol}", (shape, shown))
    assert texts > 400, texts   # the demo's checks cite several hundred inputs
    assert not found, found


@pytest.mark.parametrize("text, expected", [
    # a key already followed by the rest of its label is not labelled twice
    ("hyperbolic law chosen by AICc", "hyperbolic law chosen by AICc"),
    ("model hyperbolic", "model hyperbolic law"),
    # a range whose two ends are one number is that number; real ranges stay
    ("limits 100–100 %", "limits 100 %"), ("2.5–2.5 MPa", "2.5 MPa"),
    ("1–10 d", "1–10 d"), ("10–100 %", "10–100 %"), ("95–100 %", "95–100 %"),
])
def test_no_word_or_number_said_twice(text, expected):
    assert plain(text) == expected


def test_a_list_of_symbols_gets_each_its_subscript():
    # CIEDE2000's weighting functions S_L, S_C, S_H (Sharma, Wu & Dalal 2005), one per symbol
    from specgen.report.wording import symbol
    assert symbol("S_L, S_C, S_H") == "S<sub>L</sub>, S<sub>C</sub>, S<sub>H</sub>"
    assert symbol("V_m,min") == "V<sub>m,min</sub>"       # a comma inside one subscript stays


def test_a_negative_zero_reads_zero():
    # ISO 80000-1: a sign belongs to a non-zero number (from memory); CIEDE2000's R_T of a
    # pair with no blue hue rounds to −0.0 and reads 0
    from specgen.report.fmt import as_given
    assert as_given(-0.0) == "0" and as_given(-0.5) == "\u22120.5"


def test_a_kind_without_a_unit_keeps_its_precision_on_the_sheet():
    # ΔE00 to 0.01 on every page (SYMBOL_PRECISION, common practice): the sheet's four
    # figures give way to the kind's rule
    assert qty(6.3545, "", 4, "ΔE00") == "6.35"
    assert qty(6.3545, "", None, "ΔE00") == "6.35"
    assert rounded(6.3545, "ΔE00") == "6.35"
    # a kind not listed keeps the sheet's figures (fmt: enough to recompute by hand)
    assert qty(1.17883, "", 4, "x") == "1.179"


def _number_after(symbol: str, text: str) -> list[str]:
    """The numbers a message gives right after ``symbol`` (``CI = 1.172``, ``ΔE00 6.35``)."""
    return re.findall(r"(?<![\w])" + re.escape(symbol) + r"(?: =)? ([−-]?\d+(?:\.\d+)?)", text)


def test_register_message_and_sheet_read_the_same_number(demo_checked):
    """For every check of the demo whose message names a quantity of SYMBOL_PRECISION (the
    kinds no unit names) with its number, the number is the one its calculation sheet shows
    on that quantity's result line, and the register's value column shows the same when the
    check's value is that quantity.  Quantities with a unit (MPa, %) are not covered: a sheet
    keeps four figures of those to be recomputed by hand."""
    _, results = demo_checked
    compared, wrong = set(), []
    for c in results.checks:
        message = plain(c.message)
        sheet = {}
        for s in c.steps:
            if s.symbol in SYMBOL_PRECISION:
                sheet.setdefault(s.symbol, set()).add(qty(s.result, s.unit, 4, s.symbol))
        for sym, shown in sheet.items():
            for number in _number_after(sym, message):
                compared.add(c.code)
                if number.replace("-", "−") not in shown:
                    wrong.append((c.key, sym, number, sorted(shown)))
        kind = c.value_symbol
        if kind in SYMBOL_PRECISION:
            register = qty(c.value, c.unit, kind=kind).split(UNIT_SPACE)[0]
            if register not in sheet[kind]:
                wrong.append((c.key, "register", register, sorted(sheet[kind])))
    assert not wrong, wrong
    # the demo's checks that state such a quantity in their message (not a vacuous pass)
    assert compared >= {"COMP-COLOUR", "CHEM-CI", "CHEM-HI", "CHEM-LSF", "CHEM-RATIOS",
                        "COMP-MOVE", "COMP-GRAD"}, compared


def test_the_terminal_table_shows_the_colour_difference_as_the_dossier(demo_checked):
    """`specgen check`'s table (textreport) shows COMP-COLOUR/Z2/M2's value by the same rule
    as the register and its finding: ΔE00 to 0.01 (SYMBOL_PRECISION, common practice)."""
    from specgen.textreport import table
    _, results = demo_checked
    line = next(ln for ln in table(results, wide=True).splitlines()
                if ln.startswith("COMP-COLOUR") and " Z2/M2 " in ln)
    value = line.split("attention", 1)[1].split()[0]
    assert value == rounded(results.check("COMP-COLOUR", "Z2/M2").value, "ΔE00")
    assert re.fullmatch(r"\d+\.\d\d", value) and f"ΔE00 {value} between" in line
