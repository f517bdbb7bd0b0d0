"""Colour: CIEDE2000 colour difference, summary of repeated CIELAB readings, swatches.

Inputs are CIELAB coordinates (L* 0–100, a*, b* unbounded in principle, ±128 in practice),
dimensionless.  The CIEDE2000 formula is implemented from its published formulation
[Sharma, Wu & Dalal, Color Res. Appl. 30 (2005) 21–30, eqs. 1–24], including the
conventions the paper fixes for the hue mean and hue difference when a chroma is zero.

The swatch conversion (CIELAB → sRGB) follows CIE 15 (Lab → XYZ) and IEC 61966-2-1
(XYZ → linear sRGB → gamma-encoded sRGB) with the D65 white; it is for display only and
flags colours outside the sRGB gamut, which are clipped.
"""
from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from specgen.errors import ScienceInputError


class ColourInputError(ScienceInputError):
    """Lab values the colour functions cannot use."""


@dataclass(frozen=True)
class DeltaE00:
    """CIEDE2000 difference with its intermediate terms (for the calculation sheet)."""

    value: float
    dL: float        # ΔL'
    dC: float        # ΔC'
    dH: float        # ΔH'
    SL: float
    SC: float
    SH: float
    RT: float
    G: float


def _check_lab(lab: Sequence[float], which: str) -> tuple[float, float, float]:
    if len(lab) != 3:
        raise ColourInputError(f"{which}: a CIELAB colour has three values (L*, a*, b*)")
    L, a, b = (float(v) for v in lab)
    if not all(math.isfinite(v) for v in (L, a, b)):
        raise ColourInputError(f"{which}: L*, a* and b* must be finite numbers")
    if not 0.0 <= L <= 100.0:
        raise ColourInputError(f"{which}: L* must lie between 0 and 100; found {L:g}")
    return L, a, b


def ciede2000(lab1: Sequence[float], lab2: Sequence[float],
              kL: float = 1.0, kC: float = 1.0, kH: float = 1.0) -> DeltaE00:
    """CIEDE2000 colour difference ΔE00 between two CIELAB colours (parametric factors k)."""
    L1, a1, b1 = _check_lab(lab1, "first colour")
    L2, a2, b2 = _check_lab(lab2, "second colour")
    C1, C2 = math.hypot(a1, b1), math.hypot(a2, b2)
    Cbar7 = ((C1 + C2) / 2.0) ** 7
    G = 0.5 * (1.0 - math.sqrt(Cbar7 / (Cbar7 + 25.0 ** 7)))          # eq. 3
    a1p, a2p = (1.0 + G) * a1, (1.0 + G) * a2                            # eq. 4
    C1p, C2p = math.hypot(a1p, b1), math.hypot(a2p, b2)                  # eq. 5
    h1p = _hue(a1p, b1)                                                  # eq. 6
    h2p = _hue(a2p, b2)
    dLp = L2 - L1                                                        # eq. 8
    dCp = C2p - C1p                                                      # eq. 9
    if C1p * C2p == 0.0:                                                 # eq. 10
        dhp = 0.0
    else:
        dhp = h2p - h1p
        if dhp > 180.0:
            dhp -= 360.0
        elif dhp < -180.0:
            dhp += 360.0
    dHp = 2.0 * math.sqrt(C1p * C2p) * math.sin(math.radians(dhp / 2.0))  # eq. 11
    Lbp = (L1 + L2) / 2.0                                                # eq. 12
    Cbp = (C1p + C2p) / 2.0                                              # eq. 13
    hbp = _hue_mean(h1p, h2p, C1p * C2p)                                 # eq. 14
    T = (1.0 - 0.17 * math.cos(math.radians(hbp - 30.0))                 # eq. 15
         + 0.24 * math.cos(math.radians(2.0 * hbp))
         + 0.32 * math.cos(math.radians(3.0 * hbp + 6.0))
         - 0.20 * math.cos(math.radians(4.0 * hbp - 63.0)))
    dtheta = 30.0 * math.exp(-(((hbp - 275.0) / 25.0) ** 2))             # eq. 16
    Cbp7 = Cbp ** 7
    RC = 2.0 * math.sqrt(Cbp7 / (Cbp7 + 25.0 ** 7))                      # eq. 17
    SL = 1.0 + 0.015 * (Lbp - 50.0) ** 2 / math.sqrt(20.0 + (Lbp - 50.0) ** 2)  # eq. 18
    SC = 1.0 + 0.045 * Cbp                                               # eq. 19
    SH = 1.0 + 0.015 * Cbp * T                                           # eq. 20
    RT = -math.sin(math.radians(2.0 * dtheta)) * RC                      # eq. 21
    tL, tC, tH = dLp / (kL * SL), dCp / (kC * SC), dHp / (kH * SH)
    value = math.sqrt(tL ** 2 + tC ** 2 + tH ** 2 + RT * tC * tH)        # eq. 22
    return DeltaE00(value, dLp, dCp, dHp, SL, SC, SH, RT, G)


def _hue(a: float, b: float) -> float:
    """Hue angle in degrees, 0–360; 0 when a = b = 0 (the paper's convention)."""
    if a == 0.0 and b == 0.0:
        return 0.0
    return math.degrees(math.atan2(b, a)) % 360.0


def _hue_mean(h1: float, h2: float, c_product: float) -> float:
    if c_product == 0.0:
        return h1 + h2
    if abs(h1 - h2) <= 180.0:
        return (h1 + h2) / 2.0
    if h1 + h2 < 360.0:
        return (h1 + h2 + 360.0) / 2.0
    return (h1 + h2 - 360.0) / 2.0


@dataclass(frozen=True)
class LabSummary:
    """Mean and spread of repeated readings of one sample."""

    n: int
    mean: tuple[float, float, float]
    sd: tuple[float, float, float]      # sample standard deviation (n − 1); 0 for n = 1
    spread: float                       # largest ΔE00 of a reading from the mean colour


def summarise(readings: Sequence[Sequence[float]]) -> LabSummary:
    """Mean L*, a*, b*, their sample SDs, and the largest ΔE00 of a reading from the mean."""
    if len(readings) == 0:
        raise ColourInputError("no readings to summarise")
    arr = np.array([_check_lab(r, f"reading {i + 1}") for i, r in enumerate(readings)])
    mean = tuple(float(v) for v in arr.mean(axis=0))
    sd = tuple(float(v) for v in (arr.std(axis=0, ddof=1) if len(arr) > 1 else np.zeros(3)))
    spread = max(ciede2000(r, mean).value for r in arr)
    return LabSummary(len(arr), mean, sd, spread)


# IEC 61966-2-1 (sRGB): XYZ (D65, Y = 1) → linear RGB, and the D65 white of CIE 15 (2°).
_XYZ_TO_SRGB = np.array([[3.2406, -1.5372, -0.4986],
                         [-0.9689, 1.8758, 0.0415],
                         [0.0557, -0.2040, 1.0570]])
D65_WHITE = (0.95047, 1.0, 1.08883)


def lab_to_xyz(lab: Sequence[float], white: Sequence[float] = D65_WHITE) -> tuple[float, ...]:
    """CIELAB → XYZ (Y of the white = 1), inverse of the CIE 15 formulae."""
    L, a, b = _check_lab(lab, "colour")
    fy = (L + 16.0) / 116.0
    fx, fz = fy + a / 500.0, fy - b / 200.0
    eps = 6.0 / 29.0

    def inv(f: float) -> float:
        return f ** 3 if f > eps else 3.0 * eps ** 2 * (f - 4.0 / 29.0)
    return tuple(w * inv(f) for w, f in zip(white, (fx, fy, fz)))


@dataclass(frozen=True)
class Swatch:
    """An sRGB display colour: components 0–1, hex code, whether it had to be clipped."""

    rgb: tuple[float, float, float]
    hex: str
    clipped: bool


def lab_to_srgb(lab: Sequence[float]) -> Swatch:
    """CIELAB (D65) → gamma-encoded sRGB for a swatch; out-of-gamut colours are clipped."""
    xyz = np.array(lab_to_xyz(lab))
    lin = _XYZ_TO_SRGB @ xyz
    # IEC 61966-2-1 states the matrix to four decimals: each coefficient may be off by half a
    # unit of the fourth, so a linear component is known to 0.5e-4·(|X| + |Y| + |Z|) (the white
    # itself gives a green of 1.000076, inside that bound).  Beyond it a colour is clipped.
    tol = 0.5e-4 * float(np.abs(xyz).sum())
    clipped = bool(np.any(lin < -tol) or np.any(lin > 1.0 + tol))
    lin = np.clip(lin, 0.0, 1.0)
    enc = np.where(lin <= 0.0031308, 12.92 * lin, 1.055 * lin ** (1 / 2.4) - 0.055)
    rgb = tuple(float(v) for v in enc)
    return Swatch(rgb, "#" + "".join(f"{round(255 * v):02x}" for v in rgb), clipped)
