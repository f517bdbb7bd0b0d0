"""Works checks: mix yield, works quantities per zone, site gaugings, weather window.

Codes: ``MIX-YIELD`` (mix), ``WORKS-QTY`` (zone), ``SITE-WEATHER`` (project);
``SITE-GAUGE`` (mix) is in ``works_gauging_checks``.  Formulas are in
``specgen.science.mix_design`` and ``works``; inputs and their sources are gathered in
``specgen.checks.works_common``.
"""
from __future__ import annotations

import datetime as dt

from specgen.checks import works_common as wc
from specgen.checks.registry import declare, register
from specgen.checks.result import Basis, CheckResult, Input, Quantity, Step, not_assessed, tex_name
from specgen.dates import date_text
from specgen.science import works as wk

PRACTICE = Basis("common practice", note="absolute-volume method; defaults in "
                 "content/data/mix_densities.yaml and content/rules/works.yaml")
WORKS = Basis("common practice", note="quantities from the zone's dimensions; wastage "
              "applied once (content/rules/works.yaml)")
WEATHER = Basis("common practice", note="working-temperature window and curing durations of "
                "content/rules/works.yaml")

declare("mass_proportions", "", "binder : each sand by mass, from parts by loose volume and bulk "
        "densities (binders together = 1)")
declare("yield_per_m3", "kg/m³", "kg of each constituent (binders, sands, water, admixtures) per "
        "m³ of fresh mortar, absolute-volume method with air content")
declare("fresh_density", "kg/m³", "density of the fresh mortar from the absolute-volume yield")
declare("joint_length_per_m2", "m/m²", "joint length per m² of wall face, stretcher bond "
        "(bed joints + perpends net of crossings)")
declare("mortar_volume", "m³", "mortar volume of a zone, wastage allowance included (applied once)")
declare("mortar_volume_net", "m³", "mortar volume of a zone before wastage")
declare("wastage", "%", "wastage allowance applied (once) to a zone's mortar volume")
declare("binder_mass", "kg", "mass of each binder for a zone, by mix")
declare("sand_mass", "kg", "mass of each sand for a zone, by mix")
declare("water_mass", "kg", "mass of gauging water for a zone, by mix")
declare("admixture_mass", "kg", "mass of each admixture for a zone, by mix")
declare("bags", "", "whole bags of each binder for a zone, by mix")
declare("weather_window", "°C", "working-temperature window {low, high} and curing/protection days")
declare("days_outside_window", "", "days of the site temperature record outside the working "
        "window, each {day, temperature in °C, side, date (ISO, or null when the record is "
        "not dated by site_temperature_from)}")


def _r(x: float, n: int = 4) -> float:
    return float(f"{x:.{n}g}")


# ---------------------------------------------------------------- mix yield
@register("MIX-YIELD", "Mix proportions and yield", "mix", order=600)
def mix_yield_check(mix, ctx) -> CheckResult:
    """Proportions by volume and by mass; absolute-volume yield in kg per m³ with air content."""
    title, p = "Mix proportions and yield", ctx.project
    y = wc.yield_of(ctx, mix)
    if y is None:
        why = (f"water is gauged to the consistence target {mix.consistence * 1000:g} mm "
               "(EN 1015-3)" if mix.consistence else "no water/binder ratio is given")
        return not_assessed("MIX-YIELD", title, mix.id, "mix", (PRACTICE,), f"{why}; give "
                            f"mixes.yaml {mix.id}.water_binder_ratio to compute the yield")
    parts = wc.parts_of(p, mix)
    air, rho_w = wc.air_of(mix, ctx.rules), wc.water_density()
    binder = sum(y.masses[q.constituent.name] for q in parts if q.constituent.kind == "binder")
    props = {k: round(v / binder, 4) for k, v in y.masses.items()}
    steps = [_mass_step(parts, y, binder), _yield_step(parts, y, mix, air, rho_w)]
    per = {k: round(v, 2) for k, v in y.per_m3.items()}
    text, mass_text = _ratio_text(parts, props)
    return CheckResult(
        code="MIX-YIELD", title=title, subject=mix.id, subject_kind="mix", status="info",
        value=round(y.binder_mass_per_m3, 1), unit="kg/m³", basis=(PRACTICE,),
        steps=tuple(steps),
        message=(f"binder : sand {text} by loose volume, {mass_text} by mass; "
                 f"{y.binder_mass_per_m3:.0f} kg "
                 f"of binder and {y.per_m3[wc.WATER]:.0f} kg of water per m³ of fresh mortar "
                 f"(air {100 * air.value:.3g} %, fresh density {y.fresh_density:.0f} kg/m³)"),
        quantities=(Quantity("mass_proportions", props, "", "proportions by mass (binder = 1)"),
                    Quantity("yield_per_m3", per, "kg/m³", "kg per m³ of fresh mortar"),
                    Quantity("fresh_density", round(y.fresh_density, 1), "kg/m³",
                             "fresh mortar density")))


def _ratio_text(parts, props) -> tuple[str, str]:
    """'1 : 1.5 (S1 1 + S2 0.5)' by loose volume and '1 : 2.68' by mass (binders together = 1)."""
    kinds = {k: [q.constituent for q in parts if q.constituent.kind == k] for k in ("binder", "sand")}
    vol = f"{sum(c.parts for c in kinds['binder']):g} : {sum(c.parts for c in kinds['sand']):g}"
    mass = f"1 : {sum(props[c.name] for c in kinds['sand']):.3g}"
    detail = [" + ".join(f"{c.name} {c.parts:g}" for c in cs) for cs in kinds.values() if len(cs) > 1]
    return vol + (f" ({'; '.join(detail)})" if detail else ""), mass


def _mass_step(parts, y, binder) -> Step:
    inputs = []
    for q in parts:
        c = q.constituent
        inputs += [Input(f"V_{c.name}", f"{q.label}: parts by loose volume", c.parts, "",
                         "mixes.yaml"),
                   Input(f"ρb_{c.name}", f"{q.label}: loose bulk density", c.bulk_density,
                         "kg/m³", q.bulk.source)]
    sub = r",\ ".join(rf"m_{{\mathrm{{{tex_name(q.constituent.name)}}}}} = {q.constituent.parts:g} \times "
                      rf"{q.constituent.bulk_density:g} = {y.masses[q.constituent.name]:.1f}"
                      for q in parts)
    return Step("Masses of one batch (1 part = 1 m³ loose) and proportions by mass",
                r"m_i = V_i\,\rho_{b,i},\qquad m_i / \textstyle\sum_{\mathrm{binders}} m",
                tuple(inputs), sub + rf";\ \sum m_b = {binder:.1f}\ \mathrm{{kg}}",
                round(binder, 2), "kg", "Σm_b")


def _yield_step(parts, y, mix, air, rho_w) -> Step:
    inputs = [Input(f"ρp_{q.constituent.name}", f"{q.label}: particle density",
                    q.constituent.particle_density, "kg/m³", q.particle.source) for q in parts]
    inputs += [Input("w/b", "water/binder ratio by mass", mix.water_binder_ratio, "",
                     f"mixes.yaml {mix.id}.water_binder_ratio"),
               Input("ρ_w", "density of water", rho_w.value, "kg/m³", rho_w.source),
               Input("a", "air content", round(100 * air.value, 3), "%", air.source)]
    inputs += [Input(f"dose_{i + 1}", f"{a.name} (% of binder mass)", round(100 * a.dose, 4), "%",
                     f"mixes.yaml {mix.id}.admixtures[{i}]; volume neglected")
               for i, a in enumerate(mix.admixtures)]
    terms = " + ".join(rf"\frac{{{y.masses[q.constituent.name]:.1f}}}"
                       rf"{{{q.constituent.particle_density:g}}}" for q in parts)
    sub = (rf"V_f = \frac{{{terms} + \frac{{{y.water:.1f}}}{{{rho_w.value:g}}}}}"
           rf"{{1 - {air.value:.4g}}} = \frac{{{y.solid_water_volume:.4f}}}{{{1 - air.value:.4g}}}"
           rf" = {y.fresh_volume:.4f}\ \mathrm{{m^3}};\ c_b = {y.binder_mass_per_m3:.1f}\ "
           rf"\mathrm{{kg/m^3}}")
    return Step("Absolute-volume yield: fresh volume of the batch and kg per m³",
                r"V_f = \frac{\sum_i m_i/\rho_{p,i} + m_w/\rho_w}{1 - a},\quad m_w = (w/b)"
                r"\sum m_b,\quad c_i = m_i / V_f", tuple(inputs), sub,
                round(y.fresh_volume, 5), "m³", "V_f")


# ---------------------------------------------------------------- works quantities
@register("WORKS-QTY", "Works quantities", "zone", order=610)
def works_quantities_check(zone, ctx) -> CheckResult:
    """Mortar volume of the zone (wastage once) → binder, sands, water, admixtures, bags."""
    title, p = "Works quantities", ctx.project
    v = wc.zone_volume(zone, p, ctx.rules)
    if v.reason:
        return not_assessed("WORKS-QTY", title, zone.id, "zone", (WORKS,),
                            f"{zone.works} in zone {zone.id}: {v.reason}")
    steps = [_volume_step(zone, v)]
    masses: dict[str, dict] = {"binder_mass": {}, "sand_mass": {}, "water_mass": {},
                               "admixture_mass": {}, "bags": {}}
    skipped = []
    for mix in wc.mixes_of(zone, p):
        y = ctx.quantity(mix.id, "yield_per_m3")
        if y is None:
            skipped.append(f"{mix.id}: no yield (MIX-YIELD not assessed)")
            continue
        bags = ({b.binder: p.binders[b.binder].bag_mass for b in mix.binders}
                if p.dossier.works.bags else {})
        t = wk.totals(v.total, y.value, bags)
        kinds = {b.binder: "binder_mass" for b in mix.binders}
        kinds |= {s.sand: "sand_mass" for s in mix.sands}
        for name, m in t.masses.items():
            kind = kinds.get(name, "water_mass" if name == wc.WATER else "admixture_mass")
            if kind == "water_mass":
                masses[kind][mix.id] = round(m, 2)
            else:
                masses[kind].setdefault(mix.id, {})[name] = round(m, 3 if kind ==
                                                                   "admixture_mass" else 2)
        if bags:
            masses["bags"][mix.id] = t.bags
        steps.append(_totals_step(mix, v, y.value, t, bags))
    q = [Quantity("mortar_volume", round(v.total, 5), "m³", "mortar volume with wastage"),
         Quantity("mortar_volume_net", round(v.net, 5), "m³", "mortar volume before wastage"),
         Quantity("wastage", round(100 * v.wastage.value, 4), "%", "wastage allowance")]
    if v.joint_length is not None:
        q.append(Quantity("joint_length_per_m2", round(v.joint_length, 4), "m/m²",
                          "joint length per m² of face"))
    q += [Quantity(n, d, "" if n == "bags" else "kg", n.replace("_", " "))
          for n, d in masses.items() if d]
    msg = (f"{zone.works}: {v.net:.3g} m³ net + {100 * v.wastage.value:.3g} % wastage = "
           f"{v.total:.3g} m³ of mortar")
    if masses["binder_mass"]:
        msg += "; binder " + ", ".join(
            f"{m}: " + " + ".join(f"{kg:.0f} kg {b}" for b, kg in d.items())
            for m, d in masses["binder_mass"].items())
    return CheckResult(code="WORKS-QTY", title=title, subject=zone.id, subject_kind="zone",
                       status="info", value=round(v.total, 4), unit="m³", basis=(WORKS,),
                       steps=tuple(steps), message=msg, notes=tuple(skipped), quantities=tuple(q))


def _shown(value: float, div: float) -> float:
    return _r(value / div, 6)


def _volume_step(zone, v: wc.ZoneVolume) -> Step:
    inputs = [Input(s, n, _shown(val, d), u, src) for s, n, val, u, d, src in v.inputs]
    inputs.append(Input("w", "wastage allowance", round(100 * v.wastage.value, 3), "%",
                        v.wastage.source))
    x = {s: val for s, _, val, _, _, _ in v.inputs}
    w = v.wastage.value
    if zone.works == "repointing":
        formula = (r"L = \frac{l + j + h}{(l + j)(h + j)},\quad V = A\,L\,j\,d\,(1 + w)")
        sub = (rf"L = \frac{{{x['l']:g} + {x['j']:g} + {x['h']:g}}}{{({x['l']:g} + {x['j']:g})"
               rf"({x['h']:g} + {x['j']:g})}} = {v.joint_length:.3f}\ \mathrm{{m/m^2}};\ "
               rf"V = {x['A']:g} \times {v.joint_length:.3f} \times {x['j']:g} \times "
               rf"{x['d']:g} \times {1 + w:.3g} = {v.total:.4f}")
    elif zone.works == "render":
        ts = [val for s, _, val, _, _, _ in v.inputs if s.startswith("t_")]
        formula = r"V = A \sum_k t_k\,(1 + w)"
        sub = (rf"V = {x['A']:g} \times ({' + '.join(f'{t:g}' for t in ts)}) \times {1 + w:.3g}"
               rf" = {v.total:.4f}")
    else:
        formula = r"V = V_m\,f\,(1 + w)"
        sub = rf"V = {x['V_m']:g} \times {x['f']:.3g} \times {1 + w:.3g} = {v.total:.4f}"
    return Step(f"Mortar volume ({zone.works}), wastage applied once", formula, tuple(inputs),
                sub, round(v.total, 5), "m³", "V")


def _totals_step(mix, v, per_m3: dict, t: wk.Totals, bags: dict) -> Step:
    inputs = [Input("V", "mortar volume with wastage", round(v.total, 5), "m³", "step above")]
    inputs += [Input(f"c_{k}", f"{k} per m³ of fresh mortar", c, "kg/m³",
                     f"MIX-YIELD/{mix.id}") for k, c in per_m3.items()]
    inputs += [Input(f"m_bag,{b}", f"bag mass of {b}", m, "kg", f"materials.yaml {b}.bag_mass")
               for b, m in bags.items()]
    sub = r",\ ".join(rf"m_{{\mathrm{{{tex_name(k)}}}}} = {c:g} \times {v.total:.4f} = {t.masses[k]:.2f}"
                      for k, c in per_m3.items())
    if bags:
        sub += r";\ " + r",\ ".join(rf"n_{{\mathrm{{{tex_name(b)}}}}} = \lceil {t.masses[b]:.2f} / {m:g}"
                                    rf"\rceil = {t.bags[b]}" for b, m in bags.items())
    return Step(f"Constituents for mix {mix.id}", r"m_i = c_i\,V"
                + (r",\quad n = \lceil m_b / m_{bag} \rceil" if bags else ""),
                tuple(inputs), sub, round(sum(t.masses[b.binder] for b in mix.binders), 2),
                "kg", "m_b")


# ---------------------------------------------------------------- weather
def _on(start, seconds: float) -> str | None:
    """The calendar date (ISO) ``seconds`` after day 0 of the record, or None undated."""
    return None if start is None else (start + dt.timedelta(days=seconds / 86400)).isoformat()


@register("SITE-WEATHER", "Working temperature and curing", "project", order=630)
def weather_check(project, ctx) -> CheckResult:
    """Working-temperature window, curing/protection durations, days outside the window."""
    title, rules = "Working temperature and curing", ctx.rules
    lo, hi = (wc.rule_si(rules, k, "temperature") for k in ("min_working_temperature",
                                                             "max_working_temperature"))
    cure, protect = (wc.rule_si(rules, k, "time") for k in ("curing_days", "protection_days"))
    window = {"low": round(lo.value - 273.15, 2), "high": round(hi.value - 273.15, 2),
              "curing_days": round(cure.value / 86400, 2),
              "protection_days": round(protect.value / 86400, 2)}
    inputs = [Input("T_min", "lowest working temperature", window["low"], "°C", lo.source),
              Input("T_max", "highest working temperature", window["high"], "°C", hi.source),
              Input("t_c", "keep damp for", window["curing_days"], "d", cure.source),
              Input("t_p", "protect for", window["protection_days"], "d", protect.source)]
    code, sub = project.dossier.project.code, project.site_temperature
    q = [Quantity("weather_window", window, "°C", "working window (°C) and curing days")]
    base = (f"place mortar only between {window['low']:g} and {window['high']:g} °C; keep damp "
            f"{window['curing_days']:g} d and protect {window['protection_days']:g} d")
    if sub is None:
        return CheckResult(code="SITE-WEATHER", title=title, subject=code, subject_kind="project",
                           status="info", value=None, unit="", basis=(WEATHER,),
                           steps=(Step("Working window", r"T_{\min} < T < T_{\max}",
                                       tuple(inputs), "—", 0, "", "—"),),
                           message=base + "; no site temperature record is given",
                           quantities=tuple(q))
    points = [(0.0, sub.constant)] if sub.constant is not None else list(sub.points)
    start = project.dossier.site_temperature_from
    outside = [{"day": round(t / 86400, 3), "temperature": round(k - 273.15, 2),
                "side": "cold" if k <= lo.value else "hot",
                "date": _on(start, t)}
               for t, k in points if k <= lo.value or k > hi.value]
    inputs.append(Input("T_d", "daily mean temperatures", f"{len(points)} reading{'s' if len(points) != 1 else ''}", "°C",
                        sub.source))
    q.append(Quantity("days_outside_window", outside, "", "days outside the working window"))
    cold = sum(1 for o in outside if o["side"] == "cold")
    step = Step("Days of the site record outside the working window",
                r"\text{outside} \iff T_d \le T_{\min}\ \text{or}\ T_d > T_{\max}", tuple(inputs),
                rf"{cold}\ \text{{cold}} + {len(outside) - cold}\ \text{{hot}}\ \text{{of}}\ "
                rf"{len(points)}", len(outside), "d", "n")
    days = "day" if len(points) == 1 else "days"
    msg = base + f"; {len(outside)} of {len(points)} {days} of {sub.source} fall outside"
    if outside:
        more = " …" if len(outside) > 8 else ""
        if start is not None:  # dates, when the record says which day is day 0
            first = ", ".join(date_text(dt.date.fromisoformat(o["date"])) for o in outside[:8])
            msg += f" ({first}{more}): plan protection or no work"
        else:
            first = ", ".join(f"{o['day']:g}" for o in outside[:8])
            msg += (f" (days {first}{more} after placement; the record is not dated): plan "
                    "protection or no work")
    return CheckResult(code="SITE-WEATHER", title=title, subject=code, subject_kind="project",
                       status="attention" if outside else "pass", value=len(outside), unit="d",
                       basis=(WEATHER,), steps=(step,), message=msg, quantities=tuple(q))
