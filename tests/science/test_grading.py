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


# --- reading between sieves, envelopes, cross-series deviation, blends: whole results -------
# The log-linear reading between sieves is checked against numpy.interp on ln(aperture) (a
# reference library), and the edges by hand.  Series written out here: ASTM E11 (above) and
# the ISO 565 / EN 933-2 basic set 0.063 ... 4 mm (from memory).
from dataclasses import replace  # noqa: E402

from specgen.science.grading import (  # noqa: E402
    Deviation, EnvelopeComparison, Grading, common_sieves, interpolated_passing, known_at)

ISO_MM = [4.0, 2.0, 1.0, 0.5, 0.25, 0.125, 0.063]
ISO = [s * MM for s in ISO_MM]
SAND_MM = [4.75, 2.36, 1.18, 0.6, 0.3, 0.15]
SAND_P = [1.0, 0.9, 0.7, 0.5, 0.2, 0.05]


def _sand():
    return from_passing([s * MM for s in SAND_MM], SAND_P, ASTM)


def _np_log_interp(size_mm, sieves_mm, passing):
    # numpy.interp needs ascending abscissae: ln(aperture) from finest to coarsest
    return float(np.interp(np.log(size_mm), np.log(sieves_mm[::-1]), passing[::-1]))


def test_interpolated_passing_by_hand_and_against_numpy():
    g = _sand()
    # by hand, 1.0 mm between 1.18 mm (70 %) and 0.6 mm (50 %):
    # 0.5 + 0.2·ln(1.0/0.6)/ln(1.18/0.6) = 0.5 + 0.2·0.5108256/0.6763344 = 0.5 + 0.2·0.7552793
    # = 0.6510559
    assert interpolated_passing(g, 1.0 * MM) == pytest.approx(0.6510559, abs=2e-7)
    for size in np.geomspace(0.15, 4.75, 23):
        assert interpolated_passing(g, size * MM) == pytest.approx(
            _np_log_interp(size, SAND_MM, SAND_P), abs=1e-12)
    for size in (0.25, 0.5, 2.0, 4.0):                 # the ISO 565 sieves inside the range
        assert interpolated_passing(g, size * MM) == pytest.approx(
            _np_log_interp(size, SAND_MM, SAND_P), abs=1e-12)
    # on a sieve of the analysis (1.2 typed for 1.18): the measured value itself
    assert interpolated_passing(g, 1.2 * MM) == 0.7
    assert interpolated_passing(g, 0.15 * MM) == 0.05


def test_interpolated_passing_outside_the_tested_range():
    g = _sand()
    assert interpolated_passing(g, 8.0 * MM) == 1.0           # all passed 4.75 mm
    assert interpolated_passing(g, 0.063 * MM) is None        # 5 % passed 0.15 mm: unknown
    short = from_passing([s * MM for s in SAND_MM], [0.97, 0.9, 0.7, 0.5, 0.2, 0.0], ASTM)
    assert interpolated_passing(short, 8.0 * MM) is None      # 3 % held on 4.75 mm: unknown
    assert interpolated_passing(short, 0.063 * MM) == 0.0     # nothing passed 0.15 mm


def test_known_at_a_size_between_the_top_two_sieves_is_not_known():
    # 3 mm lies between 2.36 and 4.75 mm: not a sieve of the analysis and not above its top
    assert not known_at(_sand(), 3.0 * MM)


def test_envelope_read_between_sieves_whole_comparison():
    g = _sand()
    # an envelope on ISO sieves (limits invented for the test), and one sieve off the range
    env = [(4.0 * MM, 0.95, 1.0), (1.0 * MM, 0.70, 0.90), (0.25 * MM, 0.05, 0.12),
           (0.063 * MM, 0.0, 0.05), (4.75 * MM, 0.98, 1.0)]
    cmp = compare_envelope(g, env, interpolate=True)
    p4 = _np_log_interp(4.0, SAND_MM, SAND_P)
    p1 = _np_log_interp(1.0, SAND_MM, SAND_P)
    p025 = _np_log_interp(0.25, SAND_MM, SAND_P)
    # by hand: 0.651 passing 1 mm is 0.049 under 70 %; at 0.25 mm 0.05 + 0.15·ln(0.25/0.15)/
    # ln(0.3/0.15) = 0.05 + 0.15·0.7369656 = 0.1605448 is 0.0405448 over 12 %; 0.063 mm cannot
    # be read (5 % passed 0.15 mm)
    assert cmp == EnvelopeComparison(
        (4.0 * MM, 1.0 * MM, 0.25 * MM, 4.75 * MM), (p4, p1, p025, 1.0),
        (0.95, 0.70, 0.05, 0.98), (1.0, 0.90, 0.12, 1.0),
        (0.0, 0.70 - p1, p025 - 0.12, 0.0), (True, True, True, False))
    assert cmp.outside[1] == pytest.approx(0.049, abs=5e-4)
    assert cmp.outside[2] == pytest.approx(0.0405448, abs=1e-7)
    assert not cmp.within


def test_envelope_without_reading_between_sieves_refuses_a_missing_sieve():
    with pytest.raises(GradingInputError) as exc:
        compare_envelope(_sand(), [(4.75 * MM, 0.95, 1.0), (1.0 * MM, 0.7, 0.9)])
    assert str(exc.value) == "no result on the 1 mm sieve"
    with pytest.raises(GradingInputError) as exc:
        compare_envelope(_sand(), [(0.063 * MM, 0.0, 0.05)], interpolate=True)
    assert str(exc.value) == "the analysis reaches none of the envelope's sieves"


def test_envelope_on_the_analysis_sieves_is_not_marked_read_between():
    cmp = compare_envelope(_sand(), [(4.75 * MM, 0.95, 1.0), (1.18 * MM, 0.5, 0.6)])
    # 70 % passing 1.18 mm against 50-60 %: 0.10 over, by hand
    assert cmp == EnvelopeComparison((4.75 * MM, 1.18 * MM), (1.0, 0.7), (0.95, 0.5),
                                     (1.0, 0.6), (0.0, pytest.approx(0.1, abs=1e-12)),
                                     (False, False))


def test_deviation_across_series_reads_the_other_between_its_sieves():
    a = replace(_sand(), series="standard")
    b_p = [1.0, 0.85, 0.6, 0.45, 0.25, 0.1, 0.02]
    b = replace(from_passing(ISO, b_p, ISO), series="iso")
    d = deviation(a, b)
    # b read at each sieve of a with numpy.interp on ln(aperture); 4.75 mm is above b's top
    # (4 mm, 100 % passing) so it reads 1.0
    pb = [1.0] + [_np_log_interp(s, ISO_MM, b_p) for s in SAND_MM[1:]]
    diff = np.array(SAND_P) - np.array(pb)
    assert d == Deviation(tuple(s * MM for s in SAND_MM), pytest.approx(tuple(diff), abs=1e-12),
                          pytest.approx(float(np.sqrt(np.mean(diff ** 2))), abs=1e-12),
                          pytest.approx(float(np.max(np.abs(diff))), abs=1e-12))


def test_deviation_on_one_series_uses_only_the_common_sieves():
    a = from_passing([s * MM for s in (2.36, 1.18, 0.6, 0.3)], [0.9, 0.7, 0.5, 0.2], ASTM)
    b = from_passing([s * MM for s in (1.18, 0.6, 0.3, 0.15)], [1.0, 0.8, 0.4, 0.1], ASTM)
    # common sieves 1.18, 0.6, 0.3: a − b = −0.3, −0.3, −0.2 by hand; 2.36 mm (where b is
    # known to pass 100 %) joins only when the two are on different series
    for sa, sb in (("", ""), ("standard", ""), ("", "standard"), ("standard", "standard")):
        d = deviation(replace(a, series=sa), replace(b, series=sb))
        assert d.sieves == (1.18 * MM, 0.6 * MM, 0.3 * MM)
        assert d.difference == pytest.approx((-0.3, -0.3, -0.2), abs=1e-12)
    d = deviation(replace(a, series="standard"), replace(b, series="other"))
    assert d.sieves == (2.36 * MM, 1.18 * MM, 0.6 * MM, 0.3 * MM)
    assert d.difference == pytest.approx((-0.1, -0.3, -0.3, -0.2), abs=1e-12)


def test_deviation_across_series_with_two_readable_sieves_and_with_one():
    a = replace(from_passing([s * MM for s in (1.18, 0.6)], [0.7, 0.5], ASTM), series="standard")
    b = replace(from_passing([s * MM for s in (2.0, 1.0, 0.5)], [0.95, 0.7, 0.4], ISO),
                series="iso")
    assert len(deviation(a, b).sieves) == 2            # both ASTM sieves lie inside 0.5-2 mm
    c = replace(from_passing([s * MM for s in (4.0, 2.0, 1.0)], [0.95, 0.8, 0.6], ISO),
                series="iso")
    with pytest.raises(GradingInputError) as exc:
        deviation(a, c)                                # only 1.18 mm lies inside 1-4 mm
    assert str(exc.value) == ("the gradings share fewer than two sieves, even read between "
                              "the sieves of the other series")


def test_blend_whole_grading_by_hand():
    sizes = [s * MM for s in (2.36, 1.18, 0.6)]
    a = replace(from_passing(sizes, [1.0, 0.6, 0.2], ASTM), series="standard")
    b = replace(from_passing(sizes, [0.8, 0.4, 0.0], ASTM), series="standard")
    # by hand, 25 % of a and 75 % of b: passing 0.85, 0.45, 0.05; retained 0.15, 0.40, 0.40
    g = blend([a, b], [0.25, 0.75])
    assert g == Grading(tuple(sizes), pytest.approx((0.15, 0.40, 0.40), abs=1e-12),
                        pytest.approx((0.15, 0.55, 0.95), abs=1e-12),
                        pytest.approx((0.85, 0.45, 0.05), abs=1e-12),
                        pytest.approx(0.05, abs=1e-12), "standard")
    assert blend([a, replace(b, series="other")], [0.25, 0.75]).series == ""
    assert blend([a, b], [0.0, 1.0]).passing == pytest.approx((0.8, 0.4, 0.0), abs=1e-12)


@pytest.mark.parametrize("fractions", [[0.5, 0.6], [1.2, -0.2], [1.0], [0.5, 0.5 + 1e-8]])
def test_blend_fractions_refused(fractions):
    sizes = [s * MM for s in (2.36, 1.18, 0.6)]
    a = from_passing(sizes, [1.0, 0.6, 0.2], ASTM)
    with pytest.raises(GradingInputError) as exc:
        blend([a, a], fractions)
    assert str(exc.value) == "blend fractions must be non-negative and sum to 1"


def test_fit_blend_of_one_sand_against_a_target_on_fewer_sieves():
    sand = from_passing([s * MM for s in SAND_MM], SAND_P, ASTM)
    target = from_passing([s * MM for s in (1.18, 0.6, 0.3)], [0.8, 0.5, 0.3], ASTM)
    fit = fit_blend([sand], target)
    # one sand: all of it; residual on the target's sieves −0.1, 0, −0.1 by hand:
    # RMS = √(0.02/3) = 0.0816497
    assert fit.proportions == (1.0,)
    assert fit.sieves == (1.18 * MM, 0.6 * MM, 0.3 * MM)
    assert fit.rms == pytest.approx(0.0816497, abs=1e-7)
    with pytest.raises(GradingInputError) as exc:
        fit_blend([], target)
    assert str(exc.value) == "a blend needs at least one sand"


def test_fit_blend_proportions_sum_to_one_exactly():
    sizes = [s * MM for s in (4.75, 2.36, 1.18, 0.6, 0.3, 0.15)]
    a = from_passing(sizes, [1.0, 0.92, 0.74, 0.51, 0.24, 0.07], ASTM)
    c = from_passing(sizes, [1.0, 0.80, 0.50, 0.30, 0.10, 0.02], ASTM)
    t = from_passing(sizes, [1.0, 0.95, 0.80, 0.60, 0.35, 0.10], ASTM)
    assert sum(fit_blend([a, c], t).proportions) == pytest.approx(1.0, abs=1e-12)


def test_volume_to_mass_fractions_edges():
    # by hand: 1 × 0.6 and 0.5 × 1.2 (t/m³) are equal masses: 0.5 each
    assert volume_to_mass_fractions([1.0, 0.5], [0.6, 1.2]) == pytest.approx([0.5, 0.5])
    with pytest.raises(GradingInputError) as exc:
        volume_to_mass_fractions([1.0, 0.0], [1500, 1450])
    assert str(exc.value) == "parts and bulk densities must be greater than zero"


def test_binder_aggregate_whole_with_the_binder_loss():
    # by hand: 50.0 g sample, 38.5 g residue: binder 11.5 g as found, 11.5/38.5 = 0.298701;
    # LOI of the binder 30 %: net 11.5 × 0.7 = 8.05 g, 8.05/38.5 = 0.209091; by volume with
    # 700 and 1500 kg/m³: (8.05/700)/(38.5/1500) = 0.448052
    r = binder_aggregate(0.050, 0.0385, 700, 1500, binder_loss=0.30)
    assert r.binder_mass == pytest.approx(0.0115, abs=1e-12)
    assert r.aggregate_mass == 0.0385
    assert r.by_mass == pytest.approx(0.298701, abs=1e-6)
    assert r.by_volume == pytest.approx(0.448052, abs=1e-6)
    assert r.binder_loss == 0.30
    assert r.by_mass_loss_free == pytest.approx(0.209091, abs=1e-6)
    # without a loss: no loss-free ratio, loss 0; one density alone gives no volume ratio
    r0 = binder_aggregate(0.050, 0.0385, 700, None)
    assert (r0.by_volume, r0.binder_loss, r0.by_mass_loss_free) == (None, 0.0, None)
    r00 = binder_aggregate(0.050, 0.0385, binder_loss=0.0)       # a loss of 0 % is a value
    assert r00.by_mass_loss_free == pytest.approx(0.298701, abs=1e-6)


@pytest.mark.parametrize("args, message", [
    ((0.0, 0.0385), "sample and residue masses must be greater than zero"),
    ((0.05, 0.0), "sample and residue masses must be greater than zero"),
    ((0.05, 0.05), "the insoluble residue must be lighter than the sample"),
    ((0.05, 0.0385, None, None, 1.0), "the binder's loss on ignition must lie in 0–100 %"),
    ((0.05, 0.0385, None, None, -0.1), "the binder's loss on ignition must lie in 0–100 %"),
])
def test_binder_aggregate_refusals_whole(args, message):
    with pytest.raises(GradingInputError) as exc:
        binder_aggregate(*args)
    assert str(exc.value) == message


def test_from_retained_edges():
    sizes = [s * MM for s in (2.36, 1.18, 0.6)]
    # the pan is 0 unless given: 10 + 30 + 60 g all retained, nothing passes 0.6 mm
    assert from_retained(sizes, [10, 30, 60], ASTM).pan == 0.0
    # half a gram in the pan and half a gram retained: masses in any unit, however small
    g = from_retained(sizes, [0.0, 0.0, 0.5], ASTM, pan=0.5)
    assert g.passing == pytest.approx((1.0, 1.0, 0.5), abs=1e-12)
    for masses, pan, message in (([10, -1, 5], 0.0, "masses retained cannot be negative"),
                                 ([10, 1, 5], -1.0, "masses retained cannot be negative"),
                                 ([0, 0, 0], 0.0, "the masses retained add up to zero")):
        with pytest.raises(GradingInputError) as exc:
            from_retained(sizes, masses, ASTM, pan=pan)
        assert str(exc.value) == message


def test_from_passing_edges():
    sizes = [s * MM for s in (2.36, 1.18, 0.6)]
    # nothing passing the finest sieve is a reading (0 %), not an error
    assert from_passing(sizes, [1.0, 0.5, 0.0], ASTM).pan == 0.0
    for passing in ([1.0, 0.5], [1.0]):
        with pytest.raises(GradingInputError) as exc:
            from_passing(sizes if len(passing) == 2 else sizes[:1], passing, ASTM)
        assert str(exc.value) == "a grading needs at least two sieves, each with a passing value"
    with pytest.raises(GradingInputError) as exc:
        from_passing(sizes, [1.0, 0.5, -0.1], ASTM)
    assert str(exc.value) == "passing must lie between 0 and 100 %"
    with pytest.raises(GradingInputError) as exc:
        from_passing([2.36 * MM, 2.4 * MM], [1.0, 0.5], ASTM)
    assert str(exc.value) == "a sieve appears twice in the analysis"
    with pytest.raises(GradingInputError) as exc:
        from_passing([4.75 * MM, 0.6 * MM, 0.15 * MM], [1.0, 0.5, 0.1], ASTM)
    assert str(exc.value) == "the sieve series has gaps: no result for 0.3 mm, 1.18 mm, 2.36 mm"


def test_match_sieve_at_exactly_two_percent():
    from specgen.science.grading import match_sieve
    # SAME_SIEVE is 2 %, the edge included: 51 against 50 is 2 % off exactly (0.02 × 50 = 1.0
    # in binary floating point too); 51.5 is 3 % off
    assert match_sieve(51.0, [50.0]) == 50.0
    assert match_sieve(51.5, [50.0]) is None


def test_fineness_modulus_refuses_a_coarser_sieve_when_the_top_one_held_material():
    # ASTM C125: 9.5 mm counts in the FM; 3 % held on 4.75 mm, so what 9.5 mm held is unknown
    g = from_passing([s * MM for s in SAND_MM], [0.97, 0.9, 0.7, 0.5, 0.2, 0.05], ASTM)
    with pytest.raises(GradingInputError) as exc:
        fineness_modulus(g, FM_SIEVES)
    assert str(exc.value) == "the fineness modulus needs the 9.5 mm sieve"
    with pytest.raises(GradingInputError) as exc:
        common_sieves(g, from_passing([0.15 * MM, 0.075 * MM], [0.05, 0.0], ASTM))
    assert str(exc.value) == "the gradings share fewer than two sieves"
