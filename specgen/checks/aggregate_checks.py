"""Aggregate of each candidate mix against the historic aggregate and a grading envelope.

* COMP-GRAD: grading of the mix's sand (a blend of its sands, volume parts converted to mass
  with the loose bulk densities) — % retained, cumulative % passing, fineness modulus
  (ASTM C125) — against the historic aggregate recovered by acid digestion (RMS difference
  of % passing, a rule) and against the envelope the project chose (data with its source).
* COMP-BLEND: the proportions of the sands that best match the historic grading
  (non-negative least squares, proportions summing to one), beside the proposed ones.
* COMP-BA: binder:aggregate of the historic mortar from acid digestion, by mass and by
  volume, beside the mix's proportions by volume.
"""
from __future__ import annotations

from specgen import refdata
from specgen.checks import compatibility_common as cc
from specgen.precision import by_symbol
from specgen.checks.registry import declare, register
from specgen.checks.result import Basis, Input, Quantity, Step, tex_name, worst
from specgen.science import grading as gr

declare("fineness_modulus", "", "fineness modulus (ASTM C125) of the repair sand and of the "
        "historic aggregate")
declare("grading_deviation", "%", "RMS and largest difference of cumulative % passing, repair "
        "sand − historic aggregate, on their common sieves")
declare("grading_curves", "%", "cumulative % passing against sieve size (mm) of the repair "
        "sand (blended) and of the historic aggregate, and the envelope in force {title, "
        "source, sieves_mm, low, high}, as the grading figure and the clauses show them")
declare("blend_proportions", "", "mass proportions of the sands that best match the historic "
        "grading (NNLS, sum 1), with the proposed ones and the RMS difference in %")
declare("binder_aggregate_ratio", "", "binder:aggregate of the historic mortar from acid "
        "digestion (by mass as found and net of the binder's loss on ignition, by volume) and "
        "of the mix (by volume)")

C125 = Basis("reference", "astmc125", "fineness modulus: cumulative % retained on 150 µm … "
             "150 mm, a 2:1 series, / 100", read_in="fm_dictionary")


def envelope(ctx) -> tuple[str, dict]:
    """The grading envelope in force: the project's choice, else its practice's."""
    from specgen import practice
    key = practice.resolve(ctx.project.dossier).grading_envelope
    return key, refdata.load("grading_envelopes").data[key]


def _series_name(key: str) -> str:
    """The series' name ending in "sieves" (its title says "… test sieves" or not), so that
    a sentence never reads "sieves sieves"."""
    name = refdata.load("sieve_series").data["series"][key]["title"].split(" (")[0] if key else "?"
    return name if name.endswith("sieves") else f"{name} sieves"


def _how_read(g: gr.Grading, sieve: float, between: bool) -> str:
    """How the passing on an envelope sieve was had: on a sieve of the analysis it was
    measured; above its largest sieve, all of the sample passed that one (100 %)."""
    if between:
        return "read between sieves"
    if gr.match_sieve(sieve, g.sieves) is None:
        return f"above the analysis' largest sieve, {g.sieves[0] * 1000:g} mm, which all passed"
    return "measured"


def _outside_pct(p: float, lo: float, hi: float) -> str:
    """A passing outside its limits, in % to the fewest decimals (0 to 3) that still show it
    outside them, and never "100" or "0" for a share that is not all or nothing: 99.75 %
    against at most 99 % reads "99.8", not "100" (all passed) or "99" (on the limit)."""
    for d in range(4):
        shown = round(100 * p, d)
        whole = (shown == 100 and p < 1) or (shown == 0 and p > 0)
        if (shown < 100 * lo or shown > 100 * hi) and not whole:
            return f"{shown:.{d}f}"
    return f"{100 * p:.3f}"


def _limits(lo: float, hi: float) -> str:
    """``limits 95–100 %``, or ``limit 100 %`` when both are one (the whole sand passes)."""
    low, high = f"{100 * lo:g}", f"{100 * hi:g}"
    return f"limit {high} %" if low == high else f"limits {low}–{high} %"


def _envelope_step(g: gr.Grading, cmp: gr.EnvelopeComparison, env: dict) -> Step:
    """The passing on the envelope's own sieves, read between the analysis' sieves where the
    two series differ (linear in the logarithm of the aperture)."""
    inputs = tuple(Input(f"P({s * 1000:g})", f"passing {s * 1000:g} mm ({_how_read(g, s, i)})"
                         + f", {_limits(lo, hi)}", round(100 * p, 2), "%",
                         "interpolated" if i else "lab/sieves.csv")
                   for s, p, lo, hi, i in zip(cmp.sieves, cmp.passing, cmp.low, cmp.high,
                                              cmp.interpolated or (False,) * len(cmp.sieves)))
    return Step(f"Passing on the envelope's sieves ({_series_name(env.get('series', ''))}), "
                f"from the analysis on the {_series_name(g.series)}",
                r"P(s) = P_2 + (P_1 - P_2)\,\frac{\ln(s/s_2)}{\ln(s_1/s_2)}", inputs,
                r"s_2 \le s \le s_1\ \text{adjacent sieves of the analysis}",
                round(100 * max(cmp.outside), 3), "%", "outside")


def mix_sand(pair, project) -> tuple[gr.Grading | None, list[str], list[tuple[str, float, str]]]:
    """(blended grading, missing items, [(sand id, mass fraction, source of its bulk density)])
    of the mix's sands.

    Volume parts become mass with the sands' loose bulk densities, given or else the
    default the works checks use (one rule for the yield and the grading).
    """
    from specgen.checks.works_common import parts_of
    mix, missing = pair.mix, []
    if mix is None or not mix.sands:
        return None, [f"mix {pair.mix_id} names no sand (mixes.yaml)"], []
    for part in mix.sands:
        if part.sand not in project.gradings:
            missing.append(f"no sieve analysis of sand {part.sand} in lab/sieves.csv")
    if missing:
        return None, missing, []
    sands = [pt for pt in parts_of(project, mix) if pt.constituent.kind == "sand"]
    fr = gr.volume_to_mass_fractions([pt.constituent.parts for pt in sands],
                                     [pt.constituent.bulk_density for pt in sands])
    g = gr.blend([project.gradings[pt.constituent.name] for pt in sands], fr)
    return g, [], [(pt.constituent.name, f, pt.bulk.source) for pt, f in zip(sands, fr)]


def _densities(fractions) -> str:
    """Where the bulk densities that turned volume parts into mass came from."""
    if len(fractions) < 2:
        return ""
    return (" (volume parts × loose bulk density: "
            + "; ".join(f"{s} {src}" for s, _, src in fractions) + ")")


def historic_aggregate(pair, project) -> tuple[gr.Grading | None, str]:
    h = pair.historic
    if h is None:
        return None, cc.fabric_names(pair)[1]
    if not h.aggregate_sample:
        return None, (f"historic mortar {h.id} names no sieve analysis of its aggregate "
                      f"(materials.yaml {h.id}.aggregate_sample: the sample of its aggregate "
                      "recovered by acid digestion, in lab/sieves.csv)")
    return project.gradings.get(h.aggregate_sample), ""


def _curve(g: gr.Grading) -> dict:
    return {"sieves_mm": [round(s * 1000, 6) for s in g.sieves],
            "passing": [round(100 * v, 4) for v in g.passing]}


def _envelope_curve(env: dict) -> dict:
    lim = sorted(env["limits"], key=lambda e: e["sieve_mm"])
    source = refdata.shown(env["source"], env.get("tag", ""))
    if env.get("read_in"):      # read in a published summary, not in the standard itself
        source += f" (as stated in {refdata.reference_label(env['read_in'])})"
    return {"title": env["title"], "source": source,
            "sieves_mm": [e["sieve_mm"] for e in lim],
            "low": [e["low"] for e in lim], "high": [e["high"] for e in lim]}


def _rms_substituted(dev) -> str:
    """Every difference squared under the root, so the sheet shows the sum it takes."""
    terms = " + ".join(f"({100 * d:.3f})^2" if d < 0 else f"{100 * d:.3f}^2"
                       for d in dev.difference)
    return (rf"\Delta_\mathrm{{rms}} = \sqrt{{\frac{{1}}{{{len(dev.difference)}}}({terms})}}"
            rf" = {100 * dev.rms:.3f}")


def _grading_step(name: str, g: gr.Grading, fm: float, src: str) -> Step:
    inputs = tuple(Input(f"P({s * 1000:g})", f"passing {s * 1000:g} mm (retained {100 * r:.1f} %, "
                         f"cumulative retained {100 * c:.1f} %)", round(100 * p, 2), "%", src)
                   for s, r, c, p in zip(g.sieves, g.retained, g.cumulative, g.passing))
    cum = " + ".join(f"{100 * c:.4g}" for c, s in zip(g.cumulative, g.sieves) if s >= 0.00015 - 1e-9)
    return Step(f"Fineness modulus of {name}", r"FM = \frac{\sum \text{cumulative \% retained}}{100}",
                inputs, rf"FM = \frac{{{cum}}}{{100}} = " + by_symbol(round(fm, 4), "FM"),
                round(fm, 4), "", "FM")


@register("COMP-GRAD", "Aggregate grading against the historic aggregate", "zone", order=550,
          matrix="compatibility", column="grading")
def grading_check(zone, ctx):
    """Fineness modulus, RMS difference from the historic aggregate, envelope."""
    return cc.each_pair("COMP-GRAD", zone, ctx, _grading_one)


def _grading_one(pair, ctx):
    # long: one calculation sheet built in reading order (inputs, fineness moduli, deviation,
    # envelope, result); cut up, its steps would be read out of order
    code, title, p = "COMP-GRAD", "Aggregate grading against the historic aggregate", ctx.project
    fm_sieves = refdata.load("sieve_series").data["series"]["astm_e11"]["fineness_modulus"]
    g, missing, fractions = mix_sand(pair, p)
    hist, why = historic_aggregate(pair, p)
    if why:
        missing.append(why)
    if missing:
        return cc.not_assessed(code, title, pair, missing, basis=(C125,))
    _, env = envelope(ctx)
    steps, statuses, msg, notes = [], [], [], []
    fm = {}
    for name, gg, src in ((f"repair sand of {pair.mix_id}", g,
                           "lab/sieves.csv, blended by mass " + ", ".join(
                               f"{s} {f:.3f}" for s, f, _ in fractions) + _densities(fractions)),
                          (f"historic aggregate {pair.historic.aggregate_sample}", hist,
                           "lab/sieves.csv")):
        try:
            v = gr.fineness_modulus(gg, fm_sieves)
        except gr.GradingInputError as exc:
            notes.append(f"fineness modulus of {name} not computed: {exc}")
            continue
        fm["repair" if name.startswith("repair") else "historic"] = round(v, 4)
        steps.append(_grading_step(name, gg, v, src))
    dev = gr.deviation(g, hist)
    rms_lim = ctx.rules["compatibility.grading_rms_max"].value
    steps.append(Step("Difference from the historic aggregate",
                      r"\Delta_\mathrm{rms} = \sqrt{\frac{1}{n}\sum (P_\mathrm{repair} - P_\mathrm{hist})^2}",
                      tuple(Input(f"ΔP({s * 1000:g})", f"difference at {s * 1000:g} mm",
                                  round(100 * d, 3), "%", "P_repair − P_hist, the fineness "
                                  "modulus steps above")
                            for s, d in zip(dev.sieves, dev.difference)),
                      _rms_substituted(dev), round(100 * dev.rms, 4), "%", "Δ_rms"))
    statuses.append("pass" if 100 * dev.rms <= rms_lim else "attention")
    msg.append(f"RMS difference from the historic aggregate {100 * dev.rms:.1f} % (at most "
               f"{rms_lim:g} %), largest {100 * dev.max_abs:.1f} %")
    limits = [(e["sieve_mm"] / 1000, e["low"] / 100, e["high"] / 100) for e in env["limits"]]
    across = bool(g.series) and g.series != env.get("series", g.series)
    usable = [lim for lim in limits if gr.known_at(g, lim[0])
              or (across and gr.interpolated_passing(g, lim[0]) is not None)]
    skipped = [lim[0] for lim in limits if lim not in usable]
    if skipped:
        notes.append("envelope sieves without a result, not compared: "
                     + ", ".join(f"{s * 1000:g} mm" for s in skipped))
    cmp = gr.compare_envelope(g, usable, interpolate=across)
    if across:
        steps.append(_envelope_step(g, cmp, env))
        notes.append(f"the envelope is written on the {_series_name(env['series'])} and "
                     f"the sand was sieved on the {_series_name(g.series)}: the passing "
                     "on each envelope sieve is read between the two nearest sieves of the "
                     "analysis, linear in the logarithm of the aperture")
    if hist.series and g.series and hist.series != g.series:
        notes.append(f"the historic aggregate was sieved on the {_series_name(hist.series)}"
                     ": its passing is read on the repair sand's sieves by the same "
                     "interpolation")
    out = [f"{s * 1000:g} mm ({_outside_pct(pp, lo, hi)} % passing, {_limits(lo, hi)})"
           for s, pp, lo, hi, d in zip(cmp.sieves, cmp.passing, cmp.low, cmp.high, cmp.outside)
           if d > 1e-9]
    statuses.append("pass" if not out else "attention")
    msg.append(f"within the {env['title']} envelope" if not out
               else "outside the envelope at " + "; ".join(out))
    if "repair" in fm and "historic" in fm:
        msg.insert(0, f"FM {by_symbol(fm['repair'], 'FM')} (historic {by_symbol(fm['historic'], 'FM')})")
    drawn = _envelope_curve(env)
    notes.append(f"envelope: {drawn['title']} — {drawn['source']}")
    return cc.result(code, title, pair, worst(statuses), round(100 * dev.rms, 3), "%",
                     [C125, Basis("reference", env["ref"], env["source"],
                                  read_in=env.get("read_in", "")),
                      cc.rule_basis(ctx, "grading_rms_max")], "; ".join(msg), steps=steps,
                     notes=notes,
                     limit=cc.rule_limit(ctx, "grading_rms_max", "<=", f"Δ_rms ≤ {rms_lim:g} %"),
                     quantities=[Quantity("fineness_modulus", fm, "", "fineness modulus"),
                                 Quantity("grading_curves", {"repair": _curve(g),
                                                             "historic": _curve(hist),
                                                             "envelope": drawn},
                                          "%",
                                          "cumulative % passing by sieve (mm)"),
                                 Quantity("grading_deviation",
                                          {"rms": round(100 * dev.rms, 3),
                                           "max": round(100 * dev.max_abs, 3)}, "%",
                                          "difference of % passing from the historic aggregate")])


@register("COMP-BLEND", "Sand blend that best matches the historic aggregate", "zone", order=551,
          matrix="compatibility")
def blend_check(zone, ctx):
    """Non-negative least-squares blend of the sands against the historic grading."""
    return cc.each_pair("COMP-BLEND", zone, ctx, _blend_one)


def _blend_one(pair, ctx):
    code, title, p = "COMP-BLEND", "Sand blend that best matches the historic aggregate", ctx.project
    hist, why = historic_aggregate(pair, p)
    mix_sands = [s.sand for s in pair.mix.sands] if pair.mix else []
    sands = [s for s in mix_sands if s in p.gradings]
    if len(sands) < 2:      # one sand alone: try every sand of the project with a grading
        sands = [s for s in p.sands if s in p.gradings]
    missing = ([why] if why else []) + ([] if len(sands) >= 2 else [
        "fewer than two sands with a sieve analysis in lab/sieves.csv to blend"])
    if missing:
        return cc.not_assessed(code, title, pair, missing, basis=(C125,))
    fit = gr.fit_blend([p.gradings[s] for s in sands], hist)
    best = {s: round(f, 4) for s, f in zip(sands, fit.proportions)}
    _, _, proposed = mix_sand(pair, p)
    prop = {s: round(f, 4) for s, f, _ in proposed}
    inputs = tuple(Input(f"x_{s}", f"mass proportion of sand {s}", v, "", "fitted (NNLS)")
                   for s, v in best.items())
    inputs += tuple(Input(f"x0_{s}", f"proposed proportion of {s}", v, "",
                          f"mixes.yaml {pair.mix_id}" + _densities(proposed))
                    for s, v in prop.items())
    step = Step("Best blend by non-negative least squares",
                r"\min_{x \ge 0,\ \sum x = 1} \sum_j \Big(\sum_i x_i P_{ij} - P_{\mathrm{hist},j}\Big)^2",
                inputs, ", ".join(f"x_{{{tex_name(s)}}} = {v:.3f}" for s, v in best.items())
                + rf",\ \Delta_\mathrm{{rms}} = {100 * fit.rms:.2f}\,\%", round(100 * fit.rms, 4),
                "%", "Δ_rms")
    text = ", ".join(f"{s} {100 * v:.0f} %" for s, v in best.items())
    ptext = ", ".join(f"{s} {100 * v:.0f} %" for s, v in prop.items()) or "—"
    return cc.result(code, title, pair, "info", round(100 * fit.rms, 3), "%",
                     [Basis("common practice", note="match of the historic grading by a blend of "
                            "available sands; scipy.optimize.nnls")],
                     f"best blend by mass {text} (RMS {100 * fit.rms:.1f} %); proposed {ptext}",
                     steps=[step],
                     quantities=[Quantity("blend_proportions", {"best": best, "proposed": prop,
                                                                "rms": round(100 * fit.rms, 3)},
                                          "", "sand blend proportions by mass")])


@register("COMP-BA", "Binder:aggregate of the historic mortar", "zone", order=552,
          matrix="compatibility")
def binder_aggregate_check(zone, ctx):
    """Binder:aggregate from acid digestion, by mass and volume, beside the mix's proportions."""
    return cc.each_pair("COMP-BA", zone, ctx, _ba_one)


def _ba_one(pair, ctx):
    code, title = "COMP-BA", "Binder:aggregate of the historic mortar"
    h = pair.historic
    if h is None or h.acid_digestion is None:
        return cc.not_assessed(code, title, pair, [cc.fabric_names(pair)[1] if h is None else (
            f"historic mortar {h.id} has no acid digestion results (materials.yaml "
            f"{h.id}.acid_digestion)")])
    d = h.acid_digestion
    loi, loi_src = _binder_loss(h, ctx.project)
    r = gr.binder_aggregate(d.sample_mass, d.residue_mass, d.binder_bulk_density,
                            d.aggregate_bulk_density,
                            None if loi is None else loi / 100)
    src = f"materials.yaml {h.id}.acid_digestion"
    inputs = (Input("m_s", "dry mortar sample", round(d.sample_mass * 1000, 3), "g", src),
              Input("m_r", "acid-insoluble residue (aggregate)", round(d.residue_mass * 1000, 3), "g", src))
    steps = [Step("Binder:aggregate by mass", r"B{:}A_m = \frac{m_s - m_r}{m_r}", inputs,
                  rf"B{{:}}A_m = \frac{{{d.sample_mass * 1000:g} - {d.residue_mass * 1000:g}}}"
                  rf"{{{d.residue_mass * 1000:g}}} = {r.by_mass:.4f}", round(r.by_mass, 5), "", "B:A_m")]
    notes = ["fines dissolved from a calcareous aggregate would be counted as binder"]
    if r.by_mass_loss_free is not None:
        steps.append(Step("Binder:aggregate net of the binder's loss on ignition",
                          r"B{:}A_{m,0} = \frac{(m_s - m_r)(1 - LOI/100)}{m_r}",
                          inputs + (Input("LOI", "loss on ignition of the binder fraction "
                                          "(its CO2 and bound water are not binder)", loi, "%",
                                          loi_src),),
                          rf"B{{:}}A_{{m,0}} = {r.by_mass:.4f} \times (1 - {loi:g}/100) = "
                          rf"{r.by_mass_loss_free:.4f}", round(r.by_mass_loss_free, 5), "",
                          "B:A_m0"))
    else:
        notes.append(f"not corrected for loss on ignition: {loi_src}; the acid-soluble loss is "
                     "counted as binder as found (carbonated, with its CO2 and bound water)")
    if r.by_volume is not None:
        steps.append(_volume_step(d, r, inputs, src, loi, loi_src))
    else:
        notes.append("by volume not computed: binder_bulk_density and aggregate_bulk_density not both given")
    q = {"historic_by_mass": round(r.by_mass, 4),
         "historic_by_mass_loss_free": None if r.by_mass_loss_free is None
         else round(r.by_mass_loss_free, 4),
         "historic_by_volume": None if r.by_volume is None else round(r.by_volume, 4)}
    mix_txt = ""
    if pair.mix is not None and pair.mix.sands:
        b, s = sum(x.parts for x in pair.mix.binders), sum(x.parts for x in pair.mix.sands)
        q["mix_by_volume"] = round(b / s, 4)
        mix_txt = f"; mix {pair.mix_id} 1 : {s / b:.2g} by volume (B:A {b / s:.3f})"
    vol = f", 1 : {1 / r.by_volume:.2g} by volume" if r.by_volume else ""
    if r.by_mass_loss_free is not None:
        vol = (f" as found, 1 : {1 / r.by_mass_loss_free:.2g} net of its loss on ignition "
               f"({loi:g} %)") + vol
    return cc.result(code, title, pair, "info", round(r.by_mass, 4), "",
                     [Basis("common practice", note="acid digestion of a lime or natural-cement "
                            "mortar with a siliceous aggregate")],
                     f"historic mortar {h.id}: 1 : {1 / r.by_mass:.2g} by mass{vol}{mix_txt}",
                     steps=steps, notes=notes,
                     quantities=[Quantity("binder_aggregate_ratio", q, "", "binder:aggregate")])


def _volume_step(d, r, inputs, src, loi, loi_src) -> Step:
    """B:A by loose volume; the binder mass is net of its loss on ignition when that is known
    (as the science computes it: the CO2 and bound water taken up are not binder as batched)."""
    dens = (Input("ρ_b", "binder loose bulk density", d.binder_bulk_density, "kg/m³", src),
            Input("ρ_a", "aggregate loose bulk density", d.aggregate_bulk_density, "kg/m³", src))
    top = f"{d.sample_mass * 1000:g} - {d.residue_mass * 1000:g}"
    if loi is None:
        formula, num = r"B{:}A_V = \frac{(m_s - m_r)/\rho_b}{m_r/\rho_a}", f"({top})"
    else:
        formula = r"B{:}A_V = \frac{(m_s - m_r)(1 - LOI/100)/\rho_b}{m_r/\rho_a}"
        num = f"({top})(1 - {loi:g}/100)"
        dens = (Input("LOI", "loss on ignition of the binder fraction (its CO2 and bound water "
                      "are not binder)", loi, "%", loi_src),) + dens
    return Step("Binder:aggregate by loose volume", formula, inputs + dens,
                rf"B{{:}}A_V = \frac{{{num}/{d.binder_bulk_density:g}}}"
                rf"{{{d.residue_mass * 1000:g}/{d.aggregate_bulk_density:g}}} = "
                rf"{r.by_volume:.4f}", round(r.by_volume, 5), "", "B:A_V")


def _binder_loss(h, project) -> tuple[float | None, str]:
    """Loss on ignition (mass %) of the historic mortar's binder fraction, and its source."""
    from specgen.science import oxides
    a = project.analyses.get(h.binder_analysis) if h.binder_analysis else None
    if a is None:
        return None, f"historic mortar {h.id} names no binder_analysis with a loss on ignition"
    loi = oxides.loss_on_ignition(a.mass_percent)
    if loi <= 0:
        return None, f"analysis {a.id} gives no loss on ignition"
    return loi, f"analysis {a.id}" + (f" ({a.laboratory})" if a.laboratory else "")


__all__ = ["grading_check", "blend_check", "binder_aggregate_check"]
