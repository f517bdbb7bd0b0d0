"""The evidence the dossier rests on: the sample register (``samples.yaml``) and the
heritage context of ``dossier.yaml`` (``heritage:``).

A sample is where a result came from: taken where (a drawing and x/y on it, or a grid
reference), when, by whom, tested by which laboratory under which report and accreditation.
Analyses (``lab_sample:``), measured properties (``lab_samples:``) and the rows of the lab
tables (column ``lab_sample``) name the register's ids; an id named but not registered is a
located input error (``project/evidence.py``).
"""
from __future__ import annotations

import datetime as dt
from typing import Literal

from pydantic import Field, model_validator

from specgen.project.schema_types import Id, Model, Number, Text

SAMPLE_KINDS = ("historic_mortar", "historic_aggregate", "masonry_unit", "render", "raw_stone",
                "binder", "sand", "prisms", "salt_powder", "core", "other")


class DrawingPoint(Model):
    """A point on a drawing of the register: the drawing's id and x/y in its own units."""

    drawing: Id = Field(description="drawing id (samples.yaml drawings)")
    x: Number = Field(description="x on the drawing, in the drawing's units (from its left edge)")
    y: Number = Field(description="y on the drawing, in the drawing's units (from its bottom "
                      "edge)")


class ZoneArea(Model):
    """The extent of a zone of work on a drawing (a rectangle in the drawing's units)."""

    zone: Id = Field(description="zone id (dossier.yaml)")
    x: Number = Field(description="left edge, in the drawing's units")
    y: Number = Field(description="bottom edge, in the drawing's units")
    width: Number = Field(gt=0, description="width, in the drawing's units")
    height: Number = Field(gt=0, description="height, in the drawing's units")


class Drawing(Model):
    """A drawing or elevation sample points are given on (its extent in its own units)."""

    id: Id = Field(description="drawing identifier, e.g. D1")
    title: Text = Field(description="what it shows, e.g. inner face elevation, bays 1-8")
    width: Number = Field(gt=0, description="width of the drawing's extent, in its units")
    height: Number = Field(gt=0, description="height of the drawing's extent, in its units")
    units: Text = Field("m", description="units of x, y, width and height, e.g. m")
    reference: Text = Field("", description="drawing number and revision of the survey it "
                            "comes from")
    north: Text = Field("", description="orientation note printed with the drawing, e.g. "
                        "'elevation faces north-west'")
    zones: list[ZoneArea] = Field(default_factory=list, description="zones of work drawn on it")
    image: Id | None = Field(None, description="image id (images:) of the drawing sheet, a JPEG "
                             "or PNG whose edges are the drawing's extent: drawn under the "
                             "zones and sample points")


class Sample(Model):
    """One sample or specimen series of the register."""

    id: Id = Field(description="sample identifier, e.g. HM1-S1 (named by the results)")
    kind: Literal[SAMPLE_KINDS] = Field(description="what was sampled: "
                                        + ", ".join(SAMPLE_KINDS))
    description: Text = Field(description="what the sample is, as the laboratory received it")
    of: Id | None = Field(None, description="the material or mix it is a sample of (a masonry "
                          "unit, historic mortar, binder, sand or mix id)")
    zone: Id | None = Field(None, description="zone of work it was taken in (dossier.yaml)")
    location: DrawingPoint | None = Field(None, description="where it was taken, on a drawing")
    grid: Text = Field("", description="where it was taken as a grid reference or in words "
                       "(when no drawing point is given)")
    taken_on: dt.date | None = Field(None, description="date taken or cast (YYYY-MM-DD)")
    taken_by: Text = Field("", description="who took it (role and organisation)")
    laboratory: Text = Field("", description="laboratory that tested it")
    report: Text = Field("", description="the laboratory's report reference")
    accreditation: Text = Field("", description="the laboratory's accreditation for the tests, "
                                "e.g. ISO/IEC 17025 schedule reference; empty: not accredited")
    curing_regime: Text = Field("", description="prism series: how the prisms were cured, by "
                                "the key of content/data/curing_regimes.yaml (rows of the mix in "
                                "lab/strength.csv without their own take it)")

    @model_validator(mode="after")
    def _located(self):
        # a register entry that says nowhere where it came from is not evidence of place
        if self.location is None and not self.grid and self.kind not in ("binder", "sand",
                                                                            "prisms"):
            raise ValueError("a sample of the fabric needs 'location:' (drawing, x, y) or "
                             "'grid:' (where it was taken)")
        return self


class Picture(Model):
    """A photograph or a drawing sheet placed in the dossier (JPEG, PNG, SVG or a PDF page)."""

    id: Id = Field(description="image identifier, e.g. P1")
    file: Text = Field(description="the file inside the project folder, e.g. images/P1.jpg")
    page: int | None = Field(None, ge=1, description="the page of a PDF drawing, from 1 (a "
                             "one-page PDF needs none)")
    caption: Text = Field(description="what the image shows, as its caption")
    alt: Text = Field("", description="what is seen in the image, for a reader who cannot see "
                      "it (its alternative text in the site and the tagged PDF): what the "
                      "caption does not already say, e.g. 'Close view of three courses of "
                      "brick with joints eroded 10-15 mm behind the face'")
    kind: Literal["photograph", "drawing"] = Field("photograph", description="photograph or "
                                                   "drawing")
    taken_on: dt.date | None = Field(None, description="date taken or drawn (YYYY-MM-DD)")
    by: Text = Field("", description="who took or drew it")
    zone: Id | None = Field(None, description="zone of work it shows (dossier.yaml)")
    keep_metadata: bool = Field(False, description="keep the camera's metadata (never the GPS "
                                "position); by default every metadata block is stripped")


class LabReport(Model):
    """A laboratory report (PDF) attached to the dossier and linked from the samples."""

    reference: Text = Field(description="the report reference the samples name, e.g. NML-4402 "
                            "rev. A")
    file: Text = Field(description="the PDF inside the project folder, e.g. reports/NML-4402.pdf")
    title: Text = Field("", description="title of the report")


class SamplesFile(Model):
    """The file ``samples.yaml``: the sample register and the drawings it points on."""

    drawings: list[Drawing] = Field(default_factory=list, description="drawings sample points "
                                    "are given on")
    samples: list[Sample] = Field(default_factory=list, description="the sample register")
    images: list[Picture] = Field(default_factory=list, description="photographs and drawings "
                                  "placed in the dossier")
    reports: list[LabReport] = Field(default_factory=list, description="laboratory reports "
                                     "(PDF) attached to the dossier")


class HeritageContext(Model):
    """The heritage standing of the structure and the approach the repair follows."""

    designation: Text = Field("", description="statutory designation, e.g. listed grade II, "
                              "with the list entry reference")
    consent: Text = Field("", description="consent reference for the works, or that it is "
                          "applied for")
    significance: Text = Field("", description="statement of significance of the fabric "
                               "(default: project.significance)")
    approach: list[Literal["minimum intervention", "like for like", "reversibility",
                           "sacrificial repair", "honesty of repair"]] = Field(
        default_factory=list, description="conservation principles the repair follows: "
        "minimum intervention, like for like, reversibility, sacrificial repair, honesty of "
        "repair")
    approach_note: Text = Field("", description="how the principles apply to these works")
    impact: Text = Field("", description="heritage impact statement: what the works change "
                         "in the significant fabric, and how harm is avoided or mitigated")


METHOD_PARTS = ("preparation", "sequencing", "protection", "placing", "finishing", "curing",
                "weather")


class ZoneMethod(Model):
    """The project's own wording for parts of one zone's method statement (each replaces the
    wording specgen derives from the zone's works and the chosen mortar)."""

    zone: Id = Field(description="zone id (dossier.yaml)")
    preparation: Text = Field("", description="preparation: raking out, cutting back, cleaning")
    sequencing: Text = Field("", description="sequence of the work and bay sizes")
    protection: Text = Field("", description="protection of adjacent fabric and the public")
    placing: Text = Field("", description="placing the mortar (pointing, render coats, bedding)")
    finishing: Text = Field("", description="finishing of joints or render")
    curing: Text = Field("", description="curing and protection of the new work")
    weather: Text = Field("", description="weather limits")


class Responsibility(Model):
    """Who does one task of the works: a role of the parties in dossier.yaml."""

    task: Text = Field(description="what is done, e.g. tests the prisms and reports the results")
    role: Text = Field(description="the role that does it, e.g. laboratory (a party's role)")


class MethodFile(Model):
    """The file ``method.yaml``: the project's overrides of the method statement."""

    zones: list[ZoneMethod] = Field(default_factory=list, description="wording per zone")
    responsibilities: list[Responsibility] = Field(
        default_factory=list, description="who supplies, mixes, tests, inspects and approves "
        "(replaces the default split when given)")
    competence: Text = Field("", description="the competence the contractor must show")
