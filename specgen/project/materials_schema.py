"""The models of analyses.yaml and materials.yaml: analyses, binders, masonry units, historic
mortars, sands and measured mortar properties.

Part of the project folder format; ``specgen.project.schema`` gathers every model.
"""
from __future__ import annotations

import datetime as dt
from typing import Annotated, Literal

from pydantic import AfterValidator, BeforeValidator, Field, field_validator, model_validator

from specgen.project.durability_schema import (AbsorptionRate, Soundness,
                                               SubstrateProperties)
from specgen.project.schema_types import (Capillary, Density, Expansion, Fraction, Id, Length,
                                          Mass, MassPercent, Model, Number, PercentWithUnit,
                                          Pressure, Temperature, Text, _canonical_names,
                                          _known_constituent)


# --------------------------------------------------------------- analyses.yaml
class Analysis(Model):
    id: Id = Field(description="analysis identifier")
    kind: Literal["raw_stone", "binder", "historic_binder"] = Field(
        description="what was analysed")
    material: Id | None = Field(None, description="binder id (materials.yaml) this analysis is of")
    description: Text = Field("", description="sample description")
    laboratory: Text = Field("", description="who analysed it, report reference")
    date: dt.date | None = Field(None, description="date of the analysis")
    lab_sample: Id | None = Field(None, description="the sample it was made on (samples.yaml)")
    mass_percent: Annotated[dict[Annotated[str, AfterValidator(_known_constituent)], MassPercent],
                            BeforeValidator(_canonical_names)] = Field(
        description="constituents in mass %, e.g. CaO: 41.2, LOI: 30.5 (names: see "
        "'Constituents of an analysis' below; volatile ones count as loss)")
    lumped_split: dict[str, dict[str, Number]] = Field(
        default_factory=dict, description="declared split of a lumped oxide, e.g. "
        "'Al2O3+Fe2O3': {Al2O3: 0.6, Fe2O3: 0.4} (fractions summing to 1)")

    @field_validator("lumped_split")
    @classmethod
    def _split_matches(cls, value: dict, info):
        """Each split names a lumped key of mass_percent and exactly its oxides, summing to 1."""
        reported = info.data.get("mass_percent") or {}
        for key, fractions in value.items():
            if key not in reported or "+" not in key:
                raise ValueError(f"'{key}' is not a lumped constituent of mass_percent "
                                 "(a key such as 'Al2O3+Fe2O3')")
            if set(fractions) != set(key.split("+")):
                raise ValueError(f"the split of '{key}' must name {', '.join(key.split('+'))}; "
                                 f"found {', '.join(fractions) or 'nothing'}")
            if any(not 0 <= f <= 1 for f in fractions.values()) or \
                    abs(sum(fractions.values()) - 1) > 1e-6:
                raise ValueError(f"the split fractions of '{key}' must lie in 0-1 and sum to 1; "
                                 f"they sum to {sum(fractions.values()):g}")
        return value


class AnalysesFile(Model):
    analyses: list[Analysis] = Field(default_factory=list, description="oxide analyses")


# -------------------------------------------------------------- materials.yaml
class Firing(Model):
    """A firing record: peak temperature and/or a time-temperature CSV under lab/."""

    peak: Temperature | None = Field(None, description="peak kiln temperature, e.g. '950 degC'")
    record: Text | None = Field(None, description="CSV under lab/ with columns 'time [h]' and "
                                "'temperature [degC]'")
    description: Text = Field("", description="kiln, fuel, charge, who recorded it")

    @model_validator(mode="after")
    def _something_recorded(self):
        if self.peak is None and self.record is None:
            raise ValueError("a firing record needs 'peak:' or 'record:' (or both)")
        return self


class BinderClassTests(Model):
    """Tests of a delivered building lime made to judge its declared EN 459-1 class (each one
    result, tested to EN 459-2)."""

    available_lime: PercentWithUnit | None = Field(
        None, description="available lime as Ca(OH)2, mass % with its unit, e.g. '41 %'")
    free_water: PercentWithUnit | None = Field(
        None, description="free water, mass % with its unit, e.g. '0.8 %'")
    strength_7d: Pressure | None = Field(
        None, description="7-d compressive strength in the standard mortar, e.g. '2.1 MPa'")
    strength_28d: Pressure | None = Field(
        None, description="28-d compressive strength in the standard mortar, e.g. '4.6 MPa'")
    laboratory: Text = Field("", description="laboratory and report reference")


class Binder(Model):
    id: Id = Field(description="binder identifier")
    name: Text = Field(description="descriptive name (no trade names)")
    type: Literal["natural_cement", "nhl", "fl", "hl", "air_lime", "portland", "pozzolan"] = Field(
        description="binder family")
    declared_class: Text = Field("", description="declared class, e.g. NHL 3.5")
    analysis: Id | None = Field(None, description="analysis id of this binder")
    bulk_density: Density | None = Field(None, description="loose bulk density, e.g. '850 kg/m^3'")
    contains_clinker: bool = Field(False, description="holds sintered clinker: Bogue applies")
    firing: Firing | None = Field(None, description="firing record of the binder (kiln trial)")
    particle_density: Density | None = Field(None, description="particle density for the "
                                             "yield, e.g. '2900 kg/m^3'")
    bag_mass: Mass | None = Field(None, description="mass of one bag as supplied, e.g. '25 kg'")
    soundness: Soundness | None = Field(None, description="free lime, free MgO and expansion "
                                        "as measured")
    class_tests: BinderClassTests | None = Field(
        None, description="tests of the delivered lime against its declared EN 459-1 class")


class Hygrothermal(Model):
    """Measured properties compared by the compatibility checks (fabric and repair mortar)."""

    elastic_modulus: Pressure | None = Field(None, description="static elastic modulus, e.g. '6 GPa'")
    capillary_coefficient: Capillary | None = Field(
        None, description="capillary absorption coefficient (EN 1015-18 style), e.g. "
        "'0.4 kg/(m^2*min^0.5)'; or readings in lab/capillary.csv under the same id")
    vapour_resistance_factor: Number | None = Field(
        None, gt=0, description="water-vapour diffusion resistance factor μ (EN ISO 12572), e.g. 12")
    thermal_expansion: Expansion | None = Field(
        None, description="linear thermal expansion coefficient, e.g. '8e-6 1/K'")
    hygric_expansion: Fraction | None = Field(
        None, description="hygric (wetting) expansion, dry to saturated, e.g. '0.2 mm/m'")
    source: Text = Field("", description="laboratory and report of these properties")
    lab_samples: list[Id] = Field(default_factory=list, description="the samples they were "
                                  "measured on (samples.yaml)")


class SaltContent(Model):
    """Soluble salts of a fabric sample (mass % of the dry material)."""

    chloride: PercentWithUnit | None = Field(None, description="chloride Cl⁻, mass % of the dry "
                                          "material with its unit, e.g. '0.35 %'")
    nitrate: PercentWithUnit | None = Field(None, description="nitrate NO3⁻, mass % of the dry "
                                          "material with its unit, e.g. '0.35 %'")
    sulfate: PercentWithUnit | None = Field(None, description="sulfate SO4²⁻, mass % of the dry "
                                          "material with its unit, e.g. '0.35 %'")
    sample: Text = Field("", description="where and how deep it was sampled, laboratory")


class AcidDigestion(Model):
    """Acid digestion of a historic mortar sample: the insoluble residue is its aggregate."""

    sample_mass: Mass = Field(description="dry mass of the mortar sample, e.g. '50.0 g'")
    residue_mass: Mass = Field(description="dry mass of the acid-insoluble residue, e.g. '38.5 g'")
    binder_bulk_density: Density | None = Field(
        None, description="loose bulk density assumed for the binder, e.g. '700 kg/m^3'")
    aggregate_bulk_density: Density | None = Field(
        None, description="loose bulk density of the recovered aggregate, e.g. '1500 kg/m^3'")
    laboratory: Text = Field("", description="who did it, report reference")

    @model_validator(mode="after")
    def _residue_within_sample(self):
        # the acid-insoluble residue is part of the sample: it cannot weigh more
        if self.residue_mass >= self.sample_mass:
            raise ValueError("residue_mass must be less than sample_mass (the residue is part "
                             "of the sample); check the two masses and their units")
        return self


class MasonryUnit(Hygrothermal):
    id: Id
    name: Text
    compressive_strength: Pressure | None = Field(None, description="unit compressive strength")
    length: Length | None = Field(None, description="unit length, e.g. '215 mm'")
    height: Length | None = Field(None, description="unit height, e.g. '65 mm'")
    salts: SaltContent | None = Field(None, description="soluble salts of the units")
    initial_rate_of_absorption: AbsorptionRate | None = Field(
        None, description="initial rate of absorption (suction) of the units (ASTM C67 style), "
        "e.g. '1.8 kg/(m^2*min)'")


class HistoricMortar(Hygrothermal):
    id: Id
    name: Text
    compressive_strength: Pressure | None = Field(None, description="sound historic mortar strength")
    binder_analysis: Id | None = Field(None, description="analysis id of its binder fraction")
    salts: SaltContent | None = Field(None, description="soluble salts of the historic mortar")
    aggregate_sample: Id | None = Field(
        None, description="sample id in lab/sieves.csv of its aggregate recovered by acid digestion")
    acid_digestion: AcidDigestion | None = Field(None, description="acid digestion results")


class MortarProperties(SubstrateProperties, Hygrothermal):
    """Properties measured on a candidate repair mortar (strength comes from lab/strength.csv)."""

    mix: Id = Field(description="mix id (mixes.yaml)")


class Sand(Model):
    id: Id
    name: Text
    bulk_density: Density | None = Field(None, description="loose bulk density")
    particle_density: Density | None = Field(None, description="particle density for the "
                                             "yield, e.g. '2650 kg/m^3'")


class MaterialsFile(Model):
    binders: list[Binder] = Field(default_factory=list)
    masonry_units: list[MasonryUnit] = Field(default_factory=list)
    historic_mortars: list[HistoricMortar] = Field(default_factory=list)
    sands: list[Sand] = Field(default_factory=list)
    mortar_properties: list[MortarProperties] = Field(
        default_factory=list, description="measured properties of candidate repair mortars")
