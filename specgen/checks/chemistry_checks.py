"""Checks on oxide analyses: loss-free basis, hydraulic index, LSF, ratios, raw-stone CO2 and clay.

Formulas come from :mod:`specgen.science.oxides` and :mod:`specgen.science.calcination`;
limits from ``content/rules/analysis.yaml``.  Every check states its scheme and basis.
"""
from __future__ import annotations

from specgen.checks.chemistry_common import (ATOMIC, TAYLOR, VICAT, atomic_weights, binder_of,
                                             finite, guarded, is_clinker, not_assessed,
                                             oxide_inputs, prepared, source)
from specgen.views import oxide_order
from specgen.precision import by_symbol
from specgen.checks.registry import declare, register
from specgen.checks.result import Basis, CheckResult, Input, Limit, Quantity, Step
from specgen.science import calcination, oxides

declare("loss_free_composition", "%", "oxides on the loss-free (ignited) basis, "
        "oxide × 100/(100 − LOI), by oxide")
declare("hydraulic_index", "", "hydraulic index, Vicat form (S + A + F)/(C + M)")
declare("lime_saturation_factor", "", "lime saturation factor (C − 0.7S̄)/(2.8S + 1.18A + 0.65F) "
        "(Taylor); descriptive for unsintered binders")
declare("silica_ratio", "", "silica ratio S/(A + F)")
declare("alumina_ratio", "", "alumina ratio A/F")
declare("carbonate_content", "%", "CaCO3 + MgCO3 of a raw stone from its CO2 (CO2 to CaO first)")
declare("co2_gap", "%", "CO2 that CaO + MgO could carry as carbonate minus CO2 measured")
declare("clay_fraction", "%", "clay fraction of a raw stone: SiO2 + Al2O3 + Fe2O3 + combined water")

CSAFM = (("C", "CaO"), ("S", "SiO2"), ("A", "Al2O3"), ("F", "Fe2O3"), ("M", "MgO"))
PRACTICE_NC = Basis("common practice", note="natural cement: one marly limestone of about "
                    "20–30 % clay")
LOSSFREE_BASIS = (Basis("common practice", note="fired oxide = raw oxide × 100/(100 − LOI): "
                        "every loss leaves on firing"),)


def _raw_stone_only(fn):
    """Run a check on raw-stone analyses only (others get no result)."""
    def wrapper(analysis, ctx):
        return fn(analysis, ctx) if analysis.kind == "raw_stone" else None
    wrapper.__doc__, wrapper.__name__ = fn.__doc__, fn.__name__
    return wrapper


@register("CHEM-LOSSFREE", "Loss-free basis", "analysis", order=105)
@guarded("CHEM-LOSSFREE", "Loss-free basis", "analysis", LOSSFREE_BASIS)
def loss_free_check(analysis, ctx) -> CheckResult:
    """Renormalise the analysis to the loss-free (ignited) basis."""
    prep = prepared(analysis)
    loi = oxides.loss_on_ignition(prep.ox)
    factor = finite(100.0 / (100.0 - loi), "the loss-free factor")
    free = oxides.loss_free(prep.ox)
    steps = [Step("Loss-free factor", r"f = \frac{100}{100 - LOI}",
                  (Input("LOI", "loss on ignition", round(loi, 4), "%", source(analysis)),),
                  rf"f = \frac{{100}}{{100 - {loi:.2f}}}", round(factor, 5), "", "f")]
    for sym, name in CSAFM:
        if name in prep.ox:
            steps.append(Step(f"{name} on the loss-free basis", rf"{sym}_{{lf}} = f \times {sym}",
                              oxide_inputs(analysis, prep.ox, ((sym, name),)),
                              rf"{sym}_{{lf}} = {factor:.5f} \times {prep.ox[name]:.2f}",
                              round(free[name], 4), "%", f"{sym}lf"))
    listing = ", ".join(f"{k} {free[k]:.2f} %" for k in sorted(free, key=oxide_order)[:5])
    return CheckResult(
        code="CHEM-LOSSFREE", title="Loss-free basis", subject=analysis.id,
        subject_kind="analysis", status="info", value=round(factor, 5), unit="",
        basis=LOSSFREE_BASIS, steps=tuple(steps),
        message=f"factor 100/(100 − {loi:.2f}) = {factor:.4f}; {listing}; the indices are "
                "ratios and do not change",
        notes=prep.assumptions,
        quantities=(Quantity("loss_free_composition",
                             {k: round(v, 4) for k, v in sorted(free.items())}, "%",
                             "loss-free composition"),))


@register("CHEM-HI", "Hydraulic index (Vicat)", "analysis", order=115)
@guarded("CHEM-HI", "Hydraulic index (Vicat)", "analysis", (VICAT,))
def hydraulic_index_check(analysis, ctx) -> CheckResult:
    """Hydraulic index in Vicat's form, with the scheme named."""
    prep = prepared(analysis)
    ox = prep.ox
    hi = finite(oxides.hydraulic_index(ox), "the hydraulic index")
    g = lambda k: ox.get(k, 0.0)  # noqa: E731 - oxides not reported count as zero
    step = Step("Hydraulic index (Vicat)", r"HI = \frac{S + A + F}{C + M}",
                oxide_inputs(analysis, ox, CSAFM),
                rf"HI = \frac{{{g('SiO2'):.2f} + {g('Al2O3'):.2f} + {g('Fe2O3'):.2f}}}"
                rf"{{{g('CaO'):.2f} + {g('MgO'):.2f}}}", round(hi, 4), "", "HI")
    return CheckResult(
        code="CHEM-HI", title="Hydraulic index (Vicat)", subject=analysis.id,
        subject_kind="analysis", status="info", value=round(hi, 4), unit="", basis=(VICAT,),
        steps=(step,), notes=prep.assumptions,
        message=f"HI = {by_symbol(round(hi, 4), 'HI')} (scheme: {oxides.HYDRAULIC_INDEX_SCHEME}); for information — "
                "the classification uses the cementation index",
        quantities=(Quantity("hydraulic_index", round(hi, 4), "", "hydraulic index (Vicat)"),))


@register("CHEM-LSF", "Lime saturation factor", "analysis", order=120)
@guarded("CHEM-LSF", "Lime saturation factor", "analysis", (TAYLOR,))
def lime_saturation_check(analysis, ctx) -> CheckResult:
    """Lime saturation factor; descriptive only unless the binder holds clinker."""
    prep = prepared(analysis)
    ox = prep.ox
    lsf = finite(oxides.lime_saturation_factor(ox), "the lime saturation factor")
    g = lambda k: ox.get(k, 0.0)  # noqa: E731
    step = Step("Lime saturation factor", r"LSF = \frac{C - 0.7\,\bar{S}}{2.8\,S + 1.18\,A + "
                r"0.65\,F}", oxide_inputs(analysis, ox, CSAFM[:4] + (("S̄", "SO3"),)),
                rf"LSF = \frac{{{g('CaO'):.2f} - 0.7 \times {g('SO3'):.2f}}}{{2.8 \times "
                rf"{g('SiO2'):.2f} + 1.18 \times {g('Al2O3'):.2f} + 0.65 \times "
                rf"{g('Fe2O3'):.2f}}}", round(lsf, 4), "", "LSF")
    if is_clinker(binder_of(analysis, ctx.project)):
        why = "a clinker-bearing binder: LSF describes how far its lime saturates the clinker"
    else:
        why = ("descriptive only: LSF is a clinker concept and this material is not sintered "
               "(no alite forms below sintering)")
    return CheckResult(
        code="CHEM-LSF", title="Lime saturation factor", subject=analysis.id,
        subject_kind="analysis", status="info", value=round(lsf, 4), unit="", basis=(TAYLOR,),
        steps=(step,), notes=prep.assumptions, message=f"LSF = {by_symbol(round(lsf, 4), 'LSF')}; {why}",
        quantities=(Quantity("lime_saturation_factor", round(lsf, 4), "",
                             "lime saturation factor"),))


@register("CHEM-RATIOS", "Silica and alumina ratios", "analysis", order=125)
@guarded("CHEM-RATIOS", "Silica and alumina ratios", "analysis", (TAYLOR,))
def ratios_check(analysis, ctx) -> CheckResult:
    """Silica ratio S/(A + F) and alumina ratio A/F (the latter only when Fe2O3 is reported)."""
    prep = prepared(analysis)
    ox = prep.ox
    sr = finite(oxides.silica_ratio(ox), "the silica ratio")
    g = lambda k: ox.get(k, 0.0)  # noqa: E731
    steps = [Step("Silica ratio", r"SR = \frac{S}{A + F}", oxide_inputs(analysis, ox, CSAFM[1:4]),
                  rf"SR = \frac{{{g('SiO2'):.2f}}}{{{g('Al2O3'):.2f} + {g('Fe2O3'):.2f}}}",
                  round(sr, 4), "", "SR")]
    quantities = [Quantity("silica_ratio", round(sr, 4), "", "silica ratio")]
    text = f"SR = {by_symbol(round(sr, 4), 'SR')}"
    if g("Fe2O3") > 0:
        ar = oxides.alumina_ratio(ox)
        steps.append(Step("Alumina ratio", r"AR = \frac{A}{F}",
                          oxide_inputs(analysis, ox, CSAFM[2:4]),
                          rf"AR = \frac{{{g('Al2O3'):.2f}}}{{{g('Fe2O3'):.2f}}}", round(ar, 4),
                          "", "AR"))
        quantities.append(Quantity("alumina_ratio", round(ar, 4), "", "alumina ratio"))
        text += f", AR = {by_symbol(round(ar, 4), 'AR')}"
    else:
        text += "; AR not assessed: no Fe2O3 reported"
    return CheckResult(
        code="CHEM-RATIOS", title="Silica and alumina ratios", subject=analysis.id,
        subject_kind="analysis", status="info", value=round(sr, 4), unit="", basis=(TAYLOR,),
        steps=tuple(steps), notes=prep.assumptions, message=text + " (for information)",
        quantities=tuple(quantities))


CO2_TITLE = "Carbonate content and CO2 balance"


@register("CHEM-CO2", CO2_TITLE, "analysis", order=130)
@_raw_stone_only
@guarded("CHEM-CO2", CO2_TITLE, "analysis", (Basis("common practice"),))
def co2_check(analysis, ctx) -> CheckResult:
    """Raw stone: carbonates from CO2, and CO2 measured vs what CaO + MgO could carry."""
    rule = ctx.rules["analysis.co2_gap_tolerance"]
    prep = prepared(analysis)
    ox = prep.ox
    if "CO2" not in ox:
        return not_assessed("CHEM-CO2", CO2_TITLE, analysis.id, "analysis", (rule.basis,),
                            "the raw-stone analysis gives no CO2; ask the laboratory for CO2 "
                            "beside LOI")
    aw = atomic_weights()
    bal = calcination.co2_balance(ox, aw, rule.value)
    carb = calcination.carbonate_content(ox, aw)
    k_ca, k_mg = (calcination.co2_per_oxide(o, aw) for o in ("CaO", "MgO"))
    r_ca, r_mg = (calcination.molar_mass(c, aw) / calcination.molar_mass("CO2", aw)
                  for c in ("CaCO3", "MgCO3"))
    g = lambda k: ox.get(k, 0.0)  # noqa: E731
    steps = (
        Step("CO2 that CaO and MgO could carry", r"CO_2^{cap} = k_C\,C + k_M\,M",
             oxide_inputs(analysis, ox, (("C", "CaO"), ("M", "MgO"))) + (
                 Input("k_C", "M(CO2)/M(CaO)", round(k_ca, 5), "g/g", ATOMIC),
                 Input("k_M", "M(CO2)/M(MgO)", round(k_mg, 5), "g/g", ATOMIC)),
             rf"CO_2^{{cap}} = {k_ca:.4f} \times {g('CaO'):.2f} + {k_mg:.4f} \times "
             rf"{g('MgO'):.2f}", round(bal.capacity, 4), "%", "CO2cap"),
        Step("Gap to CO2 measured", r"\Delta = CO_2^{cap} - CO_2",
             oxide_inputs(analysis, ox, (("CO2", "CO2"),)),
             rf"\Delta = {bal.capacity:.2f} - {bal.measured:.2f}", round(bal.gap, 4), "%", "Δ"),
        Step("CO2 given to CaO first (calcite)", r"CO_2^{Ca} = \min(CO_2,\ k_C\,C)",
             oxide_inputs(analysis, ox, (("CO2", "CO2"), ("C", "CaO"))) + (
                 Input("k_C", "M(CO2)/M(CaO)", round(k_ca, 5), "g/g", ATOMIC),),
             rf"CO_2^{{Ca}} = \min({g('CO2'):.2f},\ {k_ca:.4f} \times {g('CaO'):.2f})",
             round(carb.co2_to_cao, 4), "%", "CO2_Ca"),
        Step("The rest of the CO2 to MgO (magnesite)",
             r"CO_2^{Mg} = \min(CO_2 - CO_2^{Ca},\ k_M\,M)",
             oxide_inputs(analysis, ox, (("M", "MgO"),)) + (
                 Input("k_M", "M(CO2)/M(MgO)", round(k_mg, 5), "g/g", ATOMIC),),
             rf"CO_2^{{Mg}} = \min({g('CO2'):.2f} - {carb.co2_to_cao:.2f},\ {k_mg:.4f} \times "
             rf"{g('MgO'):.2f})", round(carb.co2_to_mgo, 4), "%", "CO2_Mg"),
        Step("Carbonates from that CO2",
             r"w_{carb} = CO_2^{Ca}\,r_{Ca} + CO_2^{Mg}\,r_{Mg}",
             (Input("r_Ca", "M(CaCO3)/M(CO2)", round(r_ca, 5), "g/g", ATOMIC),
              Input("r_Mg", "M(MgCO3)/M(CO2)", round(r_mg, 5), "g/g", ATOMIC)),
             rf"w_{{carb}} = {carb.co2_to_cao:.2f} \times {r_ca:.4f} + {carb.co2_to_mgo:.2f} "
             rf"\times {r_mg:.4f}", round(carb.caco3 + carb.mgco3, 4), "%", "carb"))
    status = "attention" if bal.flagged else "pass"
    return CheckResult(
        code="CHEM-CO2", title=CO2_TITLE, subject=analysis.id, subject_kind="analysis",
        status=status, value=round(bal.gap, 4), unit="%", basis=(rule.basis,), steps=steps,
        limit=Limit("within", -rule.value, rule.value, "%", f"|gap| ≤ {rule.value:g} %",
                    rule=rule.key, overridden=rule.justification),
        message=(f"carbonates {carb.caco3 + carb.mgco3:.1f} % (CaCO3 {carb.caco3:.1f} %, "
                 f"MgCO3 {carb.mgco3:.1f} %); {bal.message}"),
        notes=prep.assumptions + (carb.method,),
        quantities=(Quantity("carbonate_content", round(carb.caco3 + carb.mgco3, 4), "%",
                             "carbonate content"),
                    Quantity("co2_gap", round(bal.gap, 4), "%", "CO2 capacity − measured")))


@register("CHEM-CLAY", "Clay fraction of the raw stone", "analysis", order=135)
@_raw_stone_only
@guarded("CHEM-CLAY", "Clay fraction of the raw stone", "analysis", (PRACTICE_NC,))
def clay_check(analysis, ctx) -> CheckResult:
    """Raw stone: clay fraction against the natural-cement range."""
    low, high = ctx.rules["analysis.clay_low"], ctx.rules["analysis.clay_high"]
    prep = prepared(analysis)
    ox = prep.ox
    if "CO2" not in ox:
        return not_assessed("CHEM-CLAY", "Clay fraction of the raw stone", analysis.id,
                            "analysis", (low.basis,), "the raw-stone analysis gives no CO2, so "
                            "the combined water (LOI − CO2) is unknown")
    aw = atomic_weights()
    clay = calcination.clay_fraction(ox, aw, "oxide_sum")
    residue = calcination.clay_fraction(ox, aw, "residue")
    carb = calcination.carbonate_content(ox, aw)    # the residue's carbonates, shown on its step
    rng = calcination.clay_range_check(clay.fraction, low.value, high.value)
    cross = calcination.clay_range_check(residue.fraction, low.value, high.value)
    straddle = rng.inside != cross.inside     # the two estimates fall on both sides of an edge
    water = oxides.combined_water(ox)
    g = lambda k: ox.get(k, 0.0)  # noqa: E731
    steps = (
        Step("Clay fraction (oxide sum)", r"w_{clay} = S + A + F + H_{comb}",
             oxide_inputs(analysis, ox, CSAFM[1:4]) + (
                 Input("H_comb", "combined water (H2O+)" if "H2O" in ox else
                       "combined water = LOI − CO2 − moisture − organic matter", round(water, 4), "%",
                       source(analysis)),),
             rf"w_{{clay}} = {g('SiO2'):.2f} + {g('Al2O3'):.2f} + {g('Fe2O3'):.2f} + "
             rf"{water:.2f}", round(clay.fraction, 4), "%", "w_clay"),
        Step("Cross-check: non-carbonate residue", r"w_{res} = 100 - CaCO_3 - MgCO_3 - \bar{S}",
             (Input("CaCO_3", "calcite from the CO2 (CO2 to CaO first)", round(carb.caco3, 4),
                    "%", f"CHEM-CO2/{analysis.id}"),
              Input("MgCO_3", "magnesite from the rest of the CO2", round(carb.mgco3, 4), "%",
                    f"CHEM-CO2/{analysis.id}"))
             + oxide_inputs(analysis, ox, (("S̄", "SO3"),)),
             rf"w_{{res}} = 100 - {carb.caco3:.2f} - {carb.mgco3:.2f} - {g('SO3'):.2f} = "
             rf"{residue.fraction:.2f}", round(residue.fraction, 4), "%", "w_res"))
    binder = binder_of(analysis, ctx.project)
    if binder is not None and binder.type == "natural_cement":
        status = "pass" if rng.inside and not straddle else "attention"
        verdict = f" (binder {binder.id} is declared a natural cement)"
    else:
        status, verdict = "info", ""
    if straddle:
        verdict += (f"; borderline: the non-carbonate residue ({residue.fraction:.1f} %) "
                    f"{'lies in' if cross.inside else 'falls outside'} the range, so the two "
                    "estimates straddle it — a mineralogical analysis (XRD) of the raw stone "
                    "decides")
    return CheckResult(
        code="CHEM-CLAY", title="Clay fraction of the raw stone", subject=analysis.id,
        subject_kind="analysis", status=status, value=round(clay.fraction, 4), unit="%",
        basis=(low.basis,), steps=steps,
        limit=Limit("within", low.value, high.value, "%", f"{low.value:g}–{high.value:g} % "
                    "clay for a natural cement", rule=low.key,
                    overridden=low.justification or high.justification),
        message=f"{rng.message}{verdict}" + (
            "" if straddle else f"; non-carbonate residue {residue.fraction:.1f} %"),
        notes=prep.assumptions + (clay.method, residue.method),
        quantities=(Quantity("clay_fraction", round(clay.fraction, 4), "%", "clay fraction"),))
