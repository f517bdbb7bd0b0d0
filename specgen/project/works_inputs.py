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
        _air(project, located.get("mixes.yaml"), log)
    _fractions(project, located.get("dossier.yaml"), log)
    if "materials.yaml" not in failed:
        _densities(project, located.get("materials.yaml"), log)


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


def _fractions(project, loc, log: ProblemLog) -> None:
    """Mortar fraction and wastage are shares of a whole: below 100 %."""
    for i, z in enumerate(project.dossier.zones):
        for key, what in (("mortar_fraction", "mortar as a fraction of the masonry volume"),
                          ("wastage", "the wastage allowance")):
            value = getattr(z, key)
            if value is not None and value >= 1:
                log.add("dossier.yaml", f"zone '{z.id}': {what} must be below 100 %; found "
                        f"{100 * value:g} %.", line=_line(loc, ("zones", i, key)),
                        field=f"zones[{i}].{key}",
                        fix=f"give it as a percentage, e.g. '{key}: \"{_EXAMPLE[key]}\"'.")


_EXAMPLE = {"mortar_fraction": "22 %", "wastage": "12 %"}


def _air(project, loc, log: ProblemLog) -> None:
    for i, m in enumerate(project.mixes.values()):
        if m.air_content is not None and m.air_content >= 0.5:
            log.add("mixes.yaml", f"mix '{m.id}': an air content of {100 * m.air_content:g} % "
                    "is out of range; the yield takes 0–50 % of air.", line=_line(loc, ("mixes", i, "air_content")),
                    field=f"mixes[{i}].air_content",
                    fix="give the air content of the fresh mortar (EN 1015-7) as a "
                        "percentage, e.g. '5 %'.")


def _densities(project, loc, log: ProblemLog) -> None:
    """A loose bulk density is below the particle density (given, or the default)."""
    from specgen import refdata
    table = refdata.load("mix_densities").data["particle"]
    for key, items in (("binders", project.binders), ("sands", project.sands)):
        for i, x in enumerate(items.values()):
            kind = x.type if key == "binders" else "sand"
            particle = x.particle_density or float(table[kind]["value"])
            if x.bulk_density is not None and x.bulk_density >= particle:
                log.add("materials.yaml", f"{key[:-1]} '{x.id}': the loose bulk density "
                        f"{x.bulk_density:g} kg/m³ is not below its particle density "
                        f"{particle:g} kg/m³ (loose material holds voids).",
                        line=_line(loc, (key, i, "bulk_density")),
                        field=f"{key}[{i}].bulk_density",
                        fix="give the loose bulk density, e.g. '1500 kg/m^3' for a sand, or "
                            "the particle density ('particle_density:') if it differs.")
