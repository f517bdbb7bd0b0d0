"""A firing record against the kiln stages: the stage edges, the whole findings, the refusals.

Stage temperatures (content/data/kiln_stages.yaml, common practice): clay dehydroxylation
500-650 C, calcite decomposition 800-900 C, usual natural-cement firing 750-1100 C,
sintering from 1250 C.  Kelvin = Celsius + 273.15 exactly (definition of the Celsius scale).
The words of each stage rule are ours: "below" a stage is under its lower edge, "within"
is from the lower edge up to (not including) the upper edge, "at or above" includes the edge.
The tables are converted inside each test, so that a wrong conversion fails a test.
"""
from __future__ import annotations

import math

import pytest

from specgen import refdata
from specgen.science.kiln import FiringFinding, check_firing, stages_to_kelvin
from specgen.science.oxides import ChemistryInputError

K0 = 273.15  # K at 0 C, definition of the Celsius scale


def _stages():
    return stages_to_kelvin(refdata.load("kiln_stages").data)


def test_stage_table_converted_to_kelvin_by_hand():
    # the table in C (common practice), plus 273.15 by hand
    assert _stages() == {
        "dehydroxylation": (773.15, 923.15),          # 500, 650 C
        "calcite_decomposition": (1073.15, 1173.15),  # 800, 900 C
        "natural_cement_firing": (1023.15, 1373.15),  # 750, 1100 C
        "sintering": (1523.15, 1723.15),              # 1250, 1450 C
    }


def test_stage_row_without_an_edge_is_refused_with_the_field():
    with pytest.raises(ChemistryInputError) as exc:
        stages_to_kelvin([{"key": "sintering", "lower_C": 1250}])
    assert str(exc.value) == "a kiln stage needs key, lower_C, upper_C: 'upper_C'"


def test_stage_table_lacking_two_stages_names_both():
    stages = {k: v for k, v in _stages().items() if k not in ("dehydroxylation", "sintering")}
    with pytest.raises(ChemistryInputError) as exc:
        check_firing(stages, peak=1200.0)
    assert str(exc.value) == "the kiln stage table lacks dehydroxylation, sintering"


CLAY = "peak below clay dehydroxylation: the clay stays inert"
CALCITE = "peak below calcite decomposition: expect carbonate to remain"
PARTLY = ("peak within the calcite decomposition range: residual carbonate likely unless "
          "held long enough")
SINTER = ("peak at or above the sintering limit: melt and alite may form, no longer an "
          "unsintered binder")
USUAL = ("peak above the usual natural-cement firing range (best strengths are found at its "
         "low end)")


@pytest.mark.parametrize("peak_c, finding", [
    (499.0, ("firing.clay_not_activated", CLAY, (500, 650))),
    (500.0, ("firing.calcite_not_decomposed", CALCITE, (800, 900))),  # at the lower edge: begun
    (600.0, ("firing.calcite_not_decomposed", CALCITE, (800, 900))),  # inside dehydroxylation
    (800.0, ("firing.calcite_partly_decomposed", PARTLY, (800, 900))),  # at the onset: within
    (899.0, ("firing.calcite_partly_decomposed", PARTLY, (800, 900))),
    (900.0, None),                                  # the end of decomposition: complete
    (1100.0, None),                                 # the top of the usual range: inside it
    (1101.0, ("firing.above_usual_range", USUAL, (750, 1100))),
    (1249.0, ("firing.above_usual_range", USUAL, (750, 1100))),
    (1250.0, ("firing.sintering_reached", SINTER, (1250, 1450))),   # at the limit: reached
])
def test_peak_findings_at_and_beside_each_stage_edge(peak_c, finding):
    peak = peak_c + K0
    expected = [] if finding is None else [
        FiringFinding(finding[0], finding[1], (peak, finding[2][0] + K0, finding[2][1] + K0))]
    assert check_firing(_stages(), peak=peak) == expected


def test_without_a_usual_range_only_the_stages_speak():
    # the usual natural-cement range is an optional row: without it a peak of 1200 C (past
    # decomposition, short of sintering) gives nothing to note
    stages = {k: v for k, v in _stages().items() if k != "natural_cement_firing"}
    assert check_firing(stages, peak=1200.0 + K0) == []


def test_any_positive_kelvin_peak_is_read_and_zero_refused():
    # 1 K is absurd for a kiln but a valid temperature: it reads as below dehydroxylation
    assert [f.key for f in check_firing(_stages(), peak=1.0)] == ["firing.clay_not_activated"]
    for bad in (0.0, -5.0, math.nan, math.inf):
        with pytest.raises(ChemistryInputError) as exc:
            check_firing(_stages(), peak=bad)
        assert str(exc.value) == f"peak temperature must be a positive kelvin value, got {bad!r}"
    with pytest.raises(ChemistryInputError) as exc:
        check_firing(_stages())
    assert str(exc.value) == "a firing record needs a peak temperature or a series"


NO_SOAK = FiringFinding("firing.no_soak", "the series never holds above the calcite "
                        "decomposition onset between two readings", (800 + K0,))


def test_stated_peak_is_kept_beside_the_series_findings():
    # series maximum 1200 K (926.85 C), stated peak 1400 K (1126.85 C, above 1100 C): the
    # stated peak is judged, and the disagreement and the missing soak are both reported
    series = [(0.0, 300.0), (3600.0, 1200.0), (7200.0, 400.0)]
    assert check_firing(_stages(), peak=1400.0, series=series) == [
        FiringFinding("firing.above_usual_range", USUAL, (1400.0, 750 + K0, 1100 + K0)),
        FiringFinding("firing.peak_disagrees",
                      "the stated peak differs from the series maximum", (1400.0, 1200.0)),
        NO_SOAK,
    ]


def test_peak_equal_to_the_series_maximum_agrees_and_half_a_kelvin_does_not():
    series = [(0.0, 300.0), (3600.0, 1200.0), (7200.0, 1200.0), (10800.0, 400.0)]
    assert check_firing(_stages(), peak=1200.0, series=series) == []
    assert check_firing(_stages(), peak=1200.5, series=series) == [FiringFinding(
        "firing.peak_disagrees", "the stated peak differs from the series maximum",
        (1200.5, 1200.0))]


PARTLY_AT_ONSET = FiringFinding("firing.calcite_partly_decomposed", PARTLY,
                                (800 + K0, 800 + K0, 900 + K0))


@pytest.mark.parametrize("series, peak_findings, soaked", [
    # held in the last interval only (between the 2nd and 3rd readings, both at 1200 K)
    ([(0.0, 300.0), (3600.0, 1200.0), (7200.0, 1200.0)], [], True),
    # held at 850 C (inside 800-900 C) and only touching 926.85 C once: the hold counts from
    # the onset of decomposition (800 C), not from its end
    ([(0.0, 300.0), (3600.0, 850 + K0), (7200.0, 850 + K0), (10800.0, 1200.0),
      (14400.0, 400.0)], [], True),
    # held exactly at the onset (800 C): at the onset counts as held
    ([(0.0, 300.0), (3600.0, 800 + K0), (7200.0, 800 + K0), (10800.0, 400.0)],
     [PARTLY_AT_ONSET], True),
    # touching exactly the onset once: reached, not held
    ([(0.0, 300.0), (3600.0, 800 + K0), (7200.0, 400.0)], [PARTLY_AT_ONSET], False),
    # times measured from the peak (negative before it): a hold of 7200 s across zero
    ([(-7200.0, 300.0), (-3600.0, 1200.0), (3600.0, 1200.0), (7200.0, 400.0)], [], True),
])
def test_soak_above_the_onset_of_decomposition(series, peak_findings, soaked):
    # the peak (the series maximum) is judged first, then the series
    findings = check_firing(_stages(), series=series)
    assert findings == peak_findings + ([] if soaked else [NO_SOAK])


@pytest.mark.parametrize("series", [
    [(0.0, 300.0), (3600.0, 0.0)],                # 0 K
    [(0.0, 300.0), (3600.0, -10.0)],              # below absolute zero
    [(0.0, 300.0), (math.nan, 900.0)],            # a time not a number, temperatures fine
    [(0.0, 300.0), (3600.0, math.inf)],
])
def test_series_refused_with_the_whole_message(series):
    with pytest.raises(ChemistryInputError) as exc:
        check_firing(_stages(), series=series)
    assert str(exc.value) == "a firing series needs finite times and positive kelvin values"


def test_series_of_one_kelvin_readings_is_read():
    # positive however low: 1 K readings are accepted and stay below every stage
    assert [f.key for f in check_firing(_stages(), series=[(0.0, 1.0), (60.0, 1.0)])] == [
        "firing.clay_not_activated"]


def test_series_times_must_increase():
    with pytest.raises(ChemistryInputError) as exc:
        check_firing(_stages(), series=[(0.0, 300.0), (0.0, 900.0)])
    assert str(exc.value) == "firing series times must increase strictly"
