"""Which cautions a project needs, from the caution library in ``content/cautions.yaml``."""
from __future__ import annotations

import yaml

from specgen.refdata import CONTENT_DIR


def _library() -> dict:
    return yaml.safe_load((CONTENT_DIR / "cautions.yaml").read_text(encoding="utf-8"))


def _applies(trigger: str, project) -> bool:
    kind, _, arg = trigger.partition(":")
    if kind == "always":
        return True
    if kind == "binder":
        return any(b.type == arg for b in project.binders.values())
    if kind == "works":
        return any(z.works == arg for z in project.dossier.zones)
    if kind == "project":
        return bool(getattr(project.dossier.project, arg, False))
    raise ValueError(f"content/cautions.yaml: unknown trigger '{trigger}'")


def cautions_for(project) -> tuple[list[dict], str]:
    """The cautions that apply (in library order) and the closing notice shown always."""
    lib = _library()
    chosen = [c for c in lib["cautions"] if _applies(c["trigger"], project)]
    return chosen, lib["closing"]
