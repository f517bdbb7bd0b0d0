"""Exposure of each zone and the frost requirement it sets for each candidate.

* DUR-EXPOSE (zone): the zone's conditions (``exposure_conditions``, else the words of its
  ``exposure`` text) with their wetting and salt sources, the site's frost, and the class:
  EN 1996-1-1 Annex A micro conditions in European practice (MX4 with MX3.2 …), the
  ASTM C270 Table X1.1 location and a weathering severity in American practice.
* DUR-FROST (zone × candidate): where the class carries freeze–thaw, the mortar must show
  a freeze–thaw test of the regime the class asks for (cycles, mass and strength loss, rules
  of common practice, since EN 998-2 defers to the provisions of the place of use); binder
  family, air content and strength are shown as indicators.  No test: *hold*, naming it.
"""
from __future__ import annotations

from specgen import refdata
from specgen.checks import compatibility_common as cc
from specgen.checks import durability_common as dc
from specgen.checks.registry import declare, register
from specgen.checks.result import (
    Basis,
    CheckResult,
    Input,
    Limit,
    Quantity,
    Step,
    not_assessed,
)
from specgen.science import exposure as ex

declare("exposure_class", "", "exposure class of a zone: {practice, designation, classes, base, "
        "wetting, freeze_thaw, sea, aggressive, conditions, american}")

TITLE = "Exposure class of the zone"
FROST = "Freeze–thaw resistance for the exposure"
EN998 = Basis("reference", "en998_2", "durability: freeze–thaw resistance declared by the "
              "provisions valid in the place of use")


@register("DUR-EXPOSE", TITLE, "zone", order=535)
def exposure_check(zone, ctx) -> CheckResult:
    """The zone's micro condition (or American location and weathering) with the reasoning."""
    table = refdata.load("exposure_classes")
    found = ctx.project.exposure.get(zone.id)
    if found is None or not found.conditions:
        words = ", ".join(table.data["conditions"])
        return not_assessed("DUR-EXPOSE", TITLE, zone.id, "zone", (dc.PRACTICE_BASIS,),
                            f"the exposure of zone {zone.id} ('{zone.exposure}') names no "
                            "condition the checks read; give 'exposure_conditions:' in "
                            f"dossier.yaml, from: {words}")
    dur = ctx.project.dossier.durability
    ec = ex.classify(found.conditions, table.data["conditions"], dur.freezing)
    kind, said = dc.practice(ctx.project)
    where = (f"dossier.yaml {zone.id}.exposure_conditions" if found.given_as ==
             "exposure_conditions" else f"dossier.yaml {zone.id}.exposure")
    inputs = tuple(Input(c, f"{c.replace('_', ' ')} ({spec['wetting']} wetting"
                         + (f"; {spec['sea']}" if spec.get("sea") else "") + ")", 1, "",
                         f"{where}: {word}")
                   for c, word in found.found for spec in (table.data["conditions"][c],))
    frost_src = (f"dossier.yaml durability.freezing ({dur.source})" if dur.source
                 else "dossier.yaml durability.freezing")
    steps = [Step("Wetting and salt sources of the conditions",
                  r"w = \max_i w_i,\quad \text{salt source if any condition carries one}",
                  inputs, rf"w = \text{{{ec.wetting}}}" + (
                      rf",\ \text{{salts: {dc.tex('; '.join(ec.sea))}}}" if ec.sea else ""),
                  float(ex.WETTING.index(ec.wetting)), "", "w"),
             Step("Micro condition", r"\text{MX by wetting, freeze-thaw, salts, chemicals}",
                  (Input("F", "site sees freezing", "unknown" if dur.freezing is None
                         else ("yes" if dur.freezing else "no"), "", frost_src),),
                  rf"\text{{{dc.tex(ec.designation)}}}", float(len(ec.classes)), "", "MX")]
    q = {"practice": kind, "designation": ec.designation, "classes": list(ec.classes),
         "base": ec.base, "wetting": ec.wetting, "freeze_thaw": ec.freeze_thaw,
         "sea": list(ec.sea), "aggressive": ec.aggressive, "conditions": list(found.conditions)}
    loc = table.data["american"][ex.american_location(found.conditions)]
    q["american"] = {"location": loc["location"], "recommended": loc["recommended"],
                     "alternatives": loc["alternatives"], "weathering": ex.weathering(ec)}
    basis = [dc.PRACTICE_BASIS]
    text = f"{ec.designation}: " + "; ".join(ec.reasons)
    if kind == "american":
        basis = [Basis("reference", "astmc270", "Appendix X1, Table X1.1")]
        text = (f"{loc['location']}: type {loc['recommended']} recommended (alternatives "
                f"{', '.join(loc['alternatives'])}); weathering {q['american']['weathering']} "
                f"(EN 1996-1-1 equivalent {ec.designation})")
    # a class wording still tagged memory is listed on the Values to confirm page, not here
    notes = [said, f"class wording: {refdata.shown(table.source, table.tag)}"]
    status = "info"
    if dur.freezing is None and ec.wetting != "dry":
        status = "attention"
        notes.append("the site's frost is not stated (dossier.yaml durability.freezing): the "
                     "freeze-thaw sub-class cannot be told")
    return CheckResult(code="DUR-EXPOSE", title=TITLE, subject=zone.id, subject_kind="zone",
                       status=status, value=ec.designation, unit="", basis=tuple(basis),
                       steps=tuple(steps), message=text, notes=tuple(notes),
                       quantities=(Quantity("exposure_class", q, "", "exposure class"),))


# ---------------------------------------------------------------- frost
@register("DUR-FROST", FROST, "zone", order=545, matrix="durability", column="frost")
def frost_check(zone, ctx):
    """Freeze–thaw requirement of the zone's class against the mortar's test, with indicators."""
    return cc.each_pair("DUR-FROST", zone, ctx, _frost_one)


def _frost_one(pair, ctx) -> CheckResult:
    e = dc.exposure(ctx, pair.zone.id)
    if e is None:
        return cc.not_assessed("DUR-FROST", FROST, pair, [
            f"no exposure class for zone {pair.zone.id} (see DUR-EXPOSE)"], basis=(EN998,))
    if e["freeze_thaw"] is None:
        return cc.result("DUR-FROST", FROST, pair, "hold", None, "", [EN998],
                         "the site's frost is not stated: give durability.freezing in "
                         "dossier.yaml (true where winter air falls below 0 °C)")
    if not e["freeze_thaw"]:
        return cc.result("DUR-FROST", FROST, pair, "pass", e["designation"], "", [EN998],
                         f"{e['designation']}: no freeze–thaw cycling, so no frost requirement")
    severe = e["base"] == "MX3.2" or bool(e["sea"])
    need = dc.rule(ctx, "frost_cycles_severe" if severe else "frost_cycles_moderate")
    steps = [_indicators(pair, ctx)]
    ft = pair.props.freeze_thaw if pair.props else None
    test = dc.asked("freeze–thaw resistance of the mortar",
                    f"at least {need.value:g} cycles on water-saturated prisms 40 × 40 × 160 mm "
                    "by the provisions valid at the place of use (EN 998-2 gives no European "
                    "method), reporting mass loss and strength loss against unfrozen companions",
                    f"zone {pair.zone.id} is {e['designation']}", "DUR-FROST")
    if ft is None:
        return cc.result("DUR-FROST", FROST, pair, "hold", None, "", [EN998, need.basis],
                         f"{e['designation']} asks for a declared freeze–thaw resistance; "
                         f"{pair.mix_id} has none: commission {test['method']}", steps=steps,
                         quantities=dc.tests_quantity(ctx, pair.subject, [test]))
    return _frost_tested(pair, ctx, e, need, ft, steps, test)


def _frost_tested(pair, ctx, e, need, ft, steps, test) -> CheckResult:
    src = f"materials.yaml mortar_properties {pair.mix_id}.freeze_thaw ({ft.source or ft.method})"
    inputs = [Input("N", "cycles completed", ft.cycles, "", src),
              dc.rule_input(ctx, "N_req", need.key.split(".")[1])]
    verdicts, words = [], []
    ok = ft.cycles >= need.value
    verdicts.append("pass" if ok else "hold")
    words.append(f"{ft.cycles} of {need.value:g} cycles")
    for key, val, name in (("frost_mass_loss_max", ft.mass_loss, "mass loss"),
                           ("frost_strength_loss_max", ft.strength_loss, "strength loss")):
        if val is None:
            continue
        lim = dc.rule(ctx, key)
        inputs += [Input(name[0].upper() + "L", name, round(100 * val, 3), "%", src),
                   dc.rule_input(ctx, name[0].upper() + "L_max", key)]
        verdicts.append("pass" if 100 * val <= lim.value else "fail")
        words.append(f"{name} {100 * val:g} % (limit {lim.value:g} %)")
    if ft.mass_loss is None and ft.strength_loss is None:
        verdicts.append("hold")
        words.append("no mass or strength loss reported")
    status = "fail" if "fail" in verdicts else ("hold" if "hold" in verdicts else "pass")
    steps.append(Step("Freeze–thaw test against the regime of the class",
                      r"N \ge N_{req},\ ML \le ML_{max},\ SL \le SL_{max}", tuple(inputs),
                      rf"N = {ft.cycles}\ \text{{against}}\ {need.value:g}", float(ft.cycles),
                      "", "N"))
    msg = f"{e['designation']}: " + "; ".join(words)
    if status == "hold":
        msg += f" — complete the test: {test['method']}"
    return cc.result("DUR-FROST", FROST, pair, status, ft.cycles, "cycles", [EN998, need.basis],
                     msg, steps=steps, limit=Limit(">=", low=need.value, text=f"N ≥ {need.value:g}"
                                                   " cycles", rule=need.key),
                     quantities=dc.tests_quantity(ctx, pair.subject,
                                                   [test] if status == "hold" else []))


def _indicators(pair, ctx) -> Step:
    """Binder family, air content and strength: what the standard and practice weigh."""
    from specgen.checks import works_common as wc
    mix, inputs = pair.mix, []
    for bid, fam in dc.binder_types(mix, ctx.project):
        carb = "hardens largely by carbonation: weak to frost while young" if fam in dc.LIME_RICH \
            else "hydraulic"
        inputs.append(Input(bid, f"binder family {fam.replace('_', ' ')} ({carb})", fam, "",
                            f"materials.yaml {bid}.type"))
    air = wc.air_of(mix, ctx.rules)
    inputs.append(Input("a", "air content of the fresh mortar", round(100 * air.value, 3), "%",
                        air.source))
    mean = ctx.quantity(pair.mix_id, "mean_strength")
    comp = (mean.value or {}).get("compressive", {}) if mean else {}
    if comp:
        age = max(comp, key=lambda k: float(k[:-2]))
        inputs.append(Input("f_c", f"mean compressive strength at {age}", comp[age], "MPa",
                            f"STR-AGG/{pair.mix_id}"))
    return Step("What the mix has (indicators, not a verdict)",
                r"\text{binder family, air content, strength}", tuple(inputs),
                rf"a = {100 * air.value:g}\,\%", round(100 * air.value, 3), "%", "a")
