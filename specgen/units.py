"""Units at the edge: text with units in, SI floats out (and back for display).

Inside specgen every number is a plain float in SI: Pa, m, m², m³, kg, kg/m³, s,
K, J/mol, 1/K.  Fractions are plain ratios (0.25, not 25 %), except oxide analyses,
which stay in mass % because the trade's formulas are written on that basis.
pint is used only here, where user text is read and where values are shown.
"""
from __future__ import annotations

import math
import os
import re
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path

import pint


def _registry() -> pint.UnitRegistry:
    """pint's registry, its parsed definition files kept in the user's cache (pint's own
    ``cache_folder``: reading them afresh is most of the registry's 0.3 s of CPU time, paid by
    every command); a cache that cannot be written or read only costs that time."""
    base = Path(os.environ.get("XDG_CACHE_HOME") or Path.home() / ".cache")
    try:
        return pint.UnitRegistry(autoconvert_offset_to_baseunit=True,
                                 cache_folder=base / "specgen" / f"units-pint-{pint.__version__}")
    except Exception:   # noqa: BLE001 — an unwritable or damaged cache: parse as without one
        return pint.UnitRegistry(autoconvert_offset_to_baseunit=True)


ureg = _registry()
ureg.define("percent_ = 0.01 = pct")

# a capillary coefficient in kg/(m²·s^0.5) times this is in kg/(m²·min^0.5), the unit of
# EN 1015-18 (the checks record and the dossier shows it so)
ROOT_MIN = math.sqrt(60.0)


@dataclass(frozen=True)
class Kind:
    """A physical kind of quantity: its SI unit, an example for messages, and the range of
    magnitudes (SI) any value of this kind in a masonry-repair project can have.

    The range is deliberately wide (orders of magnitude beyond any real material or wall):
    it refuses values that are typing or unit errors and would break the arithmetic (an
    overflow to infinity, a division by almost nothing), not unusual ones.  A non-zero
    magnitude below ``low`` or above ``high`` is refused; ``signed`` says whether a
    negative value is possible at all (a temperature in K is not).
    """

    name: str
    si: str
    example: str
    low: float = 0.0
    high: float = 1e9
    signed: bool = True


KINDS: dict[str, Kind] = {k.name: k for k in [
    Kind("pressure", "Pa", "'12 MPa' or '1740 psi'", 1e-3, 1e12),        # 1000 GPa
    Kind("length", "m", "'10 mm' or '0.5 in'", 1e-9, 1e5),              # 100 km
    Kind("area", "m**2", "'120 m^2' or '1300 ft^2'", 1e-9, 1e8),
    Kind("volume", "m**3", "'0.02 m^3' or '20 L'", 1e-12, 1e7),
    Kind("mass", "kg", "'25 kg' or '55 lb'", 1e-9, 1e9),
    Kind("volume_rate", "m**3/s", "'12 L/h' or '0.2 L/min'", 1e-12, 1e3),
    Kind("density", "kg/m**3", "'1500 kg/m^3'", 1e-3, 1e5),             # osmium: 2.3e4
    Kind("time", "s", "'28 d', '90 min' or '4 h'", 0.0, 1e10),          # about 300 years
    Kind("temperature", "K", "'20 degC' or '68 degF'", 0.0, 1e4, signed=False),
    Kind("fraction", "dimensionless", "'25 %' or '0.25'", 1e-12, 1e3),
    Kind("molar_energy", "J/mol", "'33.5 kJ/mol'", 1e-3, 1e7),
    Kind("expansion", "1/K", "'8e-6 1/K'", 1e-12, 1.0),
    Kind("capillary", "kg/m**2/s**0.5", "'0.05 kg/(m^2*s^0.5)' or '0.4 kg/(m^2*min^0.5)'",
         1e-12, 1e3),
    Kind("areal_mass", "kg/m**2", "'1.2 kg/m^2' or '0.12 g/cm^2'", 0.0, 1e5),
    Kind("absorption_rate", "kg/m**2/s", "'1.5 kg/(m^2*min)' or '1 g/(min*in^2)'", 1e-9, 1e3),
    Kind("dimensionless", "dimensionless", "'12'", 0.0, 1e6),
    Kind("number", "dimensionless", "'2.5'", 1e-9, 1e9),
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
    return plausible(to_si(value, unit_text, kind), kind, text)


def plausible(value: float, kind: str, given: object = None) -> float:
    """``value`` (SI) if it is finite and within the range of its kind, else UnitProblem.

    The one guard every number read from a project passes (YAML quantities and plain
    numbers through the schema's field types, CSV cells through the table layer), so a
    NaN, an infinity or an absurd magnitude never reaches the science.  ``given`` is the
    value as the user wrote it, for the message.
    """
    k = KINDS[kind]
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise UnitProblem(f"expected a number; found {value!r}")
    shown = given if given is not None else f"{value:g}"
    what = "number" if kind == "number" else k.name.replace("_", " ")
    if math.isnan(value):
        raise UnitProblem(f"expected a {what}; found {shown!r}, which is not a number")
    size = abs(value)
    if value < 0 and not k.signed:
        raise UnitProblem(f"{shown} is below absolute zero; check the value and its unit")
    if size > k.high or (size and size < k.low):
        unit = "" if k.si == "dimensionless" else " " + k.si.replace("**", "^")
        bounds = (f"between {k.low:g} and {k.high:g}{unit}" if k.low
                  else f"up to {k.high:g}{unit}")
        raise UnitProblem(f"{shown} is not a plausible {what} (a size {bounds} is expected); "
                          "check the value and its unit")
    return float(value)


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
