"""The project folder format: one pydantic model per YAML document.

Every field has a type, a default where one makes sense, and a one-line
description (the format reference is generated from these).  Quantities are
written with their unit (``"12 MPa"``, ``"1740 psi"``) and arrive here as SI floats.
Unknown keys are refused (with a suggestion) so a typo never silently drops data.
"""
from __future__ import annotations

# the models of each file live beside this module; every name stays importable from here
from pydantic import BaseModel

from specgen.project.durability_schema import *  # noqa: F401,F403
from specgen.project.schema_types import *  # noqa: F401,F403
from specgen.project.dossier_schema import *  # noqa: F401,F403
from specgen.project.materials_schema import *  # noqa: F401,F403
from specgen.project.mixes_schema import *  # noqa: F401,F403
from specgen.project.specification_schema import *  # noqa: F401,F403


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

