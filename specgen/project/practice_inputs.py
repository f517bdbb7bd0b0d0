"""Checks of the practice a project states, made on loading (before any check runs).

A project follows one set of standards (``dossier.yaml`` ``practice:``, resolved by
:mod:`specgen.practice`).  It may take a grading envelope or a mortar classification of the
other set, or give sieve analyses on the other set's sieve series, only by saying why in
``practice.mixing_reason``; otherwise each such mix is an input problem located at the key
that asks for it, naming the fix.
"""
from __future__ import annotations

from specgen import practice as pr
from specgen import refdata
from specgen.errors import ProblemLog

ROOT = "dossier.yaml"


def _line(located: dict, path: tuple) -> int | None:
    where = located.get(ROOT)
    return where.line_of(path) if where else None


def _set_title(key: str) -> str:
    return pr.sets()[key]["title"].split(" (")[0] if key in pr.sets() else key


def practice_problems(project, located: dict, log: ProblemLog) -> None:
    """Log every unstated mix of practices in ``project`` (already validated)."""
    d = project.dossier
    p = pr.resolve(d)
    if p.mixing_reason:
        return
    envelopes = refdata.load("grading_envelopes").data
    env = envelopes[p.grading_envelope]
    env_key = ("compatibility", "grading_envelope") if d.compatibility.grading_envelope \
        else ("practice", "follows")
    env_practice = env.get("practice", "")
    if env_practice and env_practice != p.key:
        others = [k for k, e in envelopes.items() if e.get("practice") == p.key]
        log.add(ROOT, f"the grading envelope '{p.grading_envelope}' belongs to "
                f"{_set_title(env_practice)} but the project follows {_set_title(p.key)}.",
                line=_line(located, env_key), field=".".join(env_key),
                fix=f"choose an envelope of {_set_title(p.key)} ({', '.join(others)}), or say "
                "why the project mixes the two in practice.mixing_reason.")
    mortar_practice = pr.mortar_class_practice(p.mortar_classes)
    if mortar_practice and mortar_practice != p.key:
        log.add(ROOT, f"the mortar classification '{p.mortar_classes}' belongs to "
                f"{_set_title(mortar_practice)} but the project follows {_set_title(p.key)}.",
                line=_line(located, ("practice", "mortar_classes")),
                field="practice.mortar_classes",
                fix="remove the key (the practice names its own), or say why the project mixes "
                "the two in practice.mixing_reason.")

