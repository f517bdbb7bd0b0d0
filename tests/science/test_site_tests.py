"""Site test regime and options appraisal arithmetic, by hand."""
import pytest

from specgen.science import site_tests as stt

DAY_H = 3600.0


@pytest.mark.parametrize("area, per_set, sets", [
    (150.0, 50.0, 3),    # 150/50 = 3 exactly: never 4 through a floating-point excess
    (151.0, 50.0, 4),    # 3.02 -> 4
    (240.0, 100.0, 3),   # demo zone Z1 at one set per 100 m²: 2.4 -> 3
    (0.3, 0.1, 3),       # 0.3/0.1 = 2.9999999999999996 in floating point: still 3
])
def test_sets_by_area_rounds_up_once(area, per_set, sets):
    assert stt.sets_by_area(area, per_set) == sets


def test_working_days_by_hand():
    # 0.85235 m³ at 8 L/h for 6 h a day: 0.85235/0.048 = 17.76 -> 18 days
    assert stt.working_days(0.85235, 8e-3 / 3600, 6 * DAY_H) == 18
    # 0.048 m³ is exactly one day's work at that rate
    assert stt.working_days(0.048, 8e-3 / 3600, 6 * DAY_H) == 1


def test_sample_sets_takes_the_largest_known_term():
    s = stt.sample_sets(2, area=240.0, area_per_set=100.0, volume=0.85235, rate=8e-3 / 3600,
                        day=6 * DAY_H)
    assert (s.by_area, s.working_days, s.sets) == (3, 18, 18)
    only_min = stt.sample_sets(2)
    assert (only_min.by_area, only_min.working_days, only_min.sets) == (None, None, 2)
    area_only = stt.sample_sets(1, area=240.0, area_per_set=100.0)
    assert (area_only.by_area, area_only.working_days, area_only.sets) == (3, None, 3)
    assert stt.sample_sets(5, area=240.0, area_per_set=100.0).sets == 5


def test_prisms_and_cost_by_hand():
    assert stt.prisms(3, 3, 4) == 36                    # 3 sets x 3 prisms x 4 ages
    # 1650 per m³ x 0.85235 m³ / 240 m² = 5.8599 per m²; priced per 0.5 m³ it doubles
    assert stt.cost_per_area(1650.0, 1.0, 0.85235, 240.0) == pytest.approx(5.859906, abs=1e-6)
    assert stt.cost_per_area(1650.0, 0.5, 0.85235, 240.0) == pytest.approx(11.719813, abs=1e-6)


@pytest.mark.parametrize("fn, args, words", [
    (stt.sets_by_area, (0.0, 50.0), "area and area per set must be positive"),
    (stt.sets_by_area, (100.0, -5.0), "area and area per set must be positive"),
    (stt.working_days, (1.0, 0.0, 3600.0), "volume, placing rate and working day must be positive"),
    (stt.working_days, (0.0, 1.0, 3600.0), "volume, placing rate and working day must be positive"),
    (stt.working_days, (1.0, 1.0, 0.0), "volume, placing rate and working day must be positive"),
    (stt.cost_per_area, (100.0, 0.0, 1.0, 10.0), "the priced quantity and the area must be positive"),
    (stt.cost_per_area, (100.0, 1.0, 1.0, 0.0), "the priced quantity and the area must be positive"),
])
def test_bad_arguments_are_refused(fn, args, words):
    with pytest.raises(ValueError, match=words):
        fn(*args)
