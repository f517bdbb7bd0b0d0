"""Sieve analysis, fineness modulus, envelopes, blend fit and binder:aggregate."""
import numpy as np
import pytest
from scipy import optimize

from specgen import refdata
from specgen.science.grading import (GradingInputError, binder_aggregate, blend, compare_envelope,
                                     deviation, fineness_modulus, fit_blend, from_passing,
                                     from_retained, volume_to_mass_fractions)

SERIES = refdata.load("sieve_series").data["standard"]
FM_SIEVES = refdata.load("sieve_series").data["fineness_modulus"]
MM = 1e-3


def test_fm_sieves_are_astm_c125():
    # ASTM C125, fineness modulus: 150 µm, 300 µm, 600 µm, 1.18, 2.36, 4.75, 9.5, 19.0,
    # 37.5, 75, 150 mm (from memory)
    assert [round(s / MM, 3) for s in FM_SIEVES] == [0.15, 0.3, 0.6, 1.18, 2.36, 4.75, 9.5,
                                                     19.0, 37.5, 75.0, 150.0]


def test_fineness_modulus_published_worked_example():
    # Kosmatka, Kerkhoff & Panarese, Design and Control of Concrete Mixtures (PCA), table
    # "determination of fineness modulus of fine aggregates" (from memory): % retained
    # 9.5 mm 0, 4.75 mm 2, 2.36 mm 13, 1.18 mm 20, 600 µm 20, 300 µm 24, 150 µm 18, pan 3;
    # cumulative 0, 2, 15, 35, 55, 79, 97 -> FM = 283 / 100 = 2.83.
    sizes = [9.5 * MM, 4.75 * MM, 2.36 * MM, 1.18 * MM, 0.6 * MM, 0.3 * MM, 0.15 * MM]
    g = from_retained(sizes, [0, 2, 13, 20, 20, 24, 18], SERIES, pan=3)
    assert [round(100 * c, 6) for c in g.cumulative] == [0, 2, 15, 35, 55, 79, 97]
    assert fineness_modulus(g, FM_SIEVES) == pytest.approx(2.83, abs=1e-12)
    assert g.pan == pytest.approx(0.03)


def test_fineness_modulus_from_passing_equals_from_retained():
    sizes = [4.75 * MM, 2.36 * MM, 1.18 * MM, 0.6 * MM, 0.3 * MM, 0.15 * MM]
    g = from_passing(sizes, [1.0, 0.92, 0.74, 0.51, 0.24, 0.07], SERIES)
    # by hand: cumulative retained 0 + 8 + 26 + 49 + 76 + 93 = 252 % -> FM 2.52
    assert fineness_modulus(g, FM_SIEVES) == pytest.approx(2.52, abs=1e-12)
    assert [round(100 * r, 6) for r in g.retained] == [0, 8, 18, 23, 27, 17]


def test_fineness_modulus_needs_the_fm_sieves():
    g = from_passing([4.75 * MM, 2.36 * MM, 1.18 * MM, 0.6 * MM, 0.3 * MM],
                     [1, .9, .7, .5, .2], SERIES)
    with pytest.raises(GradingInputError, match="the fineness modulus needs the 0.15 mm sieve"):
        fineness_modulus(g, FM_SIEVES)


@pytest.mark.parametrize("sizes, passing, words", [
    ([2.36, 1.18, 0.6], [0.9, 0.95, 0.5],
     "cumulative passing is not monotone: 95 % passes 1.18 mm but only 90 % passes the coarser 2.36 mm"),
    ([2.36, 1.18, 0.6], [1.2, 0.9, 0.5], "passing must lie between 0 and 100 %"),
    ([2.36, 0.6, 0.3], [1.0, 0.5, 0.2], "the sieve series has gaps: no result for 1.18 mm"),
    ([2.0, 1.18, 0.6], [1.0, 0.8, 0.5], "sieve 2 mm is not in the standard series"),
])
def test_bad_gradings_refused(sizes, passing, words):
    with pytest.raises(GradingInputError, match=words.replace("(", r"\(").replace(")", r"\)")):
        from_passing([s * MM for s in sizes], passing, SERIES)


# ASTM C144 gradation as Table 1 of the Portland Cement Association's "Trowel Tips: Mortar Sand"
# (Masonry Magazine, August 1993, p. 17) prints it, % passing: natural sand 4.75 mm 100,
# 2.36 mm 95-100, 1.18 mm 70-100, 600 µm 40-75, 300 µm 10-35, 150 µm 2-15; 75 µm 0-5 is not in
# that table (from memory, so the natural envelope stays tagged memory).
C144_NATURAL = [(4.75, 100, 100), (2.36, 95, 100), (1.18, 70, 100), (0.6, 40, 75),
                (0.3, 10, 35), (0.15, 2, 15), (0.075, 0, 5)]
# manufactured sand, same table: 300 µm 20-40, 150 µm 10-25, 75 µm 0-10 (every row read).
C144_MANUFACTURED = [(4.75, 100, 100), (2.36, 95, 100), (1.18, 70, 100), (0.6, 40, 75),
                     (0.3, 20, 40), (0.15, 10, 25), (0.075, 0, 10)]


@pytest.mark.parametrize("key, expected, tag", [
    ("astm_c144_natural", C144_NATURAL, "memory"),
    ("astm_c144_manufactured", C144_MANUFACTURED, None)])
def test_envelope_data_matches_astm_c144(key, expected, tag):
    env = refdata.load("grading_envelopes").data[key]
    assert [(e["sieve_mm"], e["low"], e["high"]) for e in env["limits"]] == expected
    assert "ASTM C144" in env["source"] and env.get("tag") == tag


def test_envelope_comparison_inside_and_outside():
    env = [(s * MM, lo / 100, hi / 100) for s, lo, hi in C144_NATURAL]
    sizes = [4.75, 2.36, 1.18, 0.6, 0.3, 0.15, 0.075]
    inside = from_passing([s * MM for s in sizes], [1, .97, .8, .55, .2, .08, .02], SERIES)
    assert compare_envelope(inside, env).within
    coarse = from_passing([s * MM for s in sizes], [1, .9, .7, .5, .2, .08, .02], SERIES)
    cmp = compare_envelope(coarse, env)
    # by hand: 90 % passing 2.36 mm against the C144 lower limit of 95 % -> 0.05 outside
    assert not cmp.within and cmp.outside[1] == pytest.approx(0.05)


def test_blend_fit_recovers_known_proportions():
    sizes = [s * MM for s in (4.75, 2.36, 1.18, 0.6, 0.3, 0.15)]
    a = from_passing(sizes, [1.0, 0.92, 0.74, 0.51, 0.24, 0.07], SERIES)
    b = from_passing(sizes, [1.0, 0.99, 0.83, 0.58, 0.33, 0.14], SERIES)
    c = from_passing(sizes, [1.0, 0.80, 0.50, 0.30, 0.10, 0.02], SERIES)
    target = blend([a, b, c], [0.5, 0.2, 0.3])        # synthetic blend of known proportions
    fit = fit_blend([a, b, c], target)
    assert fit.proportions == pytest.approx((0.5, 0.2, 0.3), abs=1e-4)
    assert fit.rms < 1e-5
    # non-negativity: a target finer than every sand gives the finest sand (b) alone
    fine = from_passing(sizes, [1.0, 1.0, 0.95, 0.8, 0.5, 0.25], SERIES)
    fit2 = fit_blend([a, b, c], fine)
    assert min(fit2.proportions) >= 0 and sum(fit2.proportions) == pytest.approx(1.0)
    assert fit2.proportions == pytest.approx((0.0, 1.0, 0.0), abs=1e-6)
    # reference: scipy.optimize.lsq_linear with bounds [0, 1] on the same augmented system
    A = np.column_stack([[1.0, 0.92, 0.74, 0.51, 0.24, 0.07], [1.0, 0.99, 0.83, 0.58, 0.33, 0.14],
                         [1.0, 0.80, 0.50, 0.30, 0.10, 0.02]])
    Aa = np.vstack([A, 1e3 * np.ones(3)])
    ba = np.concatenate([[1.0, 1.0, 0.95, 0.8, 0.5, 0.25], [1e3]])
    ref = optimize.lsq_linear(Aa, ba, bounds=(0, np.inf)).x
    assert fit2.proportions == pytest.approx(tuple(ref / ref.sum()), abs=1e-5)


def test_deviation_rms_and_max():
    sizes = [s * MM for s in (2.36, 1.18, 0.6)]
    a = from_passing(sizes, [0.9, 0.7, 0.5], SERIES)
    b = from_passing(sizes, [0.95, 0.7, 0.4], SERIES)
    d = deviation(a, b)
    # by hand: differences -0.05, 0, 0.10 -> RMS sqrt((0.0025 + 0.01) / 3) = 0.0645497
    assert d.rms == pytest.approx(0.0645497, abs=1e-7) and d.max_abs == pytest.approx(0.10)


def test_volume_parts_to_mass_fractions():
    # by hand: 1.0 x 1550 = 1550, 0.5 x 1450 = 725 -> 1550 / 2275 = 0.681319
    f = volume_to_mass_fractions([1.0, 0.5], [1550, 1450])
    assert f[0] == pytest.approx(0.681319, abs=1e-6)


def test_binder_aggregate_from_acid_digestion():
    # by hand: 50.0 g sample, 38.5 g insoluble residue -> binder 11.5 g, 11.5 / 38.5 = 0.298701
    # by volume with 700 and 1500 kg/m3: (11.5 / 700) / (38.5 / 1500) = 0.640074
    r = binder_aggregate(0.050, 0.0385, 700, 1500)
    assert r.by_mass == pytest.approx(0.298701, abs=1e-6)
    assert r.by_volume == pytest.approx(0.640074, abs=1e-6)
    with pytest.raises(GradingInputError, match="lighter than the sample"):
        binder_aggregate(0.05, 0.06)


# The sieve matching helpers, on a series written out here (ASTM E11 / C136 apertures, mm,
# from memory) so that a change of the shipped series table does not move these checks.
ASTM_MM = [9.5, 4.75, 2.36, 1.18, 0.6, 0.3, 0.15, 0.075]
ASTM = [s * MM for s in ASTM_MM]


@pytest.mark.parametrize("size_mm, expected_mm", [
    (0.6, 0.6), (0.600, 0.6), (4.75, 4.75),
    (1.2, 1.18),          # 1.7 % off the 1.18 mm aperture: within 2 % (SAME_SIEVE), same sieve
    (0.15 * 1.019, 0.15),  # 1.9 % above: same sieve
    (0.15 * 1.021, None),  # 2.1 % above: another sieve
    (0.15 * 0.981, 0.15), (0.15 * 0.979, None),
    (1.0, None), (0.5, None), (2.0, None),   # ISO 565 R20 sizes are not on the 2:1 series
])
def test_match_sieve_within_two_percent(size_mm, expected_mm):
    from specgen.science.grading import match_sieve
    got = match_sieve(size_mm * MM, ASTM)
    if expected_mm is None:
        assert got is None
    else:
        assert got == pytest.approx(expected_mm * MM, rel=1e-12)
        assert got in ASTM          # the standard aperture itself, not the typed size


def test_known_at_and_passing_at_coarser_than_the_top_sieve():
    from specgen.science.grading import known_at, passing_at
    all_through = from_passing([4.75 * MM, 2.36 * MM, 1.18 * MM], [1.0, 0.9, 0.6], ASTM)
    short = from_passing([4.75 * MM, 2.36 * MM, 1.18 * MM], [0.97, 0.9, 0.6], ASTM)
    # all passed 4.75 mm, so 9.5 mm passes 100 % too; with 3 % retained on 4.75 mm nothing is
    # known of 9.5 mm; a sieve finer than the finest sieve of the analysis is never known
    assert known_at(all_through, 9.5 * MM) and not known_at(short, 9.5 * MM)
    assert not known_at(all_through, 0.6 * MM)
    assert known_at(all_through, 1.2 * MM)                # 1.2 typed for 1.18
    assert list(passing_at(all_through, [9.5 * MM, 2.36 * MM, 1.2 * MM])) == [1.0, 0.9, 0.6]
    with pytest.raises(GradingInputError, match="no result on the 9.5 mm sieve"):
        passing_at(short, [9.5 * MM])


def test_common_sieves_coarsest_first_and_refused_below_two():
    from specgen.science.grading import common_sieves
    a = from_passing([4.75 * MM, 2.36 * MM, 1.18 * MM, 0.6 * MM], [1.0, 0.9, 0.6, 0.3], ASTM)
    b = from_passing([2.36 * MM, 1.18 * MM, 0.6 * MM, 0.3 * MM], [0.95, 0.7, 0.4, 0.1], ASTM)
    c = from_passing([0.6 * MM, 0.3 * MM, 0.15 * MM], [0.5, 0.2, 0.05], ASTM)
    assert common_sieves(a, b) == [2.36 * MM, 1.18 * MM, 0.6 * MM]
    assert common_sieves(b, a) == [2.36 * MM, 1.18 * MM, 0.6 * MM]
    assert common_sieves(b, c) == [0.6 * MM, 0.3 * MM]
    with pytest.raises(GradingInputError, match="the gradings share fewer than two sieves"):
        common_sieves(a, c)                    # only 0.6 mm in common
    # deviation on the common sieves, by hand: a - b = -0.05, -0.10, -0.10;
    # RMS = sqrt((0.0025 + 0.01 + 0.01)/3) = 0.086603, largest 0.10
    d = deviation(a, b)
    assert d.difference == pytest.approx((-0.05, -0.10, -0.10), abs=1e-12)
    assert d.rms == pytest.approx(0.086603, abs=1e-6) and d.max_abs == pytest.approx(0.10)


def test_sieve_off_the_series_and_repeated_sieve_are_refused():
    with pytest.raises(GradingInputError, match=r"sieve 1 mm is not in the standard series "
                                                r"\(0.075, 0.15, 0.3, 0.6, 1.18, 2.36, 4.75, "
                                                r"9.5 mm\)"):
        from_passing([2.36 * MM, 1.0 * MM], [0.9, 0.6], ASTM)
    with pytest.raises(GradingInputError, match="a sieve appears twice in the analysis"):
        from_passing([1.18 * MM, 1.2 * MM], [0.9, 0.6], ASTM)
