"""Capillary absorption coefficient (least squares against root time) and sd = μ·d."""

import numpy as np
import pytest
from scipy import stats

from specgen.science.moisture import MoistureInputError, capillary_coefficient, sd_value


def test_slope_of_an_exact_line():
    t = np.array([1, 4, 9, 16, 25]) * 60.0          # √t = 1..5 √min
    w = 0.2 + 0.05 * np.sqrt(t)
    fit = capillary_coefficient(t, w)
    assert fit.slope == pytest.approx(0.05, abs=1e-12) and fit.intercept == pytest.approx(0.2)
    assert fit.r2 == pytest.approx(1.0)


def test_slope_against_scipy_linregress():
    t = np.array([5, 10, 15, 30, 60, 90]) * 60.0
    w = np.array([0.61, 0.85, 1.06, 1.47, 2.05, 2.52])
    fit = capillary_coefficient(t, w)
    ref = stats.linregress(np.sqrt(t), w)          # reference library: scipy.stats
    assert fit.slope == pytest.approx(ref.slope, rel=1e-12)
    assert fit.intercept == pytest.approx(ref.intercept, rel=1e-12)
    assert fit.stderr == pytest.approx(ref.stderr, rel=1e-9)
    assert fit.r2 == pytest.approx(ref.rvalue ** 2, rel=1e-12)


def test_uptake_that_does_not_rise_is_refused():
    with pytest.raises(MoistureInputError, match="does not rise with √t"):
        capillary_coefficient([300.0, 1800.0, 5400.0], [2.9, 1.7, 0.8])

def test_bad_readings():
    with pytest.raises(MoistureInputError, match="at least three readings"):
        capillary_coefficient([60, 120], [0.1, 0.2])
    with pytest.raises(MoistureInputError, match="not negative"):
        capillary_coefficient([-60, 120, 240], [0.1, 0.2, 0.3])


def test_sd_value():
    # EN ISO 12572: sd = μ·d; μ = 12, d = 25 mm -> 0.3 m (by hand)
    assert sd_value(12, 0.025) == pytest.approx(0.3)
    with pytest.raises(MoistureInputError):
        sd_value(0, 0.02)


@pytest.mark.parametrize("times, uptake, message", [
    ([60, 120, 240], [0.1, 0.2], "3 times but 2 uptake readings"),
    ([60, 120], [0.1, 0.2], "a capillary coefficient needs at least three readings"),
    ([-60, 120, 240], [0.1, 0.2, 0.3], "times must be finite and not negative; uptakes finite"),
    ([60, float("inf"), 240], [0.1, 0.2, 0.3], "times must be finite and not negative; uptakes finite"),
    ([60, 120, 240], [0.1, float("nan"), 0.3], "times must be finite and not negative; uptakes finite"),
    ([60, 60, 60], [0.1, 0.2, 0.3], "the readings are all at the same time"),
    ([60, 120, 240], [0.3, 0.3, 0.3],
     "the uptake does not rise with √t: check the readings' order and units"),
])
def test_every_capillary_refusal_word_for_word(times, uptake, message):
    with pytest.raises(MoistureInputError) as exc:
        capillary_coefficient(times, uptake)
    assert str(exc.value) == message


def test_three_readings_and_time_zero_are_accepted():
    # the smallest accepted test: 0, 1, 4 min (√t = 0, 1, 2 √min) with uptake on a line
    # 0.1 + 0.2 √(t/min): slope 0.2 kg/(m²·min^0.5) = 0.2/√60 kg/(m²·s^0.5), exact fit
    t = np.array([0.0, 60.0, 240.0])
    fit = capillary_coefficient(t, 0.1 + 0.2 * np.sqrt(t / 60))
    assert fit.n == 3
    assert fit.slope == pytest.approx(0.2 / np.sqrt(60), rel=1e-12)
    assert fit.intercept == pytest.approx(0.1, rel=1e-12)
    assert fit.r2 == pytest.approx(1.0, abs=1e-12) and fit.stderr == pytest.approx(0.0, abs=1e-12)


@pytest.mark.parametrize("mu, d", [(0, 0.02), (-3, 0.02), (12, 0.0), (12, -0.01)])
def test_sd_value_refusals_word_for_word(mu, d):
    with pytest.raises(MoistureInputError) as exc:
        sd_value(mu, d)
    assert str(exc.value) == "μ and the thickness must be greater than zero"


def test_sd_value_is_the_product():
    # EN ISO 12572 sd = μ·d: μ 60 (demo EB1) over 0.1 m = 6 m; μ 1 over 1 mm = 0.001 m
    assert sd_value(60, 0.1) == pytest.approx(6.0, rel=1e-12)
    assert sd_value(1, 0.001) == pytest.approx(0.001, rel=1e-12)
