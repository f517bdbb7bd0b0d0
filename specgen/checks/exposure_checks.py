"""Exposure of each zone and the frost requirement it sets for each candidate.

* DUR-EXPOSE (zone): the zone's conditions (``exposure_conditions``, else the words of its
  ``exposure`` text) with their wetting and salt sources, the site's frost, and the class:
  EN 1996-2 micro conditions (2.1.2.1, Annex A) in European practice (MX4 with MX3.2 …), the
  ASTM C270 Table X1.1 location and a weathering severity in American practice.
* DUR-FROST (zone × candidate): where the class carries freeze–thaw, the mortar must show
  a freeze–thaw test of the regime the class asks for (cycles, mass and strength loss, rules
  of common practice, since EN 998-2 defers to the provisions of the place of use).  The
  binder's hydraulic class, the measured air content and the 28-d strength are weighed
  against the regime's minima (common practice, content/rules/durability.yaml): a passed
  test with an indicator below its minimum is *attention* (keep the site mix to the tested
  one, protect the young work); without a test, a moderate regime (MX3.1) whose indicators
  all meet their minima is deemed to satisfy (*attention*, the test advised), anything else
  is *hold* naming the test, with the indicators that weigh against the mix.
"""
from __future__ import annotations

import re
from dataclasses import dataclass

from specgen import refdata
from specgen.checks import compatibility_common as cc
from specgen.checks import durability_common as dc
from specgen.checks import strength_common as sc
from specgen.checks.registry import declare, register
from specgen.checks.result import (
    Basis,
    CheckResult,
    Input,
    Limit,
    Quantity,
    Step,
    age_key,
    not_assessed,
)
from specgen.science import exposure as ex
from specgen.views import family_words

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
    meaning = dc.exposure_meaning({"classes": ec.classes})
    text = f"{ec.designation}" + (f" ({meaning})" if meaning else "") + ": " + "; ".join(ec.reasons)
    if kind == "american":
        basis = [Basis("reference", "astmc270", "Appendix X1, Table X1.1")]
        text = (f"{loc['location']}: type {loc['recommended']} recommended (alternatives "
                f"{', '.join(loc['alternatives'])}); weathering {q['american']['weathering']} "
                f"(EN 1996-2 equivalent {ec.designation})")
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
    """Freeze–thaw requirement of the zone's class against the mortar's test and indicators."""
    return cc.each_pair("DUR-FROST", zone, ctx, _frost_one)


@dataclass(frozen=True)
class Indicators:
    """What the mix has against the regime's minima: the sheet's step, what falls short, what
    is not known (each in words)."""

    step: Step
    short: tuple[str, ...]
    unknown: tuple[str, ...]

    @property
    def all_met(self) -> bool:
        return not self.short and not self.unknown

    def words(self) -> str:
        return "; ".join(self.short + self.unknown)


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
                         f"{dc.exposure_words(e)}: no freeze–thaw cycling, so no frost "
                         "requirement")
    regime = "severe" if e["base"] == "MX3.2" or bool(e["sea"]) else "moderate"
    need = dc.rule(ctx, f"frost_cycles_{regime}")
    ind = _indicators(pair, ctx, regime)
    ft = pair.props.freeze_thaw if pair.props else None
    test = dc.asked("freeze–thaw resistance of the mortar",
                    f"at least {need.value:g} cycles on water-saturated prisms 40 × 40 × 160 mm "
                    "by the provisions valid at the place of use (EN 998-2 gives no European "
                    "method), reporting mass loss and strength loss against unfrozen companions",
                    f"zone {pair.zone.id} is {e['designation']}", "DUR-FROST")
    if ft is None:
        return _frost_untested(pair, ctx, e, need, ind, test, regime)
    return _frost_tested(pair, ctx, e, need, ft, ind, test)


def _frost_untested(pair, ctx, e, need, ind, test, regime) -> CheckResult:
    basis = [EN998, need.basis, PRACTICE]
    if regime == "moderate" and ind.all_met:
        return cc.result("DUR-FROST", FROST, pair, "attention", None, "", basis,
                         f"{dc.exposure_words(e)}: no freeze–thaw test, but binder class, "
                         "measured air content and 28-d strength all meet the minima of common practice "
                         f"for moderate frost: deemed to satisfy; {test['method']} would confirm "
                         "it", steps=[ind.step])
    msg = (f"{dc.exposure_words(e)} asks for a declared freeze–thaw resistance; {pair.mix_id} "
           f"has none: commission {test['method']}")
    if ind.short:
        msg += f" — the indicators weigh against the mix: {'; '.join(ind.short)}"
    return cc.result("DUR-FROST", FROST, pair, "hold", None, "", basis, msg, steps=[ind.step],
                     quantities=dc.tests_quantity(ctx, pair.subject, [test]))


def _frost_tested(pair, ctx, e, need, ft, ind, test) -> CheckResult:
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
    steps = [ind.step, Step("Freeze–thaw test against the regime of the class",
                            r"N \ge N_{req},\ ML \le ML_{max},\ SL \le SL_{max}", tuple(inputs),
                            rf"N = {ft.cycles}\ \text{{against}}\ {need.value:g}",
                            float(ft.cycles), "", "N")]
    msg = f"{dc.exposure_words(e)}: " + "; ".join(words)
    if status == "hold":
        msg += f" — complete the test: {test['method']}"
    elif status == "pass" and ind.short:
        status = "attention"
        msg += (f"; the test passed but the indicators weigh against the mix: "
                f"{'; '.join(ind.short)} — keep the site mix to the tested one and protect the "
                "young work from frost")
    return cc.result("DUR-FROST", FROST, pair, status, ft.cycles, "cycles",
                     [EN998, need.basis, PRACTICE], msg, steps=steps,
                     limit=Limit(">=", low=need.value, text=f"N ≥ {need.value:g} cycles",
                                 rule=need.key),
                     quantities=dc.tests_quantity(ctx, pair.subject,
                                                   [test] if status == "hold" else []))


PRACTICE = Basis("common practice", note="binder class, air content and strength weighed for "
                 "frost as the trade does: NHL 5 or a cement for severe exposure, measured air "
                 "of a few per cent, a mortar that has reached its class before the first winter")
HYDRAULIC_CEMENT = {"natural_cement", "portland"}


def _indicators(pair, ctx, regime: str) -> Indicators:
    """Binder class, air content and 28-d strength against the regime's minima."""
    parts = [_binder_indicator(pair, ctx, regime), _air_indicator(pair, ctx),
             _strength_indicator(pair, ctx, regime)]
    inputs = tuple(i for p in parts for i in p[0])
    short = tuple(p[2] for p in parts if p[3] == "short")
    unknown = tuple(p[2] for p in parts if p[3] == "unknown")
    met = sum(p[3] == "met" for p in parts)
    return Indicators(Step(
        "What the mix has against the minima of common practice for the regime",
        r"B \ge B_{min}\ (\text{lime only}),\quad a \ge a_{min}\ (\text{measured}),\quad "
        r"f_{c,28} \ge f_{min}", inputs, r",\quad ".join(p[1] for p in parts), float(met), "",
        r"n_{met}"), short, unknown)


def _binder_indicator(pair, ctx, regime):
    """(inputs, substituted, words, 'met' | 'short' | 'unknown') of the binder's class."""
    fams = dc.binder_types(pair.mix, ctx.project)
    inputs = [Input(bid, "binder family", family_words(fam), "",
                    f"materials.yaml {bid}.type") for bid, fam in fams]
    cements = [bid for bid, fam in fams if fam in HYDRAULIC_CEMENT]
    if cements:
        return inputs, rf"B:\ \text{{{dc.tex(cements[0])} is a cement}}", \
            f"{cements[0]} is a hydraulic cement", "met"
    key = f"frost_lime_class_min_{regime}"
    lim = dc.rule(ctx, key)
    inputs.append(dc.rule_input(ctx, "B_min", key))
    known = [(c, bid) for bid, fam in fams
             for c in (_lime_class(ctx.project.binders[bid], fam),) if c is not None]
    if not known:
        return inputs, r"B:\ \text{not declared}", \
            "the lime's EN 459-1 class is not declared (materials.yaml declared_class)", "unknown"
    cls, bid = max(known)
    inputs.append(Input("B", "strength class of the lime (air lime counts 0)", cls, "",
                        f"materials.yaml {bid}.declared_class"))
    ok = cls >= lim.value
    return inputs, rf"B = {cls:g} {_rel(ok)} {lim.value:g}", \
        f"lime class {cls:g} {'≥' if ok else '<'} {lim.value:g}", "met" if ok else "short"


def _rel(ok: bool) -> str:
    return r"\ge" if ok else "<"


def _lime_class(binder, family: str) -> float | None:
    if family == "air_lime":
        return 0.0
    m = re.search(r"(\d+(?:[.,]\d+)?)", binder.declared_class or "")
    return float(m.group(1).replace(",", ".")) if m else None


def _air_indicator(pair, ctx):
    from specgen.checks import works_common as wc
    air, lim = wc.air_of(pair.mix, ctx.rules), dc.rule(ctx, "frost_air_min")
    a = round(100 * air.value, 3)
    measured = pair.mix.air_content is not None
    inputs = [Input("a", "air content of the fresh mortar" + ("" if measured else
                    " (assumed: does not count)"), a, "%", air.source),
              dc.rule_input(ctx, "a_min", "frost_air_min")]
    if not measured:
        return inputs, r"a:\ \text{not measured}", \
            "air content not measured (EN 1015-7)", "unknown"
    ok = a >= lim.value
    return inputs, rf"a = {a:g}\,\% {_rel(ok)} {lim.value:g}\,\%", \
        f"air content {a:g} % {'≥' if ok else '<'} {lim.value:g} %", "met" if ok else "short"


def _strength_indicator(pair, ctx, regime):
    key = f"frost_strength_min_{regime}"
    lim = dc.rule(ctx, key)
    mean = ctx.quantity(pair.mix_id, "mean_strength")
    f28 = ((mean.value or {}).get("compressive", {}) if mean else {}).get(age_key(28 * sc.DAY))
    inputs = [dc.rule_input(ctx, "f_min", key)]
    if f28 is None:
        return inputs, r"f_{c,28}:\ \text{not tested}", \
            "no 28-d compressive strength (EN 1015-11)", "unknown"
    inputs.insert(0, Input("f_c28", "mean compressive strength at 28 d", f28, "MPa",
                           f"STR-AGG/{pair.mix_id}"))
    ok = f28 >= lim.value
    return inputs, rf"f_{{c,28}} = {f28:.3g} {_rel(ok)} {lim.value:g}", \
        f"28-d strength {f28:.3g} MPa {'≥' if ok else '<'} {lim.value:g} MPa", \
        "met" if ok else "short"
