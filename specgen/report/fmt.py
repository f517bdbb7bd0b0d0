"""Number formatting for the dossier: enough digits to recompute, no false precision."""
from __future__ import annotations

import contextlib
import contextvars
import math

from specgen.dates import date_text  # noqa: F401  (one place; the render stage formats with it)
# the rule per quantity kind: one table, which the checks' messages read too
from specgen.precision import PRECISION, SYMBOL_PRECISION, Precision, by_symbol  # noqa: F401


#: between a value and its unit: a narrow no-break space (the unit never wraps away)
UNIT_SPACE = "\u202f"
MINUS = "\u2212"


#: ASCII spellings of units (as checks and data files write them) and their symbols
UNIT_SYMBOLS = {"degC": "°C", "deg C": "°C", "m^2": "m²", "m2": "m²", "m^3": "m³", "m3": "m³",
                "kg/m^3": "kg/m³", "kg/m3": "kg/m³", "cm^3": "cm³", "m/m^2": "m/m²",
                "kg/(m^2·min^0.5)": "kg/(m²·min^½)", "kg/(m2·min0.5)": "kg/(m²·min^½)",
                "currency/m^2": "currency/m²"}


def unit_symbol(unit: str) -> str:
    """The unit as a reader sees it: ``degC`` → ``°C``, ``m^2`` → ``m²``; ``min^½`` is set
    as a superscript by the Markdown extension :mod:`specgen.report.mdtypo`."""
    if not unit:
        return ""
    if unit in UNIT_SYMBOLS:
        return UNIT_SYMBOLS[unit]
    out = unit.replace("degC", "°C").replace("^0.5", "^½").replace("*", "·")
    return out.replace("^2", "²").replace("^3", "³")


def _signed(text: str) -> str:
    return MINUS + text[1:] if text.startswith("-") else text


def num(value, digits: int = 4) -> str:
    """``value`` with ``digits`` significant figures (plain text, a true minus sign);
    text passes through."""
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
    return _signed(f"{value:.{decimals}f}")


def rounded(value, unit_or_kind: str) -> str:
    """``value`` rounded by the rule of its quantity kind (:data:`SYMBOL_PRECISION` by its
    symbol, else :data:`PRECISION` by its unit), no unit."""
    if value is None or isinstance(value, (str, bool)) or not math.isfinite(value):
        return num(value)
    if unit_or_kind in SYMBOL_PRECISION:
        return _signed(by_symbol(value, unit_or_kind))
    rule = PRECISION.get(unit_symbol(unit_or_kind), Precision(significant=3))
    if rule.integer:
        return _signed(f"{round(value):d}")
    if rule.significant:
        return num(value, rule.significant)
    text = f"{value:.{rule.decimals}f}"
    return _signed("0" if float(text) == 0 else text)


def as_given(value) -> str:
    """An input value as the source gave it (no padding zeros), e.g. ``5.6``, ``0.2``."""
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        return _signed(f"{value + 0.0:.6g}")    # + 0.0: a negative zero reads 0, not −0
    return num(value)


def qty(value, unit: str, digits: int | None = None, kind: str = "") -> str:
    """Value and unit, e.g. ``4.9 MPa``, ``12.3 %`` (narrow no-break space between).

    Without ``digits`` the value is rounded by the rule of its kind (:data:`PRECISION`:
    what a reader needs), with its US customary value beside it when the practice shows
    units that way (:func:`unit_display`); with ``digits`` it keeps that many significant
    figures in SI (what a calculation sheet needs to be recomputed by hand).  A ``kind`` (the
    quantity's symbol) listed in :data:`SYMBOL_PRECISION` is shown by its rule either way:
    the sheet and the register read the same number.
    """
    if isinstance(value, str):  # a named result (a model, a class): its words
        from specgen.report.wording import plain
        return plain(value)
    symbol = unit_symbol(unit)
    text = rounded(value, kind) if kind in SYMBOL_PRECISION else rounded(value, symbol) \
        if digits is None else _to_recompute(value, symbol, digits)
    shown = f"{text}{UNIT_SPACE}{symbol}" if symbol and text != "—" else text
    beside = us_customary(value, symbol) if digits is None and _DISPLAY.get() == US_BESIDE \
        else ""
    # the reading in the text carries the US customary value beside it; a calculation sheet
    # (digits given) stays in SI, the units its formulas are written in
    return f"{shown} ({beside})" if beside else shown


#: the ways a practice may show units (content/data/practice.yaml ``unit_display``)
SI_ONLY, US_BESIDE = "SI", "US customary beside SI"
#: SI symbol → (pint unit, US customary pint unit, symbol shown, rule): the unit a reader of
#: American practice reads beside the SI value (NIST SP 811 / Handbook 44 definitions, as pint
#: carries them); kinds not listed (%, d, min, ratios) read the same in both systems
US_CUSTOMARY = {
    "MPa": ("MPa", "psi", "psi", Precision(significant=3)),
    "GPa": ("GPa", "ksi", "ksi", Precision(significant=3)),
    "°C": ("degC", "degF", "°F", Precision(decimals=0)),
    "mm": ("mm", "inch", "in", Precision(significant=2)),
    "m": ("m", "foot", "ft", Precision(significant=3)),
    "m²": ("m**2", "foot**2", "ft²", Precision(significant=3)),
    "m³": ("m**3", "yard**3", "yd³", Precision(significant=3)),
    "L": ("L", "gallon", "US gal", Precision(significant=3)),
    "kg": ("kg", "pound", "lb", Precision(significant=3)),
    "kg/m³": ("kg/m**3", "pound/foot**3", "lb/ft³", Precision(significant=3)),
}
_DISPLAY: contextvars.ContextVar[str] = contextvars.ContextVar("unit_display", default=SI_ONLY)


@contextlib.contextmanager
def unit_display(mode: str):
    """Show quantities the practice's way inside the block (``SI`` or ``US customary beside
    SI``); one render sets it once, from the practice the project follows."""
    if mode not in (SI_ONLY, US_BESIDE):
        raise ValueError(f"unknown unit display {mode!r}: expected {SI_ONLY!r} or {US_BESIDE!r}")
    token = _DISPLAY.set(mode)
    try:
        yield
    finally:
        _DISPLAY.reset(token)


def us_customary(value: float, symbol: str) -> str:
    """``value`` (in the SI ``symbol``) in its US customary unit, e.g. ``595 psi``; '' when
    the kind reads the same in both systems."""
    if symbol not in US_CUSTOMARY or not isinstance(value, (int, float)) \
            or isinstance(value, bool) or not math.isfinite(value):
        return ""
    from specgen.units import ureg
    si, us, shown, rule = US_CUSTOMARY[symbol]
    converted = float(ureg.Quantity(value, si).to(us).magnitude)
    if rule.significant and converted:
        # no more figures than the SI reading carries: 7.6 MPa reads 1100 psi, not 1102
        mag = math.floor(math.log10(abs(converted)))
        converted = round(converted, rule.significant - 1 - mag)
    text = num(converted, rule.significant) if rule.significant else \
        _signed(f"{converted:.{rule.decimals}f}")
    return f"{text}{UNIT_SPACE}{shown}"


def _to_recompute(value, symbol: str, digits: int) -> str:
    """A calculation sheet's number: ``digits`` significant figures, but a count stays an
    integer (``n = 18``, not ``18.00``) and a site quantity keeps the figures its kind
    supports (``0.403 m³``, not ``0.4032 m³``)."""
    if value is None or isinstance(value, (str, bool)) or not math.isfinite(value):
        return num(value)
    rule = PRECISION.get(symbol, Precision(significant=3))
    if rule.integer or (not symbol and float(value).is_integer()):
        return _signed(f"{round(value):d}")
    if symbol and rule.significant:
        return num(value, min(digits, rule.significant))
    return num(value, digits)


def count(n, word: str, many: str | None = None) -> str:
    """A count as an integer with its noun: ``1 measure``, ``2 coats``, ``0 days``."""
    n = int(round(n))
    return f"{n} {word if n == 1 else (many or word + 's')}"


def and_list(items) -> str:
    """``a, b and c`` for a reader (one item alone; nothing for none)."""
    items = list(items)
    return ", ".join(items[:-1]) + " and " + items[-1] if len(items) > 1 else "".join(items)


def anchor(*parts: str) -> str:
    """A stable HTML id from parts (lowercase, safe characters only)."""
    raw = "-".join(parts).lower()
    return "".join(ch if ch.isalnum() else "-" for ch in raw).strip("-")
