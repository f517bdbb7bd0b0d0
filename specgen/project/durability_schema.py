"""The project-file models of durability and soundness (kept beside schema.py, which uses them).

The site's climate (``dossier.yaml durability:``), the conditions a zone is exposed to,
the soundness tests of a binder, the setting times of a mix and the durability tests
of a repair mortar.  Quantities arrive as SI floats like every other field.
"""
from __future__ import annotations

from typing import Annotated, Literal

from pydantic import BaseModel, BeforeValidator, ConfigDict, Field, model_validator

from specgen import units


class Model(BaseModel):
    """Same configuration as schema.Model (unknown keys refused, values immutable); its own
    class here so that schema.py can import these models without an import cycle."""

    model_config = ConfigDict(extra="forbid", frozen=True, str_strip_whitespace=True)


def _quantity(kind: str):
    return BeforeValidator(lambda v: units.parse(v, kind))


def _percent(value):
    if isinstance(value, str) and value.strip().endswith("%"):
        return float(value.strip().rstrip("%"))
    return value


_Positive = Field(gt=0)
Temperature = Annotated[float, _quantity("temperature")]
Duration = Annotated[float, _quantity("time"), _Positive]
Length = Annotated[float, _quantity("length"), _Positive]
LengthOrZero = Annotated[float, _quantity("length"), Field(ge=0)]
Pressure = Annotated[float, _quantity("pressure"), _Positive]
Percent = Annotated[float, _quantity("fraction"), Field(ge=0)]
AbsorptionRate = Annotated[float, _quantity("absorption_rate"), _Positive]
MassPercent = Annotated[float, BeforeValidator(_percent), Field(ge=0, le=100)]

#: The words a zone's exposure may be given in (content/data/exposure_classes.yaml maps each
#: to its wetting, sea-water and chemical conditions).
ExposureCondition = Literal[
    "internal", "sheltered", "exposed", "driving_rain", "parapet", "coping", "below_dpc",
    "ground_contact", "salt_spray", "splash", "tidal", "submerged", "deicing_salts",
    "aggressive_ground"]


class DurabilitySettings(Model):
    """The site's winter climate, declared once for the project (dossier.yaml ``durability:``)."""

    freezing: bool | None = Field(
        None, description="the site sees air temperatures below 0 °C in winter, so wet masonry "
        "goes through freeze–thaw cycles (true/false; unknown leaves the frost check held)")
    lowest_temperature: Temperature | None = Field(
        None, description="lowest daily mean air temperature expected in winter, e.g. '-3 degC' "
        "(the cold condition of thaumasite; default: the coldest day of site_temperature)")
    source: str = Field("", max_length=4000, description="where the climate data come from, "
                        "e.g. the weather station and its years of record")


class Soundness(Model):
    """Soundness of a binder: free lime, free magnesia and the expansion test, as measured."""

    free_cao: MassPercent | None = Field(
        None, description="free (uncombined, unslaked) CaO, mass % of the binder, e.g. 1.2 "
        "(EN 459-2 / EN 196-2 style determination)")
    free_mgo: MassPercent | None = Field(
        None, description="free MgO (periclase), mass % of the binder, e.g. 0.4")
    expansion: LengthOrZero | None = Field(
        None, description="Le Chatelier expansion (EN 196-3 / EN 459-2), e.g. '1.5 mm'")
    autoclave_expansion: Percent | None = Field(
        None, description="autoclave expansion (ASTM C151), e.g. '0.3 %'")
    laboratory: str = Field("", max_length=4000, description="laboratory and report reference")


class SettingTime(Model):
    """Initial and final setting time of the mix's binder paste as dosed on the card."""

    initial: Duration = Field(description="initial setting time, e.g. '12 min'")
    final: Duration = Field(description="final setting time, e.g. '35 min'")
    method: Literal["vicat_en196_3", "vicat_en459_2", "vicat_astm_c191",
                    "gillmore_astm_c266"] = Field(
        "vicat_en196_3", description="test method")
    retarder_dose: Percent | None = Field(
        None, description="retarder dose of the tested paste, fraction of the binder mass, "
        "e.g. '0.2 %' (none: tested without retarder)")
    temperature: Temperature | None = Field(None, description="temperature of the test, "
                                            "e.g. '20 degC'")
    source: str = Field("", max_length=4000, description="laboratory and report reference")


class FreezeThaw(Model):
    """A freeze–thaw test of the repair mortar and its outcome."""

    method: str = Field(min_length=3, max_length=4000, description="test method as carried out, "
                        "e.g. 'prisms 40x40x160 mm, water-saturated, -15/+20 degC cycles'")
    cycles: int = Field(ge=1, description="cycles completed")
    mass_loss: Percent | None = Field(None, description="mass loss after the cycles, e.g. "
                                       "'1.5 %'")
    strength_loss: Percent | None = Field(None, description="loss of compressive strength "
                                           "against companion prisms, e.g. '12 %'")
    source: str = Field("", max_length=4000, description="laboratory and report reference")


class CarbonationReading(Model):
    """Depth of carbonation measured on the mortar (phenolphthalein on a fresh break)."""

    age: Duration = Field(description="age at the reading, e.g. '28 d'")
    depth: LengthOrZero = Field(description="carbonated depth from the exposed face, e.g. "
                                "'6 mm'")


class SubstrateProperties(Model):
    """Fresh and hardened properties of a repair mortar compared with the substrate."""

    water_retention: Percent | None = Field(
        None, description="water retention of the fresh mortar (ASTM C1506 / EN 413-2 style "
        "suction test), e.g. '88 %'")
    bond_strength: Pressure | None = Field(
        None, description="render: pull-off bond strength on the background (EN 1015-12), "
        "e.g. '0.15 MPa'")
    bond_failure: Literal["adhesive", "mortar", "substrate"] | None = Field(
        None, description="render: where the pull-off specimens broke: at the interface "
        "(adhesive), in the mortar or in the background")
    freeze_thaw: FreezeThaw | None = Field(None, description="freeze–thaw test of the mortar")
    carbonation: list[CarbonationReading] = Field(
        default_factory=list, description="carbonation depths at ages (phenolphthalein)")

    @model_validator(mode="after")
    def _failure_with_strength(self):
        if self.bond_failure is not None and self.bond_strength is None:
            raise ValueError("bond_failure is given without bond_strength; give the pull-off "
                             "strength, e.g. 'bond_strength: \"0.15 MPa\"'")
        return self
