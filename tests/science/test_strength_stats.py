"""Statistics of one group of strength results: summary, EN 1990 Annex D, Grubbs."""
import math
import statistics

import numpy as np
import pytest
from scipy import stats

from specgen import refdata
from specgen.science.strength_stats import (
    StrengthInputError, characteristic_value, check_plausible, grubbs_critical, grubbs_screen,
    kn_factor, kn_from_table, summarise)

MPA = 1e6
KN = refdata.load("en1990_kn").data    # EN 1990 Annex D Table D1 (read in pamd_eurocodes)


def test_summary_matches_statistics_module():
    # Reference: Python's statistics module (sample SD, n - 1).
    x = [4.1e6, 4.6e6, 5.2e6, 4.9e6]
    s = summarise(x)
    assert s.n == 4
    assert s.mean == pytest.approx(statistics.mean(x))
    assert s.sd == pytest.approx(statistics.stdev(x))
    assert s.cv == pytest.approx(statistics.stdev(x) / statistics.mean(x))
    assert (s.minimum, s.maximum) == (4.1e6, 5.2e6)


def test_single_result_has_zero_sd_not_nan():
    s = summarise([3.0e6])
    assert (s.sd, s.cv) == (0.0, 0.0)


@pytest.mark.parametrize("bad, words", [
    ([], "no strength results"),
    ([2e6, 0.0, 3e6], "greater than zero"),
    ([2e6, -1e6], "greater than zero"),
    ([2e6, float("nan")], "finite"),
])
def test_bad_results_are_refused(bad, words):
    with pytest.raises(StrengthInputError, match=words):
        summarise(bad)


# EN 1990 Annex D Table D1 (as the pamd_eurocodes library, 0.3.0, gives it); the table
# rounds u(0.95) to 1.64 and to two
# decimals, and its n = 20 'unknown' entry (1.76) sits 0.012 below the formula (1.772).
@pytest.mark.parametrize("i", range(len(KN["n"])))
def test_kn_formula_against_table_d1(i):
    n = KN["n"][i]
    if math.isinf(n):
        # n -> infinity: k_n -> u(0.95) = 1.645 (scipy.stats.norm); Table D1: 1.64
        assert stats.norm.ppf(0.95) == pytest.approx(KN["vx_known"][i], abs=0.006)
        assert KN["vx_unknown"][i] == KN["vx_known"][i]
        return
    assert kn_factor(n, True) == pytest.approx(KN["vx_known"][i], abs=0.02)
    if KN["vx_unknown"][i] is not None:
        assert kn_factor(n, False) == pytest.approx(KN["vx_unknown"][i], abs=0.015)


def test_kn_n3_unknown_variance_against_scipy_t():
    # EN 1990 Table D1 (pamd_eurocodes 0.3.0): n = 3, Vx unknown -> 3.37;
    # scipy.stats.t: t(0.95, 2) = 2.920 -> 2.920 * sqrt(4/3) = 3.372
    k = kn_factor(3, False)
    assert k == pytest.approx(stats.t.ppf(0.95, 2) * math.sqrt(1 + 1 / 3), rel=1e-12)
    assert k == pytest.approx(3.37, abs=0.005)
    assert kn_from_table(3, KN, known_variance=False) == 3.37


def test_kn_table_interpolates_in_one_over_n():
    # n = 7 lies between the tabulated 6 (2.18) and 8 (2.00); linear in 1/n:
    # (1/6 - 1/7) / (1/6 - 1/8) = 0.5714 of the way from 2.18 to 2.00 -> 2.0771
    assert kn_from_table(7, KN, known_variance=False) == pytest.approx(2.0771, abs=1e-4)
    assert kn_from_table(10_000, KN, known_variance=True) == pytest.approx(1.64, abs=1e-3)
    with pytest.raises(StrengthInputError, match="no k_n for n = 2"):
        kn_from_table(2, KN, known_variance=False)


def test_characteristic_value_worked_by_hand():
    # By hand: 4.0, 4.5, 5.0 MPa -> mean 4.5, s = 0.5; unknown variance
    #   k_3 = 3.372 (scipy.stats.t, see above) -> fk = 4.5 - 3.372*0.5 = 2.814 MPa
    cv = characteristic_value([4.0e6, 4.5e6, 5.0e6])
    assert cv.value / MPA == pytest.approx(2.814, abs=0.001)
    assert cv.variance == "unknown" and "EN 1990" in cv.basis
    # Known sigma 0.3 MPa: k = 1.6449*sqrt(4/3) = 1.8993 -> fk = 4.5 - 0.5698 = 3.930 MPa
    kv = characteristic_value([4.0e6, 4.5e6, 5.0e6], sigma=0.3e6)
    assert kv.value / MPA == pytest.approx(3.930, abs=0.001)
    # Table D1 factor passed in instead of the formula: 4.5 - 3.37*0.5 = 2.815
    tv = characteristic_value([4.0e6, 4.5e6, 5.0e6], k_n=kn_from_table(3, KN, False))
    assert tv.value / MPA == pytest.approx(2.815, abs=1e-9)


def test_characteristic_value_needs_two_results_for_unknown_variance():
    with pytest.raises(StrengthInputError, match="at least 2 results"):
        characteristic_value([4.0e6])
    assert characteristic_value([4.0e6], sigma=0.2e6).value == pytest.approx(
        4.0e6 - stats.norm.ppf(0.95) * math.sqrt(2) * 0.2e6)


# Grubbs two-sided critical values at alpha = 0.05, ASTM E178 Table 1 (upper 2.5 % one-sided
# column), from memory.  n = 3: printed 1.155; the closed form (exact for n = 3) gives
# 1.1543.  The 1.153 of the 5 % column belongs to a one-sided test (see
# test_strength_checks.test_grubbs_tie_in_three_is_reported_not_dropped).
@pytest.mark.parametrize("n, g", [(3, 1.155), (4, 1.481), (5, 1.715), (6, 1.887),
                                  (7, 2.020), (8, 2.126), (10, 2.290)])
def test_grubbs_critical_values(n, g):
    assert grubbs_critical(n, 0.05) == pytest.approx(g, abs=0.002)


def test_grubbs_critical_has_stated_size_by_simulation():
    # Definition of the test (reference: numpy normal samples): under H0 a fraction
    # alpha of samples of n = 5 gives G > G_crit.  200 000 samples: SE of 0.05 is 0.0005.
    rng = np.random.default_rng(1)
    x = rng.standard_normal((200_000, 5))
    g = np.max(np.abs(x - x.mean(1, keepdims=True)), 1) / x.std(1, ddof=1)
    assert np.mean(g > grubbs_critical(5, 0.05)) == pytest.approx(0.05, abs=0.002)


def test_grubbs_flags_with_reason_and_keeps_the_rest():
    # By hand: 10.0 10.2 9.9 10.1 13.0 MPa: mean 10.64; squared deviations
    #   0.4096 + 0.1936 + 0.5476 + 0.2916 + 5.5696 = 7.012 -> s = sqrt(7.012/4) = 1.3240,
    #   G = (13.0 - 10.64)/1.3240 = 1.782 > G_crit(5) = 1.715
    vals = [10.0e6, 10.2e6, 9.9e6, 10.1e6, 13.0e6]
    scr = grubbs_screen(vals)
    assert scr.assessed and len(scr.flagged) == 1
    f = scr.flagged[0]
    assert (f.index, f.value) == (4, 13.0e6)
    assert scr.statistic == pytest.approx(1.782, abs=0.001)
    assert scr.critical == pytest.approx(1.715, abs=0.001)
    assert "G = 1.782 > G_crit = 1.715" in f.reason
    assert [k.index for k in scr.kept] == [0, 1, 2, 3]
    assert len(scr.kept) + len(scr.flagged) == len(vals)    # nothing vanishes


def test_grubbs_no_outlier_and_small_groups():
    scr = grubbs_screen([4.0e6, 4.2e6, 4.1e6, 4.3e6])
    assert scr.flagged == () and len(scr.kept) == 4 and "no outlier" in scr.message
    small = grubbs_screen([4.0e6, 9.0e6])
    assert not small.assessed and len(small.kept) == 2
    assert "needs at least 3 values" in small.message
    equal = grubbs_screen([4.0e6] * 4)
    assert equal.flagged == () and equal.statistic == 0.0


def test_grubbs_repeated_screen():
    vals = [10.0, 10.1, 9.9, 10.05, 9.95, 10.02, 14.0, 13.0]
    once = grubbs_screen([v * 1e6 for v in vals])
    again = grubbs_screen([v * 1e6 for v in vals], iterate=True)
    assert len(again.flagged) >= len(once.flagged)
    assert {f.index for f in once.flagged} <= {f.index for f in again.flagged}


def test_psi_entered_as_mpa_is_flagged():
    # common practice plausible range (content/data/strength_classes.yaml); 1 MPa = 145 psi,
    # so 725 psi (5 MPa) typed under an MPa heading reads as 725 MPa.
    rng = refdata.load("strength_classes").data["plausible_range"]["compressive"]
    msgs = check_plausible([5.0e6, 725e6], rng["low_mpa"] * MPA, rng["high_mpa"] * MPA)
    assert len(msgs) == 1 and "psi" in msgs[0] and msgs[0].startswith("result 2")
    assert check_plausible([0.3e6, 25e6], rng["low_mpa"] * MPA, rng["high_mpa"] * MPA) == []


def _g_crit(n, alpha=0.05):
    """Two-sided Grubbs critical value written out (ASTM E178 / Grubbs 1969 closed form):
    (n-1)/sqrt(n) sqrt(t^2/(n-2+t^2)), t the upper alpha/(2n) point of Student's t, n-2 dof
    (scipy.stats.t)."""
    t = stats.t.isf(alpha / (2 * n), n - 2)
    return (n - 1) / math.sqrt(n) * math.sqrt(t * t / (n - 2 + t * t))


def _g(values):
    """Largest |x - mean| / s (sample SD, n - 1), by numpy."""
    x = np.asarray(values, float)
    return float(np.max(np.abs(x - x.mean())) / x.std(ddof=1))


def test_grubbs_screen_whole_result_once_and_repeated():
    from specgen.science.strength_stats import Flag
    vals = [10.0e6, 10.2e6, 9.9e6, 10.1e6, 13.0e6]
    g5, c5 = _g(vals), _g_crit(5)
    assert (round(g5, 3), round(c5, 3)) == (1.782, 1.715)        # by hand, above
    once = grubbs_screen(vals)
    assert once.method == "Grubbs two-sided test, alpha = 0.05"
    assert (once.alpha, once.n, once.assessed, once.message) == (0.05, 5, True,
                                                                 "1 value(s) flagged")
    assert once.statistic == pytest.approx(g5, rel=1e-12)
    assert once.critical == pytest.approx(c5, rel=1e-9)
    assert once.kept == tuple(Flag(i, v, "within the Grubbs limit")
                              for i, v in enumerate(vals[:4]))
    assert once.flagged == (Flag(4, 13.0e6, "G = 1.782 > G_crit = 1.715 (n = 5, alpha = 0.05)"),)
    # Repeated: the second round on the four left, 10.0 10.2 9.9 10.1 (mean 10.05, s = 0.1291):
    # G = 0.15/0.1291 = 1.162 <= G_crit(4) = 1.481, so it stops with the one flag
    again = grubbs_screen(vals, iterate=True)
    assert again.method == "Grubbs two-sided test, alpha = 0.05 (repeated)"
    assert again.flagged == once.flagged and again.kept == once.kept
    assert again.statistic == pytest.approx(_g(vals[:4]), rel=1e-12)
    assert again.critical == pytest.approx(_g_crit(4), rel=1e-9)
    assert (round(again.statistic, 3), round(again.critical, 3)) == (1.162, 1.481)


def test_grubbs_screen_at_three_values_and_other_alpha():
    from specgen.science.strength_stats import Flag
    # n = 3, the demo's 1.18, 1.24, 1.18 MPa: G = 2/sqrt(3) = 1.1547 > 1.1543 (two-sided 5 %,
    # closed form above): the test runs at n = 3 and flags the 1.24
    scr = grubbs_screen([1.18e6, 1.24e6, 1.18e6])
    assert scr.assessed and scr.statistic == pytest.approx(2 / math.sqrt(3), rel=1e-9)
    assert scr.flagged == (Flag(1, 1.24e6, "G = 1.155 > G_crit = 1.154 (n = 3, alpha = 0.05)"),)
    # alpha = 0.01 (two-sided; the upper 0.5 % column of ASTM E178 Table 1, from memory)
    strict = grubbs_screen([10.0e6, 10.2e6, 9.9e6, 10.1e6, 13.0e6], alpha=0.01)
    assert strict.method == "Grubbs two-sided test, alpha = 0.01"
    assert strict.critical == pytest.approx(_g_crit(5, 0.01), rel=1e-9)      # 1.7645
    assert round(strict.critical, 3) == 1.764                    # ASTM E178 0.5 % column: 1.764
    assert strict.flagged[0].reason == "G = 1.782 > G_crit = 1.764 (n = 5, alpha = 0.01)"


def test_grubbs_screen_no_outlier_too_few_and_all_equal_whole_results():
    from specgen.science.strength_stats import Flag
    calm = [4.0e6, 4.2e6, 4.1e6, 4.3e6]       # mean 4.15, s = 0.1291, G = 1.162 < 1.481
    scr = grubbs_screen(calm)
    assert scr.message == "no outlier: G = 1.162 <= G_crit = 1.481"
    assert scr.flagged == () and scr.assessed
    assert scr.kept == tuple(Flag(i, v, "within the Grubbs limit") for i, v in enumerate(calm))
    small = grubbs_screen([4.0e6, 9.0e6])
    assert (small.assessed, small.statistic, small.critical, small.n) == (False, 0.0, 0.0, 2)
    assert small.message == "not assessed: Grubbs' test needs at least 3 values; got 2"
    assert small.method == "Grubbs two-sided test, alpha = 0.05"
    assert small.kept == (Flag(0, 4.0e6, "not tested"), Flag(1, 9.0e6, "not tested"))
    equal = grubbs_screen([4.0e6] * 4)
    assert (equal.statistic, equal.message) == (0.0, "no outlier: G = 0.000 <= G_crit = 1.481")
    assert equal.critical == pytest.approx(_g_crit(4), rel=1e-9)


# --- refusals whole, the messages of the plausibility screen, and every field of a result ---

@pytest.mark.parametrize("bad, message", [
    ([], "no strength results given"),
    ([2e6, float("nan")], "strength results must be finite numbers (found NaN or inf)"),
    ([2e6, float("inf")], "strength results must be finite numbers (found NaN or inf)"),
    ([2e6, 0.0, 3e6, -1.5e6], "strength results must be greater than zero; found 0, -1.5e+06 Pa"),
])
def test_bad_results_are_refused_whole(bad, message):
    for fn in (summarise, characteristic_value, grubbs_screen):
        with pytest.raises(StrengthInputError) as err:
            fn(bad)
        assert str(err.value) == message


@pytest.mark.parametrize("args, message", [
    ((2.5, False), "the number of results must be a whole number >= 1; got 2.5"),
    ((0, True), "the number of results must be a whole number >= 1; got 0"),
    ((3, False, 0.0), "fractile must lie between 0 and 0.5; got 0.0"),
    ((3, False, 0.5), "fractile must lie between 0 and 0.5; got 0.5"),
    ((1, False), "a characteristic value with unknown variance needs at least 2 results "
                 "(EN 1990 Table D1 starts at n = 3)"),
])
def test_kn_refusals_whole(args, message):
    with pytest.raises(StrengthInputError) as err:
        kn_factor(*args)
    assert str(err.value) == message


def test_kn_at_the_smallest_counts_and_another_fractile():
    # n = 1, known variance: u(0.95)·sqrt(2) (scipy.stats.norm); n = 2, unknown:
    # t(0.95, 1)·sqrt(1.5) = 6.3138 × 1.2247 = 7.733 (scipy.stats.t)
    assert kn_factor(1, True) == pytest.approx(stats.norm.ppf(0.95) * math.sqrt(2), rel=1e-12)
    assert kn_factor(2, False) == pytest.approx(stats.t.ppf(0.95, 1) * math.sqrt(1.5), rel=1e-12)
    # the 10 % fractile: u(0.90) = 1.2816 and t(0.90, 4) = 1.5332 (scipy.stats)
    assert kn_factor(5, True, 0.10) == pytest.approx(stats.norm.ppf(0.9) * math.sqrt(1.2),
                                                     rel=1e-12)
    assert kn_factor(5, False, 0.10) == pytest.approx(stats.t.ppf(0.9, 4) * math.sqrt(1.2),
                                                      rel=1e-12)


def test_kn_table_refusal_whole_and_its_known_row():
    with pytest.raises(StrengthInputError) as err:
        kn_from_table(2, KN, known_variance=False)
    assert str(err.value) == "EN 1990 Table D1 gives no k_n for n = 2 (unknown variance)"
    # the known-variance row of Table D1 starts at n = 1 (2.31): read as printed
    i = KN["n"].index(1)
    assert kn_from_table(1, KN, known_variance=True) == KN["vx_known"][i] == 2.31
    # n = 3 on both rows as printed (Table D1: known 1.89, unknown 3.37)
    assert kn_from_table(3, KN, known_variance=True) == 1.89


def test_characteristic_value_every_field():
    # 4.0, 4.5, 5.0 MPa, unknown variance (by hand above): mean 4.5, s = 0.5, k = 3.372
    cv = characteristic_value([4.0e6, 4.5e6, 5.0e6])
    k = stats.t.ppf(0.95, 2) * math.sqrt(4 / 3)                       # scipy.stats.t
    assert (cv.mean, cv.s, cv.n, cv.variance, cv.fractile) == (4.5e6, 0.5e6, 3, "unknown", 0.05)
    assert cv.k_n == pytest.approx(k, rel=1e-12)
    assert cv.value == pytest.approx(4.5e6 - k * 0.5e6, rel=1e-12)
    assert cv.basis == ("EN 1990 Annex D (D7.2), normal distribution, variance unknown: "
                        "k_n = t(1-p, n-1)·sqrt(1+1/n)")
    kv = characteristic_value([4.0e6, 4.5e6, 5.0e6], sigma=0.3e6, fractile=0.10)
    ku = stats.norm.ppf(0.90) * math.sqrt(4 / 3)                      # scipy.stats.norm
    assert (kv.s, kv.variance, kv.fractile) == (0.3e6, "known", 0.10)
    assert kv.value == pytest.approx(4.5e6 - ku * 0.3e6, rel=1e-12)
    assert kv.basis == ("EN 1990 Annex D (D7.2), normal distribution, variance known: "
                        "k_n = u(1-p)·sqrt(1+1/n)")
    # a known sigma of zero is allowed: the characteristic value is the mean
    assert characteristic_value([4.0e6, 5.0e6], sigma=0.0).value == 4.5e6


@pytest.mark.parametrize("sigma", [-0.1e6, float("nan"), float("inf")])
def test_known_sigma_refused_whole(sigma):
    with pytest.raises(StrengthInputError) as err:
        characteristic_value([4.0e6, 4.5e6, 5.0e6], sigma=sigma)
    assert str(err.value) == f"a known standard deviation must be finite and >= 0; got {sigma}"


@pytest.mark.parametrize("args, message", [
    ((2,), "Grubbs' test needs at least 3 values; got 2"),
    ((5, 0.0), "alpha must lie between 0 and 1; got 0.0"),
    ((5, 1.0), "alpha must lie between 0 and 1; got 1.0"),
])
def test_grubbs_critical_refusals_whole(args, message):
    with pytest.raises(StrengthInputError) as err:
        grubbs_critical(*args)
    assert str(err.value) == message


def test_grubbs_value_just_below_the_critical_value_is_kept():
    # G > G_crit flags (G equal to G_crit, 1.1543 for n = 3, cannot be met exactly in floating
    # point): 1.18, 1.18, 1.24 flags (1.1547, above); 1.18, 1.19, 1.24 by hand: mean 1.20333,
    # deviations −0.02333, −0.01333, +0.03667, s = sqrt(0.0020667/2) = 0.032146,
    # G = 0.03667/0.032146 = 1.1406 < 1.1543: kept
    assert _g([1.18e6, 1.19e6, 1.24e6]) == pytest.approx(1.1406, abs=1e-4)
    scr = grubbs_screen([1.18e6, 1.19e6, 1.24e6])
    assert scr.flagged == () and scr.message == "no outlier: G = 1.141 <= G_crit = 1.154"


def test_plausibility_messages_whole():
    # each side of the range with its own wording, a non-number, and the range's own edges
    msgs = check_plausible([5.0e6, 725e6, 0.05e6, float("nan"), 0.1e6, 60e6], 0.1e6, 60e6)
    assert msgs == [
        "result 2: 725 MPa is above the plausible 60 MPa; was it entered in psi or kPa under "
        "an MPa heading?",
        "result 3: 0.05 MPa is below the plausible 0.1 MPa; was it entered in the wrong unit "
        "(e.g. GPa or N/m² scaled)?",
        "result 4: nan is not a number"]
    # in another unit: kPa labels and factors
    assert check_plausible([90e3], 100e3, 60e6, "kPa", 1e3) == [
        "result 1: 90 kPa is below the plausible 100 kPa; was it entered in the wrong unit "
        "(e.g. GPa or N/m² scaled)?"]


def test_small_positive_values_and_two_results():
    # any positive number is a result here (plausibility is a separate screen): 0.5 Pa passes,
    # and a refusal lists only the values at or below zero
    assert summarise([0.5, 0.7]).n == 2
    with pytest.raises(StrengthInputError) as err:
        summarise([0.5, -1e6])
    assert str(err.value) == "strength results must be greater than zero; found -1e+06 Pa"
    # two results have a sample SD (Python's statistics module): 4 and 5 MPa -> 0.7071 MPa
    s = summarise([4.0e6, 5.0e6])
    assert s.sd == pytest.approx(statistics.stdev([4.0e6, 5.0e6]), rel=1e-12)
    assert s.cv == pytest.approx(statistics.stdev([4.0e6, 5.0e6]) / 4.5e6, rel=1e-12)


def test_kn_table_refusal_on_the_known_row():
    # the known row of Table D1 starts at n = 1: a count under one has no entry
    with pytest.raises(StrengthInputError) as err:
        kn_from_table(0.5, KN, known_variance=True)
    assert str(err.value) == "EN 1990 Table D1 gives no k_n for n = 0.5 (known variance)"


def test_grubbs_defaults_to_five_percent():
    # the default significance is 0.05 (two-sided): the closed form written out above
    assert grubbs_critical(5) == pytest.approx(_g_crit(5, 0.05), rel=1e-9)
    assert grubbs_screen([4.0e6, 9.0e6]).alpha == 0.05
    assert grubbs_screen([4.0e6, 9.0e6], alpha=0.01).alpha == 0.01
