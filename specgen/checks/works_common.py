"""Inputs of the works checks gathered once: densities with their sources, yields, volumes.

The checks in ``works_checks`` show these numbers in their steps; the chapter and
the batching cards read the same results.  Defaults come from
``content/data/mix_densities.yaml`` (each with its source) and
``content/rules/works.yaml``; a value in the project files always wins and is
shown as a project input.
"""
from __future__ import annotations

from dataclasses import dataclass

from specgen import refdata
from specgen.science import mix_design as md
from specgen.science import works as wk
from specgen.views import WATER, mixes_of  # noqa: F401  (the works checks read them here)



@dataclass(frozen=True)
class Sourced:
    """A value (SI) and where it came from."""

    value: float
    source: str


def rule_si(rules, name: str, kind: str) -> Sourced:
    """A works rule converted to SI, with its source text."""
    r = rules[f"works.{name}"]
    return Sourced(r.si(kind), r.source())


def _default(table: str, key: str) -> Sourced:
    d = refdata.load("mix_densities").data[table][key]
    return Sourced(float(d["value"]), "default: " + refdata.shown(d["source"], d.get("tag", "")))


def water_density() -> Sourced:
    d = refdata.load("mix_densities").data["water"]
    return Sourced(float(d["value"]), refdata.shown(d["source"], d.get("tag", "")))


def _given(value, file: str, field: str, table: str, key: str) -> Sourced:
    return Sourced(value, f"{file} {field}") if value is not None else _default(table, key)


@dataclass(frozen=True)
class Part:
    """A dry constituent of a mix with the sources of its densities."""

    constituent: md.Constituent
    bulk: Sourced
    particle: Sourced
    label: str


def parts_of(project, mix) -> list[Part]:
    """The binders and sands of ``mix`` with densities (given, else defaults)."""
    out = []
    for bp in mix.binders:
        b = project.binders[bp.binder]
        bulk = _given(b.bulk_density, "materials.yaml", f"{b.id}.bulk_density", "bulk", b.type)
        part = _given(b.particle_density, "materials.yaml", f"{b.id}.particle_density",
                      "particle", b.type)
        out.append(Part(md.Constituent(b.id, "binder", bp.parts, bulk.value, part.value),
                        bulk, part, b.name))
    for sp in mix.sands:
        s = project.sands[sp.sand]
        bulk = _given(s.bulk_density, "materials.yaml", f"{s.id}.bulk_density", "bulk", "sand")
        part = _given(s.particle_density, "materials.yaml", f"{s.id}.particle_density",
                      "particle", "sand")
        out.append(Part(md.Constituent(s.id, "sand", sp.parts, bulk.value, part.value),
                        bulk, part, s.name))
    return out


def air_of(mix, rules) -> Sourced:
    if mix.air_content is not None:
        return Sourced(mix.air_content, f"mixes.yaml {mix.id}.air_content (measured)")
    return rule_si(rules, "default_air_content", "fraction")


def admixture_key(a) -> str:
    return a.name


def mix_yield(project, mix, rules) -> md.MixYield | None:
    """The absolute-volume yield of ``mix``, or None when its water is not given."""
    if mix.water_binder_ratio is None:
        return None
    doses = {admixture_key(a): a.dose for a in mix.admixtures}
    return md.absolute_volume_yield([p.constituent for p in parts_of(project, mix)],
                                    mix.water_binder_ratio, air_of(mix, rules).value,
                                    water_density().value, doses)


def yield_of(ctx, mix) -> md.MixYield | None:
    """:func:`mix_yield` once per mix and run (kept on the check context): MIX-YIELD and
    SITE-GAUGE use the same numbers."""
    found = ctx.__dict__.setdefault("_yields", {})
    if mix.id not in found:
        found[mix.id] = mix_yield(ctx.project, mix, ctx.rules)
    return found[mix.id]


def fresh_per_loose_binder(y: md.MixYield, mix) -> float:
    """Y_b: m³ of fresh mortar per m³ of loose binder."""
    return y.fresh_volume / sum(b.parts for b in mix.binders)


def workable_life(project, mix, rules) -> tuple[Sourced, bool]:
    """(workable life in s with source, measured?): measured (EN 1015-9), else the shortest
    binder default — either capped by the measured initial set of the paste as dosed, since
    mortar that has begun to set is no longer workable."""
    if mix.workable_life is not None:
        src = mix.workable_life_source or "laboratory"
        life, measured = Sourced(mix.workable_life, f"mixes.yaml {mix.id}.workable_life, "
                                 f"EN 1015-9 ({src})"), True
    else:
        found = [rule_si(rules, f"workable_life_{project.binders[b.binder].type}", "time")
                 for b in mix.binders]
        life, measured = min(found, key=lambda s: s.value), False
    s = mix.setting
    if s is not None and s.initial < life.value:
        life = Sourced(s.initial, f"mixes.yaml {mix.id}.setting.initial (initial set "
                       f"{s.initial / 60:g} min caps the {life.value / 60:g} min of "
                       f"{life.source})")
    return life, measured


@dataclass(frozen=True)
class ZoneVolume:
    """The mortar volume of a zone: formula inputs, net volume, wastage, total (SI)."""

    net: float
    wastage: Sourced
    total: float
    joint_length: float | None = None
    inputs: tuple = ()         # (symbol, name, value SI, unit shown, divisor, source)
    reason: str = ""           # why no volume (missing inputs)


def zone_volume(zone, project, rules) -> ZoneVolume:
    """Net and total mortar volume of a zone by its kind of work (reason when not computable)."""
    wastage = (Sourced(zone.wastage, f"dossier.yaml {zone.id}.wastage") if zone.wastage is not None
               else rule_si(rules, f"wastage_{zone.works}", "fraction"))
    where = f"dossier.yaml {zone.id}"
    if zone.works == "repointing":
        unit = project.masonry_units.get(zone.units) if zone.units else None
        missing = [n for n, v in ((f"{where}.area", zone.area),
                                  (f"{where}.joint_width", zone.joint_width),
                                  ("the unit's length", unit and unit.length),
                                  ("the unit's height", unit and unit.height)) if not v]
        if missing:
            return ZoneVolume(0, wastage, 0, reason="give " + ", ".join(missing))
        ratio = rules["works.joint_depth_ratio"]
        depth = (Sourced(zone.joint_depth, f"{where}.joint_depth") if zone.joint_depth
                 else Sourced(ratio.value * zone.joint_width, f"joint width × {ratio.source()}"))
        L = wk.joint_length_per_m2(unit.length, unit.height, zone.joint_width)
        net = wk.repointing_volume(zone.area, L, zone.joint_width, depth.value)
        inputs = (("A", "wall area", zone.area, "m²", 1, f"{where}.area"),
                  ("l", "unit length", unit.length, "mm", 1e-3, f"materials.yaml {unit.id}.length"),
                  ("h", "unit height", unit.height, "mm", 1e-3, f"materials.yaml {unit.id}.height"),
                  ("j", "joint width", zone.joint_width, "mm", 1e-3, f"{where}.joint_width"),
                  ("d", "joint depth", depth.value, "mm", 1e-3, depth.source))
        return ZoneVolume(net, wastage, wk.with_wastage(net, wastage.value), L, inputs)
    if zone.works == "render":
        missing = [n for n, v in ((f"{where}.area", zone.area), (f"{where}.coats", zone.coats))
                   if not v]
        if missing:
            return ZoneVolume(0, wastage, 0, reason="give " + ", ".join(missing))
        net = wk.render_volume(zone.area, zone.coats)
        inputs = (("A", "rendered area", zone.area, "m²", 1, f"{where}.area"),) + tuple(
            (f"t_{i + 1}", f"thickness of coat {i + 1}", t, "mm", 1e-3, f"{where}.coats[{i}]")
            for i, t in enumerate(zone.coats))
        return ZoneVolume(net, wastage, wk.with_wastage(net, wastage.value), None, inputs)
    if not zone.masonry_volume:
        return ZoneVolume(0, wastage, 0, reason=f"give {where}.masonry_volume")
    frac = (Sourced(zone.mortar_fraction, f"{where}.mortar_fraction") if zone.mortar_fraction
            else rule_si(rules, "bedding_mortar_fraction", "dimensionless"))
    net = wk.bedding_volume(zone.masonry_volume, frac.value)
    inputs = (("V_m", "volume of masonry", zone.masonry_volume, "m³", 1, f"{where}.masonry_volume"),
              ("f", "mortar fraction", frac.value, "", 1, frac.source))
    return ZoneVolume(net, wastage, wk.with_wastage(net, wastage.value), None, inputs)
