"""Number formatting for the dossier: enough digits to recompute, no false precision."""
from __future__ import annotations

import math


#: How the dossier names each binder type of materials.yaml (one table for every page).
BINDER_WORDS = {"natural_cement": "natural cement", "nhl": "natural hydraulic lime (NHL)",
                "fl": "formulated lime (FL)", "hl": "hydraulic lime (HL)", "air_lime": "air lime",
                "portland": "Portland cement", "pozzolan": "pozzolan"}


def num(value, digits: int = 4) -> str:
    """``value`` with ``digits`` significant figures (plain text); text passes through."""
    if value is None:
        return "—"
    if isinstance(value, str):
        return value
    if isinstance(value, bool):
        return "yes" if value else "no"
    if not math.isfinite(value):
        return "—"
    if value == 0:
        return "0"
    mag = math.floor(math.log10(abs(value)))
    decimals = max(0, digits - 1 - mag)
    text = f"{value:.{decimals}f}"
    return text


def as_given(value) -> str:
    """An input value as the source gave it (no padding zeros), e.g. ``5.6``, ``0.2``."""
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        return f"{value:.6g}"
    return num(value)


def qty(value, unit: str, digits: int = 4) -> str:
    """Value and unit, e.g. ``4.85 MPa``; percentages written ``12.3 %``."""
    text = num(value, digits)
    return f"{text} {unit}".strip() if unit else text


def anchor(*parts: str) -> str:
    """A stable HTML id from parts (lowercase, safe characters only)."""
    raw = "-".join(parts).lower()
    return "".join(ch if ch.isalnum() else "-" for ch in raw).strip("-")
