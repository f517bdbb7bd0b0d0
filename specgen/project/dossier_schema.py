"""The models of dossier.yaml: the project, parties, document control, revision, zones,
requirements, rule overrides and settings.

Part of the project folder format; ``specgen.project.schema`` gathers every model.
"""
from __future__ import annotations

import datetime as dt
from typing import Annotated, Literal

from pydantic import AfterValidator, Field
from pydantic_core import PydanticCustomError

from specgen.project.durability_schema import DurabilitySettings, ExposureCondition
from specgen.project.schema_evidence import HeritageContext
from specgen.project.schema_types import (Area, Duration, Fraction, Id, Length, Model, MolarEnergy,
                                          Number, Pressure, Temperature, Text, Volume, VolumeRate)


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
    site_temperature_from: dt.date | None = Field(
        None, description="calendar date of day 0 of the site temperature record (the day the "
        "mortar is placed, YYYY-MM-DD): its days are then read as dates")
    distribution: list[Recipient] = Field(default_factory=list, description="who receives "
                                          "the dossier (the distribution list)")
    document_control: DocumentControl = Field(default_factory=lambda: DocumentControl(),
                                              description="how revisions are controlled")
    heritage: HeritageContext | None = Field(None, description="designation, consent, "
                                             "significance, approach and impact of the works")
