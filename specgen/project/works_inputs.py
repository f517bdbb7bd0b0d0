"""Works inputs that only make sense together: checked at load time, located, with a fix.

Each rule reads two or more fields (a zone's joint against its masonry unit, the
``works.bags`` setting against the binders' bag masses, a mix's parts against each
other), so it cannot live in one field's validator.  Problems are added to the
loader's log like every other input problem: the run stops before anything is
written, with exit status 2.
"""
from __future__ import annotations

from specgen.errors import ProblemLog

MM = 1e-3


def works_problems(project, located: dict, log: ProblemLog, failed=frozenset()) -> None:
    """Record every problem of the works inputs (files that failed to load are skipped)."""
    if "materials.yaml" not in failed:
        _joints(project, located.get("dossier.yaml"), log)
        if "mixes.yaml" not in failed:
            _bag_masses(project, located.get("materials.yaml"), log)
    if "mixes.yaml" not in failed:
        _mix_parts(project, located.get("mixes.yaml"), log)


def _line(loc, path: tuple) -> int | None:
    return loc.line_of(path) if loc is not None else None


def _joints(project, loc, log: ProblemLog) -> None:
    """A joint must be narrower than the unit it is laid between."""
    for i, z in enumerate(project.dossier.zones):
        unit = project.masonry_units.get(z.units) if z.units else None
        if z.joint_width is None or unit is None or not unit.length or not unit.height:
            continue
        if z.joint_width >= min(unit.length, unit.height):
            log.add("dossier.yaml", f"zone '{z.id}': the joint width {z.joint_width / MM:g} mm is "
                    f"not narrower than the unit {unit.id} ({unit.length / MM:g} × "
                    f"{unit.height / MM:g} mm) it is laid between.",
                    line=_line(loc, ("zones", i, "joint_width")), field=f"zones[{i}].joint_width",
                    fix="give the joint width with its unit, e.g. '10 mm', or correct the "
                        "unit's length and height in materials.yaml.")


def _used_binders(project) -> set[str]:
    """Binders of the mixes some zone's quantities are worked out for."""
    mixes = {m for z in project.dossier.zones for m in ([z.mix] if z.mix else z.candidates)}
    return {b.binder for m in mixes if m in project.mixes for b in project.mixes[m].binders}


def _bag_masses(project, loc, log: ProblemLog) -> None:
    """Whole bags are asked for: every binder they are counted for needs its bag mass."""
    if not project.dossier.works.bags:
        return
    used = _used_binders(project)
    for i, b in enumerate(project.binders.values()):
        if b.id in used and b.bag_mass is None:
            log.add("materials.yaml", f"dossier.yaml asks for whole bags (works.bags: true) but "
                    f"binder '{b.id}' has no bag mass.", line=_line(loc, ("binders", i)),
                    field=f"binders[{i}].bag_mass",
                    fix="add 'bag_mass:' with the mass of one bag as supplied, e.g. '25 kg', "
                        "or set works.bags: false in dossier.yaml.")


def _mix_parts(project, loc, log: ProblemLog) -> None:
    """Parts by loose volume: each above zero, and some binder to batch."""
    for i, m in enumerate(project.mixes.values()):
        total = sum(b.parts for b in m.binders)
        if total <= 0 and all(b.parts <= 0 for b in m.binders):
            log.add("mixes.yaml", f"mix '{m.id}': the binder parts sum to {total:g}, so the mix "
                    "has no binder to batch.", line=_line(loc, ("mixes", i, "binders")),
                    field=f"mixes[{i}].binders",
                    fix="give each binder its parts by loose volume, e.g. "
                        "'binders: [{binder: B1, parts: 1}]'.")
        else:
            _each_positive(m.binders, "binder", i, loc, log)
        _each_positive(m.sands, "sand", i, loc, log)


def _each_positive(parts, kind: str, i: int, loc, log: ProblemLog) -> None:
    for j, p in enumerate(parts):
        if p.parts <= 0:
            key = f"{kind}s"
            log.add("mixes.yaml", f"parts by loose volume must be greater than zero; found "
                    f"{p.parts:g}.", line=_line(loc, ("mixes", i, key, j, "parts")),
                    field=f"mixes[{i}].{key}[{j}].parts",
                    fix=f"give the {kind}'s share of the mix by loose volume, e.g. 'parts: 2.5', "
                        f"or remove the {kind} from the mix.")
