"""Checks on firing: expected vs measured fired composition, residual carbonate, kiln stages.

The subject is a binder: its raw stone (analyses of kind ``raw_stone`` with
``material:`` the binder), its own analysis and its ``firing`` record.  Formulas
from :mod:`specgen.science.calcination`; limits from ``content/rules/calcination.yaml``;
kiln stage temperatures from ``content/data/kiln_stages.yaml``.
"""
from __future__ import annotations

from specgen.checks.chemistry_common import (ATOMIC, atomic_weights, binder_analysis, finite,
                                             guarded, not_assessed, prepared, raw_analyses,
                                             source, table)
from specgen.views import oxide_order
from specgen.checks.registry import declare, register
from specgen.checks.result import Basis, CheckResult, Input, Limit, Quantity, Step
from specgen.science import calcination, oxides

declare("expected_fired_composition", "%", "fired oxides expected from the raw stone, "
        "loss-free basis, by oxide")
declare("fired_difference", "%", "largest |measured − expected| fired oxide (loss-free basis) "
        "between a binder and its raw stone, signed")
declare("residual_co2", "%", "CO2 left in a fired binder (mass % of the binder as analysed)")
declare("decarbonation", "%", "degree of decarbonation of a fired binder against its raw stone")
declare("firing_peak", "°C", "peak temperature of the firing record")

MAJOR = ("SiO2", "Al2O3", "Fe2O3", "CaO", "MgO", "SO3")
ZERO_C = 273.15  # K, definition of the Celsius scale
STAGE_SOURCE = "content/data/kiln_stages.yaml"
FIRED_TITLE = "Fired composition against the raw stone"
BURN_TITLE = "Residual carbonate (degree of burning)"
FIRING_TITLE = "Firing record against the kiln stages"


def _raw_and_measured(binder, project):
    """(raw stone analysis, binder analysis) of a binder; either may be None."""
    raws = raw_analyses(binder, project)
    return (raws[0] if raws else None), binder_analysis(binder, project)


@register("CHEM-FIRED", FIRED_TITLE, "binder", order=140)
@guarded("CHEM-FIRED", FIRED_TITLE, "binder", (Basis("common practice"),))
def fired_check(binder, ctx) -> CheckResult:
    """Expected fired oxides (raw stone, every loss gone) against the binder's own analysis."""
    rule = ctx.rules["calcination.fired_difference"]
    raw, measured = _raw_and_measured(binder, ctx.project)
    if raw is None or measured is None:
        missing = "no raw-stone analysis names this binder as its material" if raw is None \
            else "the binder has no analysis of its own"
        return not_assessed("CHEM-FIRED", FIRED_TITLE, binder.id, "binder", (rule.basis,),
                            f"{missing}; the balance needs both")
    raw_ox, meas_ox = prepared(raw).ox, prepared(measured).ox
    oxides.validate(raw_ox), oxides.validate(meas_ox)
    expected = calcination.expected_fired(raw_ox)
    cmp = calcination.compare_fired(expected, meas_ox)
    loi_r, loi_m = oxides.loss_on_ignition(raw_ox), oxides.loss_on_ignition(meas_ox)
    measured_lf = oxides.loss_free(meas_ox)
    steps = []
    for name in (k for k in MAJOR if k in raw_ox or k in meas_ox):
        e, m = expected.get(name, 0.0), measured_lf.get(name, 0.0)
        steps.append(Step(
            f"{name}: measured − expected (loss-free)",
            r"\Delta = \frac{100\,x_b}{100 - LOI_b} - \frac{100\,x_r}{100 - LOI_r}",
            (Input("x_r", f"{name} in the raw stone", raw_ox.get(name, 0.0), "%", source(raw)),
             Input("LOI_r", "loss on ignition, raw stone", round(loi_r, 4), "%", source(raw)),
             Input("x_b", f"{name} in the binder", meas_ox.get(name, 0.0), "%",
                   source(measured)),
             Input("LOI_b", "loss on ignition, binder", round(loi_m, 4), "%", source(measured))),
            rf"\Delta = \frac{{100 \times {meas_ox.get(name, 0.0):.2f}}}{{100 - {loi_m:.2f}}} - "
            rf"\frac{{100 \times {raw_ox.get(name, 0.0):.2f}}}{{100 - {loi_r:.2f}}}",
            round(finite(m - e, "the fired difference"), 4), "%", f"Δ{name}"))
    worst = max(((k, cmp.differences[k]) for k in MAJOR if k in cmp.differences),
                key=lambda kv: abs(kv[1]), default=(cmp.largest, cmp.largest_difference))
    status = "pass" if abs(worst[1]) <= rule.value else "attention"
    verdict = ("the binder is what its raw stone should give" if status == "pass" else
               "another bed, fuel ash taken up in the kiln or a mislabelled sample?")
    return CheckResult(
        code="CHEM-FIRED", title=FIRED_TITLE, subject=binder.id, subject_kind="binder",
        status=status, value=round(worst[1], 4), unit="%", basis=(rule.basis,),
        steps=tuple(steps),
        limit=Limit("within", -rule.value, rule.value, "%", f"|Δ| ≤ {rule.value:g} % per oxide",
                    rule=rule.key, overridden=rule.justification),
        message=(f"raw stone {raw.id} → binder {measured.id}: largest difference "
                 f"{worst[0]} {worst[1]:+.2f} % (loss-free); {verdict}"),
        notes=("expected fired oxide = raw oxide × 100/(100 − LOI): every loss (CO2, combined "
               "water) leaves in the kiln and nothing is gained from fuel or lining",),
        quantities=(Quantity("expected_fired_composition",
                             {k: round(v, 4) for k, v in sorted(expected.items(),
                                                                key=lambda kv: oxide_order(kv[0]))},
                             "%", "expected fired composition"),
                    Quantity("fired_difference", round(worst[1], 4), "%",
                             f"largest fired difference ({worst[0]})")))


@register("CHEM-BURN", BURN_TITLE, "binder", order=145)
@guarded("CHEM-BURN", BURN_TITLE, "binder", (Basis("common practice"),))
def burn_check(binder, ctx) -> CheckResult:
    """CO2 left in the binder read as calcite; degree of decarbonation against the raw stone."""
    rule = ctx.rules["calcination.residual_co2"]
    raw, measured = _raw_and_measured(binder, ctx.project)
    if measured is None:
        return not_assessed("CHEM-BURN", BURN_TITLE, binder.id, "binder", (rule.basis,),
                            "the binder has no analysis")
    ox = prepared(measured).ox
    if "CO2" not in ox:
        return not_assessed("CHEM-BURN", BURN_TITLE, binder.id, "binder", (rule.basis,),
                            f"analysis {measured.id} gives no CO2; ask the laboratory for CO2 "
                            "beside LOI (LOI alone mixes CO2 with combined and absorbed water)")
    raw_ox = prepared(raw).ox if raw is not None and "CO2" in raw.mass_percent else None
    aw = atomic_weights()
    res = calcination.residual_carbonate(ox, aw, raw_ox)
    m_cc, m_co2 = (calcination.molar_mass(f, aw) for f in ("CaCO3", "CO2"))
    steps = [Step("Residual carbonate as calcite", r"CaCO_3 = CO_2 \times \frac{M_{CaCO_3}}"
                  r"{M_{CO_2}}",
                  (Input("CO_2", "CO2 in the binder", ox["CO2"], "%", source(measured)),
                   Input("M_{CaCO_3}", "molar mass of calcite", round(m_cc, 4), "g/mol", ATOMIC),
                   Input("M_{CO_2}", "molar mass of CO2", round(m_co2, 4), "g/mol", ATOMIC)),
                  rf"CaCO_3 = {ox['CO2']:.2f} \times \frac{{{m_cc:.3f}}}{{{m_co2:.3f}}}",
                  round(res.caco3, 4), "%", "CaCO3")]
    quantities = [Quantity("residual_co2", round(res.co2, 4), "%", "residual CO2")]
    text = f"CO2 {res.co2:.2f} % (as calcite {res.caco3:.1f} %)"
    if res.decarbonation is not None:
        loi_b, loi_r = oxides.loss_on_ignition(ox), oxides.loss_on_ignition(raw_ox)
        steps.append(Step(
            "Degree of decarbonation", r"D = 1 - \frac{CO_{2,b}/(100 - LOI_b)}"
            r"{CO_{2,r}/(100 - LOI_r)}",
            (Input("CO_{2,b}", "CO2 in the binder", ox["CO2"], "%", source(measured)),
             Input("LOI_b", "loss on ignition, binder", round(loi_b, 4), "%", source(measured)),
             Input("CO_{2,r}", "CO2 in the raw stone", raw_ox["CO2"], "%", source(raw)),
             Input("LOI_r", "loss on ignition, raw stone", round(loi_r, 4), "%", source(raw))),
            rf"D = 1 - \frac{{{ox['CO2']:.2f}/(100 - {loi_b:.2f})}}{{{raw_ox['CO2']:.2f}/"
            rf"(100 - {loi_r:.2f})}}", round(100 * res.decarbonation, 3), "%", "D"))
        quantities.append(Quantity("decarbonation", round(100 * res.decarbonation, 3), "%",
                                   "degree of decarbonation"))
        text += f"; decarbonation {100 * res.decarbonation:.1f} % of the raw stone's CO2"
    under = res.co2 > rule.value
    text += ("; above the limit: under-burnt, or carbonated in store — check the firing and "
             "the storage" if under else "; a well-burnt binder")
    return CheckResult(
        code="CHEM-BURN", title=BURN_TITLE, subject=binder.id, subject_kind="binder",
        status="attention" if under else "pass", value=round(res.co2, 4), unit="%",
        basis=(rule.basis,), steps=tuple(steps),
        limit=Limit("<=", high=rule.value, unit="%", text=f"CO2 ≤ {rule.value:g} %",
                    rule=rule.key, overridden=rule.justification),
        message=text, quantities=tuple(quantities),
        notes=("all CO2 of the binder is read as calcite (the first carbonate to form again "
               "and the last to decompose)",))


def stages() -> dict[str, tuple[float, float, str, str]]:
    """Kiln stages: key → (lower K, upper K, name, basis) from the reference table."""
    rows = table("kiln_stages").data
    kelvin = calcination.stages_to_kelvin(rows)
    return {r["key"]: (*kelvin[r["key"]], r["name"], str(r.get("basis", ""))) for r in rows}


def _c(kelvin: float) -> float:
    """°C of a temperature in K, to 1e-6 °C: the stages' edges come back as written
    (900 °C, not the 900.0000000000001 of the round trip through kelvin)."""
    return round(kelvin - ZERO_C, 6)


# the symbol of each stage on the sheet, as the step's formula names it
STAGE_SYMBOL = {"dehydroxylation": "T_{dehyd}", "calcite_decomposition": "T_{calc}",
                "natural_cement_firing": "T_{NC}", "sintering": "T_{sint}"}


@register("CHEM-FIRING", FIRING_TITLE, "binder", order=150)
@guarded("CHEM-FIRING", FIRING_TITLE, "binder", (Basis("common practice"),))
def firing_check(binder, ctx) -> CheckResult | None:
    """Peak temperature (and the time-temperature record) against the kiln stages."""
    if binder.firing is None:
        return None
    basis = (Basis("common practice", note="kiln stages of a marly limestone: clay "
                   "dehydroxylation, calcite decomposition, sintering (content/data/"
                   "kiln_stages.yaml)"),)
    st = stages()
    series = ctx.project.firing.get(binder.id)
    peak = binder.firing.peak
    if peak is None and series is None:
        return not_assessed("CHEM-FIRING", FIRING_TITLE, binder.id, "binder", basis,
                            "the firing record gives neither a peak temperature nor a readable "
                            "time-temperature file")
    findings = calcination.check_firing({k: v[:2] for k, v in st.items()}, peak,
                                        series.points if series else None)
    shown_peak = peak if peak is not None else max(k for _, k in series.points)
    stage_inputs = tuple(
        Input(STAGE_SYMBOL[key], f"{st[key][2]} (from–to)",
              f"{_c(st[key][0]):g}–{_c(st[key][1]):g}", "°C",
              f"{STAGE_SOURCE} ({st[key][3] or 'common practice'})")
        for key in ("dehydroxylation", "calcite_decomposition", "natural_cement_firing",
                    "sintering") if key in st)
    peak_src = (f"materials.yaml binders {binder.id}.firing.peak" if peak is not None
                else f"{series.file}, highest reading")
    steps = [Step("Peak temperature against the stages",
                  r"T_{dehyd,from} \le T_{calc,to} \le T_{peak} < T_{sint,from}",
                  (Input("T_{peak}", "peak kiln temperature", round(_c(shown_peak), 1), "°C",
                         peak_src),) + stage_inputs,
                  rf"{_c(st['dehydroxylation'][0]):g} \le {_c(st['calcite_decomposition'][1]):g}"
                  rf" \le {_c(shown_peak):.0f} < {_c(st['sintering'][0]):g}",
                  round(_c(shown_peak), 1), "°C", "T_peak")]
    if series is not None:
        onset = st["calcite_decomposition"][0]
        pts = series.points
        held = sum(b[0] - a[0] for a, b in zip(pts, pts[1:]) if min(a[1], b[1]) >= onset)
        steps.append(Step("Time held above the onset of calcite decomposition",
                          r"t_{soak} = \sum \Delta t \;\; (T_i, T_{i+1} \ge T_{calc,start})",
                          (Input("T_{calc,start}", "onset of calcite decomposition",
                                 _c(onset), "°C", STAGE_SOURCE),
                           Input("record", "time-temperature readings", f"{len(pts)} rows", "",
                                 series.file)),
                          rf"t_{{soak}} = {held / 3600:.2f}\ \mathrm{{h}}", round(held / 3600, 3),
                          "h", "t_soak"))
    if findings:
        text = "; ".join(f.message for f in findings)
    else:
        text = (f"peak {_c(shown_peak):.0f} °C: clay activated, calcite decomposed, below "
                "sintering — the firing the binder class assumes")
    return CheckResult(
        code="CHEM-FIRING", title=FIRING_TITLE, subject=binder.id, subject_kind="binder",
        status="attention" if findings else "pass", value=round(_c(shown_peak), 1), unit="°C",
        basis=basis, steps=tuple(steps),
        limit=Limit("within", _c(st["calcite_decomposition"][1]), _c(st["sintering"][0]), "°C",
                    f"{_c(st['calcite_decomposition'][1]):g} °C ≤ peak < "
                    f"{_c(st['sintering'][0]):g} °C (kiln stages)"),
        message=text, notes=("calcite decomposition shifts with the CO2 pressure in the kiln; "
                             "the stage temperatures are guides, not sharp limits",)
        + ((binder.firing.description,) if binder.firing.description else ()),
        quantities=(Quantity("firing_peak", round(_c(shown_peak), 1), "°C", "firing peak"),))
