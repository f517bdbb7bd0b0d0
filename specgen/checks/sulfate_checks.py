"""Sulfate attack of the repair mortar, assessed per zone and candidate, in two forms.

* DUR-TSA, thaumasite: attacks the C-S-H itself, so any binder that forms C-S-H (natural
  cement, hydraulic limes, portland) is assessed, whatever its alumina.  It needs all of:
  a sulfate source (the fabric's sulfate class, or sea water from the zone's exposure),
  water (the zone's wetting), carbonate (CO2 in the binder's analysis, or a lime-rich binder
  that carbonates) and cold (below the rule's temperature; the project's lowest winter
  temperature, else the coldest day of the site record).
* DUR-ETT, ettringite: reactive aluminate (Al2O3 of the analysis against the rule, or the
  binder family) plus sulfate and water.

Each condition is shown with its source; one absent condition clears the risk, an unknown
one holds the verdict and names the measurement.
"""
from __future__ import annotations

from dataclasses import dataclass

from specgen.checks import compatibility_common as cc
from specgen.checks import durability_common as dc
from specgen.checks.registry import register
from specgen.checks.result import Basis, CheckResult, Input, Step
from specgen.checks.salt_checks import aluminate_rich
from specgen.views import family_words

TSA = "Thaumasite sulfate attack"
ETT = "Ettringite sulfate expansion"
TEG = Basis("reference", "teg1999", "primary risk factors: a sulfate source, mobile water, "
            "carbonate and low temperatures, generally below 15 °C", read_in="teg_summary")
ZERO_C = 273.15


@dataclass(frozen=True)
class Condition:
    """One condition of an attack: met (True/False/None unknown), why, source, what decides."""

    name: str
    met: bool | None
    why: str
    source: str
    decide: str = ""


def sulfate(pair, ctx) -> tuple[Condition, str]:
    """Sulfate source: the fabric's class (COMP-SALT) or sea water (DUR-EXPOSE)."""
    e = dc.exposure(ctx, pair.zone.id) or {}
    q = ctx.quantity(pair.subject, "salt_load_class")
    classes = [c.get("sulfate") for k, c in (q.value if q else {}).items()
               if k != "table" and isinstance(c, dict) and c.get("sulfate")]
    order = ["low", "medium", "high"]
    top = max(classes, key=order.index) if classes else None
    sea = [s for s in e.get("sea", []) if "de-icing" not in s]
    parts = []
    if top:
        parts.append(f"fabric sulfate {top} (COMP-SALT/{pair.subject})")
    if sea:
        parts.append(f"sea water ({'; '.join(sea)}, DUR-EXPOSE/{pair.zone.id})")
    met = None if top is None and not sea else bool(sea) or top in ("medium", "high")
    why = "; ".join(parts) or "no sulfate measured in the fabric and no sea water"
    level = "high" if top == "high" else ("sea" if sea else (top or ""))
    return Condition("sulfate", met, why, "COMP-SALT, DUR-EXPOSE",
                     "measure sulfate in the units and the historic mortar (soluble salts, "
                     "mass %)"), level


def water(pair, ctx) -> Condition:
    e = dc.exposure(ctx, pair.zone.id)
    if e is None:
        return Condition("water", None, "no exposure class", "DUR-EXPOSE",
                         f"give dossier.yaml {pair.zone.id}.exposure_conditions")
    # the class by its designation: what it means is said once, by the zone's DUR-EXPOSE,
    # named beside it (repeated in every sulfate finding it ran the main volume pages longer)
    return Condition("water", e["wetting"] != "dry", f"{e['wetting']} wetting ({e['designation']}"
                     ")", f"DUR-EXPOSE/{pair.zone.id}")


def carbonate(pair, ctx) -> Condition:
    lim = dc.rule(ctx, "carbonate_co2_min")
    found = []
    for bid, fam in dc.binder_types(pair.mix, ctx.project):
        b = ctx.project.binders[bid]
        an = ctx.project.analyses.get(b.analysis) if b.analysis else None
        co2 = an.mass_percent.get("CO2") if an else None
        if co2 is not None and co2 >= lim.value:
            found.append(f"{bid}: CO2 {co2:g} % ≥ {lim.value:g} % (analysis {an.id})")
        elif fam in dc.LIME_RICH:
            found.append(f"{bid}: {family_words(fam)} carbonates in the wall (calcite)")
    return Condition("carbonate", bool(found), "; ".join(found) or
                     "no CO2 in the binders' analyses and no lime-rich binder",
                     "analyses.yaml, materials.yaml")


def cold(ctx) -> tuple[Condition, float | None]:
    lim = dc.rule(ctx, "thaumasite_temperature_max")
    dur, site = ctx.project.dossier.durability, ctx.project.site_temperature
    if dur.lowest_temperature is not None:
        t, src = dur.lowest_temperature, "dossier.yaml durability.lowest_temperature"
    elif site is not None and (site.points or site.constant is not None):
        t = min(k for _, k in site.points) if site.points else site.constant
        src = f"coldest day of {site.source}"
    else:
        return Condition("cold", None, "winter temperature unknown", "dossier.yaml",
                         "give durability.lowest_temperature in dossier.yaml"), None
    c = t - ZERO_C
    return Condition("cold", c < lim.value, f"{c:.1f} °C {'<' if c < lim.value else '≥'} "
                     f"{lim.value:g} °C", src), c


def csh(pair, ctx) -> Condition:
    fams = dc.binder_types(pair.mix, ctx.project)
    forming = [f"{b} ({family_words(f, short=True)})" for b, f in fams if f in dc.BINDER_CSH]
    return Condition("C-S-H", bool(forming), ", ".join(forming) or "air lime only: no C-S-H",
                     "materials.yaml binder types")


def _step(title: str, conds: list[Condition]) -> Step:
    word = {True: "yes", False: "no", None: "unknown"}
    inputs = tuple(Input(c.name, f"{c.name}: {c.why}", word[c.met], "", c.source) for c in conds)
    met = sum(1 for c in conds if c.met)
    return Step(title, r"\text{risk} = \bigwedge_i \text{condition}_i", inputs,
                r"\ \wedge\ ".join(rf"\text{{{dc.tex(c.name)}: {word[c.met]}}}" for c in conds),
                float(met), "", "n")


def _verdict(code, title, pair, ctx, conds, severe: bool, basis, rules, what: str, tables=()):
    absent = [c for c in conds if c.met is False]
    unknown = [c for c in conds if c.met is None]
    steps = [_step(f"Conditions of {what}", conds)]
    if absent:
        return cc.result(code, title, pair, "pass",
                         ", ".join(c.name for c in absent) + " absent", "", basis,
                         f"no {what} risk: " + "; ".join(f"{c.name} absent ({c.why})"
                                                         for c in absent), steps=steps)
    if unknown:
        tests = [dc.asked(f"{c.name} for {what}", c.decide, f"{what} in zone {pair.zone.id}",
                          code) for c in unknown]
        return cc.result(code, title, pair, "hold", None, "", basis,
                         f"{what}: cannot decide — " + "; ".join(
                             f"{c.name} unknown: {c.decide}" for c in unknown), steps=steps,
                         quantities=dc.tests_quantity(ctx, pair.subject, tests))
    status = "fail" if severe else "attention"
    status, notes = dc.memory_gate(ctx, status, rules, tables)
    return cc.result(code, title, pair, status, f"all {len(conds)} conditions met", "", basis,
                     f"{what} risk: every condition met — " + "; ".join(
                         f"{c.name}: {c.why}" for c in conds), steps=steps, notes=notes)


def _salt_table(ctx, level: str) -> list[str]:
    """The salt-load table when the verdict rests on a fabric class read from it and its
    edges are recalled."""
    from specgen.checks.salt_checks import table
    key, tab = table(ctx)
    if level in ("medium", "high") and tab.get("tag") == "memory":
        return [f"the salt-load class edges of {tab.get('title') or 'the salt-load table'}"]
    return []


@register("DUR-TSA", TSA, "zone", order=546, matrix="durability", column="thaumasite")
def thaumasite_check(zone, ctx) -> list[CheckResult]:
    """Thaumasite: C-S-H, sulfate, water, carbonate and cold, each with its source."""
    return cc.each_pair("DUR-TSA", zone, ctx, _tsa_one)


def _tsa_one(pair, ctx) -> CheckResult:
    if pair.mix is None:
        return cc.not_assessed("DUR-TSA", TSA, pair, [f"unknown mix {pair.mix_id}"], (TEG,))
    sul, level = sulfate(pair, ctx)
    wet, (cd, _) = water(pair, ctx), cold(ctx)
    conds = [csh(pair, ctx), sul, wet, carbonate(pair, ctx), cd]
    e = dc.exposure(ctx, pair.zone.id) or {}
    severe = level == "high" or (level == "sea" and e.get("wetting") == "severe")
    return _verdict("DUR-TSA", TSA, pair, ctx, conds, severe, [TEG],
                    [dc.rule(ctx, "thaumasite_temperature_max")], "thaumasite",
                    _salt_table(ctx, level))


@register("DUR-ETT", ETT, "zone", order=547, matrix="durability", column="ettringite")
def ettringite_check(zone, ctx) -> list[CheckResult]:
    """Ettringite: reactive aluminate, sulfate and water, each with its source."""
    return cc.each_pair("DUR-ETT", zone, ctx, _ett_one)


def _ett_one(pair, ctx) -> CheckResult:
    if pair.mix is None:
        return cc.not_assessed("DUR-ETT", ETT, pair, [f"unknown mix {pair.mix_id}"])
    rich, why = aluminate_rich(pair.mix, ctx.project, ctx)
    alu = Condition("aluminate", rich, why, "analyses.yaml Al2O3 against "
                    "rule compatibility.aluminate_rich_al2o3")
    sul, level = sulfate(pair, ctx)
    conds = [alu, sul, water(pair, ctx)]
    basis = [cc.rule_basis(ctx, "aluminate_rich_al2o3")]
    res = _verdict("DUR-ETT", ETT, pair, ctx, conds, level == "high", basis, [], "ettringite",
                   _salt_table(ctx, level))
    if level == "sea" and res.status in ("attention", "fail"):
        from dataclasses import replace
        res = replace(res, notes=res.notes + (
            "sea water: its chloride moderates the expansion of ettringite in practice, but the "
            "sulfate still reacts; a sulfate-resisting choice is the safe one (common practice)",))
    return res
