"""Site test regime and options appraisal arithmetic, by hand."""
import re

import pytest

from specgen.science import site_tests as stt

DAY_H = 3600.0


@pytest.mark.parametrize("area, per_set, sets", [
    (150.0, 50.0, 3),    # 150/50 = 3 exactly: never 4 through a floating-point excess
    (151.0, 50.0, 4),    # 3.02 -> 4
    (240.0, 100.0, 3),   # demo zone Z1 at one set per 100 m²: 2.4 -> 3
    (0.3, 0.1, 3),       # 0.3/0.1 = 2.9999999999999996 in floating point: still 3
    (100.00000001, 50.0, 2),   # 0.01 mm² beyond two sets (2 + 2e-10 sets): not a third set
    (100.0000001, 50.0, 3),    # 0.1 mm² beyond (2 + 2e-9 sets): a third set
])
def test_sets_by_area_rounds_up_once(area, per_set, sets):
    assert stt.sets_by_area(area, per_set) == sets


def test_working_days_by_hand():
    # 0.85235 m³ at 8 L/h for 6 h a day: 0.85235/0.048 = 17.76 -> 18 days
    assert stt.working_days(0.85235, 8e-3 / 3600, 6 * DAY_H) == 18
    # 0.048 m³ is exactly one day's work at that rate
    assert stt.working_days(0.048, 8e-3 / 3600, 6 * DAY_H) == 1
    # 2.4 days' volume (0.1152 m³) takes 3 days: rounded up, never to the nearest day
    assert stt.working_days(0.1152, 8e-3 / 3600, 6 * DAY_H) == 3
    # 2 + 2e-10 days' work is two days (a floating-point excess, 4 ms of a 6-hour day)
    assert stt.working_days(0.096 * (1 + 1e-10), 8e-3 / 3600, 6 * DAY_H) == 2
    # any positive day is a day: 1 L at 1 L/s in half-second days is 2 of them
    assert stt.working_days(1e-3, 1e-3, 0.5) == 2


def test_sample_sets_takes_the_largest_known_term():
    s = stt.sample_sets(2, area=240.0, area_per_set=100.0, volume=0.85235, rate=8e-3 / 3600,
                        day=6 * DAY_H)
    assert (s.by_area, s.working_days, s.sets) == (3, 18, 18)
    only_min = stt.sample_sets(2)
    assert (only_min.by_area, only_min.working_days, only_min.sets) == (None, None, 2)
    area_only = stt.sample_sets(1, area=240.0, area_per_set=100.0)
    assert (area_only.by_area, area_only.working_days, area_only.sets) == (3, None, 3)
    assert stt.sample_sets(5, area=240.0, area_per_set=100.0).sets == 5
    # one term of a pair known is no term: area without area per set, or a volume, rate or
    # day without the others, leaves the minimum
    for part in ({"area": 240.0}, {"area_per_set": 100.0}, {"volume": 0.85235},
                 {"day": 6 * DAY_H}, {"volume": 0.85235, "rate": 8e-3 / 3600},
                 {"rate": 8e-3 / 3600, "day": 6 * DAY_H}, {"volume": 0.85235, "day": 6 * DAY_H}):
        s = stt.sample_sets(2, **part)
        assert (s.by_area, s.working_days, s.sets) == (None, None, 2), part


def test_prisms_and_cost_by_hand():
    assert stt.prisms(3, 3, 4) == 36                    # 3 sets x 3 prisms x 4 ages
    # 1650 per m³ x 0.85235 m³ / 240 m² = 5.8599 per m²; priced per 0.5 m³ it doubles
    assert stt.cost_per_area(1650.0, 1.0, 0.85235, 240.0) == pytest.approx(5.859906, abs=1e-6)
    assert stt.cost_per_area(1650.0, 0.5, 0.85235, 240.0) == pytest.approx(11.719813, abs=1e-6)
    # a wall under 1 m² is still an area: 100 per m³ × 0.01 m³ / 0.5 m² = 2.0 per m²
    assert stt.cost_per_area(100.0, 1.0, 0.01, 0.5) == pytest.approx(2.0, rel=1e-12)


@pytest.mark.parametrize("fn, args, words", [
    (stt.sets_by_area, (0.0, 50.0), "area and area per set must be positive"),
    (stt.sets_by_area, (100.0, -5.0), "area and area per set must be positive"),
    (stt.sets_by_area, (100.0, 0.0), "area and area per set must be positive"),
    (stt.working_days, (1.0, 0.0, 3600.0), "volume, placing rate and working day must be positive"),
    (stt.working_days, (0.0, 1.0, 3600.0), "volume, placing rate and working day must be positive"),
    (stt.working_days, (1.0, 1.0, 0.0), "volume, placing rate and working day must be positive"),
    (stt.cost_per_area, (100.0, 0.0, 1.0, 10.0), "the priced quantity and the area must be positive"),
    (stt.cost_per_area, (100.0, 1.0, 1.0, 0.0), "the priced quantity and the area must be positive"),
])
def test_bad_arguments_are_refused(fn, args, words):
    # the whole message, not a fragment of it
    with pytest.raises(ValueError, match=f"^{re.escape(words)}$"):
        fn(*args)
