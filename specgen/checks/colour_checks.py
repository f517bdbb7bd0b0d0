"""Colour of each candidate's trial panel against the historic mortar (COMP-COLOUR).

Readings come from lab/colour.csv: several CIELAB readings per sample, each with illuminant
and observer.  The panel's readings are those of the sample a trial panel of the mix names
(``colour_sample`` in specification.yaml): a panel built for the zone first, else a panel of
the same mix elsewhere (said in a note), else the readings under the mix id; the historic
mortar's are under its id.
The mean colours are compared by CIEDE2000 (our implementation of Sharma, Wu & Dalal 2005)
against the project's threshold.  No standard threshold exists for repointing: the
dossier says so, and says that trial panels judged dry by eye decide.
"""
from __future__ import annotations

from specgen.checks import compatibility_common as cc
from specgen.checks import fits
from specgen.precision import by_symbol
from specgen.checks.registry import declare, register
from specgen.checks.result import Basis, Input, Quantity, Step
from specgen.science import colour

declare("delta_e_2000", "", "CIEDE2000 difference between the mean colours of the trial panel "
        "and the historic mortar, with both means, spreads and the illuminant/observer, and "
        "the display swatch of each mean {hex, clipped} (sRGB, D65)")

SHARMA = Basis("reference", "sharma2005", "CIEDE2000, eqs. 1–22")
DECIDES = ("no standard acceptance threshold exists for repointing; ΔE00 ≈ 1 is just noticeable "
           "and 2–3.5 visible at a glance (common practice); trial panels judged dry, by eye, "
           "in daylight, decide")


def readings(project, sample: str):
    return [r for r in project.colours if r.sample == sample]


def panel_sample(pair, project) -> tuple[str, str]:
    """(sample id of the candidate's panel readings, where that choice comes from)."""
    spec = project.specification
    panels = [tp for tp in (spec.doc.trial_panels if spec else [])
              if tp.mix == pair.mix_id and tp.colour_sample]
    here = [tp for tp in panels if tp.zone in (None, pair.zone.id)]
    if here:
        tp = here[0]
        return tp.colour_sample, f"trial panel {tp.id} (sample {tp.colour_sample})"
    if panels:
        tp = panels[0]
        return tp.colour_sample, (f"trial panel {tp.id} (sample {tp.colour_sample}, built for "
                                  f"zone {tp.zone}: the same mortar)")
    return pair.mix_id, f"sample {pair.mix_id} (no trial panel of {pair.mix_id} names a colour sample)"


@register("COMP-COLOUR", "Colour of the trial panel against the historic mortar", "zone", order=560,
          matrix="compatibility", column="colour ΔE00")
def colour_check(zone, ctx):
    """Mean CIELAB of panel and historic mortar, spread, CIEDE2000 against the threshold."""
    return cc.each_pair("COMP-COLOUR", zone, ctx, _colour_one)


def _summary_step(name: str, rows, s: colour.LabSummary) -> Step:
    inputs = tuple(Input("Lab", f"reading {i + 1}", f"{r.L:g}, {r.a:g}, {r.b:g}", "",
                         f"{r.file} row {r.row} ({r.illuminant}/{r.observer}°)")
                   for i, r in enumerate(rows))
    inputs += (Input("s", "sample SD of L*, a*, b*", ", ".join(f"{v:.2f}" for v in s.sd), "",
                     "computed (n − 1)"),)
    m = s.mean
    return Step(f"Mean colour of {name} (n = {s.n})", r"\bar L^* = \frac{1}{n}\sum L^*_i \ldots",
                inputs, rf"(\bar L^*, \bar a^*, \bar b^*) = ({m[0]:.2f}, {m[1]:.2f}, {m[2]:.2f})",
                round(s.spread, 4), "", "spread ΔE00")


def _colour_one(pair, ctx):
    code, title, p = "COMP-COLOUR", "Colour of the trial panel against the historic mortar", ctx.project
    hist_id = pair.historic.id if pair.historic else None
    sample, source = panel_sample(pair, p)
    panel, hist = readings(p, sample), readings(p, hist_id) if hist_id else []
    missing = []
    if not panel:
        missing.append(f"no colour readings of the trial panel of {pair.mix_id} (lab/colour.csv, "
                       f"{source})")
    if hist_id is None:
        missing.append(cc.fabric_names(pair)[1])
    elif not hist:
        missing.append(f"no colour readings of historic mortar {hist_id} (lab/colour.csv)")
    if missing:
        return cc.not_assessed(code, title, pair, missing, basis=(SHARMA,))
    conds = {(r.illuminant, r.observer) for r in panel + hist}
    if len(conds) > 1:
        return cc.not_assessed(code, title, pair, [
            "the readings use different illuminant/observer conditions ("
            + ", ".join(f"{i}/{o}°" for i, o in sorted(conds)) + "): measure panel and historic "
            "mortar under the same conditions"], basis=(SHARMA,))
    sp = fits.colour_summary([(r.L, r.a, r.b) for r in panel])
    sh = fits.colour_summary([(r.L, r.a, r.b) for r in hist])
    de = colour.ciede2000(sp.mean, sh.mean)
    limit = ctx.rules["compatibility.colour_delta_e_max"].value
    ill, obs = conds.pop()
    steps = [_summary_step(f"the panel of {pair.mix_id}: {source}", panel, sp),
             _summary_step(f"historic mortar {hist_id}", hist, sh),
             Step("CIEDE2000 difference of the means",
                  r"\Delta E_{00} = \sqrt{\left(\frac{\Delta L'}{S_L}\right)^2 + "
                  r"\left(\frac{\Delta C'}{S_C}\right)^2 + \left(\frac{\Delta H'}{S_H}\right)^2 + "
                  r"R_T\frac{\Delta C'}{S_C}\frac{\Delta H'}{S_H}}",
                  (Input("ΔL'", "lightness difference", round(de.dL, 4), "", "computed"),
                   Input("ΔC'", "chroma difference", round(de.dC, 4), "", "computed"),
                   Input("ΔH'", "hue difference", round(de.dH, 4), "", "computed"),
                   Input("S_L, S_C, S_H", "weighting functions",
                         f"{de.SL:.4f}, {de.SC:.4f}, {de.SH:.4f}", "", "computed"),
                   Input("R_T", "rotation term", round(de.RT, 5), "", "computed")),
                  rf"\Delta E_{{00}} = \sqrt{{({de.dL:.3f}/{de.SL:.3f})^2 + ({de.dC:.3f}/{de.SC:.3f})^2"
                  rf" + ({de.dH:.3f}/{de.SH:.3f})^2 + ({de.RT:.4f})\,\ldots}} = "
                  + by_symbol(round(de.value, 4), "ΔE00"),
                  round(de.value, 4), "", "ΔE00")]
    status = "pass" if de.value <= limit else "attention"
    notes = [DECIDES, f"readings under illuminant {ill}, {obs}° observer"]
    if sp.n < 3 or sh.n < 3:
        notes.append("fewer than three readings of a sample: the spread is poorly known")
    q = {"value": round(de.value, 4), "panel_mean": [round(v, 3) for v in sp.mean],
         "panel_spread": round(sp.spread, 4), "historic_mean": [round(v, 3) for v in sh.mean],
         "historic_spread": round(sh.spread, 4), "illuminant": ill, "observer": obs}
    # display swatches of the recorded means (the figure draws these; it converts nothing)
    for side in ("panel", "historic"):
        sw = colour.lab_to_srgb(q[f"{side}_mean"])
        q[f"{side}_swatch"] = {"hex": sw.hex, "clipped": sw.clipped}
    return cc.result(code, title, pair, status, round(de.value, 4), "",
                     [SHARMA, cc.rule_basis(ctx, "colour_delta_e_max")],
                     f"ΔE00 {by_symbol(round(de.value, 4), 'ΔE00')} between the mean of {sp.n} panel reading(s) and {sh.n} of "
                     f"{hist_id} (threshold {limit:g}, project rule); trial panels judged dry decide",
                     steps=steps, notes=notes,
                     limit=cc.rule_limit(ctx, "colour_delta_e_max", "<=", f"ΔE00 ≤ {limit:g}"),
                     quantities=[Quantity("delta_e_2000", q, "", "CIEDE2000 difference")])
