"""Checks on oxide analyses: closure and the cementation index."""
from __future__ import annotations

from specgen.checks.chemistry_common import guarded, prepared, source
from specgen.precision import by_symbol
from specgen.checks.registry import declare, register
from specgen.checks.result import Basis, CheckResult, Input, Limit, Quantity, Step
from specgen.science import oxides
from specgen.views import oxide_order

declare("analysis_total", "%", "sum of the reported constituents of an analysis, LOI included "
        "(CO2 and H2O reported beside LOI counted once, as parts of it)")
declare("loss_on_ignition", "%", "loss on ignition as reported (mass %); CO2 + H2O when no LOI "
        "is given")
declare("cementation_index", "", "Eckel cementation index (2.8S + 1.1A + 0.7F)/(C + 1.4M)")
declare("hydraulicity_class", "", "band of the cementation index (Eckel's bands via Boynton)")

ECKEL = Basis("reference", "eckel1922", "cementation index, as reproduced in Boynton (1980)")
CI_TERMS = (("S", "SiO2", 2.8), ("A", "Al2O3", 1.1), ("F", "Fe2O3", 0.7))


CLOSURE_BASIS = (Basis("common practice", note="an analysis with LOI closes near 100 %"),)


@register("CHEM-CLOSURE", "Oxide analysis closure", "analysis", order=100)
@guarded("CHEM-CLOSURE", "Oxide analysis closure", "analysis", CLOSURE_BASIS)
def closure_check(analysis, ctx) -> CheckResult:
    """The reported constituents (LOI included) should add up to 100 %."""
    ox = analysis.mass_percent
    c = oxides.closure(ox)
    ok, warn = ctx.rules["analysis.closure_pass"], ctx.rules["analysis.closure_attention"]
    gap = abs(c.deviation)
    status = "pass" if gap <= ok.value else "attention" if gap <= warn.value else "fail"
    # The science counts CO2/H2O once when LOI is reported (they are parts of it): so does the sheet.
    parts = [k for k in ox if "LOI" in ox and k in oxides.LOSS_KEYS[1:]]
    names = sorted((k for k in ox if k not in parts), key=oxide_order)
    notes = tuple(f"{k} = {ox[k]:g} % is part of LOI = {ox['LOI']:g} %: not added a second time"
                  for k in sorted(parts, key=oxide_order))
    step = Step(
        title="Sum of reported constituents",
        formula=r"\Sigma = \sum_i w_i",
        inputs=tuple(Input(f"w({n})", n, ox[n], "%", source(analysis)) for n in names),
        substituted=r"\Sigma = " + " + ".join(f"{ox[n]:.2f}" for n in names),
        result=round(c.total, 4), unit="%", symbol="Σ")
    msg = (f"total {c.total:.2f} %, {c.deviation:+.2f} % from 100 %; "
           f"pass within ±{ok.value:g} %, attention within ±{warn.value:g} %")
    return CheckResult(
        code="CHEM-CLOSURE", title="Oxide analysis closure", subject=analysis.id,
        subject_kind="analysis", status=status, value=round(c.total, 4), unit="%",
        basis=(ok.basis,), steps=(step,),
        limit=Limit("within", 100 - ok.value, 100 + ok.value, "%",
                    f"100 ± {ok.value:g} % (attention to ± {warn.value:g} %)",
                    rule=ok.key, overridden=ok.justification or warn.justification),
        message=msg, notes=notes,
        quantities=(Quantity("analysis_total", round(c.total, 4), "%", "sum of constituents"),
                    Quantity("loss_on_ignition", round(oxides.loss_on_ignition(ox), 4), "%",
                             "loss on ignition")))


@register("CHEM-CI", "Cementation index", "analysis", order=110)
@guarded("CHEM-CI", "Cementation index", "analysis", (ECKEL,))
def cementation_index_check(analysis, ctx) -> CheckResult:
    """Eckel's cementation index and the hydraulicity band it falls in."""
    prep = prepared(analysis)
    ox = prep.ox
    missing = [k for k in ("CaO", "SiO2") if k not in ox]
    if missing:
        return CheckResult(
            code="CHEM-CI", title="Cementation index", subject=analysis.id,
            subject_kind="analysis", status="not_assessed", value=None, unit="",
            basis=(ECKEL,), message=f"not assessed: the analysis gives no {', '.join(missing)}")
    ci = oxides.cementation_index(ox)
    get = lambda k: ox.get(k, 0.0)  # noqa: E731 - oxides not reported count as zero
    inputs = tuple(Input(sym, name, get(name), "%", source(analysis))
                   for sym, name, _ in CI_TERMS + (("C", "CaO", 0), ("M", "MgO", 0)))
    step = Step(
        title="Cementation index (Eckel)",
        formula=r"CI = \frac{2.8\,S + 1.1\,A + 0.7\,F}{C + 1.4\,M}",
        inputs=inputs,
        substituted=(rf"CI = \frac{{2.8 \times {get('SiO2'):.2f} + 1.1 \times {get('Al2O3'):.2f}"
                     rf" + 0.7 \times {get('Fe2O3'):.2f}}}{{{get('CaO'):.2f} + 1.4 \times "
                     rf"{get('MgO'):.2f}}}"),
        result=round(ci, 4), unit="", symbol="CI")
    band = classify(ci, ctx)
    status, message = _judge(analysis, band, ctx)
    return CheckResult(
        code="CHEM-CI", title="Cementation index", subject=analysis.id, subject_kind="analysis",
        status=status, value=round(ci, 4), unit="", basis=(ECKEL, band["basis"]), steps=(step,),
        limit=Limit("within", band["low"], band["high"], "", f"band '{band['name']}': "
                    f"{_edges(band)}", rule="hydraulicity_bands"),
        message=f"CI = {by_symbol(round(ci, 4), 'CI')}: {message}", notes=prep.assumptions,
        quantities=(Quantity("cementation_index", round(ci, 4), "", "Eckel cementation index"),
                    Quantity("hydraulicity_class", band["name"], "",
                             "band of the cementation index" + (" (borderline)"
                                                                if band["borderline"] else ""))))


def classify(ci: float, ctx) -> dict:
    """Place ``ci`` in the hydraulicity bands (content/data/hydraulicity_bands.yaml)."""
    from specgen import refdata
    table = refdata.load("hydraulicity_bands")
    margin = ctx.rules["analysis.band_margin"].value
    band = oxides.classify(ci, table.data, margin)
    basis = Basis("reference", "boynton1980", "hydraulicity bands of the cementation index")
    return {"name": band.name, "low": band.lower, "high": band.upper,
            "borderline": band.borderline, "neighbour": band.neighbour, "basis": basis}


def _judge(analysis, band: dict, ctx) -> tuple[str, str]:
    """Attention when borderline or when the band contradicts the declared binder type."""
    text = f"falls in the band '{band['name']}' ({_edges(band)})"
    if band["borderline"]:
        return "attention", (text + f", within the margin of the edge with "
                             f"'{band['neighbour']}': borderline")
    binder = ctx.project.binders.get(analysis.material) if analysis.material else None
    if binder is None or binder.type not in ("natural_cement",):
        return "info", text
    if band["name"] != "natural cement":
        return "attention", text + f", but binder {binder.id} is declared a natural cement"
    return "pass", text + f", consistent with binder {binder.id} declared a natural cement"


def _edges(band: dict) -> str:
    low = "" if band["low"] is None else f"{band['low']:g}"
    high = "" if band["high"] is None else f"{band['high']:g}"
    return f"{low}–{high}" if low and high else (f"≥ {low}" if low else f"< {high}")
