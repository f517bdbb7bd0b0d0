"""Compatibility of each candidate mix with the fabric of each zone it serves (part 1):
strength and stiffness hierarchy, moisture transport, movement.

* COMP-STR-UNIT / COMP-STR-HIST: the repair mortar's compressive strength — measured (mean at
  the latest tested age) and predicted long-term (the STR-PRED value and the upper edge of its
  band at ``strength.late_age_2``) — as a ratio to the units' and to the sound historic
  mortar's; the elastic modulus likewise where both are given.  Limits are rules.
* COMP-MOIST: capillary absorption coefficient (given, or fitted to lab/capillary.csv) and
  vapour diffusion resistance factor μ of repair and units side by side; the repair must be
  at least as open (ratios against rules); sd = μ·d where the repair thickness is given.
* COMP-MOVE: thermal (and, where given, hygric) expansion against a relative tolerance.
"""
from __future__ import annotations

from specgen.checks import compatibility_common as cc
from specgen.checks import fits
from specgen.precision import by_symbol
from specgen.checks.registry import declare, register
from specgen.checks.result import Basis, Input, Quantity, Step, worst
from specgen.science import moisture
from specgen.units import ROOT_MIN

declare("strength_ratio_to_unit", "", "repair mortar compressive strength / masonry unit "
        "strength: {measured, predicted, predicted_upper} (and elastic modulus ratio)")
declare("strength_ratio_to_historic", "", "repair mortar compressive strength / sound historic "
        "mortar strength: {measured, predicted, predicted_upper} (and elastic modulus ratio)")
declare("capillary_coefficient", "kg/(m²·min^0.5)", "capillary absorption coefficient of the "
        "repair mortar, the units and the historic mortar, with its source")
declare("vapour_resistance_factor", "", "water-vapour diffusion resistance factor μ of the repair "
        "mortar, the units and the historic mortar (and sd = μ·d of the repair)")

EN1015_18 = Basis("reference", "en1015_18", "capillary absorption coefficient, kg/(m²·min^0.5)")
EN12572 = Basis("reference", "en12572", "water-vapour diffusion resistance factor μ, sd = μ·d")
EN1015_19 = Basis("reference", "en1015_19", "water-vapour permeability of the hardened mortar")


# ---------------------------------------------------------------- strength hierarchy
def mortar_strengths(ctx, mix_id: str) -> list[tuple[str, str, float, str, bool]]:
    """(key, label, MPa, source, indicative) of the mix's measured and predicted long-term
    strength; ``indicative`` marks a prediction beyond the extrapolation limit, which never
    decides (see the strength checks)."""
    out = []
    mean = ctx.quantity(mix_id, "mean_strength")
    comp = (mean.value or {}).get("compressive", {}) if mean else {}
    if comp:
        age = max(comp, key=lambda k: float(k[:-2]))
        out.append(("measured", f"measured mean at {age}", comp[age],
                    f"STR-AGG/{mix_id} (lab/strength.csv)", False))
    late = f"{ctx.rules['strength.late_age_2'].value:g} d"
    pred = ctx.quantity(mix_id, "predicted_strength")
    band = ((pred.value or {}).get("compressive", {}) if pred else {}).get(late)
    if band:
        far = bool(band.get("indicative"))
        tag = ", indicative" if far else ", extrapolated" if band["extrapolated"] else ""
        out.append(("predicted", f"predicted at {late}{tag}", band["value"],
                    f"STR-PRED-C/{mix_id}", far))
        out.append(("predicted_upper", f"upper band edge at {late}{tag}", band["upper"],
                    f"STR-PRED-C/{mix_id}, 95 % band", far))
    return out


def _hierarchy(code: str, title: str, target: str, zone, ctx):
    out = []
    for pair in cc.pairs(zone, ctx.project):
        fabric = pair.unit if target == "unit" else pair.historic
        out.append(_hierarchy_one(code, title, target, pair, fabric, ctx))
    return out


def _hierarchy_one(code, title, target, pair, fabric, ctx):
    what = "masonry unit" if target == "unit" else "historic mortar"
    s_key = "strength_ratio_unit_max" if target == "unit" else "strength_ratio_historic_max"
    e_key = "stiffness_ratio_unit_max" if target == "unit" else "stiffness_ratio_historic_max"
    missing = []
    if fabric is None:
        missing.append(cc.fabric_names(pair)[0 if target == "unit" else 1])
    elif fabric.compressive_strength is None:
        missing.append(f"{what} {fabric.id} has no compressive_strength (materials.yaml)")
    strengths = mortar_strengths(ctx, pair.mix_id)
    if not strengths:
        missing.append(f"mix {pair.mix_id} has no compressive strength results or prediction "
                       "(lab/strength.csv)")
    if missing:
        return cc.not_assessed(code, title, pair, missing)
    limit = ctx.rules[f"compatibility.{s_key}"].value
    f_fab = fabric.compressive_strength / cc.MPA
    src = f"materials.yaml {fabric.id}.compressive_strength"
    steps, ratios, statuses, words = [], {}, [], []
    held = False
    for key, label, f, fsrc, far in strengths:
        st = cc.ratio_step(f"Strength ratio, {label}", "r_f", f"repair mortar, {label}", f, fsrc,
                           f"{what} {fabric.id}", f_fab, src, "MPa")
        steps.append(st)
        ratios[key] = st.result
        ok = st.result <= limit
        held = held or (far and not ok and key == "predicted")
        statuses.append("pass" if ok else ("attention" if key == "predicted_upper" else
                                           "hold" if far else "fail"))
        words.append(f"{label} {f:.3g} MPa → {st.result:.3f}")
    notes = []
    props = pair.props
    if props and props.elastic_modulus and fabric.elastic_modulus:
        e_lim = ctx.rules[f"compatibility.{e_key}"].value
        st = cc.ratio_step("Stiffness ratio", "r_E", "repair mortar elastic modulus",
                           props.elastic_modulus / cc.GPA, f"materials.yaml mortar_properties "
                           f"{pair.mix_id}", f"{what} {fabric.id} elastic modulus",
                           fabric.elastic_modulus / cc.GPA, f"materials.yaml {fabric.id}", "GPa")
        steps.append(st)
        ratios["elastic_modulus"] = st.result
        statuses.append("pass" if st.result <= e_lim else "fail")
        words.append(f"elastic modulus ratio {st.result:.3f} (limit {e_lim:g})")
    else:
        gone = [n for n, v in ((f"mix {pair.mix_id}", props and props.elastic_modulus),
                               (f"{what} {fabric.id}", fabric.elastic_modulus)) if not v]
        notes.append("elastic modulus not compared: not given for " + " and ".join(gone))
    status = worst(statuses)
    name = "strength_ratio_to_unit" if target == "unit" else "strength_ratio_to_historic"
    head = ratios.get("predicted", ratios.get("measured"))
    return cc.result(
        code, title, pair, status, round(head, 4), "", [cc.rule_basis(ctx, s_key)],
        f"{'; '.join(words)} against {limit:g} × {f_fab:g} MPa of {what} {fabric.id}"
        + ("" if status != "attention" else "; the band's upper edge exceeds the limit: "
           "confirm with the late-age tests")
        + ("" if not (held and status == "hold") else "; the prediction beyond the last tested age exceeds the limit "
           "but is indicative, so it cannot decide: held until results at later ages (the "
           f"strength sheets of {pair.mix_id} name the test age that would decide)"),
        steps=steps, notes=notes,
        limit=cc.rule_limit(ctx, s_key, "<=", f"r_f ≤ {limit:g} (repair / {what})"),
        quantities=[Quantity(name, ratios, "", f"repair / {what} strength")])


@register("COMP-STR-UNIT", "Repair weaker than the masonry units", "zone", order=510,
          matrix="compatibility", column="weaker than units")
def strength_unit_check(zone, ctx):
    """Compressive strength (measured and predicted long-term) and stiffness against the units."""
    return _hierarchy("COMP-STR-UNIT", "Repair weaker than the masonry units", "unit", zone, ctx)


@register("COMP-STR-HIST", "Repair not stronger than the historic mortar", "zone", order=511,
          matrix="compatibility", column="not above historic")
def strength_historic_check(zone, ctx):
    """Compressive strength and stiffness against the sound historic mortar."""
    return _hierarchy("COMP-STR-HIST", "Repair not stronger than the historic mortar",
                      "historic", zone, ctx)


# ---------------------------------------------------------------- moisture
def capillary(material, sample_id: str, project) -> tuple[float, str, Step | None] | None:
    """(coefficient kg/(m²·min^0.5), source, fit step) given or fitted to lab/capillary.csv."""
    rows = [r for r in project.capillary if r.sample == sample_id]
    if rows and _two_point(project):
        try:
            return _two_point_step(sample_id, rows)
        except moisture.MoistureInputError as exc:  # the regression is used, and said
            note = f"; EN 1015-18 two-point coefficient not possible: {exc}"
    else:
        note = ""
    if rows:  # readings given are used, or the reason they cannot be is said (never ignored)
        fit = fits.capillary([r.time for r in rows], [r.uptake for r in rows])
        c = fit.slope * ROOT_MIN
        inputs = tuple(Input("W_i", f"uptake at {r.time / 60:g} min", round(r.uptake, 4),
                             "kg/m²", f"{r.file} row {r.row}") for r in rows)
        inputs += (Input("R²", "coefficient of determination", round(fit.r2, 4), "", "computed"),)
        step = Step(f"Capillary coefficient of {sample_id}: least-squares slope against √t",
                    r"C = \frac{\sum(\sqrt{t_i}-\overline{\sqrt{t}})(W_i-\bar W)}"
                    r"{\sum(\sqrt{t_i}-\overline{\sqrt{t}})^2}", inputs,
                    rf"C = {fit.slope:.5f}\ \mathrm{{kg/(m^2 s^{{0.5}})}} \times \sqrt{{60}} = {c:.4f}",
                    round(c, 4), "kg/(m²·min^0.5)", "C")
        return c, f"fitted to lab/capillary.csv ({len(rows)} readings){note}", step
    if material is not None and material.capillary_coefficient:
        return material.capillary_coefficient * ROOT_MIN, f"materials.yaml {sample_id}", None
    return None


def _two_point(project) -> bool:
    from specgen import practice
    return practice.resolve(project.dossier).capillary_method == "two_point"


def _two_point_step(sample_id: str, rows) -> tuple[float, str, Step]:
    """EN 1015-18: the coefficient from the 10 and 90 min readings."""
    c = moisture.two_point_coefficient([r.time for r in rows], [r.uptake for r in rows]) * ROOT_MIN
    used = [r for r in rows if any(abs(r.time - t) <= moisture.SAME_TIME
                                   for t in moisture.TWO_POINT_TIMES)]
    inputs = tuple(Input(f"W_{r.time / 60:g}", f"uptake at {r.time / 60:g} min",
                         round(r.uptake, 4), "kg/m²", f"{r.file} row {r.row}") for r in used)
    w1, w2 = used[0].uptake, used[-1].uptake
    step = Step(f"Capillary coefficient of {sample_id}: EN 1015-18, 10 and 90 min readings",
                r"C = \frac{W_{90} - W_{10}}{\sqrt{90} - \sqrt{10}}", inputs,
                rf"C = \frac{{{w2:.4g} - {w1:.4g}}}{{\sqrt{{90}} - \sqrt{{10}}}} = {c:.4f}",
                round(c, 4), "kg/(m²·min^0.5)", "C")
    return c, f"lab/capillary.csv, EN 1015-18 two-point ({len(rows)} readings given)", step


@register("COMP-MOIST", "Repair at least as open as the units", "zone", order=520,
          matrix="compatibility", column="moisture openness")
def moisture_check(zone, ctx):
    """Capillary absorption and vapour resistance factor of repair and units, side by side."""
    return cc.each_pair("COMP-MOIST", zone, ctx, _moisture_one)


def _moisture_one(pair, ctx):
    code, title, p = "COMP-MOIST", "Repair at least as open as the units", ctx.project
    unit, props = pair.unit, pair.props
    c_rep = capillary(props, pair.mix_id, p)
    c_unit = capillary(unit, unit.id, p) if unit else None
    c_hist = capillary(pair.historic, pair.historic.id, p) if pair.historic else None
    mu_rep = props.vapour_resistance_factor if props else None
    mu_unit = unit.vapour_resistance_factor if unit else None
    missing = [w for w, v in ((f"capillary coefficient of mix {pair.mix_id} (materials.yaml "
                               "mortar_properties or lab/capillary.csv)", c_rep),
                              (f"capillary coefficient of {cc.fabric_names(pair)[0]}", c_unit),
                              (f"vapour resistance factor of mix {pair.mix_id} (materials.yaml "
                               "mortar_properties)", mu_rep),
                              (f"vapour resistance factor of {cc.fabric_names(pair)[0]}", mu_unit))
               if v is None]
    if missing:
        return cc.not_assessed(code, title, pair, ["missing " + m for m in missing])
    steps = [s for s in (c_rep[2], c_unit[2]) if s]
    c_min = ctx.rules["compatibility.capillary_ratio_min"].value
    mu_max = ctx.rules["compatibility.vapour_ratio_max"].value
    sc = cc.ratio_step("Capillary ratio (repair / units)", "r_C", "repair mortar C", c_rep[0],
                       c_rep[1], f"units {unit.id} C", c_unit[0], c_unit[1], "kg/(m²·min^0.5)")
    sm = cc.ratio_step("Vapour resistance ratio (repair / units)", "r_μ", "repair mortar μ",
                       mu_rep, f"materials.yaml mortar_properties {pair.mix_id}", f"units {unit.id} μ",
                       mu_unit, f"materials.yaml {unit.id}", "")
    steps += [sc, sm]
    statuses = ["pass" if sc.result >= c_min else "fail", "pass" if sm.result <= mu_max else "fail"]
    caps = {"repair": round(c_rep[0], 4), "units": round(c_unit[0], 4)}
    mus = {"repair": mu_rep, "units": mu_unit}
    if c_hist:
        caps["historic"] = round(c_hist[0], 4)
    if pair.historic and pair.historic.vapour_resistance_factor:
        mus["historic"] = pair.historic.vapour_resistance_factor
    d = p.dossier.compatibility.repair_thickness
    if d:
        sd = moisture.sd_value(mu_rep, d)
        steps.append(Step("Diffusion-equivalent air layer of the repair", r"s_d = \mu\,d",
                          (Input("μ", "repair mortar μ", mu_rep, "",
                                 f"materials.yaml mortar_properties {pair.mix_id}"),
                           Input("d", "repair thickness", round(d * 1000, 3), "mm",
                                 "dossier.yaml compatibility.repair_thickness")),
                          rf"s_d = {mu_rep:g} \times {d:g} = {sd:.4f}", round(sd, 5), "m", "s_d"))
        mus["sd_repair_m"] = round(sd, 5)
    status = worst(statuses)
    msg = (f"C repair {c_rep[0]:.3g} vs units {c_unit[0]:.3g} kg/(m²·min^0.5) (ratio "
           f"{sc.result:.2f}, at least {c_min:g}); μ repair {mu_rep:g} vs units {mu_unit:g} "
           f"(ratio {sm.result:.2f}, at most {mu_max:g})")
    return cc.result(code, title, pair, status, round(sc.result, 4), "",
                     [EN1015_18] + ([EN1015_19] if _two_point(p) else []) + [
                         EN12572, cc.rule_basis(ctx, "capillary_ratio_min"),
                      cc.rule_basis(ctx, "vapour_ratio_max")],
                     msg, steps=steps,
                     limit=cc.rule_limit(ctx, "capillary_ratio_min", ">=",
                                         f"r_C ≥ {c_min:g} and r_μ ≤ {mu_max:g}"),
                     quantities=[Quantity("capillary_coefficient", caps, "kg/(m²·min^0.5)",
                                          "capillary absorption coefficient"),
                                 Quantity("vapour_resistance_factor", mus, "",
                                          "vapour diffusion resistance factor μ")])


# ---------------------------------------------------------------- movement
@register("COMP-MOVE", "Similar thermal and moisture movement", "zone", order=530,
          matrix="compatibility", column="movement")
def movement_check(zone, ctx):
    """Thermal (and hygric) expansion of repair against the units, within a relative tolerance."""
    return cc.each_pair("COMP-MOVE", zone, ctx, _movement_one)


def _movement_one(pair, ctx):
    code, title = "COMP-MOVE", "Similar thermal and moisture movement"
    unit, props = pair.unit, pair.props
    a_rep = props.thermal_expansion if props else None
    a_fab = unit.thermal_expansion if unit else None
    missing = [w for w, v in ((f"thermal expansion coefficient of mix {pair.mix_id} "
                               "(materials.yaml mortar_properties)", a_rep),
                              (f"thermal expansion coefficient of {cc.fabric_names(pair)[0]}",
                               a_fab)) if not v]
    if missing:
        return cc.not_assessed(code, title, pair, ["missing " + m for m in missing])
    tol = ctx.rules["compatibility.movement_tolerance"].value
    steps, statuses, words = [], [], []
    items = [("thermal", a_rep * 1e6, a_fab * 1e6, "10⁻⁶/K")]
    if props.hygric_expansion and unit.hygric_expansion:
        items.append(("hygric", props.hygric_expansion * 1e3, unit.hygric_expansion * 1e3, "mm/m"))
    notes = [] if len(items) == 2 else ["hygric expansion not compared: not given for both"]
    for kind, rep, fab, u in items:
        dev = abs(rep - fab) / fab
        steps.append(Step(f"Relative difference of {kind} expansion",
                          r"\delta = \frac{|\alpha_\mathrm{repair} - \alpha_\mathrm{fabric}|}"
                          r"{\alpha_\mathrm{fabric}}",
                          (Input("α_repair", f"repair mortar {kind} expansion", rep, u,
                                 f"materials.yaml mortar_properties {pair.mix_id}"),
                           Input("α_fabric", f"units {unit.id} {kind} expansion", fab, u,
                                 f"materials.yaml {unit.id}")),
                          rf"\delta = \frac{{|{rep:g} - {fab:g}|}}{{{fab:g}}} = " + by_symbol(round(dev, 5), "δ"),
                          round(dev, 5), "", "δ"))
        statuses.append("pass" if dev <= tol else "attention")
        # "10 vs 6 × 10⁻⁶/K": a unit that opens with a number is a factor, not a second value
        shown = f"× {u}" if u[0].isdigit() else u
        words.append(f"{kind} {rep:g} vs {fab:g} {shown} (δ = {by_symbol(round(dev, 5), 'δ')})")
    return cc.result(code, title, pair, worst(statuses), steps[0].result, "",
                     [cc.rule_basis(ctx, "movement_tolerance")],
                     "; ".join(words) + f"; tolerance {tol:g}", steps=steps, notes=notes,
                     limit=cc.rule_limit(ctx, "movement_tolerance", "<=", f"δ ≤ {tol:g}"))
