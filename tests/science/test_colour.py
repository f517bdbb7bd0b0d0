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


def _sharma_terms(lab1, lab2):
    """Sharma, Wu & Dalal (2005) eqs. 2-21 written out again here, step by step, for the
    intermediate terms the calculation sheet shows (ΔL', ΔC', ΔH', SL, SC, SH, RT, G)."""
    (L1, a1, b1), (L2, a2, b2) = lab1, lab2
    cbar = (math.sqrt(a1 * a1 + b1 * b1) + math.sqrt(a2 * a2 + b2 * b2)) / 2
    G = 0.5 * (1 - math.sqrt(cbar ** 7 / (cbar ** 7 + 25 ** 7)))                  # eq. 3
    ap1, ap2 = a1 * (1 + G), a2 * (1 + G)                                            # eq. 4
    cp1, cp2 = math.sqrt(ap1 ** 2 + b1 ** 2), math.sqrt(ap2 ** 2 + b2 ** 2)          # eq. 5
    hp1 = 0.0 if ap1 == b1 == 0 else math.degrees(math.atan2(b1, ap1)) % 360         # eq. 6
    hp2 = 0.0 if ap2 == b2 == 0 else math.degrees(math.atan2(b2, ap2)) % 360
    if cp1 * cp2 == 0:                                                               # eq. 10
        dh = 0.0
    elif abs(hp2 - hp1) <= 180:
        dh = hp2 - hp1
    elif hp2 - hp1 > 180:
        dh = hp2 - hp1 - 360
    else:
        dh = hp2 - hp1 + 360
    dH = 2 * math.sqrt(cp1 * cp2) * math.sin(math.radians(dh) / 2)                   # eq. 11
    cbp = (cp1 + cp2) / 2                                                            # eq. 13
    if cp1 * cp2 == 0:                                                               # eq. 14
        hbar = hp1 + hp2
    elif abs(hp1 - hp2) <= 180:
        hbar = (hp1 + hp2) / 2
    elif hp1 + hp2 < 360:
        hbar = (hp1 + hp2 + 360) / 2
    else:
        hbar = (hp1 + hp2 - 360) / 2
    r = math.radians
    T = (1 - 0.17 * math.cos(r(hbar - 30)) + 0.24 * math.cos(r(2 * hbar))            # eq. 15
         + 0.32 * math.cos(r(3 * hbar + 6)) - 0.20 * math.cos(r(4 * hbar - 63)))
    dtheta = 30 * math.exp(-((hbar - 275) / 25) ** 2)                                # eq. 16
    RC = 2 * math.sqrt(cbp ** 7 / (cbp ** 7 + 25 ** 7))                              # eq. 17
    lbar = (L1 + L2) / 2
    SL = 1 + 0.015 * (lbar - 50) ** 2 / math.sqrt(20 + (lbar - 50) ** 2)             # eq. 18
    SC, SH = 1 + 0.045 * cbp, 1 + 0.015 * cbp * T                                    # eqs. 19, 20
    RT = -math.sin(r(2 * dtheta)) * RC                                               # eq. 21
    return {"dL": L2 - L1, "dC": cp2 - cp1, "dH": dH, "SL": SL, "SC": SC, "SH": SH,
            "RT": RT, "G": G}


@pytest.mark.parametrize("lab1, lab2", [
    SHARMA_2005_TABLE_1[0][:2],       # pair 1: blue, hue difference small
    SHARMA_2005_TABLE_1[6][:2],       # pair 7: one colour neutral (C' = 0)
    SHARMA_2005_TABLE_1[24][:2],      # pair 25: L* away from 50
    SHARMA_2005_TABLE_1[32][:2],      # pair 33: dark colours
    ((50.0, 20.0, 1.8), (50.0, -10.0, -1.05)),   # h' 5° and 186°: difference just over 180°
    ((50.0, 20.0, -1.8), (50.0, -10.0, 1.05)),   # h' 355° and 174°: hue sum over 360°
    ((50.0, -10.0, -1.05), (50.0, 20.0, 1.8)),   # the first of these two reversed
    ((40.0, 0.0, 0.0), (60.0, 0.0, 0.0)),        # both neutral
])
def test_intermediate_terms_against_the_equations_written_out(lab1, lab2):
    d = ciede2000(lab1, lab2)
    ref = _sharma_terms(lab1, lab2)
    got = {k: getattr(d, k) for k in ref}
    assert got == pytest.approx(ref, rel=1e-12, abs=1e-12)
    # and the whole difference against colour-science
    assert d.value == pytest.approx(float(colour.delta_E(lab1, lab2, method="CIE 2000")),
                                    abs=1e-9)


@pytest.mark.parametrize("lab1, lab2", [
    ((50.0, 20.0, 1.8), (50.0, -10.0, -1.05)), ((50.0, 20.0, -1.8), (50.0, -10.0, 1.05)),
    ((50.0, 30.0, 2.0), (50.0, -15.0, -1.6)), ((50.0, -15.0, -1.6), (50.0, 30.0, 2.0)),
    ((70.0, 0.0, 40.0), (70.0, 0.5, -35.0)), ((70.0, 0.5, -35.0), (70.0, -0.5, 40.0)),
])
def test_ciede2000_across_the_hue_wrap_against_colour_science(lab1, lab2):
    # pairs whose hue angles are about 180° apart, either side of the 0/360° cut
    ref = float(colour.delta_E(lab1, lab2, method="CIE 2000"))
    assert ciede2000(lab1, lab2).value == pytest.approx(ref, abs=1e-9)


@pytest.mark.parametrize("lab", [
    (5.0, 0.0, 0.0),          # f(Y) = 21/116 below 6/29: the linear part of the inverse
    (20.0, 0.0, 80.0),        # f(Z) = 36/116 − 0.4 below 6/29
    (20.0, -70.0, 0.0),       # f(X) = 36/116 − 0.14 below 6/29
    (60.0, 60.0, -40.0),      # all three above 6/29: the cube
])
def test_lab_to_xyz_against_colour_science(lab):
    # colour-science Lab_to_XYZ with our D65 white given as its chromaticity (Y = 1)
    white = np.array([0.95047, 1.0, 1.08883])
    ref = colour.Lab_to_XYZ(np.array(lab), illuminant=colour.XYZ_to_xy(white))
    assert lab_to_xyz(lab) == pytest.approx(tuple(ref), rel=1e-9, abs=1e-12)


@pytest.mark.parametrize("call, message", [
    (lambda: ciede2000((101.0, 0, 0), (50, 0, 0)),
     "first colour: L* must lie between 0 and 100; found 101"),
    (lambda: ciede2000((50, 0, 0), (50, 0)),
     "second colour: a CIELAB colour has three values (L*, a*, b*)"),
    (lambda: ciede2000((50, 0, 0), (50, math.inf, 0)),
     "second colour: L*, a* and b* must be finite numbers"),
    (lambda: lab_to_xyz((-1.0, 0, 0)), "colour: L* must lie between 0 and 100; found -1"),
    (lambda: summarise([(50, 0, 0), (50, 0, 0), (120, 0, 0)]),
     "reading 3: L* must lie between 0 and 100; found 120"),
    (lambda: summarise([]), "no readings to summarise"),
])
def test_colour_refusals_name_the_colour_and_the_fix(call, message):
    with pytest.raises(ColourInputError) as exc:
        call()
    assert str(exc.value) == message


def test_black_and_white_are_in_range():
    # L* = 0 (black) and 100 (white) are the ends of the scale (CIE 15), both accepted
    assert ciede2000((0.0, 0.0, 0.0), (100.0, 0.0, 0.0)).value == pytest.approx(
        float(colour.delta_E((0, 0, 0), (100, 0, 0), method="CIE 2000")), abs=1e-9)


def test_summary_of_two_readings():
    readings = [(61.8, 3.9, 14.2), (62.5, 4.1, 14.9)]
    s = summarise(readings)
    # by hand: sample SD of two values = |x1 − x2| / √2
    assert s.n == 2
    assert s.sd == pytest.approx((0.7 / math.sqrt(2), 0.2 / math.sqrt(2), 0.7 / math.sqrt(2)),
                                 rel=1e-9)


def test_swatch_of_black_and_of_a_very_dark_grey():
    # IEC 61966-2-1: linear values up to 0.0031308 are encoded as 12.92·v; black is in gamut
    from specgen.science.colour import Swatch
    assert lab_to_srgb((0.0, 0.0, 0.0)) == Swatch((0.0, 0.0, 0.0), "#000000", False)
    # L* = 1: Y = 1/903.3 = 0.001107 (CIE 15 below the 6/29 point), so 12.92·0.001107 = 0.0143
    sw = lab_to_srgb((1.0, 0.0, 0.0))
    ref = colour.XYZ_to_sRGB(colour.Lab_to_XYZ(np.array([1.0, 0.0, 0.0])))   # colour-science
    assert sw.rgb == pytest.approx(tuple(ref), abs=2e-5)
    assert sw.rgb[1] == pytest.approx(12.92 / 903.3, abs=2e-5) and not sw.clipped


def test_swatch_clipped_below_zero_only():
    # a saturated green-blue: the red component falls below zero (colour-science gives −2.2
    # after encoding), the others stay inside; clipped to 0 and flagged
    sw = lab_to_srgb((50.0, -80.0, 0.0))
    ref = colour.XYZ_to_sRGB(colour.Lab_to_XYZ(np.array([50.0, -80.0, 0.0])))
    assert ref[0] < 0 and 0 < ref[1] < 1 and 0 < ref[2] < 1
    assert sw.clipped
    assert sw.rgb == pytest.approx((0.0, ref[1], ref[2]), abs=2e-4)
    # hex by hand: 0, 255 × 0.5756 = 146.8 → 147 = 0x93, 255 × 0.4590 = 117.0 → 0x75
    assert sw.hex == "#009375"


def test_swatch_clipped_above_one_only():
    # a light yellow: red above one (colour-science 1.11), green and blue inside: clipped to 1
    sw = lab_to_srgb((95.0, 0.0, 90.0))
    ref = colour.XYZ_to_sRGB(colour.Lab_to_XYZ(np.array([95.0, 0.0, 90.0])))
    assert ref[0] > 1 and 0 < ref[1] < 1 and 0 < ref[2] < 1
    assert sw.clipped
    assert sw.rgb == pytest.approx((1.0, ref[1], ref[2]), abs=2e-4)


def test_swatch_of_the_reference_white_is_not_clipped():
    # CIE 15: L* = 100, a* = b* = 0 is the D65 white; IEC 61966-2-1 gives its matrix to four
    # decimals, so the white's linear green comes out 1.000076 (colour-science, which uses the
    # same matrix, gives the same); each coefficient is known to ±0.5e-4, so a component is
    # known to 0.5e-4 × (X + Y + Z) = 0.5e-4 × 3.0393 = 1.52e-4 (hand derivation): in gamut.
    ref = colour.XYZ_to_RGB(np.array(lab_to_xyz((100.0, 0.0, 0.0))), "sRGB",
                            apply_cctf_encoding=False)
    assert 1.0 < ref[1] < 1.0 + 1.52e-4                       # the rounding, as colour-science sees it
    sw = lab_to_srgb((100.0, 0.0, 0.0))
    assert not sw.clipped and sw.hex == "#ffffff"
    assert sw.rgb == pytest.approx((1.0, 1.0, 1.0), abs=1e-4)


def test_swatch_just_beyond_the_matrix_rounding_is_clipped():
    # a white nudged to green (a* = −0.1): colour-science gives a linear green of 1.00065,
    # four times the 1.52e-4 the matrix's rounding allows (derivation above): out of gamut
    ref = colour.XYZ_to_RGB(np.array(lab_to_xyz((100.0, -0.1, 0.0))), "sRGB",
                            apply_cctf_encoding=False)
    assert ref[1] > 1.0 + 4 * 1.52e-4
    sw = lab_to_srgb((100.0, -0.1, 0.0))
    assert sw.clipped and sw.rgb[1] == pytest.approx(1.0, abs=1e-12)      # clipped to 1


def test_the_srgb_blue_primary_is_in_gamut_with_a_channel_at_zero():
    # the sRGB primary blue (0, 0, 1) in CIELAB by colour-science (about 32.30, 79.20, −107.85):
    # back through the four-decimal IEC matrix its linear green is a rounding away from 0
    # (within the matrix's tolerance), so the swatch is the primary itself, not clipped
    lab = colour.XYZ_to_Lab(colour.sRGB_to_XYZ([0.0, 0.0, 1.0]))
    sw = lab_to_srgb(tuple(lab))
    assert sw.hex == "#0000ff"
    assert sw.clipped is False
