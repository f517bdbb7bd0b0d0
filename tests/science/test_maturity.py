"""Maturity (ASTM C1074): Arrhenius and Nurse-Saul equivalent ages (the strength in the wall
at those ages: the STR-SITE tests in tests/test_strength_checks.py)."""
import math

import numpy as np
import pytest
from scipy import constants

from specgen import refdata
from specgen.science.maturity import (
    VALID_RANGE_K, MaturityInputError, activation_energy_fhp, arrhenius_factor, equivalent_age,
    equivalent_age_arrhenius, equivalent_age_nurse_saul, temperature_time_factor)
from specgen.science.strength_laws import DAY

DEF = refdata.load("maturity_defaults").data
# 33.5 kJ/mol, Freiesleben Hansen & Pedersen (from memory)
E = DEF["activation_energy"]["value"]
TREF = DEF["reference_temperature"]["value"]     # 293.15 K (20 °C), common practice
T0 = DEF["nurse_saul_datum"]["value"]            # 263.15 K (-10 °C), common practice
K = constants.zero_Celsius
MPA = 1e6


def test_defaults_table_matches_module_range():
    assert (DEF["valid_range"]["low"], DEF["valid_range"]["high"]) == VALID_RANGE_K
    assert E == 33500.0 and TREF == pytest.approx(K + 20) and T0 == pytest.approx(K - 10)
    assert "must be measured" in DEF["activation_energy"]["warning"]


@pytest.mark.parametrize("t_c, factor", [
    # ASTM C1074 Arrhenius factor exp[-(E/R)(1/T - 1/Tref)], by hand with
    # E/R = 33500 / 8.314463 (CODATA R, scipy.constants) = 4029.12 K, Tref = 293.15 K:
    (30.0, 1.57362),   # 1/303.15 - 1/293.15 = -1.12526e-4 -> exp(+0.453380) = 1.57362
    (10.0, 0.61545),   # 1/283.15 - 1/293.15 = +1.20474e-4 -> exp(-0.485405) = 0.61545
    (20.0, 1.0),       # at the reference temperature by definition
])
def test_arrhenius_factor_by_hand(t_c, factor):
    assert float(arrhenius_factor(K + t_c, E, TREF)) == pytest.approx(factor, abs=2e-5)


def test_arrhenius_constant_temperature_seven_days_at_30c():
    # ASTM C1074, by hand: 7 d at 30 °C -> te = 7 * 1.57362 = 11.0154 d at 20 °C
    te = equivalent_age_arrhenius([0, 7 * DAY], K + 30, activation_energy=E, t_ref_k=TREF)
    assert te[-1] / DAY == pytest.approx(11.0154, abs=1e-3)


def test_arrhenius_history_uses_interval_average_temperature():
    # ASTM C1074 uses the average temperature of each interval.  Readings at 0, 1, 2, 3 d of
    # 10, 10, 30, 30 °C: interval averages 10, 20, 30 °C, by hand
    #   te = 0.61545 + 1.0 + 1.57362 = 3.18907 d
    te = equivalent_age_arrhenius(np.array([0, 1, 2, 3]) * DAY, K + np.array([10, 10, 30, 30.0]),
                                  activation_energy=E, t_ref_k=TREF)
    assert te / DAY == pytest.approx([0.0, 0.61545, 1.61545, 3.18907], abs=1e-4)


def test_nurse_saul_by_hand():
    # ASTM C1074 Nurse-Saul, datum -10 °C: same history, (Ta - T0) = 20, 30, 40 K per day
    #   M = 90 K·d; te = M / (20 - (-10)) = 3.0 d at 20 °C
    times, temps = np.array([0, 1, 2, 3]) * DAY, K + np.array([10, 10, 30, 30.0])
    m = temperature_time_factor(times, temps, datum_k=T0)
    assert m[-1] / DAY == pytest.approx(90.0, rel=1e-12)
    te = equivalent_age_nurse_saul(times, temps, datum_k=T0, t_ref_k=TREF)
    assert te[-1] / DAY == pytest.approx(3.0, rel=1e-12)
    # 7 d at 30 °C: 40 K * 7 d / 30 K = 9.333 d
    te7 = equivalent_age([0, 7 * DAY], K + 30, method="nurse_saul", datum_k=T0, t_ref_k=TREF)
    assert te7[-1] / DAY == pytest.approx(9.3333, abs=1e-4)


def test_fhp_activation_energy_below_twenty_degrees():
    # Freiesleben Hansen & Pedersen (from memory): E = 33.5 + 1.47 (20 - T) kJ/mol below 20 °C
    b = DEF["activation_energy"]["below_reference"]
    e5 = activation_energy_fhp(K + 5, E, b["slope"], b["split_temperature"])
    assert e5 == pytest.approx(33500 + 1470 * 15, rel=1e-12)       # 55.55 kJ/mol
    assert activation_energy_fhp(K + 25, E, b["slope"], b["split_temperature"]) == E


def test_equivalent_age_below_twenty_degrees_with_the_fhp_activation_energy():
    # Freiesleben Hansen & Pedersen (from memory): E(T) = 33.5 + 1.47 (20 - T) kJ/mol below
    # 20 °C, 33.5 above; ASTM C1074 factor per interval at its average temperature.  By hand
    # (R = 8.314462618 J/(mol K), CODATA via scipy.constants):
    #   5 °C: E = 55.55 kJ/mol, E/R = 6681.13 K, 1/278.15 - 1/293.15 = 1.83960e-4
    #         -> exp(-1.22907) = 0.29257  (constant 33.5 kJ/mol would give 0.47654)
    #   15 °C: E = 40.85 kJ/mol, E/R = 4913.13 K, 1/288.15 - 1/293.15 = 5.91918e-5
    #         -> exp(-0.290817) = 0.74765
    #   an interval averaging 20 °C (10 and 30 °C readings) takes E = 33.5 kJ/mol: factor 1.
    b = DEF["activation_energy"]["below_reference"]
    e_of_t = lambda tk: activation_energy_fhp(tk, E, b["slope"], b["split_temperature"])  # noqa: E731
    times = np.array([0, 1, 2, 3, 4]) * DAY
    temps = K + np.array([5, 5, 15, 10, 30.0])   # interval averages 5, 10, 12.5, 20 °C
    te = equivalent_age_arrhenius(times, temps, activation_energy=e_of_t, t_ref_k=TREF)
    f = [math.exp(-((E + b["slope"] * (20 - c)) / constants.R)
                  * (1 / (K + c) - 1 / TREF)) for c in (5, 10, 12.5)]
    assert f[0] == pytest.approx(0.29257, abs=1e-5)
    assert f[1] == pytest.approx(0.49738, abs=1e-5)       # 10 °C: E = 48.2 kJ/mol
    assert te / DAY == pytest.approx(np.cumsum([0, f[0], f[1], f[2], 1.0]), rel=1e-12)
    seven = equivalent_age_arrhenius([0, 7 * DAY], K + 15, activation_energy=e_of_t,
                                     t_ref_k=TREF)
    assert seven[-1] / DAY == pytest.approx(7 * 0.74765, abs=1e-4)     # 5.2336 d
    # the constant default gives a visibly older mortar in the cold: 7 x 0.78782 = 5.5147 d
    const = equivalent_age_arrhenius([0, 7 * DAY], K + 15, activation_energy=E, t_ref_k=TREF)
    assert const[-1] / DAY == pytest.approx(5.5147, abs=1e-4)


@pytest.mark.parametrize("times, temps, words", [
    ([0, DAY, 2 * DAY], [K + 20, K - 15, K + 20], "-15.0 °C at reading 2 is below the range"),
    ([0, DAY], [K + 20, K + 70], "70.0 °C at reading 2 is above the range"),
    ([0, DAY, DAY], K + 20, "times must increase; reading 3"),
    ([0], K + 20, "at least two times"),
    ([0, DAY, 2 * DAY], [K + 20, K + 20], "3 times but 2 temperatures"),
    ([0, DAY], [20.0, 21.0], "was it entered in °F or K"),       # °C typed as K
])
def test_bad_histories_are_refused(times, temps, words):
    with pytest.raises(MaturityInputError, match=words):
        equivalent_age_arrhenius(times, temps, activation_energy=E, t_ref_k=TREF)


def test_bad_method_and_energy():
    with pytest.raises(MaturityInputError, match="needs an activation energy"):
        equivalent_age([0, DAY], K + 20, method="arrhenius", t_ref_k=TREF)
    with pytest.raises(MaturityInputError, match="unknown method"):
        equivalent_age([0, DAY], K + 20, method="guess", t_ref_k=TREF)
    with pytest.raises(MaturityInputError, match="activation energy must be > 0"):
        arrhenius_factor(K + 20, 0.0, TREF)


# --- refusals whole, the range and datum edges, the dispatch and the energy helpers ---------

RANGE_TAIL = (" the range -10 to 60 °C in which the maturity method is applied; treat that "
              "period as not assessed (was it entered in °F or K?)")


@pytest.mark.parametrize("times, temps, message", [
    ([0], K + 20, "a temperature history needs at least two times"),
    ([0, DAY, 2 * DAY], [K + 20, K + 20], "3 times but 2 temperatures"),
    ([0, float("nan")], K + 20, "times and temperatures must be finite numbers"),
    ([0, DAY], [K + 20, float("inf")], "times and temperatures must be finite numbers"),
    ([0, DAY, DAY], K + 20,
     "times must increase; reading 3 (86400 s) does not follow reading 2 (86400 s)"),
    ([0, 2 * DAY, DAY, 3 * DAY], K + 20,
     "times must increase; reading 3 (86400 s) does not follow reading 2 (172800 s)"),
    ([0, DAY, 2 * DAY], [K + 20, K - 15, K + 20],
     "temperature -15.0 °C at reading 2 is below" + RANGE_TAIL),
    ([0, DAY], [K + 70, K + 20], "temperature 70.0 °C at reading 1 is above" + RANGE_TAIL),
    ([0, DAY], [K - 10.05, K + 20], "temperature -10.1 °C at reading 1 is below" + RANGE_TAIL),
])
def test_bad_histories_are_refused_whole(times, temps, message):
    for fn in (lambda: equivalent_age_arrhenius(times, temps, activation_energy=E, t_ref_k=TREF),
               lambda: temperature_time_factor(times, temps, datum_k=T0)):
        with pytest.raises(MaturityInputError) as err:
            fn()
        assert str(err.value) == message


def test_range_edges_are_inside():
    # −10 °C and 60 °C are the edges of the range, inclusive: 1 d at each end, Nurse-Saul
    # with datum −10 °C: intervals average −10, 25 °C: (0 + 35 K) × 1 d = 35 K·d
    m = temperature_time_factor([0, DAY, 2 * DAY], [K - 10, K - 10, K + 60], datum_k=T0)
    assert m / DAY == pytest.approx([0.0, 0.0, 35.0], rel=1e-12)


def test_intervals_below_the_datum_add_nothing():
    # datum 0 °C: readings −5, −5, 5, 15 °C one day apart average −5, 0, 10 °C; the first
    # two add nothing (not a loss), the third 10 K·d: M = 0, 0, 0, 10 K·d (by hand)
    m = temperature_time_factor(np.array([0, 1, 2, 3]) * DAY, K + np.array([-5, -5, 5, 15.0]),
                                datum_k=K)
    assert m / DAY == pytest.approx([0.0, 0.0, 0.0, 10.0], abs=1e-12)


def test_a_range_of_the_caller_is_used():
    # a wider range passed by the caller lets 65 °C through: Nurse-Saul 1 d at 65 °C with
    # datum −10 °C and Tref 20 °C: 75 K·d / 30 K = 2.5 d (by hand)
    te = equivalent_age([0, DAY], K + 65, method="nurse_saul", datum_k=T0, t_ref_k=TREF,
                        valid_range=(K - 20, K + 80))
    assert te[-1] / DAY == pytest.approx(2.5, rel=1e-12)
    ta = equivalent_age([0, DAY], K + 65, method="arrhenius", activation_energy=E, t_ref_k=TREF,
                        valid_range=(K - 20, K + 80))
    # exp[−(33500/R)(1/338.15 − 1/293.15)] written out (R from scipy.constants)
    assert ta[-1] / DAY == pytest.approx(
        math.exp(-(E / constants.R) * (1 / (K + 65) - 1 / TREF)), rel=1e-12)


@pytest.mark.parametrize("kwargs, message", [
    ({"method": "arrhenius"}, "the Arrhenius method needs an activation energy (J/mol)"),
    ({"method": "nurse_saul"}, "the Nurse-Saul method needs a datum temperature (K)"),
    ({"method": "nurse_saul", "activation_energy": E},
     "the Nurse-Saul method needs a datum temperature (K)"),
    ({"method": "arrhenius", "datum_k": T0},
     "the Arrhenius method needs an activation energy (J/mol)"),
    ({"method": "guess", "activation_energy": E, "datum_k": T0},
     "unknown method 'guess'; use 'arrhenius' or 'nurse_saul'"),
    ({"method": "nurse_saul", "datum_k": TREF},
     "the reference temperature must lie above the datum temperature"),
])
def test_method_refusals_whole(kwargs, message):
    with pytest.raises(MaturityInputError) as err:
        equivalent_age([0, DAY], K + 20, t_ref_k=TREF, **kwargs)
    assert str(err.value) == message


@pytest.mark.parametrize("energy, t_ref, message", [
    (0.0, TREF, "activation energy must be > 0 J/mol; got 0.0"),
    (-33500.0, TREF, "activation energy must be > 0 J/mol; got -33500.0"),
    (float("nan"), TREF, "activation energy must be > 0 J/mol; got nan"),
    (E, 0.0, "reference temperature must be > 0 K; got 0.0"),
    (E, float("nan"), "reference temperature must be > 0 K; got nan"),
])
def test_factor_refusals_whole(energy, t_ref, message):
    with pytest.raises(MaturityInputError) as err:
        arrhenius_factor(K + 20, energy, t_ref)
    assert str(err.value) == message


def test_fhp_energy_helpers_at_and_around_the_split():
    from specgen.science.maturity import arrhenius_energy, fhp_energy
    b = DEF["activation_energy"]["below_reference"]
    split = b["split_temperature"]
    # at the split itself the reference energy holds (E = e_ref for T ≥ split)
    assert activation_energy_fhp(split, E, b["slope"], split) == E
    f = fhp_energy(E, b["slope"], split)
    # 5 °C below the split: 33.5 + 1.47 × 5 = 40.85 kJ/mol (from memory, as above)
    assert f(np.array([split - 5, split, split + 5])) == pytest.approx(
        [33500 + 1470 * 5, 33500, 33500], rel=1e-12)
    assert arrhenius_energy(f, split - 5) == pytest.approx(40850.0, rel=1e-12)
    assert arrhenius_energy(E, split - 5) == E
    # the factor with the energy function: at 10 °C, E = 48.2 kJ/mol → 0.49738 (above)
    assert float(arrhenius_factor(K + 10, f, TREF)) == pytest.approx(0.49738, abs=1e-5)


def test_sub_second_steps_and_small_positive_parameters():
    # a logger reading every half second: 1 s at 30 °C is 1.57362 s at 20 °C (factor above)
    te = equivalent_age_arrhenius([0, 0.5, 1.0], K + 30, activation_energy=E, t_ref_k=TREF)
    assert te == pytest.approx([0.0, 0.5 * 1.57362, 1.57362], abs=2e-5)
    with pytest.raises(MaturityInputError) as err:
        equivalent_age_arrhenius([0, 0.5, 0.5], K + 30, activation_energy=E, t_ref_k=TREF)
    assert str(err.value) == "times must increase; reading 3 (0.5 s) does not follow reading 2 (0.5 s)"
    # any positive energy and reference temperature are taken, written out:
    # E = 0.5 J/mol at 30 °C: exp[−(0.5/R)(1/303.15 − 1/293.15)] = 1.0000068
    assert float(arrhenius_factor(K + 30, 0.5, TREF)) == pytest.approx(
        math.exp(-(0.5 / constants.R) * (1 / (K + 30) - 1 / TREF)), rel=1e-12)
    # Tref = 0.5 K, T = 1 K, E = 1 J/mol: exp[−(1/R)(1 − 2)] = exp(1/R) = 1.12780
    assert float(arrhenius_factor(1.0, 1.0, 0.5)) == pytest.approx(math.exp(1 / constants.R),
                                                                   rel=1e-12)
