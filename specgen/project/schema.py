"""The project folder format: one pydantic model per YAML document.

Every field has a type, a default where one makes sense, and a one-line
description (the format reference is generated from these).  Quantities are
written with their unit (``"12 MPa"``, ``"1740 psi"``) and arrive here as SI floats.
Unknown keys are refused (with a suggestion) so a typo never silently drops data.
"""
from __future__ import annotations

import datetime as dt
import unicodedata
from typing import Annotated, Literal

from pydantic import (AfterValidator, BaseModel, BeforeValidator, ConfigDict, Field,
                      field_validator, model_validator)
from pydantic_core import PydanticCustomError

from specgen import units
from specgen.project.durability_schema import (AbsorptionRate, DurabilitySettings,
                                               ExposureCondition, SettingTime, Soundness,
                                               SubstrateProperties)

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


# ---------------------------------------------------------------- dossier.yaml
class ProjectInfo(Model):
    code: Id = Field(description="project reference used in file names and headers")
    title: Text = Field(description="title of the works, as on the cover")
    site: Text = Field(description="address or location of the structure")
    client: Text = Field(description="who commissions the dossier")
    protected_building: bool = Field(False, description="listed/protected: consent caution shown")
    work_at_height: bool = Field(False, description="facades or walls needing access equipment")
    significance: Text = Field("", description="one paragraph on the fabric's significance")


class Party(Model):
    role: Text = Field(description="role in the works, e.g. specifier, reviewer, laboratory")
    name: Text = Field(description="person or team")
    organisation: Text = Field("", description="organisation")


class Signatory(Model):
    """One signature of the sign-off block: who, in what role, for whom, when."""

    name: Text = Field(description="person who signs")
    role: Text = Field("", description="their role, e.g. conservation architect")
    organisation: Text = Field("", description="their organisation")
    date: dt.date | None = Field(None, description="date of signature (YYYY-MM-DD)")


class SignOff(Model):
    """Who prepared, checked and approved a revision (shown empty on a draft)."""

    prepared: Signatory | None = Field(None, description="prepared by")
    checked: Signatory | None = Field(None, description="checked by")
    approved: Signatory | None = Field(None, description="approved by")


class Recipient(Model):
    """One entry of the distribution list."""

    name: Text = Field(description="person or office")
    organisation: Text = Field("", description="organisation")
    purpose: Text = Field("", description="why they receive it, e.g. for approval, for information")
    receives: Text = Field("", description="what they receive, e.g. PDF, site link, printed copy")


class DocumentControl(Model):
    """How revisions are controlled."""

    block_for_approval: bool = Field(False, description="a revision issued for approval also "
                                     "refuses to build while the audit has blocking findings "
                                     "(a revision for construction always does)")


class Revision(Model):
    code: Annotated[str, Field(pattern=r"^[A-Za-z0-9][A-Za-z0-9._-]{0,19}$",
                               description="revision code, e.g. R1; becomes the output folder")]
    date: dt.date = Field(description="issue date (YYYY-MM-DD); fixes all dates in the output")
    status: Literal["draft", "issued"] = Field("draft", description="draft or issued")
    purpose: Literal["preliminary", "for_approval", "for_construction"] = Field(
        "preliminary", description="what the revision is issued for")
    description: Text = Field(description="what changed in this revision and why")
    sign_off: SignOff = Field(default_factory=lambda: SignOff(), description="prepared, "
                              "checked and approved by (empty boxes on a draft)")


class Zone(Model):
    id: Id = Field(description="zone identifier, e.g. Z1")
    name: Text = Field(description="short name of the zone of work")
    works: Literal["repointing", "render", "bedding"] = Field(description="kind of work")
    units: Id | None = Field(None, description="masonry unit id (materials.yaml) of the fabric")
    historic_mortar: Id | None = Field(None, description="historic mortar id (materials.yaml)")
    exposure: Text = Field("", description="exposure of the zone (splash, sheltered, ...)")
    exposure_conditions: list[ExposureCondition] = Field(
        default_factory=list, description="the zone's exposure in the words the durability "
        "checks read (used instead of the words found in 'exposure')")
    area: Area | None = Field(None, description="wall area of the works, e.g. '120 m^2'")
    candidates: list[Id] = Field(default_factory=list, description="candidate mix ids")
    mix: Id | None = Field(None, description="mix the works quantities are worked out for "
                           "(default: every candidate)")
    joint_width: Length | None = Field(None, description="repointing: joint width, e.g. '10 mm'")
    joint_depth: Length | None = Field(None, description="repointing: depth raked out, e.g. "
                                       "'20 mm' (default: works.joint_depth_ratio × width)")
    coats: list[Length] = Field(default_factory=list, description="render: thickness of each "
                                "coat, e.g. ['12 mm', '8 mm']")
    masonry_volume: Volume | None = Field(None, description="bedding: volume of masonry "
                                          "rebedded or rebuilt, e.g. '1.8 m^3'")
    mortar_fraction: Fraction | None = Field(None, description="bedding: mortar as a fraction "
                                             "of the masonry volume, e.g. '22 %'")
    wastage: Fraction | None = Field(None, description="wastage allowance on the mortar volume, "
                                     "e.g. '12 %' (default from content/rules/works.yaml)")
    placing_rate: VolumeRate | None = Field(None, description="mortar the zone's crew places, "
                                            "e.g. '8 L/h' (sizes the gaugings)")


class MinimumStrength(Model):
    age: Duration = Field(description="test age, e.g. '28 d'")
    value: Pressure = Field(description="minimum compressive strength, e.g. '2 MPa'")


class Requirements(Model):
    min_compressive: list[MinimumStrength] = Field(
        default_factory=list, description="minimum compressive strengths at stated ages")
    max_compressive_long_term: Pressure | None = Field(
        None, description="cap on long-term compressive strength (compatibility)")
    load_strength: Pressure | None = Field(
        None, description="in-wall compressive strength to reach before the work is loaded or "
        "exposed, e.g. '1 MPa' (dated from site_temperature)")


class RuleOverride(Model):
    rule: Text = Field(description="rule key from content/rules, e.g. analysis.closure_pass")
    value: Number = Field(description="new limit, in the rule's unit")
    justification: Text = Field(min_length=10, description="why the project departs from the default")


class ChemistrySettings(Model):
    """Assumptions of the binder-chemistry calculations, declared once for the project."""

    aluminate_assignment: Literal["amorphous", "C4AF+C3A", "C2AS gehlenite"] = Field(
        "amorphous", description="where Al2O3/Fe2O3 go in the phase estimate below sintering")
    density_set: Literal["bentz_nist", "rounded_practice"] = Field(
        "bentz_nist", description="density set for hydration volumes (content/data/"
        "cement_densities.yaml)")


class StrengthSettings(Model):
    """Assumptions of the strength-development calculations, declared once for the project."""

    activation_energy: MolarEnergy | None = Field(
        None, description="apparent activation energy of the binder (ASTM C1074), e.g. "
        "'40 kJ/mol'; default from content/data/maturity_defaults.yaml")
    maturity_method: Literal["arrhenius", "nurse_saul"] = Field(
        "arrhenius", description="equivalent-age method used for predictions in the wall")
    datum_temperature: Temperature | None = Field(
        None, description="Nurse-Saul datum temperature, e.g. '-10 degC' (default -10 degC)")
    known_cv: Fraction | None = Field(
        None, description="replicate coefficient of variation known from a long laboratory "
        "record, e.g. '8 %': characteristic values are then also given with known variance")
    site_temperature_is: Literal["air", "surface", "joint"] = Field(
        "air", description="what site_temperature measures: air (a stand-in, flagged), the "
        "wall surface or the joint itself")


def one_of(name: str, known, what: str, where: str) -> str:
    """``name`` if it is in ``known``; else an error whose context carries the fix."""
    from specgen.errors import did_you_mean
    known = list(known)
    if name not in known:
        raise PydanticCustomError(
            "unknown_name", "unknown {what} '{name}' ({where})",
            {"what": what, "name": name, "where": where,
             "fix": (did_you_mean(name, known) or "") + " Known: " + ", ".join(known) + "."})
    return name


def _practice_name(value: str) -> str:
    from specgen import practice
    return one_of(value, practice.sets(), "practice", "content/data/practice.yaml")


def _mortar_classes_name(value: str) -> str:
    from specgen import practice
    return one_of(value, [s["mortar_classes"] for s in practice.sets().values()],
                  "mortar classification", "content/data/strength_classes.yaml")


class PracticeSettings(Model):
    """The practice the project follows: which standards its dossier applies."""

    follows: Annotated[str, AfterValidator(_practice_name)] | None = Field(
        None, description="european or american (content/data/practice.yaml): sieve series, "
        "grading envelope, mortar and binder classification and test methods; default american")
    mortar_classes: Annotated[str, AfterValidator(_mortar_classes_name)] | None = Field(
        None, description="mortar classification of the other practice, e.g. astm_c270 "
        "(default: the one the practice names); needs mixing_reason")
    mixing_reason: Text = Field("", description="why the project takes an item of another "
                                "practice (an envelope, a classification, sieve data on "
                                "the other series); shown on the scope page")


class CompatibilitySettings(Model):
    """Choices of the compatibility checks, declared once for the project."""

    salt_table: Literal["wta_2_9", "onorm_b3355"] = Field(
        "wta_2_9", description="published salt-load table (content/data/salt_load.yaml)")
    grading_envelope: Literal["astm_c144_natural", "astm_c144_manufactured", "en13139_0_2",
                              "en13139_0_4"] | None = Field(
        None, description="grading envelope of the repair sand (content/data/"
        "grading_envelopes.yaml); default: the one the practice names")
    repair_thickness: Length | None = Field(
        None, description="thickness of the repair layer (pointing depth or render), e.g. "
        "'20 mm', for sd = μ·d")


class WorksSettings(Model):
    """Settings of the works quantities and the site batching cards."""

    bags: bool = Field(False, description="give whole bags of each binder (needs bag_mass on "
                       "every binder used)")
    measure: Volume | None = Field(None, description="volume of the measure binder and sand "
                                   "are gauged in, e.g. '1 L' (default works.measure_volume)")


class Dossier(Model):
    """The root file ``dossier.yaml``."""

    project: ProjectInfo
    practice: PracticeSettings = Field(default_factory=PracticeSettings,
                                       description="the practice (set of standards) followed")
    parties: list[Party] = Field(default_factory=list, description="people and roles")
    revision: Revision
    zones: list[Zone] = Field(default_factory=list, description="zones of work")
    requirements: Requirements = Field(default_factory=Requirements,
                                       description="project requirements")
    rule_overrides: list[RuleOverride] = Field(default_factory=list,
                                               description="justified departures from rules")
    chemistry: ChemistrySettings = Field(default_factory=ChemistrySettings,
                                         description="assumptions of the chemistry checks")
    strength: StrengthSettings = Field(default_factory=StrengthSettings,
                                       description="assumptions of the strength checks")
    compatibility: CompatibilitySettings = Field(
        default_factory=CompatibilitySettings, description="choices of the compatibility checks")
    works: WorksSettings = Field(default_factory=lambda: WorksSettings(),
                                 description="settings of the works quantities and batching")
    durability: DurabilitySettings = Field(default_factory=lambda: DurabilitySettings(),
                                           description="the site's winter climate")
    site_temperature: Text | None = Field(
        None, description="curing temperature in the wall: a constant, e.g. '8 degC', or a CSV "
        "under lab/ with columns 'day [d]' and 'temperature [degC]' (daily means)")
    distribution: list[Recipient] = Field(default_factory=list, description="who receives "
                                          "the dossier (the distribution list)")
    document_control: DocumentControl = Field(default_factory=lambda: DocumentControl(),
                                              description="how revisions are controlled")
    heritage: HeritageContext | None = Field(None, description="designation, consent, "
                                             "significance, approach and impact of the works")


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


# ----------------------------------------------------------------- mixes.yaml
class BinderPart(Model):
    binder: Id = Field(description="binder id")
    parts: Number = Field(description="parts by volume")  # > 0: checked in works_inputs


class SandPart(Model):
    sand: Id = Field(description="sand id")
    parts: Number = Field(description="parts by volume")  # > 0: checked in works_inputs


class Admixture(Model):
    name: Text = Field(description="what it is, e.g. citric acid retarder (no trade names)")
    dose: Fraction = Field(description="dose as a fraction of the binder mass, e.g. '0.2 %'")
    purpose: Text = Field("", description="why it is added, e.g. retarder")


class Mix(Model):
    id: Id = Field(description="mix identifier")
    name: Text = Field(description="descriptive name")
    binders: list[BinderPart] = Field(description="binder parts by volume")
    sands: list[SandPart] = Field(default_factory=list, description="sand parts by volume")
    water_binder_ratio: Number | None = Field(None, gt=0, lt=3, description="water/binder by mass")
    consistence: Length | None = Field(None, description="target flow value (EN 1015-3), e.g. "
                                       "'165 mm', where water is gauged to consistence")
    air_content: Fraction | None = Field(None, description="air content of the fresh mortar "
                                         "(EN 1015-7), e.g. '5 %'")
    admixtures: list[Admixture] = Field(default_factory=list, description="admixtures dosed "
                                        "by binder mass")
    workable_life: Duration | None = Field(None, description="workable life measured in the "
                                           "laboratory (EN 1015-9), e.g. '25 min'")
    workable_life_source: Text = Field("", description="laboratory report of the workable life")
    setting: SettingTime | None = Field(None, description="initial and final setting time "
                                        "measured on the binder paste as dosed")
    notes: Text = Field("", description="free text")


class MixesFile(Model):
    mixes: list[Mix] = Field(default_factory=list)


# --------------------------------------------------------------- comments.yaml
class Comment(Model):
    """One review comment and the specifier's response."""

    id: Id = Field(description="comment identifier, e.g. C1")
    raised_in: Annotated[str, Field(pattern=r"^[A-Za-z0-9][A-Za-z0-9._-]{0,19}$",
                                    description="revision in which it was raised")]
    about: Text = Field(description="check code (CODE or CODE/subject) or page (e.g. composition)")
    reviewer_role: Text = Field(description="role of the reviewer, e.g. heritage officer")
    text: Text = Field(description="the comment")
    status: Literal["open", "closed"] = Field("open", description="open or closed")
    response: Text = Field("", description="the specifier's response")
    closed_in: Annotated[str, Field(pattern=r"^[A-Za-z0-9][A-Za-z0-9._-]{0,19}$")] | None = Field(
        None, description="revision in which it was closed")
    category: Literal["question", "required change", "advisory"] | None = Field(
        None, description="question, required change or advisory")
    author: Text = Field("", description="who wrote it (name)")
    organisation: Text = Field("", description="the author's organisation")
    date: dt.date | None = Field(None, description="date written (YYYY-MM-DD)")
    anchor: Annotated[str, Field(pattern=ANCHOR_PATTERN)] | None = Field(
        None, description="the element of the page it is about (its id in the published site), "
        "set by the comment import")
    quote: Annotated[str, Field(max_length=2000)] = Field(
        "", description="the text the reviewer selected, as published in raised_in")
    key: Annotated[str, Field(pattern=r"^[A-Za-z0-9_-]{8,64}$")] | None = Field(
        None, description="identity of an imported comment (keeps a second import from "
        "duplicating it)")


class CommentsFile(Model):
    comments: list[Comment] = Field(default_factory=list, description="review comments")


# ----------------------------------------------------------- specification.yaml
RevisionCode = Annotated[str, Field(pattern=r"^[A-Za-z0-9][A-Za-z0-9._-]{0,19}$",
                                    description="revision code, e.g. R3")]


class Selection(Model):
    """The specifier's choice of repair mortar for one zone."""

    zone: Id = Field(description="zone id (dossier.yaml)")
    mix: Id = Field(description="the chosen mix: one of the zone's candidates")
    rationale: Text = Field(min_length=10, description="why this mortar was chosen for the zone")
    justification: Text = Field("", description="why the choice stands although a check on it "
                                "fails; required when one does, shown prominently")
    covers: list[Text] = Field(default_factory=list, description="the failing checks the "
                               "justification answers, as CODE or CODE/subject; a check that "
                               "fails and is not named here makes the selection need a decision")


class SiteTests(Model):
    """Site test regime: how often prisms are made, at which ages, how they are judged."""

    area_per_set: Area | None = Field(None, description="one set of prisms per this wall area, "
                                      "e.g. '50 m^2' (default specification.area_per_set)")
    per_working_day: bool = Field(True, description="also at least one set per day's work "
                                  "(days from the zone's mortar volume and placing rate)")
    min_sets: int | None = Field(None, ge=1, le=1000, description="fewest sets per zone (default "
                                 "specification.min_sets)")
    prisms_per_set: int | None = Field(None, ge=1, le=1000, description="prisms in one set, per test "
                                       "age (default specification.prisms_per_set)")
    test_ages: list[Duration] = Field(default_factory=list, description="test ages, e.g. "
                                      "['28 d', '90 d'] (default: the ages of "
                                      "requirements.min_compressive)")
    individual_minimum: Fraction | None = Field(
        None, description="no set mean below this fraction of the required minimum, e.g. "
        "'80 %' (default specification.individual_minimum)")
    non_conformance: Text = Field("", description="what happens when a set does not conform "
                                  "(default wording in the clause template)")


class HoldPoint(Model):
    """A point in the works that may not be passed until a named role releases it."""

    id: Id = Field(description="hold point identifier, e.g. HP1")
    what: Text = Field(description="what must be shown or approved")
    stage: Text = Field(description="the stage of the works it holds, e.g. before pointing Z1")
    released_by: Text | None = Field(None, description="role that releases it: a party role "
                                     "in dossier.yaml")
    evidence: Text = Field("", description="the evidence of release (required once released)")
    state: Literal["open", "released"] = Field("open", description="open or released")
    released_in: RevisionCode | None = Field(None, description="revision in which it was "
                                             "released")
    check: Text | None = Field(None, description="check code (CODE or CODE/subject) whose "
                               "result the release rests on")


class TrialPanel(Model):
    """A trial panel of a candidate mortar and its judgement, made when dry."""

    id: Id = Field(description="panel identifier, e.g. TP1")
    mix: Id = Field(description="mix id of the panel's mortar")
    zone: Id | None = Field(None, description="zone the panel was built for")
    date: dt.date = Field(description="date the panel was built")
    location: Text = Field(description="where the panel is")
    reviewer: Text = Field(description="role that judged it: a party role in dossier.yaml")
    judgement: Literal["accepted", "rejected", "pending"] = Field(
        "pending", description="accepted, rejected or pending")
    judged_dry: bool = Field(False, description="judged when the mortar had dried out")
    judged_on: dt.date | None = Field(None, description="date of the judgement")
    remarks: Text = Field("", description="what the reviewer saw")
    photo: Text | None = Field(None, description="photo file inside the project folder, e.g. "
                               "'photos/TP1.jpg'")
    colour_sample: Id | None = Field(None, description="sample id of its readings in "
                                     "lab/colour.csv")


class UnitPrice(Model):
    """Price of a mortar for the options appraisal (cost per m² of wall)."""

    mix: Id = Field(description="mix id")
    price: Number = Field(gt=0, description="price of the quantity 'per', in the currency")
    per: Volume = Field(1.0, description="quantity of placed mortar the price is for, e.g. "
                        "'1 m^3' (default) or '1 L'")
    source: Text = Field("", description="quotation or price book")


class SpecificationFile(Model):
    """The file ``specification.yaml``: choices, site tests, hold points, trial panels."""

    selections: list[Selection] = Field(default_factory=list, description="mortar chosen per zone")
    site_tests: SiteTests = Field(default_factory=SiteTests, description="site test regime")
    hold_points: list[HoldPoint] = Field(default_factory=list, description="hold points")
    trial_panels: list[TrialPanel] = Field(default_factory=list, description="trial panels")
    currency: Text = Field("", description="currency of the unit prices, e.g. GBP")
    unit_prices: list[UnitPrice] = Field(default_factory=list, description="prices of mortars")


def submodel(model: type[BaseModel], key: str) -> type[BaseModel] | None:
    """The model the field ``key`` of ``model`` holds (itself, in a list or optional), or None."""
    import typing
    info = model.model_fields.get(key)
    if info is None:
        return None
    stack = [info.annotation]
    while stack:
        t = stack.pop()
        if isinstance(t, type) and issubclass(t, BaseModel):
            return t
        stack.extend(typing.get_args(t))
    return None


def model_at(model: type[BaseModel], path: tuple) -> type[BaseModel] | None:
    """The model whose keys sit at ``path`` (list indexes skipped) inside ``model``, or None."""
    current = model
    for part in path:
        if isinstance(part, int):
            continue
        current = submodel(current, part)
        if current is None:
            return None
    return current


from specgen.project.schema_evidence import HeritageContext  # noqa: E402  (it builds on Model)

Dossier.model_rebuild()
