"""The models of mixes.yaml and comments.yaml: mixes with their binders, sands and admixtures;
review comments.

Part of the project folder format; ``specgen.project.schema`` gathers every model.
"""
from __future__ import annotations

import datetime as dt
from typing import Annotated, Literal

from pydantic import Field

from specgen.project.durability_schema import SettingTime
from specgen.project.schema_types import (ANCHOR_PATTERN, Duration, Fraction, Id, Length, Model,
                                          Number, Text)


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
    changed: list[Text] = Field(
        default_factory=list, description="what the response changed in the dossier: pages "
        "(e.g. specification) or checks (CODE/subject), each named as in 'about'; the change "
        "report of the revision that closes the comment says whether each really changed")


class CommentsFile(Model):
    comments: list[Comment] = Field(default_factory=list, description="review comments")
