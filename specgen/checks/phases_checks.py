"""Potential phases of a binder: below sintering (C3S = 0) or, for clinker, Bogue (ASTM C150).

The aluminate/ferrite assignment is the project's declared assumption
(``chemistry.aluminate_assignment`` in dossier.yaml), stated on the sheet; since no analysis
decides it, the estimate is also made for every reasonable assignment (to C4AF + C3A, to
gehlenite, to an amorphous C-A-S) and the crystalline share is judged as that range against
the usual ~70/30 split of natural cement (``content/rules/calcination.yaml``): inside the
band → unremarkable, outside → attention, straddling an edge → hold until XRD with an
internal standard and a measured free lime decide.
"""
from __future__ import annotations

from specgen.checks.chemistry_common import (ASTM_C150, ATOMIC, atomic_weights, binder_analysis,
                                             guarded, is_clinker, not_assessed, oxide_inputs,
                                             prepared, source)
from specgen.checks.registry import declare, register
from specgen.checks.result import Basis, CheckResult, Input, Limit, Quantity, Step
from specgen.science import phases

declare("potential_phases", "%", "potential phase composition of a binder by phase (mass % of "
        "the binder as analysed)")
declare("c2s_potential", "%", "potential belite (C2S) content of a binder, mass %")
declare("crystalline_share", "%", "crystalline share of the potential phases (rest amorphous)")
declare("phase_range", "%", "unsintered phase estimate over every aluminate assignment: "
        "{assignment: {C2S, crystalline, free lime}}, with the low and high of C2S and of the "
        "crystalline share")

TITLE = "Potential phases"
PHASE_ORDER = ("C3S", "C2S", "C3A", "C4AF", "C2AS", "C2F", "amorphous A+F", "free lime",
               "periclase", "CaSO4", "calcite", "MgCO3", "uncombined SiO2", "other")


def ordered(ph: dict) -> dict:
    """Phases in the order the dossier shows them."""
    rank = {k: i for i, k in enumerate(PHASE_ORDER)}
    return dict(sorted(ph.items(), key=lambda kv: (rank.get(kv[0], 99), kv[0])))


@register("CHEM-PHASES", TITLE, "binder", order=155)
@guarded("CHEM-PHASES", TITLE, "binder", (ASTM_C150,))
def phases_check(binder, ctx) -> CheckResult:
    """Unsintered phase estimate with the 70/30 comparison, or Bogue for clinker."""
    analysis = binder_analysis(binder, ctx.project)
    if analysis is None:
        return not_assessed("CHEM-PHASES", TITLE, binder.id, "binder", (Basis("common practice"),),
                            "the binder has no analysis")
    ox = prepared(analysis).ox
    if is_clinker(binder):
        return _bogue(binder, analysis, ox)
    return _unsintered(binder, analysis, ox, ctx)


def _unsintered(binder, analysis, ox, ctx) -> CheckResult:
    # long: one calculation sheet (belite, aluminate assignments, free lime, crystalline share)
    # built in the order the sheet shows it
    share, tol = ctx.rules["calcination.crystalline_share"], ctx.rules["calcination.crystalline_tolerance"]
    assignment = ctx.project.dossier.chemistry.aluminate_assignment
    aw = atomic_weights()
    pa = phases.unsintered_phases(ox, assignment, aw)
    ph = ordered(pa.phases)
    k_s, k_c = phases.factor("C2S", "SiO2", aw), phases.factor("C2S", "CaO", aw, moles=2)
    c2s = ph.get("C2S", 0.0)
    g = lambda k: ox.get(k, 0.0)  # noqa: E731
    src = "dossier.yaml chemistry.aluminate_assignment"
    steps = [
        Step("Belite while lime suffices", r"C_2S = \min(k_S\,S_{free},\ k_C\,C_{free})",
             oxide_inputs(analysis, ox, (("S", "SiO2"), ("C", "CaO"))) + (
                 Input("k_S", "M(C2S)/M(SiO2)", round(k_s, 4), "g/g", ATOMIC),
                 Input("k_C", "M(C2S)/(2 M(CaO))", round(k_c, 4), "g/g", ATOMIC),
                 Input("rule", "aluminate/ferrite assignment", assignment, "", src)),
             rf"C_2S = {c2s:.2f}\ (\text{{{'lime-limited' if pa.lime_limited else 'silica-limited'}}}"
             rf",\ S = {g('SiO2'):.2f},\ C = {g('CaO'):.2f})", round(c2s, 4), "%", "C2S"),
        Step("Crystalline share", r"\chi = \frac{\sum w_{cryst}}{\sum w_{phases}}",
             tuple(Input(k, k, round(v, 3), "%", "phase estimate above") for k, v in ph.items()),
             rf"\chi = \frac{{{sum(v for k, v in ph.items() if k in phases.CRYSTALLINE):.2f}}}"
             rf"{{{sum(ph.values()):.2f}}}", round(100 * pa.crystalline, 3), "%", "χ")]
    rng = _over_assignments(ox, aw)
    steps.append(_range_step(rng))
    lo, hi = share.value - tol.value, share.value + tol.value
    c_lo, c_hi = rng["crystalline_low"], rng["crystalline_high"]
    compared = binder.type == "natural_cement"
    if not compared:
        status = "info"
    elif c_hi < lo or c_lo > hi:
        status = "attention"
    elif lo <= c_lo and c_hi <= hi:
        status = "info"
    else:
        status = "hold"
    text = (f"C3S 0 % (below sintering), C2S {rng['c2s_low']:.1f}–{rng['c2s_high']:.1f} %, "
            f"crystalline {c_lo:.0f}–{c_hi:.0f} % over the aluminate assignments (declared "
            f"{assignment}: C2S {c2s:.1f} %, crystalline {100 * pa.crystalline:.0f} %, free lime "
            f"{ph.get('free lime', 0):.1f} %)")
    text += (f" against the usual {share.value:g}/{100 - share.value:g} ± {tol.value:g} of a "
             "natural cement" if compared else
             " (the 70/30 split is a natural-cement rule: not compared)")
    text += {"info": "", "attention": " — the whole range lies outside: check the firing or "
             "the analysis",
             "hold": " — the range straddles the band: the estimate cannot decide; XRD with an "
             "internal standard (quantitative phase analysis) and a measured free lime will"
             }[status]
    notes = list(pa.assumptions)
    if ph.get("free lime", 0.0) > 2.0:
        notes.append("free lime in the estimate: lime the assignment leaves uncombined; hard-"
                     "burnt free lime slakes late and expands — compare with a measured free-lime "
                     "result")
    return CheckResult(
        code="CHEM-PHASES", title=TITLE, subject=binder.id, subject_kind="binder", status=status,
        value=round(c2s, 4), unit="%", basis=(share.basis, tol.basis), steps=tuple(steps),
        limit=Limit("within", share.value - tol.value, share.value + tol.value, "%",
                    f"crystalline {share.value:g} ± {tol.value:g} %", rule=tol.key,
                    overridden=tol.justification) if compared else None,
        message=text, notes=tuple(notes),
        quantities=(Quantity("potential_phases", {k: round(v, 4) for k, v in ph.items()}, "%",
                             "potential phases"),
                    Quantity("c2s_potential", round(c2s, 4), "%", "potential C2S"),
                    Quantity("crystalline_share", round(100 * pa.crystalline, 3), "%",
                             "crystalline share"),
                    Quantity("phase_range", rng, "%", "phase estimate over the assignments")))


def _over_assignments(ox, aw) -> dict:
    """The unsintered estimate under every assignment, with the low and high."""
    by = {}
    for a in phases.ASSIGNMENTS:
        pa = phases.unsintered_phases(ox, a, aw)
        by[a] = {"C2S": round(pa.phases.get("C2S", 0.0), 4),
                 "crystalline": round(100 * pa.crystalline, 3),
                 "free lime": round(pa.phases.get("free lime", 0.0), 4)}
    c2s, cr = [v["C2S"] for v in by.values()], [v["crystalline"] for v in by.values()]
    return {"by_assignment": by, "c2s_low": min(c2s), "c2s_high": max(c2s),
            "crystalline_low": min(cr), "crystalline_high": max(cr)}


def _range_step(rng: dict) -> Step:
    inputs = tuple(Input(f"χ[{a}]", f"crystalline share with {phases.ASSIGNMENTS[a]}",
                         v["crystalline"], "%", f"estimate with assignment '{a}'")
                   for a, v in rng["by_assignment"].items())
    return Step("Crystalline share over the aluminate assignments",
                r"\chi \in [\min_a \chi_a,\ \max_a \chi_a]", inputs,
                rf"\chi \in [{rng['crystalline_low']:.1f},\ {rng['crystalline_high']:.1f}]",
                round(rng["crystalline_high"] - rng["crystalline_low"], 3), "%", "Δχ")


def _bogue(binder, analysis, ox) -> CheckResult:
    b = phases.bogue(ox)
    g = lambda k: ox.get(k, 0.0)  # noqa: E731
    inputs = oxide_inputs(analysis, ox, (("C", "CaO"), ("S", "SiO2"), ("A", "Al2O3"),
                                         ("F", "Fe2O3"), ("S̄", "SO3")))
    c, s, a, f, sb = (g(k) for k in ("CaO", "SiO2", "Al2O3", "Fe2O3", "SO3"))
    steps = (
        Step("C3S (Bogue)", r"C_3S = 4.071C - 7.600S - 6.718A - 1.430F - 2.852\bar{S}", inputs,
             rf"C_3S = 4.071 \times {c:.2f} - 7.600 \times {s:.2f} - 6.718 \times {a:.2f} - "
             rf"1.430 \times {f:.2f} - 2.852 \times {sb:.2f}", round(b.c3s, 3), "%", "C3S"),
        Step("C2S (Bogue)", r"C_2S = 2.867S - 0.7544\,C_3S", inputs,
             rf"C_2S = 2.867 \times {s:.2f} - 0.7544 \times {b.c3s:.2f}", round(b.c2s, 3), "%",
             "C2S"),
        Step("C3A (Bogue)", r"C_3A = 2.650A - 1.692F", inputs,
             rf"C_3A = 2.650 \times {a:.2f} - 1.692 \times {f:.2f}", round(b.c3a, 3), "%", "C3A"),
        Step("C4AF (Bogue)", r"C_4AF = 3.043F", inputs, rf"C_4AF = 3.043 \times {f:.2f}",
             round(b.c4af, 3), "%", "C4AF"))
    ph = {"C3S": b.c3s, "C2S": b.c2s, "C3A": b.c3a, "C4AF": b.c4af}
    return CheckResult(
        code="CHEM-PHASES", title=TITLE, subject=binder.id, subject_kind="binder",
        status="info" if b.valid else "attention", value=round(b.c2s, 4), unit="%",
        basis=(ASTM_C150,), steps=steps,
        limit=Limit(">=", low=phases.BOGUE_MIN_AF, text="A/F ≥ 0.64 for the C3A + C4AF form"),
        message=(f"Bogue (clinker): C3S {b.c3s:.1f} %, C2S {b.c2s:.1f} %, C3A {b.c3a:.1f} %, "
                 f"C4AF {b.c4af:.1f} %; A/F = {b.af_ratio:.2f}: {b.note}"),
        notes=(f"{source(analysis)}; potential, not measured, phases: XRD decides",),
        quantities=(Quantity("potential_phases", {k: round(v, 4) for k, v in ph.items()}, "%",
                             "potential phases (Bogue)"),
                    Quantity("c2s_potential", round(b.c2s, 4), "%", "potential C2S")))
