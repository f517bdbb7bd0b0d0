"""Durability inputs read across fields: a zone's exposure, a binder's soundness, a mix's set.

A zone's exposure is taken from ``exposure_conditions`` when given, else from the words of
its free-text ``exposure`` found in the vocabulary of content/data/exposure_classes.yaml
(whole words, any case).  Either way the conditions are recorded on the project with
where each came from, so the checks show the reasoning.  Contradictions (sheltered and
tidal), a free lime above the binder's CaO and an initial set after the final set are
input problems, located like every other one: the run stops before anything is written.
"""
from __future__ import annotations

import re
from dataclasses import dataclass

from specgen import refdata
from specgen.errors import ProblemLog


@dataclass(frozen=True)
class ZoneExposure:
    """The exposure conditions of a zone and where each was read."""

    conditions: tuple[str, ...]
    found: tuple[tuple[str, str], ...]   # (condition, the word or field it came from)
    given_as: str                        # 'exposure_conditions', 'exposure' or ''


def vocabulary() -> dict:
    return refdata.load("exposure_classes").data["conditions"]


def words_in(text: str) -> list[tuple[str, str]]:
    """(condition, word) for every vocabulary word found in ``text`` as a whole word."""
    out = []
    for cond, spec in vocabulary().items():
        for word in spec["words"]:
            if re.search(rf"(?<![\w-]){re.escape(word)}(?![\w-])", text, flags=re.I):
                out.append((cond, word))
                break
    return out


def zone_exposure(zone) -> ZoneExposure:
    if zone.exposure_conditions:
        conds = tuple(dict.fromkeys(zone.exposure_conditions))
        return ZoneExposure(conds, tuple((c, "exposure_conditions") for c in conds),
                            "exposure_conditions")
    found = words_in(zone.exposure or "")
    return ZoneExposure(tuple(c for c, _ in found), tuple((c, f"'{w}'") for c, w in found),
                        "exposure" if found else "")


def durability_problems(project, located: dict, log: ProblemLog, failed=frozenset()) -> dict:
    """Record the problems of the durability inputs; return zone id → ZoneExposure."""
    exposure = _exposures(project, located.get("dossier.yaml"), log)
    if "materials.yaml" not in failed:
        _free_oxides(project, located.get("materials.yaml"), log)
    if "mixes.yaml" not in failed:
        _setting(project, located.get("mixes.yaml"), log)
    return exposure


def _line(loc, path: tuple) -> int | None:
    return loc.line_of(path) if loc is not None else None


def _exposures(project, loc, log: ProblemLog) -> dict:
    pairs = [tuple(p) for p in refdata.load("exposure_classes").data["contradictions"]]
    out = {}
    for i, z in enumerate(project.dossier.zones):
        ex = zone_exposure(z)
        out[z.id] = ex
        where = dict(ex.found)
        for a, b in pairs:
            if a in ex.conditions and b in ex.conditions:
                key = ex.given_as
                log.add("dossier.yaml", f"zone '{z.id}': the exposure is both {a.replace('_', ' ')}"
                        f" ({where[a]}) and {b.replace('_', ' ')} ({where[b]}), which cannot "
                        "describe one zone.", line=_line(loc, ("zones", i, key)),
                        field=f"zones[{i}].{key}",
                        fix="split the zone into one zone per exposure, or give the exposure "
                            "that governs in 'exposure_conditions:', e.g. [tidal].")
    return out


def _free_oxides(project, loc, log: ProblemLog) -> None:
    """Free CaO (MgO) is part of the binder's CaO (MgO): it cannot be more."""
    for i, b in enumerate(project.binders.values()):
        an = project.analyses.get(b.analysis) if b.analysis else None
        if b.soundness is None or an is None:
            continue
        for key, oxide in (("free_cao", "CaO"), ("free_mgo", "MgO")):
            free, total = getattr(b.soundness, key), an.mass_percent.get(oxide)
            if free is not None and total is not None and free > total:
                log.add("materials.yaml", f"binder '{b.id}': free {oxide} {free:g} % is more than "
                        f"the {oxide} of its analysis {an.id} ({total:g} %); free {oxide} is part "
                        f"of the {oxide}.", line=_line(loc, ("binders", i, "soundness", key)),
                        field=f"binders[{i}].soundness.{key}",
                        fix=f"check the free {oxide} result and its unit (mass % of the binder), "
                            f"or the analysis the binder names.")


def _setting(project, loc, log: ProblemLog) -> None:
    for i, m in enumerate(project.mixes.values()):
        s = m.setting
        if s is not None and s.initial >= s.final:
            log.add("mixes.yaml", f"mix '{m.id}': the initial set ({s.initial / 60:g} min) is not "
                    f"before the final set ({s.final / 60:g} min).",
                    line=_line(loc, ("mixes", i, "setting", "initial")),
                    field=f"mixes[{i}].setting.initial",
                    fix="check the two times and their units; the initial set comes first, e.g. "
                        "'initial: \"12 min\"', 'final: \"35 min\"'.")
