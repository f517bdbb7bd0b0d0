"""Units at the edge: text with units in, SI floats out (and back for display).

Inside specgen every number is a plain float in SI: Pa, m, m², m³, kg, kg/m³, s,
K, J/mol, 1/K.  Fractions are plain ratios (0.25, not 25 %), except oxide analyses,
which stay in mass % because the trade's formulas are written on that basis.
pint is used only here, where user text is read and where values are shown.
"""
from __future__ import annotations

import math
import re
from dataclasses import dataclass
from functools import lru_cache

import pint

ureg = pint.UnitRegistry(autoconvert_offset_to_baseunit=True)
ureg.define("percent_ = 0.01 = pct")


@dataclass(frozen=True)
class Kind:
    """A physical kind of quantity: its SI unit and an example for messages."""

    name: str
    si: str
    example: str


KINDS: dict[str, Kind] = {k.name: k for k in [
    Kind("pressure", "Pa", "'12 MPa' or '1740 psi'"),
    Kind("length", "m", "'10 mm' or '0.5 in'"),
    Kind("area", "m**2", "'120 m^2' or '1300 ft^2'"),
    Kind("volume", "m**3", "'0.02 m^3' or '20 L'"),
    Kind("mass", "kg", "'25 kg' or '55 lb'"),
    Kind("volume_rate", "m**3/s", "'12 L/h' or '0.2 L/min'"),
    Kind("density", "kg/m**3", "'1500 kg/m^3'"),
    Kind("time", "s", "'28 d', '90 min' or '4 h'"),
    Kind("temperature", "K", "'20 degC' or '68 degF'"),
    Kind("fraction", "dimensionless", "'25 %' or '0.25'"),
    Kind("molar_energy", "J/mol", "'33.5 kJ/mol'"),
    Kind("expansion", "1/K", "'8e-6 1/K'"),
    Kind("capillary", "kg/m**2/s**0.5", "'0.05 kg/(m^2*s^0.5)' or '0.4 kg/(m^2*min^0.5)'"),
    Kind("areal_mass", "kg/m**2", "'1.2 kg/m^2' or '0.12 g/cm^2'"),
    Kind("absorption_rate", "kg/m**2/s", "'1.5 kg/(m^2*min)' or '1 g/(min*in^2)'"),
    Kind("dimensionless", "dimensionless", "'12'"),
]}

_NUMBER_UNIT = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")


class UnitProblem(ValueError):
    """A value whose unit is missing, unknown or of the wrong kind."""


@lru_cache(maxsize=512)
def _unit(text: str) -> pint.Unit:
    text = text.replace("²", "**2").replace("³", "**3").replace("^", "**").replace("°C", "degC")
    text = text.replace("%", "percent_")
    return ureg.parse_units(text)


def parse_unit(text: str, kind: str) -> pint.Unit:
    """Parse a unit name and make sure it is of the expected kind."""
    k = KINDS[kind]
    try:
        unit = _unit(text.strip())
    except Exception:
        raise UnitProblem(f"unknown unit '{text}'; expected a {k.name} unit such as {k.example}")
    if (1 * unit).dimensionality != (1 * ureg(k.si)).dimensionality:
        raise UnitProblem(f"'{text}' is not a {k.name} unit; expected e.g. {k.example}")
    return unit


@lru_cache(maxsize=512)
def _affine(unit_text: str, kind: str) -> tuple[float, float]:
    """(scale, offset) with SI = scale·value + offset; every unit conversion is affine."""
    unit = parse_unit(unit_text, kind)
    si = KINDS[kind].si
    zero = float(ureg.Quantity(0.0, unit).to(si).magnitude)
    one = float(ureg.Quantity(1.0, unit).to(si).magnitude)
    return one - zero, zero


def to_si(value: float, unit_text: str, kind: str) -> float:
    """Convert a number given in ``unit_text`` to the SI unit of ``kind``.

    pint is asked once per unit for the conversion's scale and offset (cached), so a
    lab table of thousands of rows converts at the cost of a multiplication each.
    """
    scale, offset = _affine(unit_text, kind)
    return scale * float(value) + offset


def parse(text: object, kind: str, *, default_unit: str | None = None) -> float:
    """Read ``"12 MPa"`` (or a bare number when ``default_unit`` is allowed) as SI.

    Raises :class:`UnitProblem` with a message that says what was expected.
    """
    k = KINDS[kind]
    if isinstance(text, bool):
        raise UnitProblem(f"expected a {k.name} with its unit, e.g. {k.example}; found {text!r}")
    if isinstance(text, (int, float)):
        if default_unit is None:
            raise UnitProblem(f"the number {text!r} has no unit; write it with its unit, "
                              f"e.g. {k.example}")
        value, unit_text = float(text), default_unit
    else:
        m = _NUMBER_UNIT.match(str(text))
        if not m:
            raise UnitProblem(f"expected a number and a unit, e.g. {k.example}; found {text!r}")
        value, unit_text = float(m.group(1)), m.group(2)
        if not unit_text:
            if default_unit is None:
                raise UnitProblem(f"'{text}' has no unit; expected e.g. {k.example}")
            unit_text = default_unit
    if not math.isfinite(value):
        raise UnitProblem(f"expected a finite number; found {text!r}")
    return to_si(value, unit_text, kind)


def from_si(value: float, unit_text: str, kind: str) -> float:
    """Convert an SI value of ``kind`` into ``unit_text`` for display."""
    unit = parse_unit(unit_text, kind)
    return float(ureg.Quantity(value, KINDS[kind].si).to(unit).magnitude)


HEADER = re.compile(r"^\s*(?P<name>[^\[\]]+?)\s*(?:\[(?P<unit>[^\]]*)\])?\s*$")


def split_header(header: str) -> tuple[str, str | None]:
    """``'compressive [MPa]'`` → ``('compressive', 'MPa')``; no bracket → unit ``None``."""
    m = HEADER.match(header or "")
    if not m:
        return header.strip(), None
    unit = m.group("unit")
    return m.group("name").strip(), (unit.strip() if unit is not None else None)
