"""EN 459-1 / ASTM C270 descriptive classes, pass/fail/hold and the later test age."""
import math

import pytest

from specgen import refdata
from specgen.science.strength_classes import (
    ClassInputError,
    accept,
    classes_from_table,
    compare_ranges,
    pooled_cv,
    strongest_minimum,
)
from specgen.science.strength_models import DAY

MPA = 1e6
TABLES = refdata.load("strength_classes").data
EN459 = classes_from_table(TABLES["en459_1"])      # EN 459-1 (from memory)
C270 = classes_from_table(TABLES["astm_c270"])     # ASTM C270 property specification
CANDIDATES = [a * DAY for a in TABLES["candidate_test_ages"]["age_days"]]   # common practice


def test_tables_convert_to_si():
    # converted inside the test (a table converted at import would not show a wrong
    # conversion to a test); 1 d = 86 400 s, 1 MPa = 1e6 Pa (SI definitions)
    day = 86400.0
    en459 = classes_from_table(TABLES["en459_1"])
    # EN 459-1 (from memory): class 2: 2-7, 3.5: 3.5-10, 5: 5-15 MPa at 28 d; class 5 also
    # at least 2 MPa at 7 d
    assert [(c.name, c.lower, c.upper, c.age, c.early_age, c.early_lower) for c in en459] == [
        ("NHL 2", 2e6, 7e6, 28 * day, None, None),
        ("NHL 3.5", 3.5e6, 10e6, 28 * day, None, None),
        ("NHL 5", 5e6, 15e6, 28 * day, 7 * day, 2e6)]
    # ASTM C270 property specification: M 2500, S 1800, N 750, O 350, K 75 psi at 28 d, no
    # upper limit (1 psi = 6894.757 Pa, NIST SP 811); the table rounds to 0.1 MPa
    psi = 6894.757
    c270 = classes_from_table(TABLES["astm_c270"])
    assert [c.name for c in c270] == ["M", "S", "N", "O", "K"]
    for c, p in zip(c270, (2500, 1800, 750, 350, 75)):
        assert c.lower == pytest.approx(p * psi, abs=0.06e6)
        assert (c.upper, c.age, c.early_age, c.early_lower) == (None, 28 * day, None, None)
    with pytest.raises(ClassInputError, match="malformed"):
        classes_from_table({"age_days": 28, "classes": [{"name": "X"}]})


@pytest.mark.parametrize("table, message", [
    ({"age_days": 28, "classes": [{"name": "X"}]},
     "strength class table is malformed: KeyError('lower_mpa')"),
    ({"classes": []}, "strength class table is malformed: KeyError('age_days')"),
    ({"age_days": "a month", "classes": []},
     "strength class table is malformed: ValueError(\"could not convert string to float: "
     "'a month'\")"),
    ({"age_days": 28, "classes": [{"name": "X", "lower_mpa": 1, "early": {"age_days": 7}}]},
     "strength class table is malformed: KeyError('lower_mpa')"),
])
def test_malformed_class_table_word_for_word(table, message):
    with pytest.raises(ClassInputError) as exc:
        classes_from_table(table)
    assert str(exc.value) == message


@pytest.mark.parametrize("f28, f7, expected", [
    # EN 459-1 ranges (from memory): 2-7, 3.5-10, 5-15 MPa; overlapping, so several may hold
    (1.5, None, ()),
    (2.0, None, ("NHL 2",)),                     # lower edge included
    (4.0, None, ("NHL 2", "NHL 3.5")),
    (6.0, 1.5, ("NHL 2", "NHL 3.5")),            # 7-d 1.5 MPa < 2 MPa: not NHL 5
    (6.0, 2.5, ("NHL 2", "NHL 3.5", "NHL 5")),
    (12.0, 3.0, ("NHL 5",)),
    (7.0, None, ("NHL 2", "NHL 3.5")),           # upper edge included (both edges, EN 459-1)
    (15.0, 2.0, ("NHL 5",)),                     # upper edge of class 5, 7-d minimum met
    (16.0, 5.0, ()),
])
def test_en459_ranges(f28, f7, expected):
    r = compare_ranges(f28 * MPA, EN459, standard="EN 459-1", source="x",
                       early_pa=None if f7 is None else f7 * MPA)
    assert r.matches == expected
    assert len(r.lines) == 3


def test_en459_class_5_without_seven_day_result_is_not_claimed():
    r = compare_ranges(6.0 * MPA, EN459, standard="EN 459-1", source="x")
    assert "NHL 5" not in r.matches
    assert "not checked (no result at that age)" in r.lines[2]


@pytest.mark.parametrize("f28, expected", [
    # ASTM C270 minimums at 28 d: M 17.2, S 12.4, N 5.2, O 2.4, K 0.5 MPa
    (0.3, ()), (0.5, ("K",)), (3.0, ("O",)), (5.2, ("N",)), (13.0, ("S",)), (20.0, ("M",)),
])
def test_c270_strongest_type_met(f28, expected):
    assert strongest_minimum(f28 * MPA, C270, standard="ASTM C270", source="x").matches == expected


@pytest.mark.parametrize("value, lower, upper, limit, kind, status", [
    (5.0, 4.0, 6.0, 3.5, "min", "pass"),
    (5.0, 4.0, 6.0, 4.0, "min", "pass"),     # lower edge on the limit clears it
    (3.0, 2.5, 3.4, 3.5, "min", "fail"),
    (3.6, 3.0, 4.2, 3.5, "min", "hold"),
    (5.0, 4.0, 6.0, 7.0, "max", "pass"),
    (8.0, 7.5, 9.0, 7.0, "max", "fail"),
    (6.8, 6.0, 7.6, 7.0, "max", "hold"),
])
def test_accept(value, lower, upper, limit, kind, status):
    assert accept(value * MPA, lower * MPA, upper * MPA, limit * MPA, kind) == status


@pytest.mark.parametrize("args, words", [
    ((5e6, 6e6, 7e6, 4e6, "min"), "must contain the value"),
    ((5e6, 4e6, 6e6, float("nan"), "min"), "finite"),
    ((5e6, 4e6, 6e6, 4e6, "between"), "'min' or 'max'"),
])
def test_accept_bad_input(args, words):
    with pytest.raises(ClassInputError, match=words):
        accept(*args)


def test_pooled_cv():
    # By hand: sqrt((2*0.04² + 2*0.06²) / 4) = sqrt(0.0026) = 0.05099
    assert pooled_cv([0.04, 0.06, 0.0], [3, 3, 1]) == pytest.approx(0.050990, abs=1e-6)
    with pytest.raises(ClassInputError):
        pooled_cv([0.0], [1])


def test_comparison_lines_word_for_word():
    # EN 459-1 ranges (from memory) at 4 MPa: NHL 2 (2-7) within, NHL 3.5 (3.5-10) within,
    # NHL 5 (5-15, and >= 2 MPa at 7 d) outside
    cmp_ = compare_ranges(4e6, EN459, standard="EN 459-1", source="table")
    assert (cmp_.standard, cmp_.source) == ("EN 459-1", "table")
    assert cmp_.lines[:2] == ("NHL 2: 2 MPa to 7 MPa at 28 d -> within",
                              "NHL 3.5: 3.5 MPa to 10 MPa at 28 d -> within")
    assert "NHL 5: 5 MPa to 15 MPa at 28 d -> outside" in cmp_.lines
    # at 6 MPa with a 7-d result of 1.5 MPa: NHL 5 is in range but its 7-d minimum is not met
    early = compare_ranges(6e6, EN459, standard="EN 459-1", source="t", early_pa=1.5e6)
    assert "NHL 5: 5 MPa to 15 MPa at 28 d -> within; 7-d 1.5 MPa is below 2 MPa" in early.lines
    assert "NHL 5" not in early.matches
    met = compare_ranges(6e6, EN459, standard="EN 459-1", source="t", early_pa=2.0e6)
    assert "NHL 5: 5 MPa to 15 MPa at 28 d -> within; 7-d 2 MPa meets 2 MPa" in met.lines
    assert "NHL 5" in met.matches                       # the 7-d minimum is inclusive
    none = compare_ranges(6e6, EN459, standard="EN 459-1", source="t")
    assert ("NHL 5: 5 MPa to 15 MPa at 28 d -> within; the 7-d minimum 2 MPa is not checked "
            "(no result at that age)") in none.lines
    # ASTM C270 (property specification, as quoted in the DOMAIN primer: N 5.2 MPa, S 12.4):
    # 5.2 MPa meets N exactly (the minimum is inclusive), not S
    c270 = strongest_minimum(5.2e6, C270, standard="ASTM C270", source="s")
    assert c270.matches == ("N",)
    assert "S: min 12.4 MPa at 28 d -> not met" in c270.lines
    assert "N: min 5.2 MPa at 28 d -> met" in c270.lines
    assert strongest_minimum(0.4e6, C270, standard="ASTM C270", source="s").matches == ()
    assert (c270.standard, c270.source) == ("ASTM C270", "s")


def test_open_ended_class_reads_as_a_minimum():
    # a class with no upper bound (EN 998-2 style, the number is the least mean strength)
    from specgen.science.strength_classes import StrengthClass
    m5 = StrengthClass("M5", 5e6, None, 28 * 86400.0)
    cmp_ = compare_ranges(6e6, (m5,), standard="EN 998-2", source="t")
    assert cmp_.matches == ("M5",)
    assert cmp_.lines == ("M5: >= 5 MPa at 28 d -> within",)


def test_small_positive_strength_accepted_infinite_refused():
    # 1 Pa is a positive strength (no class met); infinity is not a number of Pa
    assert compare_ranges(1.0, EN459, standard="x", source="y").matches == ()
    assert strongest_minimum(1.0, C270, standard="x", source="y").matches == ()
    with pytest.raises(ClassInputError) as exc:
        compare_ranges(float("inf"), EN459, standard="x", source="y")
    assert str(exc.value) == "strength must be a positive number of Pa; got inf"


@pytest.mark.parametrize("value, lower, upper, limit, kind, status", [
    # band edges exactly on the limit (rule in the docstring): min passes at lower == limit,
    # max passes at upper == limit; fails only strictly beyond
    (3.0, 2.0, 4.0, 2.0, "min", "pass"),
    (3.0, 2.0, 4.0, 4.0, "min", "hold"),
    (3.0, 2.0, 4.0, 4.0000001, "min", "fail"),
    (3.0, 2.0, 4.0, 4.0, "max", "pass"),
    (3.0, 2.0, 4.0, 2.0, "max", "hold"),
    (3.0, 2.0, 4.0, 1.9999999, "max", "fail"),
    (3.0, 3.0, 3.0, 3.0, "min", "pass"),      # a zero-width band on the limit
])
def test_accept_at_the_edges(value, lower, upper, limit, kind, status):
    assert accept(value, lower, upper, limit, kind) == status


@pytest.mark.parametrize("call, message", [
    (lambda: accept(3.0, 3.5, 4.0, 2.0, "min"),
     "the band [3.5, 4] Pa must contain the value 3"),
    (lambda: accept(3.0, 2.0, 4.0, 2.0, "mean"), "limit kind must be 'min' or 'max'; got 'mean'"),
    (lambda: accept(float("nan"), 2.0, 4.0, 2.0, "min"),
     "value, band and limit must be finite numbers; got (nan, 2.0, 4.0, 2.0)"),
    (lambda: compare_ranges(0.0, EN459, standard="x", source="y"),
     "strength must be a positive number of Pa; got 0.0"),
    (lambda: strongest_minimum(-1.0, C270, standard="x", source="y"),
     "strength must be a positive number of Pa; got -1.0"),
    (lambda: pooled_cv([0.05], [1]), "pooled CV needs at least one group with two or more results"),
    (lambda: pooled_cv([0.05, 0.04], [3]),
     "pooled CV needs at least one group with two or more results"),
])
def test_class_refusals_word_for_word(call, message):
    with pytest.raises(ClassInputError) as exc:
        call()
    assert str(exc.value) == message


def test_pooled_cv_by_hand():
    # sqrt(((3-1) 0.05² + (4-1) 0.08² + (1-1) 0.5²) / (2 + 3)) = sqrt((0.005 + 0.0192)/5)
    # = sqrt(0.00484) = 0.069570; the single-result group (n = 1) carries no weight
    assert pooled_cv([0.05, 0.08, 0.5], [3, 4, 1]) == pytest.approx(0.069570, abs=1e-6)
    assert pooled_cv([0.05, 0.08], [2, 2]) == pytest.approx(math.sqrt((0.0025 + 0.0064) / 2),
                                                            rel=1e-12)
