"""How many figures a quantity is shown with: one rule per kind of quantity, read by the
checks when they write a number into a message and by the render stage on every page (the
register, the findings and the calculation sheets), so that one quantity reads the same
everywhere.  No imports: the checks and the render stage both read it.
"""
from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Precision:
    """How a kind of quantity is rounded for reading: ``decimals`` fixed decimals, or
    ``significant`` figures when set; ``integer`` for counts."""

    decimals: int = 2
    significant: int = 0
    integer: bool = False


#: the rule per quantity kind, by the unit the kind is shown in (what the measurement
#: supports, common practice: strengths to 0.1 MPa as lab reports give them, temperatures
#: to 0.1 °C, densities to 1 kg/m³, site volumes to three figures, ages in whole days)
PRECISION = {
    "MPa": Precision(decimals=1), "GPa": Precision(decimals=1), "%": Precision(decimals=1),
    "°C": Precision(decimals=1), "kg/m³": Precision(decimals=0), "d": Precision(integer=True),
    "min": Precision(integer=True), "h": Precision(decimals=1), "L": Precision(significant=3),
    "m³": Precision(significant=3), "m²": Precision(significant=3), "m": Precision(significant=3),
    "kg": Precision(significant=3), "g": Precision(significant=3), "mm": Precision(decimals=1),
    "m/m²": Precision(significant=3), "kJ/mol": Precision(decimals=1),
    "kg/(m²·min^½)": Precision(significant=2), "": Precision(significant=3),
    "count": Precision(integer=True),
}
#: quantity kinds that no unit names (indices and differences without a unit), by the symbol
#: the checks give them (fixed decimals): one precision wherever the quantity is shown — register, message,
#: finding and the result line of its calculation sheet alike.  Colour differences to 0.01
#: (a just-noticeable difference is about 1 ΔE00: common practice); the hydraulicity indices
#: to three decimals (their band edges are read to 0.1 — Boynton, from memory); the oxide
#: ratios, the movement mismatch and the fineness modulus to two (ASTM C125 states the
#: fineness modulus to 0.01, from memory)
SYMBOL_PRECISION = {
    "ΔE00": Precision(decimals=2), "CI": Precision(decimals=3), "HI": Precision(decimals=3),
    "LSF": Precision(decimals=3), "SR": Precision(decimals=2), "AR": Precision(decimals=2),
    "δ": Precision(decimals=2), "FM": Precision(decimals=2),
}


def by_symbol(value: float, symbol: str) -> str:
    """``value`` as the quantity ``symbol`` of :data:`SYMBOL_PRECISION` is shown (``6.35``
    for ΔE00 6.3545); a plain ASCII minus (the reader's wording sets the true one)."""
    text = f"{value:.{SYMBOL_PRECISION[symbol].decimals}f}"
    return "0" if float(text) == 0 else text
