"""The models of specification.yaml: selections, site tests, hold points, trial panels and unit
prices.

Part of the project folder format; ``specgen.project.schema`` gathers every model.
"""
from __future__ import annotations

import datetime as dt
from typing import Annotated, Literal

from pydantic import Field

from specgen.project.schema_types import (Area, Duration, Fraction, Id, Model, Number, Text,
                                          Volume)


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
