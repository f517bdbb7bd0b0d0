"""Fresh and hardened properties of each candidate against the substrate of each zone.

* DUR-RETAIN: water retention of the fresh mortar against the suction of the units (initial
  rate of absorption, else the capillary coefficient COMP-MOIST recorded): a thirsty
  background needs a mortar that holds its water, and damping first.
* DUR-BOND (render zones): pull-off bond on the background (EN 1015-12) and where it broke.
* DUR-CARB (lime-rich binders): carbonation depth with time, x = K√t, fitted to measured
  depths, and the time to carbonate the repair's depth — the period over which the
  hydraulic strength model does not describe the mortar.
"""
from __future__ import annotations

import math

from specgen.checks import compatibility_common as cc
from specgen.checks import durability_common as dc
from specgen.checks.registry import declare, register
from specgen.checks.result import Basis, CheckResult, Input, Limit, Quantity, Step
from specgen.science import carbonation as cb
from specgen.views import family_words

declare("carbonation_front", "", "carbonation of a lime-rich repair: {K_mm_per_sqrt_d, depth_mm, "
        "days_to_depth}")

RETAIN = "Water retention against the suction of the units"
BOND = "Render bond to the background"
CARB = "Carbonation of a lime-rich mortar"
ABS_MIN = 60.0  # kg/(m²·s) → kg/(m²·min)
DAY = 86400.0
GE = r"\ge"


@register("DUR-RETAIN", RETAIN, "zone", order=548, matrix="durability", column="water retention")
def retention_check(zone, ctx):
    """Water retention of each candidate against the units' suction."""
    return cc.each_pair("DUR-RETAIN", zone, ctx, _retain_one)


def _suction(pair, ctx):
    """(high?, Input, rules used) from the IRA, else the capillary coefficient; None unknown."""
    u = pair.unit
    if u is not None and u.initial_rate_of_absorption is not None:
        r = dc.rule(ctx, "ira_high")
        v = u.initial_rate_of_absorption * ABS_MIN
        return (v > r.value, [Input("IRA", f"initial rate of absorption of {u.id}", round(v, 4),
                                    "kg/(m²·min)", f"materials.yaml {u.id}"),
                              dc.rule_input(ctx, "IRA_high", "ira_high")], [r])
    q = ctx.quantity(pair.subject, "capillary_coefficient")
    c = (q.value or {}).get("units") if q else None
    if c is None:
        return None
    r = dc.rule(ctx, "capillary_high_suction")
    return (c > r.value, [Input("C_u", "capillary coefficient of the units", c,
                                "kg/(m²·min^0.5)", f"COMP-MOIST/{pair.subject}"),
                          dc.rule_input(ctx, "C_high", "capillary_high_suction")], [r])


def _retain_one(pair, ctx) -> CheckResult:
    suction = _suction(pair, ctx)
    if suction is None:
        u = pair.unit
        give = (f"materials.yaml {u.id}.initial_rate_of_absorption (or {u.id}."
                "capillary_coefficient)" if u is not None else
                f"the zone's units (dossier.yaml {pair.zone.id}.units) with one of them in "
                "materials.yaml")
        return cc.not_assessed("DUR-RETAIN", RETAIN, pair, [
            "the suction of the units is unknown: commission their initial rate of "
            f"absorption (EN 772-11; ASTM C67) or capillary coefficient (EN 1925) and give {give}"])
    high, inputs, used = suction
    need = dc.rule(ctx, "water_retention_min_high_suction" if high else "water_retention_min")
    wr = pair.props.water_retention if pair.props else None
    word = "high" if high else "ordinary"
    if wr is None:
        test = dc.asked("water retention of the fresh mortar", "suction test of the fresh "
                        "mortar (ASTM C1506 / EN 413-2 style)", f"units of {word} suction in "
                        f"zone {pair.zone.id}", "DUR-RETAIN")
        return cc.result("DUR-RETAIN", RETAIN, pair, "hold", None, "", [need.basis],
                         f"units of {word} suction: the mortar must retain at least "
                         f"{need.value:g} % of its water; {pair.mix_id} has no water retention "
                         f"— commission the {test['method']}",
                         quantities=dc.tests_quantity(ctx, pair.subject, [test]))
    inputs += [Input("WR", f"water retention of {pair.mix_id}", round(100 * wr, 3), "%",
                     f"materials.yaml mortar_properties {pair.mix_id}"),
               dc.rule_input(ctx, "WR_min", need.key.split(".")[1])]
    ok = 100 * wr >= need.value
    step = Step("Water retention against the suction of the units",
                r"WR \ge WR_{min}(\text{suction})", tuple(inputs),
                rf"{100 * wr:g}\,\% {GE if ok else '<'} {need.value:g}\,\%", round(100 * wr, 3),
                "%", "WR")
    status, notes = dc.memory_gate(ctx, "pass" if ok else "fail", used + [need])
    if high:
        notes.append("units of high suction: damp the background evenly before placing, and "
                     "again between coats")
    return cc.result("DUR-RETAIN", RETAIN, pair, status, round(100 * wr, 3), "%", [need.basis],
                     f"{word} suction: water retention {100 * wr:g} % "
                     f"{'≥' if ok else '<'} {need.value:g} %", steps=[step], notes=notes,
                     limit=Limit(">=", low=need.value, unit="%", text=f"WR ≥ {need.value:g} %",
                                 rule=need.key))


@register("DUR-BOND", BOND, "zone", order=549, matrix="durability", column="render bond")
def bond_check(zone, ctx):
    """Pull-off bond of each candidate render on the zone's background."""
    if zone.works != "render":
        return []
    return cc.each_pair("DUR-BOND", zone, ctx, _bond_one)


EN1015_12 = Basis("reference", "en1015_12", "adhesive strength by pull-off, fracture pattern")


def _bond_one(pair, ctx) -> CheckResult:
    need = dc.rule(ctx, "render_bond_min")
    p = pair.props
    if p is None or p.bond_strength is None:
        test = dc.asked("render bond (pull-off)", "EN 1015-12 pull-off on the trial panel at "
                        "28 d, at least five discs, recording where each broke",
                        f"render on {pair.unit.id if pair.unit else 'the background'} in zone "
                        f"{pair.zone.id}", "DUR-BOND")
        return cc.result("DUR-BOND", BOND, pair, "hold", None, "", [EN1015_12, need.basis],
                         f"render bond of {pair.mix_id} not measured: commission the "
                         f"{test['method']}",
                         quantities=dc.tests_quantity(ctx, pair.subject, [test]))
    f = p.bond_strength / 1e6
    ok = f >= need.value
    status = "pass" if ok else ("attention" if p.bond_failure in ("mortar", "substrate")
                                else "fail")
    where = {"adhesive": "at the interface", "mortar": "in the mortar",
             "substrate": "in the background", None: "fracture not recorded"}[p.bond_failure]
    src = f"materials.yaml mortar_properties {pair.mix_id} ({p.source or 'laboratory'})"
    step = Step("Pull-off bond against the minimum", r"f_u \ge f_{u,min}",
                (Input("f_u", "pull-off bond strength", round(f, 4), "MPa", src),
                 Input("FP", "fracture", where, "", src),
                 dc.rule_input(ctx, "f_u,min", "render_bond_min")),
                rf"{f:g} {GE if ok else '<'} {need.value:g}\ \mathrm{{MPa}}", round(f, 4),
                "MPa", "f_u")
    msg = f"bond {f:g} MPa {'≥' if ok else '<'} {need.value:g} MPa, broke {where}"
    if status == "attention":
        msg += (" — below the minimum, but the bond outlasted the " +
                ("mortar: a weak, sacrificial render" if p.bond_failure == "mortar"
                 else "background: consolidate or accept the weak surface"))
    return cc.result("DUR-BOND", BOND, pair, status, round(f, 4), "MPa", [EN1015_12, need.basis],
                     msg, steps=[step], limit=Limit(">=", low=need.value, unit="MPa",
                                                   text=f"≥ {need.value:g} MPa", rule=need.key))


@register("DUR-CARB", CARB, "zone", order=550, matrix="durability", column="carbonation")
def carbonation_check(zone, ctx):
    """Depth of carbonation with time for each lime-rich candidate in the zone's depth."""
    return [r for r in cc.each_pair("DUR-CARB", zone, ctx, _carb_one) if r is not None]


def _depth(zone, ctx) -> tuple[float, str] | None:
    if zone.works == "repointing" and zone.joint_depth:
        return zone.joint_depth, f"dossier.yaml {zone.id}.joint_depth"
    if zone.works == "render" and zone.coats:
        return sum(zone.coats), f"dossier.yaml {zone.id}.coats (total)"
    t = ctx.project.dossier.compatibility.repair_thickness
    return (t, "dossier.yaml compatibility.repair_thickness") if t else None


def _carb_one(pair, ctx):
    if pair.mix is None:
        return None
    rich = [f"{b} ({family_words(f, short=True)})"
            for b, f in dc.binder_types(pair.mix, ctx.project) if f in dc.LIME_RICH]
    if not rich:
        return None
    basis = Basis("common practice", note="carbonation front x = K√t; phenolphthalein on a "
                  "fresh break (EN 14630 method)")
    reads = pair.props.carbonation if pair.props else []
    depth = _depth(pair.zone, ctx)
    lead = (f"{', '.join(rich)} hardens largely by carbonation: until the front has passed "
            "through the repair the hydraulic strength model does not describe it")
    if not reads or depth is None:
        test = dc.asked("carbonation depth", "phenolphthalein on fresh breaks of prisms cured "
                        "beside the work, at 28 and 90 d (EN 14630 method)",
                        f"lime-rich binder in zone {pair.zone.id}", "DUR-CARB")
        miss = "no carbonation depths measured" if not reads else "no repair depth for the zone"
        return cc.result("DUR-CARB", CARB, pair, "attention", None, "", [basis],
                         f"{lead}; {miss} — measure by {test['method']}",
                         quantities=dc.tests_quantity(ctx, pair.subject, [test]))
    return _carb_fit(pair, reads, depth, basis, lead)


def _carb_fit(pair, reads, depth, basis, lead) -> CheckResult:
    k = cb.fit_coefficient([r.age for r in reads], [r.depth for r in reads])
    t = cb.time_to_depth(depth[0], k)
    k_show = k * 1e3 * math.sqrt(DAY)            # mm/√d
    src = f"materials.yaml mortar_properties {pair.mix_id}.carbonation"
    inputs = tuple(Input(f"x_{i + 1}", f"depth at {r.age / DAY:g} d", round(r.depth * 1e3, 3),
                         "mm", f"{src}[{i}]") for i, r in enumerate(reads))
    num = " + ".join(f"{r.depth * 1e3:g}\\sqrt{{{r.age / DAY:g}}}" for r in reads)
    den = " + ".join(f"{r.age / DAY:g}" for r in reads)
    steps = [Step("Carbonation coefficient (least squares through the origin)",
                  r"K = \frac{\sum x_i \sqrt{t_i}}{\sum t_i}", inputs,
                  rf"K = \frac{{{num}}}{{{den}}} = {k_show:.3f}\ \mathrm{{mm/\sqrt{{d}}}}",
                  round(k_show, 4), "mm/√d", "K"),
             Step("Time to carbonate the repair's depth", r"t = (d/K)^2",
                  (Input("d", "depth of the repair", round(depth[0] * 1e3, 3), "mm", depth[1]),
                   Input("K", "carbonation coefficient", round(k_show, 4), "mm/√d", "step above")),
                  rf"t = ({depth[0] * 1e3:g} / {k_show:.3f})^2 = {t / DAY:.0f}\ \mathrm{{d}}",
                  round(t / DAY, 1), "d", "t")]
    return cc.result("DUR-CARB", CARB, pair, "info", round(t / DAY, 1), "d", [basis],
                     f"{lead}: K = {k_show:.3f} mm/√d, so {depth[0] * 1e3:g} mm carbonate in "
                     f"about {t / DAY:.0f} days (≈ {t / DAY / 30.4:.0f} months); protect it from "
                     "frost and saturation over that time", steps=steps,
                     quantities=[Quantity("carbonation_front", {
                         "K_mm_per_sqrt_d": round(k_show, 4), "depth_mm": round(depth[0] * 1e3, 3),
                         "days_to_depth": round(t / DAY, 1)}, "", "carbonation front")])
