"""Which cautions a project needs, from the caution library in ``content/cautions.yaml``.

The dossier's caution chapter shows every caution whose trigger applies to the
project; the batching card of a mix shows, in their shorter ``card`` wording, those
whose trigger applies to that mix (its binders, the kinds of work it is used for).
"""
from __future__ import annotations

import functools
from dataclasses import dataclass

from specgen.refdata import CONTENT_DIR, content_yaml


@dataclass(frozen=True)
class Scope:
    """What a trigger is evaluated against: binder types, kinds of work, project flags."""

    binders: frozenset
    works: frozenset
    project: object
    exposure: frozenset = frozenset()  # exposure conditions of the zones, and 'freezing'


@functools.lru_cache(maxsize=1)
def _library() -> dict:
    """The caution library, read once per process (callers only read it)."""
    return content_yaml(CONTENT_DIR / "cautions.yaml")


def _applies(trigger: str, scope: Scope) -> bool:
    kind, _, arg = trigger.partition(":")
    wanted = set(arg.split("|"))
    if kind == "always":
        return True
    if kind == "binder":
        return bool(wanted & scope.binders)
    if kind == "works":
        return bool(wanted & scope.works)
    if kind == "project":
        return any(getattr(scope.project, flag, False) for flag in wanted)
    if kind == "exposure":
        return bool(wanted & scope.exposure)
    raise ValueError(f"content/cautions.yaml: unknown trigger '{trigger}'")


def _exposure(project, zones) -> frozenset:
    """The exposure conditions of ``zones`` (as the loader read them), and 'freezing' when
    the site freezes."""
    found = {c for z in zones for c in getattr(project.exposure.get(z.id), "conditions", ())}
    if project.dossier.durability.freezing:
        found.add("freezing")
    return frozenset(found)


def project_scope(project) -> Scope:
    zones = project.dossier.zones
    return Scope(frozenset(b.type for b in project.binders.values()),
                 frozenset(z.works for z in zones), project.dossier.project,
                 _exposure(project, zones))


def mix_scope(project, mix) -> Scope:
    """The mix's binder types and the kinds of work of the zones it is a candidate or choice for."""
    zones = [z for z in project.dossier.zones if mix.id in z.candidates or z.mix == mix.id]
    return Scope(frozenset(project.binders[b.binder].type for b in mix.binders
                           if b.binder in project.binders),
                 frozenset(z.works for z in zones), project.dossier.project,
                 _exposure(project, zones))


def cautions_for(project) -> tuple[list[dict], str]:
    """The cautions that apply (in library order) and the closing notice shown always."""
    lib = _library()
    scope = project_scope(project)
    chosen = [c for c in lib["cautions"] if _applies(c["trigger"], scope)]
    return chosen, lib["closing"]


def card_cautions(project, mix) -> tuple[list[dict], str]:
    """The card wording of the cautions that apply to ``mix``, and the card's closing notice."""
    lib = _library()
    scope = mix_scope(project, mix)
    chosen = [{"id": c["id"], "title": c["title"], "text": c["card"]} for c in lib["cautions"]
              if c.get("card") and _applies(c["trigger"], scope)]
    return chosen, lib["card_closing"]
