"""Site gaugings (``SITE-GAUGE``, per mix): the largest gauging placed within the workable
life, the binder measures it holds, what goes into it and how many a day.

The batching card of each mix is rendered from the ``gauging`` quantity recorded here;
the formulas are in ``specgen.science.batching``.
"""
from __future__ import annotations

from dataclasses import dataclass

from specgen import refdata
from specgen.checks import works_common as wc
from specgen.checks.registry import declare, register
from specgen.checks.result import Basis, CheckResult, Input, Quantity, Step, tex_name
from specgen.science import batching as bt

GAUGE = Basis("common practice", note="gauging sized to the workable life (EN 1015-9 where "
              "measured), the crew's placing rate and a safety factor")
TITLE = "Site gauging size"
L = 1e-3  # m³ per litre
QUICK = 1800.0  # s: a default workable life shorter than this is flagged as urgent to measure

declare("max_gauging_volume", "L", "largest gauging placed within the workable life, by zone "
        "(workable life × placing rate / safety factor)")
declare("gauging", "", "the gauging on the batching card: binder measures, measure volume (and "
        "the measure named when a smaller scoop is used), fresh volume, measures, loose litres and masses of each "
        "constituent, water in litres, admixtures in grams")
declare("gaugings_per_day", "", "gaugings to keep a zone's crew supplied for a working day, by zone")
declare("gauging_by_zone", "", "per zone: card gaugings mixed at once (the largest whole "
        "multiple placed in time), its fresh volume in litres and the gaugings per day")
declare("workable_life", "min", "workable life used for the gaugings, with whether it was measured")


@dataclass(frozen=True)
class Site:
    """What sizes the gaugings of one mix: times, rates, the measure and the yield per binder."""

    life: wc.Sourced
    measured: bool
    safety: wc.Sourced
    day: wc.Sourced
    measure: wc.Sourced
    smallest: wc.Sourced
    measures: tuple       # the site's real measures (m³), from the smallest kept up
    most_per_day: wc.Sourced
    rates: dict           # zone id → Sourced placing rate (m³/s)
    yb: float             # m³ of fresh mortar per m³ of loose binder


def site_of(mix, zones, y, project, rules) -> Site:
    """The inputs of the gauging calculation, each with its source."""
    life, measured = wc.workable_life(project, mix, rules)
    works = project.dossier.works
    measure = (wc.Sourced(works.measure, "dossier.yaml works.measure") if works.measure
               else wc.rule_si(rules, "measure_volume", "volume"))
    rates = {z.id: (wc.Sourced(z.placing_rate, f"dossier.yaml {z.id}.placing_rate")
                    if z.placing_rate else wc.rule_si(rules, "placing_rate", "volume_rate"))
             for z in zones}
    smallest = wc.rule_si(rules, "smallest_measure", "volume")
    return Site(life, measured, wc.rule_si(rules, "gauging_safety_factor", "dimensionless"),
                wc.rule_si(rules, "working_day", "time"), measure,
                smallest, tuple(m * L for m in refdata.load("site_measures").data["measures_L"]
                                if m * L >= smallest.value * (1 - 1e-9)),
                wc.rule_si(rules, "max_gaugings_per_day", "dimensionless"), rates,
                wc.fresh_per_loose_binder(y, mix))


@register("SITE-GAUGE", TITLE, "mix", order=620)
def gauging_check(mix, ctx) -> CheckResult | list:
    """Largest gauging placed in time, binder measures per gauging, gaugings per day."""
    p = ctx.project
    zones = [z for z in p.dossier.zones if mix.id in [m.id for m in wc.mixes_of(z, p)]]
    if not zones:
        return []
    y = wc.yield_of(ctx, mix)
    if y is None:
        return CheckResult(code="SITE-GAUGE", title=TITLE, subject=mix.id, subject_kind="mix",
                           status="not_assessed", value=None, unit="", basis=(GAUGE,),
                           message="not assessed: the mix has no yield (see MIX-YIELD)")
    s = site_of(mix, zones, y, p, ctx.rules)
    vmax = {z: bt.max_gauging_volume(s.life.value, r.value, s.safety.value)
            for z, r in s.rates.items()}
    gov = min(vmax, key=vmax.get)
    measure, n = bt.fitting_measure(vmax[gov], s.measure.value, s.yb, s.measures)
    q = [Quantity("max_gauging_volume", {z: round(v / L, 3) for z, v in vmax.items()}, "L",
                  "largest gauging placed in time"),
         Quantity("workable_life", {"value": round(s.life.value / 60, 2), "measured": s.measured},
                  "min", "workable life used")]
    if n < 1:
        return _result(mix, "attention", vmax[gov], [_vmax_step(vmax, s)], _notes(s), q,
                       f"even the smallest measure ({s.smallest.value / L:g} L) of binder makes "
                       f"more than the {vmax[gov] / L:.2g} L that can be placed in time in zone "
                       f"{gov}: measure the workable life with a retarder (EN 1015-9) or raise "
                       "the crew's placing rate")
    return _gauged(mix, s, y, vmax, gov, measure, n, q)


def _gauged(mix, s: Site, y, vmax, gov, measure, n, q) -> CheckResult:
    parts = {b.binder: b.parts for b in mix.binders} | {x.sand: x.parts for x in mix.sands}
    g = bt.gauging(n, measure, parts, sum(b.parts for b in mix.binders), s.yb, y.per_m3)
    # a zone whose crew may place more at once mixes a whole number of card gaugings
    times = {z: max(1, int(vmax[z] / g.volume + 1e-9)) for z in s.rates}
    per_day = {z: bt.gaugings_per_day(r.value, s.day.value, times[z] * g.volume)
               for z, r in s.rates.items()}
    steps = [_vmax_step(vmax, s), _gauging_step(mix, g, measure, s, vmax[gov], gov),
             _per_day_step(per_day, s, g, times)]
    water = g.masses[wc.WATER] / wc.water_density().value / L
    admix = {a.name: round(g.masses[wc.admixture_key(a)] * 1000, 2) for a in mix.admixtures}
    q += [Quantity("gauging", {"binder_measures": n, "measure_L": round(measure / L, 4),
                               "halved_from_L": round(s.measure.value / L, 4)
                               if measure < s.measure.value * (1 - 1e-9) else None,
                               "volume_L": round(g.volume / L, 3), "governing_zone": gov,
                               "measures": {k: round(v, 3) for k, v in g.measures.items()},
                               "loose_L": {k: round(v * measure / L, 3)
                                           for k, v in g.measures.items()},
                               "mass_kg": {k: round(v, 4) for k, v in g.masses.items()},
                               "water_L": round(water, 3), "admixture_g": admix},
                   "", "gauging on the batching card"),
          Quantity("gaugings_per_day", per_day, "", "gaugings per working day"),
          Quantity("gauging_by_zone", {z: {"times": times[z], "volume_L": round(
              times[z] * g.volume / L, 3), "per_day": per_day[z]} for z in per_day}, "",
              "card gaugings mixed at once and gaugings per day, by zone")]
    msg = (f"{s.life.value / 60:g} min workable life ({'measured' if s.measured else 'default'}): "
           f"at most {vmax[gov] / L:.3g} L per gauging (zone {gov}); gauge {n} × "
           f"{measure / L:g} L measure of binder = {g.volume / L:.3g} L of mortar with "
           f"{water:.2f} L of water")
    notes = _notes(s)
    status = "attention" if notes else "info"
    if measure < s.measure.value * (1 - 1e-9):
        msg += (f" — one {s.measure.value / L:g} L measure of binder would make more than can be "
                f"placed in time, so a {measure / L:g} L scoop is used")
        status = "attention"
    busy = {z: n for z, n in per_day.items() if n > s.most_per_day.value}
    if busy:
        msg += ("; " + ", ".join(f"zone {z} needs {n} gaugings a day" for z, n in busy.items())
                + f", more than the {s.most_per_day.value:g} a mixer can keep up with: extend the "
                "workable life with a retarder trial (EN 1015-9), or add a mixer")
        status = "attention"
    return _result(mix, status, g.volume, steps, notes, q, msg)


def _notes(s: Site) -> list[str]:
    """A default workable life is an assumption: always flagged (sooner for a quick binder)."""
    if s.measured:
        return []
    urgent = " — a quick-setting binder: measure before site work" if s.life.value < QUICK else ""
    return [f"assumption: workable life not measured, {s.life.value / 60:g} min used "
            f"({s.life.source}); measure it on the trial mix (EN 1015-9) and record it with "
            f"the mix{urgent}"]


def _result(mix, status, volume, steps, notes, q, msg) -> CheckResult:
    return CheckResult(code="SITE-GAUGE", title=TITLE, subject=mix.id, subject_kind="mix",
                       status=status, value=round(volume / L, 3), unit="L", basis=(GAUGE,),
                       steps=tuple(steps), message=msg, notes=tuple(notes), quantities=tuple(q))


def _vmax_step(vmax, s: Site) -> Step:
    inputs = [Input("t_w", "workable life", round(s.life.value / 60, 3), "min", s.life.source),
              Input("γ", "safety factor", s.safety.value, "", s.safety.source)]
    inputs += [Input(f"q_{z}", f"placing rate, zone {z}", round(r.value / L * 3600, 4), "L/h",
                     r.source) for z, r in s.rates.items()]
    sub = r",\ ".join(rf"V_{{\max,{z}}} = \frac{{{s.life.value / 60:g} \times "
                      rf"{s.rates[z].value / L * 3600:g}/60}}{{{s.safety.value:g}}} = "
                      rf"{v / L:.3f}\ \mathrm{{L}}" for z, v in vmax.items())
    return Step("Largest gauging placed within the workable life", r"V_{\max} = t_w\,q/\gamma",
                tuple(inputs), sub, round(min(vmax.values()) / L, 4), "L", "V_max")


def _gauging_step(mix, g, measure, s: Site, vmax, gov) -> Step:
    inputs = [Input("V_max", f"largest gauging (zone {gov}, governing)", round(vmax / L, 4), "L",
                    "step above"),
              Input("V_m", "measure volume", round(s.measure.value / L, 4), "L", s.measure.source),
              Input("Y_b", "fresh mortar per volume of loose binder", round(s.yb, 4), "",
                    f"MIX-YIELD/{mix.id}: V_f / Σ binder parts")]
    halved = ""
    if measure < s.measure.value * (1 - 1e-9):
        inputs.append(Input("V_m,min", "smallest measure", round(s.smallest.value / L, 4), "L",
                            s.smallest.source))
        halved = rf"V_m\ \text{{reduced to the}}\ {measure / L:g}\ \mathrm{{L}}\ \text{{scoop}};\ "
    sub = (rf"{halved}N = \left\lfloor \frac{{{vmax / L:.3f}}}{{{measure / L:g} \times "
           rf"{s.yb:.3f}}}\right\rfloor = {g.binder_measures};\ V_g = {g.binder_measures} "
           rf"\times {measure / L:g} \times {s.yb:.3f} = {g.volume / L:.3f}\ \mathrm{{L}}")
    return Step("Binder measures per gauging and its volume",
                r"N = \lfloor V_{\max} / (V_m Y_b) \rfloor\ (V_m\ \text{the largest real measure with}\ N \geq 1),"
                r"\quad V_g = N V_m Y_b,\quad m_i = c_i V_g", tuple(inputs), sub,
                round(g.volume / L, 4), "L", "V_g")


def _per_day_step(per_day, s: Site, g, times) -> Step:
    inputs = [Input("T", "placing hours per day", round(s.day.value / 3600, 3), "h",
                    s.day.source),
              Input("V_g", "gauging volume", round(g.volume / L, 4), "L", "step above"),
              Input("n_max", "most gaugings a day", s.most_per_day.value, "",
                    s.most_per_day.source)]
    sub = r",\ ".join(rf"k_{{\mathrm{{{tex_name(z)}}}}} = {times[z]},\ n_{{\mathrm{{{tex_name(z)}}}}}"
                      rf" = \lceil {s.rates[z].value / L * 3600:g} \times {s.day.value / 3600:g}"
                      rf" / ({times[z]} \times {g.volume / L:.3f}) \rceil = {n}"
                      for z, n in per_day.items())
    return Step("Gaugings per working day", r"k = \max(1, \lfloor V_{\max} / V_g \rfloor),\quad "
                r"n = \lceil q\,T / (k\,V_g) \rceil \leq n_{\max}", tuple(inputs), sub,
                max(per_day.values()), "", "n")
