"""Oxide analyses: closure, lumped oxides, loss-free basis, indices and bands."""
import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from specgen import refdata
from specgen.science.oxides import (
    ABOVE_TABLE, BELOW_TABLE, ChemistryInputError, alumina_ratio, cementation_index, classify,
    closure, hydraulic_index, lime_saturation_factor, loss_free, loss_on_ignition,
    silica_ratio, split_lumped)

BANDS = refdata.load("hydraulicity_bands")
MARGIN = BANDS.extra["borderline_margin"]

# Published analyses of cement rock: "Report of the tests of metals and other materials
# for industrial purposes ... Watertown Arsenal" (tests of 1900, Washington, 1902),
# p. 474, table "Chemical analyses of cement rock".  Columns: silica, oxide of iron,
# alumina, lime, magnesia, sulphur trioxide, humus and water, carbon dioxide.
# "Humus and water" is entered as H2O (a loss on ignition).
DARK_CEMENT_ROCK = {"SiO2": 22.69, "Fe2O3": 3.28, "Al2O3": 5.52, "CaO": 20.90, "MgO": 13.75,
                    "SO3": 0.96, "H2O": 7.20, "CO2": 25.70}  # row 3, rock of a natural-cement works
PORTLAND_CEMENT_ROCK = {"SiO2": 23.20, "Fe2O3": 2.00, "Al2O3": 6.52, "CaO": 34.20, "MgO": 1.90,
                        "SO3": 0.20, "H2O": 13.63, "CO2": 18.40}  # row 1, rock of a Portland works

# Synthetic marl, 75 % CaCO3 + 25 % kaolinite, oxides derived by hand from IUPAC abridged
# atomic weights (Ca 40.078, C 12.011, O 15.999, Al 26.982, Si 28.085, H 1.008):
#   M(CaCO3) = 100.086, M(CaO) = 56.077  -> CaO = 75 * 56.077/100.086 = 42.0216, CO2 = 32.9784
#   M(Al2Si2O5(OH)4) = 258.157; M(Al2O3) = 101.961, M(SiO2) = 60.083, M(H2O) = 18.015
#   Al2O3 = 25 * 101.961/258.157 = 9.8739; SiO2 = 25 * 120.166/258.157 = 11.6369;
#   H2O = 25 * 36.030/258.157 = 3.4892;  LOI = 32.9784 + 3.4892 = 36.4676
MARL = {"CaO": 42.0216, "SiO2": 11.6369, "Al2O3": 9.8739, "CO2": 32.9784, "H2O": 3.4892}


def test_closure_of_published_analyses():
    # Watertown table p. 474: row 3 sums to 100.00, row 1 to 100.05 (hand sums).
    assert closure(DARK_CEMENT_ROCK).deviation == pytest.approx(0.00, abs=1e-9)
    assert closure(PORTLAND_CEMENT_ROCK).deviation == pytest.approx(0.05, abs=1e-9)


def test_closure_counts_loi_once_when_parts_reported():
    ox = {"CaO": 56.0, "SiO2": 4.0, "LOI": 40.0, "CO2": 38.0}
    assert closure(ox).total == pytest.approx(100.0)


@pytest.mark.parametrize("ox, ci, hi", [
    # Watertown p. 474 row 3, by hand: CI = (2.8*22.69 + 1.1*5.52 + 0.7*3.28)/(20.90 + 1.4*13.75)
    #   = (63.532 + 6.072 + 2.296)/(20.90 + 19.25) = 71.900/40.150 = 1.79078
    #   HI (Vicat) = (22.69 + 5.52 + 3.28)/(20.90 + 13.75) = 31.49/34.65 = 0.90880
    (DARK_CEMENT_ROCK, 1.79078, 0.90880),
    # Watertown p. 474 row 1: CI = (64.960 + 7.172 + 1.400)/(34.20 + 2.66) = 73.532/36.86 = 1.99490
    #   HI = (23.20 + 6.52 + 2.00)/(34.20 + 1.90) = 31.72/36.10 = 0.87867
    (PORTLAND_CEMENT_ROCK, 1.99490, 0.87867),
])
def test_indices_of_published_cement_rock(ox, ci, hi):
    assert cementation_index(ox) == pytest.approx(ci, abs=5e-5)
    assert hydraulic_index(ox) == pytest.approx(hi, abs=5e-5)


def test_published_cement_rock_lies_above_eckel_table():
    # CI 1.791 is above the natural-cement band 1.1-1.7 (Eckel via Boynton, from memory),
    # 0.09 from the edge: not borderline.
    result = classify(cementation_index(DARK_CEMENT_ROCK), BANDS.data, MARGIN)
    assert (result.name, result.in_table, result.borderline) == (ABOVE_TABLE, False, False)
    assert result.lower == 1.7 and result.upper is None


def test_synthetic_marl_indices_by_hand():
    # Hand values (see MARL above):
    #   CI  = (2.8*11.6369 + 1.1*9.8739)/42.0216 = (32.5833 + 10.8613)/42.0216 = 1.03386
    #   HI  = (11.6369 + 9.8739)/42.0216 = 0.51190
    #   LSF = 42.0216/(2.8*11.6369 + 1.18*9.8739) = 42.0216/44.2345 = 0.94997
    #   SR  = 11.6369/9.8739 = 1.17855
    assert cementation_index(MARL) == pytest.approx(1.03386, abs=5e-5)
    assert hydraulic_index(MARL) == pytest.approx(0.51190, abs=5e-5)
    assert lime_saturation_factor(MARL) == pytest.approx(0.94997, abs=5e-5)
    assert silica_ratio(MARL) == pytest.approx(1.17855, abs=5e-5)
    assert loss_on_ignition(MARL) == pytest.approx(36.4676, abs=1e-4)


def test_synthetic_marl_fired_basis_by_hand():
    # factor = 100/(100 - 36.4676) = 1.574000; CaO 42.0216*1.574 = 66.142,
    # SiO2 11.6369*1.574 = 18.316, Al2O3 9.8739*1.574 = 15.542; loss constituents dropped.
    fired = loss_free(MARL)
    assert set(fired) == {"CaO", "SiO2", "Al2O3"}
    assert fired["CaO"] == pytest.approx(66.142, abs=2e-3)
    assert fired["SiO2"] == pytest.approx(18.316, abs=2e-3)
    assert fired["Al2O3"] == pytest.approx(15.542, abs=2e-3)
    assert sum(fired.values()) == pytest.approx(100.0, abs=1e-3)


def test_synthetic_marl_class():
    # CI 1.034 lies in 0.7-1.1 eminently hydraulic (Eckel via Boynton, from memory);
    # 1.1 - 1.034 = 0.066 > 0.05: not borderline.
    result = classify(cementation_index(MARL), BANDS.data, MARGIN)
    assert result.name == "eminently hydraulic lime"
    assert (result.lower, result.upper) == (0.7, 1.1)
    assert (result.borderline, result.neighbour) == (False, None)


@pytest.mark.parametrize("value, name, neighbour", [
    (1.08, "eminently hydraulic lime", "natural cement"),   # 0.02 below the 1.1 edge
    (1.12, "natural cement", "eminently hydraulic lime"),   # 0.02 above it
    (0.27, BELOW_TABLE, "feebly hydraulic lime"),           # 0.03 below the table
    (1.74, ABOVE_TABLE, "natural cement"),
])
def test_borderline_names_the_class_across_the_edge(value, name, neighbour):
    # Margin 0.05 is the project requirement stored with the band table.
    result = classify(value, BANDS.data, MARGIN)
    assert (result.name, result.borderline, result.neighbour) == (name, True, neighbour)


def test_band_edge_belongs_to_upper_band():
    assert classify(0.5, BANDS.data, MARGIN).name == "moderately hydraulic lime"


def test_bad_band_table_refused():
    gap = [{"name": "a", "lower": 0.3, "upper": 0.5}, {"name": "b", "lower": 0.6, "upper": 0.7}]
    with pytest.raises(ChemistryInputError, match="without gaps"):
        classify(0.4, gap, MARGIN)


def test_lumped_oxide_split_states_assumption():
    ox = {"CaO": 50.0, "SiO2": 15.0, "Al2O3+Fe2O3": 10.0, "LOI": 25.0}
    result = split_lumped(ox, {"Al2O3+Fe2O3": {"Al2O3": 0.6, "Fe2O3": 0.4}})
    assert result.analysis["Al2O3"] == pytest.approx(6.0)
    assert result.analysis["Fe2O3"] == pytest.approx(4.0)
    assert "Al2O3+Fe2O3" not in result.analysis
    assert result.assumptions == ("Al2O3+Fe2O3 = 10.00 % reported together; "
                                  "split assumed as 60 % Al2O3, 40 % Fe2O3",)
    assert closure(result.analysis).total == pytest.approx(closure(ox).total)


@pytest.mark.parametrize("ox, message", [
    ({"CaO": 50.0, "SiO2": -1.0}, "SiO2 must not be negative"),
    ({"SiO2": 20.0, "Al2O3": 5.0}, "lacks CaO"),
    ({"CaO": 50.0, "Al2O3": 5.0}, "lacks SiO2"),
    ({"CaO": 30.0, "SiO2": 10.0, "LOI": 55.0}, "loss on ignition 55.00 % exceeds 50 %"),
    ({"CaO": 50.0, "SiO2": 15.0, "Al2O3+Fe2O3": 8.0}, "lumped oxide"),
    ({"CaO": float("nan"), "SiO2": 15.0}, "CaO must be a finite number"),
])
def test_bad_analyses_raise_clear_errors(ox, message):
    for index in (cementation_index, hydraulic_index, lime_saturation_factor, silica_ratio):
        with pytest.raises(ChemistryInputError, match=message):
            index(ox)


def test_errors_are_value_errors_and_zero_denominators_refused():
    assert issubclass(ChemistryInputError, ValueError)
    with pytest.raises(ChemistryInputError, match="Fe2O3 above zero"):
        alumina_ratio(MARL)  # no iron in the synthetic marl: A/F undefined, never inf/NaN
    with pytest.raises(ChemistryInputError, match="CaO or MgO above zero"):
        cementation_index({"CaO": 0.0, "SiO2": 20.0})


@pytest.mark.parametrize("splits, message", [
    ({}, "no split fraction is declared"),
    ({"Al2O3+Fe2O3": {"Al2O3": 0.5, "Fe2O3": 0.4}}, "sum to 1"),
    ({"Al2O3+Fe2O3": {"Al2O3": 0.5, "MnO": 0.5}}, "expected"),
])
def test_bad_splits_refused(splits, message):
    with pytest.raises(ChemistryInputError, match=message):
        split_lumped({"CaO": 50.0, "SiO2": 15.0, "Al2O3+Fe2O3": 8.0}, splits)


analyses = st.fixed_dictionaries({
    "CaO": st.floats(5, 60), "SiO2": st.floats(1, 30), "Al2O3": st.floats(0.5, 15),
    "Fe2O3": st.floats(0.5, 10), "MgO": st.floats(0, 20), "SO3": st.floats(0, 3),
    "LOI": st.floats(0, 45)})


@settings(max_examples=150, deadline=None)
@given(analyses)
def test_indices_unchanged_by_renormalisation(ox):
    # A ratio of oxides is invariant under a common factor (DOMAIN primer, section 2).
    fired = loss_free(ox)
    for index in (cementation_index, hydraulic_index, lime_saturation_factor, silica_ratio,
                  alumina_ratio):
        value = index(ox)
        assert math.isfinite(value)
        assert index(fired) == pytest.approx(value, rel=1e-9)


# --- combined water, LSF, band edges, lumped splits: by hand, whole results --------------
from specgen.science.oxides import BandClass, combined_water  # noqa: E402


@pytest.mark.parametrize("ox, water", [
    # reported H2O (H2O+) is taken as it is
    ({"CaO": 50.0, "SiO2": 20.0, "LOI": 20.0, "H2O": 3.1, "CO2": 15.0}, 3.1),
    # by hand: LOI 20 − (CO2 15 + moisture 1.0 + organic 0.5) = 3.5
    ({"CaO": 50.0, "SiO2": 20.0, "LOI": 20.0, "CO2": 15.0, "H2O-": 1.0, "organic": 0.5}, 3.5),
    # by hand: no LOI reported, CO2 alone: the loss is the CO2, no combined water left
    ({"CaO": 50.0, "SiO2": 20.0, "CO2": 15.0}, 0.0),
    ({"CaO": 50.0, "SiO2": 20.0, "LOI": 20.0}, 20.0),
])
def test_combined_water_by_hand(ox, water):
    assert combined_water(ox) == pytest.approx(water, abs=1e-12)


def test_lime_saturation_factor_by_hand():
    # Taylor, Cement Chemistry (from memory): LSF = (C − 0.7 S̄)/(2.8 S + 1.18 A + 0.65 F);
    # (65 − 1.75)/(58.8 + 6.49 + 1.95) = 63.25/67.24 = 0.940660
    ox = {"CaO": 65.0, "SiO2": 21.0, "Al2O3": 5.5, "Fe2O3": 3.0, "SO3": 2.5}
    assert lime_saturation_factor(ox) == pytest.approx(0.940660, abs=1e-6)
    # a small denominator is still a denominator: 50/(2.8 × 0.2) = 89.2857
    assert lime_saturation_factor({"CaO": 50.0, "SiO2": 0.2}) == pytest.approx(89.2857, abs=1e-4)
    with pytest.raises(ChemistryInputError) as exc:
        lime_saturation_factor({"CaO": 50.0, "SiO2": 0.0})
    assert str(exc.value) == "lime saturation factor needs SiO2, Al2O3 or Fe2O3 above zero"
    with pytest.raises(ChemistryInputError) as exc:
        alumina_ratio({"CaO": 50.0, "SiO2": 20.0, "Al2O3": 5.0})
    assert str(exc.value) == "alumina ratio needs Fe2O3 above zero"


def test_closure_needs_no_particular_oxide():
    # a sand analysis without lime closes too: 95 + 4 = 99 %, 1 % short
    c = closure({"SiO2": 95.0, "LOI": 4.0})
    assert (c.total, c.deviation) == pytest.approx((99.0, -1.0))


# bands written out here (limits invented for the test): [0.3, 0.5) feeble, [0.5, 0.7) moderate
TWO = [{"name": "feeble", "lower": 0.3, "upper": 0.5},
       {"name": "moderate", "lower": 0.5, "upper": 0.7}]


@pytest.mark.parametrize("value, margin, expected", [
    (0.1, 0.0, BandClass(BELOW_TABLE, None, 0.3, False, None, False)),
    (0.3, 0.0, BandClass("feeble", 0.3, 0.5, True, BELOW_TABLE, True)),   # lower edge included
    (0.4, 0.0, BandClass("feeble", 0.3, 0.5, False, None, True)),
    (0.5, 0.0, BandClass("moderate", 0.5, 0.7, True, "feeble", True)),    # on the edge itself
    (0.6, 0.0, BandClass("moderate", 0.5, 0.7, False, None, True)),
    (0.7, 0.0, BandClass(ABOVE_TABLE, 0.7, None, True, "moderate", False)),
    (0.48, 0.05, BandClass("feeble", 0.3, 0.5, True, "moderate", True)),
    (0.9, 0.05, BandClass(ABOVE_TABLE, 0.7, None, False, None, False)),
])
def test_classify_whole_at_and_between_the_edges(value, margin, expected):
    assert classify(value, TWO, margin) == expected


@pytest.mark.parametrize("bands, value, message", [
    (TWO, math.nan, "cannot classify a non-finite index nan"),
    ([{"name": "feeble", "lower": 0.3}], 0.4, "a band needs name, lower and upper: 'upper'"),
    ([], 0.4, "the band table is empty"),
    ([{"name": "flat", "lower": 0.3, "upper": 0.3}], 0.3,
     "bands must ascend without gaps: 'flat' 0.3-0.3 then '' from inf"),
])
def test_classify_refusals_whole(bands, value, message):
    with pytest.raises(ChemistryInputError) as exc:
        classify(value, bands, 0.0)
    assert str(exc.value) == message


SPLIT = {"Al2O3+Fe2O3": {"Al2O3": 0.6, "Fe2O3": 0.4}}


def test_split_adds_to_a_separately_reported_part_by_hand():
    # 10 % lumped, 60/40: Al2O3 1.0 reported + 6.0 = 7.0, Fe2O3 4.0
    r = split_lumped({"CaO": 50.0, "Al2O3": 1.0, "Al2O3+Fe2O3": 10.0}, SPLIT)
    assert r.analysis == pytest.approx({"CaO": 50.0, "Al2O3": 7.0, "Fe2O3": 4.0})
    # nothing lumped (0 %) and half a percent are values too; a zero share is a share
    assert split_lumped({"Al2O3+Fe2O3": 0.0}, SPLIT).analysis == {"Al2O3": 0.0, "Fe2O3": 0.0}
    assert split_lumped({"Al2O3+Fe2O3": 0.5}, SPLIT).analysis == pytest.approx(
        {"Al2O3": 0.3, "Fe2O3": 0.2})
    only_a = {"Al2O3+Fe2O3": {"Al2O3": 1.0, "Fe2O3": 0.0}}
    assert split_lumped({"Al2O3+Fe2O3": 5.0}, only_a).analysis == {"Al2O3": 5.0, "Fe2O3": 0.0}


@pytest.mark.parametrize("value, split, message", [
    (-1.0, SPLIT, "Al2O3+Fe2O3 must be a finite, non-negative mass %, got -1.0"),
    (math.inf, SPLIT, "Al2O3+Fe2O3 must be a finite, non-negative mass %, got inf"),
    (5.0, {"Al2O3+Fe2O3": {"Al2O3": 0.6, "MgO": 0.4}},
     "the split for 'Al2O3+Fe2O3' names ['Al2O3', 'MgO'], expected ['Al2O3', 'Fe2O3']"),
    (5.0, {"Al2O3+Fe2O3": {"Al2O3": 1.2, "Fe2O3": -0.2}},
     "the split fractions for 'Al2O3+Fe2O3' must be >= 0 and sum to 1"),
    (5.0, {"Al2O3+Fe2O3": {"Al2O3": math.nan, "Fe2O3": 0.4}},
     "the split fractions for 'Al2O3+Fe2O3' must be >= 0 and sum to 1"),
])
def test_split_refusals_whole(value, split, message):
    with pytest.raises(ChemistryInputError) as exc:
        split_lumped({"Al2O3+Fe2O3": value}, split)
    assert str(exc.value) == message
