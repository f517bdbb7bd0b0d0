"""CIEDE2000 against the published test pairs and against colour-science; Lab summaries."""
import math

import colour
import numpy as np
import pytest

from specgen.science.colour import (ColourInputError, ciede2000, lab_to_srgb, lab_to_xyz,
                                    summarise)

# Sharma, Wu & Dalal, Color Res. Appl. 30 (2005) 21-30, Table 1: the 34 CIEDE2000 test pairs
# (L1, a1, b1), (L2, a2, b2), published ΔE00 (4 decimals).
SHARMA_2005_TABLE_1 = [
    ((50.0000, 2.6772, -79.7751), (50.0000, 0.0000, -82.7485), 2.0425),
    ((50.0000, 3.1571, -77.2803), (50.0000, 0.0000, -82.7485), 2.8615),
    ((50.0000, 2.8361, -74.0200), (50.0000, 0.0000, -82.7485), 3.4412),
    ((50.0000, -1.3802, -84.2814), (50.0000, 0.0000, -82.7485), 1.0000),
    ((50.0000, -1.1848, -84.8006), (50.0000, 0.0000, -82.7485), 1.0000),
    ((50.0000, -0.9009, -85.5211), (50.0000, 0.0000, -82.7485), 1.0000),
    ((50.0000, 0.0000, 0.0000), (50.0000, -1.0000, 2.0000), 2.3669),
    ((50.0000, -1.0000, 2.0000), (50.0000, 0.0000, 0.0000), 2.3669),
    ((50.0000, 2.4900, -0.0010), (50.0000, -2.4900, 0.0009), 7.1792),
    ((50.0000, 2.4900, -0.0010), (50.0000, -2.4900, 0.0010), 7.1792),
    ((50.0000, 2.4900, -0.0010), (50.0000, -2.4900, 0.0011), 7.2195),
    ((50.0000, 2.4900, -0.0010), (50.0000, -2.4900, 0.0012), 7.2195),
    ((50.0000, -0.0010, 2.4900), (50.0000, 0.0009, -2.4900), 4.8045),
    ((50.0000, -0.0010, 2.4900), (50.0000, 0.0010, -2.4900), 4.8045),
    ((50.0000, -0.0010, 2.4900), (50.0000, 0.0011, -2.4900), 4.7461),
    ((50.0000, 2.5000, 0.0000), (50.0000, 0.0000, -2.5000), 4.3065),
    ((50.0000, 2.5000, 0.0000), (73.0000, 25.0000, -18.0000), 27.1492),
    ((50.0000, 2.5000, 0.0000), (61.0000, -5.0000, 29.0000), 22.8977),
    ((50.0000, 2.5000, 0.0000), (56.0000, -27.0000, -3.0000), 31.9030),
    ((50.0000, 2.5000, 0.0000), (58.0000, 24.0000, 15.0000), 19.4535),
    ((50.0000, 2.5000, 0.0000), (50.0000, 3.1736, 0.5854), 1.0000),
    ((50.0000, 2.5000, 0.0000), (50.0000, 3.2972, 0.0000), 1.0000),
    ((50.0000, 2.5000, 0.0000), (50.0000, 1.8634, 0.5757), 1.0000),
    ((50.0000, 2.5000, 0.0000), (50.0000, 3.2592, 0.3350), 1.0000),
    ((60.2574, -34.0099, 36.2677), (60.4626, -34.1751, 39.4387), 1.2644),
    ((63.0109, -31.0961, -5.8663), (62.8187, -29.7946, -4.0864), 1.2630),
    ((61.2901, 3.7196, -5.3901), (61.4292, 2.2480, -4.9620), 1.8731),
    ((35.0831, -44.1164, 3.7933), (35.0232, -40.0716, 1.5901), 1.8645),
    ((22.7233, 20.0904, -46.6940), (23.0331, 14.9730, -42.5619), 2.0373),
    ((36.4612, 47.8580, 18.3852), (36.2715, 50.5065, 21.2231), 1.4146),
    ((90.8027, -2.0831, 1.4410), (91.1528, -1.6435, 0.0447), 1.4441),
    ((90.9257, -0.5406, -0.9208), (88.6381, -0.8985, -0.7239), 1.5381),
    ((6.7747, -0.2908, -2.4247), (5.8714, -0.0985, -2.2286), 0.6377),
    ((2.0776, 0.0795, -1.1350), (0.9033, -0.0636, -0.5514), 0.9082),
]


def test_table_has_all_34_pairs():
    assert len(SHARMA_2005_TABLE_1) == 34


@pytest.mark.parametrize("lab1, lab2, expected", SHARMA_2005_TABLE_1,
                         ids=[f"pair{i:02d}" for i in range(1, 35)])
def test_ciede2000_sharma_pairs(lab1, lab2, expected):
    # Sharma, Wu & Dalal (2005) Table 1, published to 4 decimals
    assert ciede2000(lab1, lab2).value == pytest.approx(expected, abs=1e-4)
    # the formula is symmetric in its two colours (Sharma et al. 2005, sec. "Mathematical observations")
    assert ciede2000(lab2, lab1).value == pytest.approx(ciede2000(lab1, lab2).value, abs=1e-12)


@pytest.mark.parametrize("lab1, lab2, expected", SHARMA_2005_TABLE_1)
def test_ciede2000_against_colour_science(lab1, lab2, expected):
    # reference library: colour-science, colour.delta_E(method="CIE 2000")
    ref = float(colour.delta_E(np.array(lab1), np.array(lab2), method="CIE 2000"))
    assert ciede2000(lab1, lab2).value == pytest.approx(ref, abs=1e-9)


def test_ciede2000_random_pairs_against_colour_science():
    rng = np.random.default_rng(2005)
    labs = np.column_stack([rng.uniform(0, 100, 200), rng.uniform(-100, 100, 200),
                            rng.uniform(-100, 100, 200)])
    for x, y in zip(labs[:100], labs[100:]):
        # reference library: colour-science
        ref = float(colour.delta_E(x, y, method="CIE 2000"))
        assert ciede2000(x, y).value == pytest.approx(ref, abs=1e-9)


def test_parametric_factor_kL_against_colour_science():
    lab1, lab2 = (61.8, 3.9, 14.2), (66.0, 2.8, 11.9)
    # colour-science: textiles = True sets kL = 2 (CIE 2000)
    ref = float(colour.delta_E(np.array(lab1), np.array(lab2), method="CIE 2000", textiles=True))
    assert ciede2000(lab1, lab2, kL=2.0).value == pytest.approx(ref, abs=1e-9)


def test_identical_colours_zero():
    assert ciede2000((50, 5, -5), (50, 5, -5)).value == 0.0


@pytest.mark.parametrize("bad, words", [
    ((101.0, 0, 0), "L* must lie between 0 and 100; found 101"),
    ((-0.5, 0, 0), "L* must lie between 0 and 100; found -0.5"),
    ((50.0, math.nan, 0), "must be finite"),
])
def test_lab_out_of_range_refused(bad, words):
    with pytest.raises(ColourInputError, match=words.replace("*", r"\*")):
        ciede2000(bad, (50, 0, 0))


def test_summary_mean_sd_and_spread():
    readings = [(61.8, 3.9, 14.2), (62.5, 4.1, 14.9), (61.2, 3.7, 13.8)]
    s = summarise(readings)
    arr = np.array(readings)
    # reference: numpy mean and sample standard deviation (ddof = 1)
    assert s.mean == pytest.approx(tuple(arr.mean(axis=0)), abs=1e-12)
    assert s.sd == pytest.approx(tuple(arr.std(axis=0, ddof=1)), abs=1e-12)
    ref = max(float(colour.delta_E(r, arr.mean(axis=0), method="CIE 2000")) for r in arr)
    assert s.spread == pytest.approx(ref, abs=1e-9)      # colour-science
    assert summarise([(50, 1, 2)]).sd == (0.0, 0.0, 0.0)


@pytest.mark.parametrize("lab", [(62.0, 4.0, 14.0), (30.0, -10.0, 5.0), (90.0, 1.0, 20.0)])
def test_lab_to_srgb_against_colour_science(lab):
    # colour-science: Lab -> XYZ (D65) -> sRGB (IEC 61966-2-1); white points differ in the
    # 5th decimal between the CIE 15 tristimulus and the chromaticity-derived white.
    ref = colour.XYZ_to_sRGB(colour.Lab_to_XYZ(np.array(lab)))
    sw = lab_to_srgb(lab)
    assert sw.rgb == pytest.approx(tuple(ref), abs=2e-3)
    assert not sw.clipped and sw.hex.startswith("#") and len(sw.hex) == 7


def test_lab_to_xyz_white_and_out_of_gamut():
    # CIE 15: L* = 100, a* = b* = 0 is the reference white itself
    assert lab_to_xyz((100, 0, 0)) == pytest.approx((0.95047, 1.0, 1.08883), abs=1e-12)
    assert lab_to_srgb((50, 120, -120)).clipped
