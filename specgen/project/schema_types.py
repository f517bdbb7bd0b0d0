"""The value types and the base model of the project folder format (``schema.py`` gathers
the models of every file; the models of each file live in ``<file>_schema.py``).

Quantities are written with their unit (``"12 MPa"``, ``"1740 psi"``) and arrive as SI
floats; every number passes ``units.plausible``.
"""
from __future__ import annotations


import unicodedata
from typing import Annotated

from pydantic import (AfterValidator, BaseModel, BeforeValidator, ConfigDict, Field,
                      field_validator)
from pydantic_core import PydanticCustomError

from specgen import units


ID_PATTERN = r"^[A-Za-z0-9][A-Za-z0-9._-]{0,39}$"
Id = Annotated[str, Field(pattern=ID_PATTERN, description="short identifier: letters, digits, . _ -")]


def _plain_text(value: str) -> str:
    # a control character (NUL, escape codes …) written as a YAML escape is damage, not text
    if any(unicodedata.category(c) == "Cc" and c not in "\n\t" for c in value):
        raise ValueError("holds a control character (such as NUL); write plain text")
    return value


Text = Annotated[str, Field(max_length=4000), AfterValidator(_plain_text)]
# an element id in the published site (what a review comment is anchored to)
ANCHOR_PATTERN = r"^[A-Za-z][A-Za-z0-9_:.-]{0,119}$"


def _quantity(kind: str):
    def parse(value):
        return units.parse(value, kind)
    parse.unit_kind = kind  # read by the format reference (project/reference.py)
    return BeforeValidator(parse)


def _positive(value: float) -> float:
    if value <= 0:
        raise ValueError("must be greater than zero")
    return value


# A plain number (parts, ratios, prices, factors): finite and of a plausible size, by the
# same guard as every quantity (units.plausible), so NaN, infinity or 1e308 never load.
Number = Annotated[float, AfterValidator(lambda v: units.plausible(v, "number"))]
Pressure = Annotated[float, _quantity("pressure"), AfterValidator(_positive)]
Length = Annotated[float, _quantity("length"), AfterValidator(_positive)]
Area = Annotated[float, _quantity("area"), AfterValidator(_positive)]
Density = Annotated[float, _quantity("density"), AfterValidator(_positive)]
Duration = Annotated[float, _quantity("time"), AfterValidator(_positive)]
Temperature = Annotated[float, _quantity("temperature")]
MolarEnergy = Annotated[float, _quantity("molar_energy"), AfterValidator(_positive)]
Fraction = Annotated[float, _quantity("fraction"), AfterValidator(_positive)]
Volume = Annotated[float, _quantity("volume"), AfterValidator(_positive)]
Mass = Annotated[float, _quantity("mass"), AfterValidator(_positive)]
VolumeRate = Annotated[float, _quantity("volume_rate"), AfterValidator(_positive)]
MassPercent = Annotated[float, BeforeValidator(lambda v: _percent(v)), Field(ge=0, le=100)]
Expansion = Annotated[float, _quantity("expansion"), AfterValidator(_positive)]
Capillary = Annotated[float, _quantity("capillary"), AfterValidator(_positive)]


def _percent(value):
    """Oxide contents: a number (mass %) or text ending in '%'."""
    if isinstance(value, str) and value.strip().endswith("%"):
        return float(value.strip().rstrip("%"))
    return value


def _percent_with_unit(value):
    """A content that must carry its unit ('0.35 %', '3500 ppm'), as mass %."""
    try:
        return units.parse(value, "fraction") * 100.0
    except units.UnitProblem:
        if isinstance(value, (int, float)) and not isinstance(value, bool):
            raise PydanticCustomError(
                "no_unit", "the number {value} has no unit",
                {"value": value, "fix": f"write it with its unit, e.g. '{value} %' (mass % of "
                 "the dry material) or in ppm."}) from None
        raise


_percent_with_unit.unit_kind = "mass %, with its unit, e.g. '0.35 %'"


#: A mass content written with its unit, e.g. '0.35 %' (a bare number is refused).
PercentWithUnit = Annotated[float, BeforeValidator(_percent_with_unit), Field(ge=0, le=100)]


def _constituents():
    from specgen import refdata
    return refdata.load("constituents").data


def _synonyms() -> dict[str, str]:
    """Every name an analysis may use (canonical keys and synonyms, case-folded) → key."""
    out = {}
    for key, c in _constituents().items():
        for name in [key, *c.get("synonyms", [])]:
            out[" ".join(str(name).split()).casefold()] = key
    return out


def _canonical(name: str) -> str | None:
    if "+" in name and len(parts := [p.strip() for p in name.split("+")]) > 1 \
            and all(p for p in parts):
        keys = [_synonyms().get(" ".join(p.split()).casefold()) for p in parts]
        return "+".join(keys) if all(keys) else None
    return _synonyms().get(" ".join(name.split()).casefold())


def _canonical_names(value):
    """Synonyms of old reports become the canonical keys; two names of one constituent are
    refused; unknown names pass on to :func:`_known_constituent` (located at their key)."""
    if not isinstance(value, dict):
        return value
    out, seen = {}, {}
    for name, v in value.items():
        key = _canonical(str(name)) or str(name)
        if key in seen:
            raise PydanticCustomError(
                "repeated_constituent", "'{a}' and '{b}' name the same constituent ({key})",
                {"a": seen[key], "b": name, "key": key,
                 "fix": "give it once (keep the value the report prints under its own name)."})
        seen[key] = name
        out[key] = v
    return out


def _known_constituent(name: str) -> str:
    if _canonical(name) is None:
        from specgen.errors import did_you_mean
        names = [n for k, c in _constituents().items() for n in [k, *c.get("synonyms", [])]]
        hint = did_you_mean(name, names)
        raise PydanticCustomError(
            "unknown_constituent", "unknown constituent '{name}'",
            {"name": name, "fix": (hint + " " if hint else "") + "Use a name of the list in the "
             "format reference (content/data/constituents.yaml): oxides such as CaO, SiO2; LOI, "
             "CO2, H2O+ (combined water), H2O- (moisture), organic matter, insoluble residue."})
    return name


class Model(BaseModel):
    """Base of every document model: unknown keys refused, values immutable."""

    model_config = ConfigDict(extra="forbid", frozen=True, str_strip_whitespace=True,
                              allow_inf_nan=False)

    @field_validator("*", mode="after")
    @classmethod
    def _required_text_given(cls, value, info):
        """A required text field (a name, a title, a description) may not be left empty."""
        if isinstance(value, str) and not value and cls.model_fields[info.field_name].is_required():
            raise ValueError("is empty; this text is required")
        return value
