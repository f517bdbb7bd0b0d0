"""CHEM-HYDR and CHEM-PASTE read whole: status, message, basis, notes, quantities and every
step's title, formula, inputs (value, unit, label, source), substituted values and result.

Outside values: molar masses summed here from the IUPAC/CIAAW abridged standard atomic weights
(conventional values for H, O, Si; Ca 40.078), checked against ``periodictable``; phase
densities of Bentz's NIST chemical-shrinkage tables as DOMAIN.md §3 quotes them (C2S 3.28, CH
2.24, C1.7-S-H4 2.11, water 0.9971 g/cm³) and amorphous silica 2.2 g/cm³ (CRC Handbook, via
content/data/cement_densities.yaml); the rounded set of that file (C2S 3.30, water 1.00, CH
2.24, C-S-H 2.00, silica 2.2 g/cm³) is common practice.  The paste model is Powers' as
``specgen.science.hydration.powers`` states it, written out here per kg of binder.  Hand-made
binders and mixes are built in memory; one test ties the demo's result to the same sheet.
"""
from __future__ import annotations

from types import SimpleNamespace as NS

import periodictable as pt
import pytest

from specgen.checks.hydration_checks import hydration_check, paste_check
from specgen.checks.result import Basis, CheckResult, Input, Quantity, Step

# IUPAC/CIAAW abridged standard atomic weights (g/mol), conventional values
CA, SI, O, H = 40.078, 28.085, 15.999, 1.008
M = {"C2S": 2 * CA + SI + 4 * O, "H": 2 * H + O, "CH": CA + 2 * (O + H),
     "C1.7SH4": 1.7 * (CA + O) + SI + 2 * O + 4 * (2 * H + O), "S": SI + 2 * O}
FORMULA = {"C2S": "(CaO)2(SiO2)", "H": "H2O", "CH": "Ca(OH)2",
           "C1.7SH4": "(CaO)1.7(SiO2)(H2O)4", "S": "SiO2"}
# Bentz (NIST) and the rounded common-practice set, kg/m³
BENTZ = {"C2S": 3280.0, "H": 997.1, "CH": 2240.0, "C1.7SH4": 2110.0, "S": 2200.0}
ROUNDED = {"C2S": 3300.0, "H": 1000.0, "CH": 2240.0, "C1.7SH4": 2000.0, "S": 2200.0}
BELITE = "C2S + 4.3 H -> C1.7-S-H4 + 0.3 CH"
POZZ = "1.7 CH + S + 2.3 H -> C1.7-S-H4"
ATOMIC = "content/data/atomic_weights.yaml (IUPAC/CIAAW standard atomic weights)"
DENS = "content/data/cement_densities.yaml"
LABEL = {"C2S": "belite C2S", "H": "water", "C1.7SH4": "C-S-H (C1.7-S-H4)", "CH": "portlandite CH",
         "S": "amorphous silica"}
BENTZ_BASIS = Basis("reference", "bentz1997", "phase densities for chemical shrinkage")
ROUNDED_BASIS = Basis("common practice", note="density set 'rounded_practice': Rounded values "
                      "with a C-S-H of about 2.0 g/cm3; gives the trade's rule of thumb 1 C2S + "
                      "1.5 water -> 2.2 C-S-H + 0.2 CH by volume.")


def test_molar_masses_agree_with_periodictable():
    # the sums above against an independent library (1e-4 relative: its older weights)
    for key, formula in FORMULA.items():
        assert M[key] == pytest.approx(pt.formula(formula).mass, rel=1e-4)


def _volumes(dens, reaction):
    """cm³ per mole of reaction: n M / ρ (ρ in g/cm³)."""
    return {s: n * M[s] / (dens[s] / 1000) for s, n in reaction}


BELITE_N = (("C2S", 1.0), ("H", 4.3), ("C1.7SH4", 1.0), ("CH", 0.3))
POZZ_N = (("CH", 1.7), ("S", 1.0), ("H", 2.3), ("C1.7SH4", 1.0))


def _balance(dens):
    v = _volumes(dens, BELITE_N)
    shrink = (v["C2S"] + v["H"] - v["C1.7SH4"] - v["CH"]) / (v["C2S"] + v["H"])
    solid = (v["C1.7SH4"] + v["CH"] - v["C2S"]) / v["C2S"]
    return v, shrink, solid


def _hydr_expected(f, subject, name, dens, other, odens, basis, obasis):
    """The CHEM-HYDR sheet of a binder with potential belite ``f`` (0-1), by hand."""
    v, shrink, solid = _balance(dens)
    _, oshrink, osolid = _balance(odens)
    pv = _volumes(dens, POZZ_N)
    poz = ((pv["CH"] + pv["S"] + pv["H"]) - pv["C1.7SH4"]) / (pv["CH"] + pv["S"] + pv["H"])
    w = f * 4.3 * M["H"] / M["C2S"]            # kg water per kg binder
    ch = f * 0.3 * M["CH"] / M["C2S"]          # kg CH per kg binder
    src = f"{DENS}, set '{name}'"
    steps = [Step(f"Volume of {n:g} mol {LABEL[s]}", r"V = n\,\frac{M}{\rho}",
                  (Input("n", "moles per mole of C2S", n, "mol", BELITE),
                   Input("M", f"molar mass of {FORMULA[s]}", round(M[s], 4), "g/mol", ATOMIC),
                   Input("ρ", f"density of {LABEL[s]}", dens[s], "kg/m³", src)),
                  rf"V = {n:g} \times \frac{{{M[s]:.3f}}}{{{dens[s] / 1000:.4g}}}",
                  round(v[s], 3), "cm³", f"V_{s}") for s, n in BELITE_N]
    steps += [
        Step("Chemical shrinkage", r"\varepsilon_{ch} = \frac{(V_{C2S} + V_H) - (V_{CSH} + "
             r"V_{CH})}{V_{C2S} + V_H}", (),
             rf"\varepsilon_{{ch}} = \frac{{({v['C2S']:.2f} + {v['H']:.2f}) - ({v['C1.7SH4']:.2f}"
             rf" + {v['CH']:.2f})}}{{{v['C2S']:.2f} + {v['H']:.2f}}}", round(100 * shrink, 3),
             "%", "ε_ch"),
        Step("Solid-volume increase", r"\Delta V_s = \frac{V_{CSH} + V_{CH} - V_{C2S}}{V_{C2S}}",
             (), rf"\Delta V_s = \frac{{{v['C1.7SH4']:.2f} + {v['CH']:.2f} - {v['C2S']:.2f}}}"
             rf"{{{v['C2S']:.2f}}}", round(100 * solid, 2), "%", "ΔV_s"),
        Step("Water for full hydration of the belite",
             r"w = f_{C2S} \times \frac{4.3\,M_H}{M_{C2S}}",
             (Input("f_{C2S}", "potential belite of the binder", round(100 * f, 3), "%",
                    "CHEM-PHASES"),
              Input("M_H", "molar mass of water", round(M["H"], 4), "g/mol", ATOMIC),
              Input("M_{C2S}", "molar mass of belite", round(M["C2S"], 4), "g/mol", ATOMIC)),
             rf"w = {f:.4f} \times \frac{{4.3 \times {M['H']:.3f}}}{{{M['C2S']:.3f}}}",
             round(w, 4), "kg/kg", "w"),
        Step("Portlandite formed", r"CH = f_{C2S} \times \frac{0.3\,M_{CH}}{M_{C2S}}",
             (Input("M_{CH}", "molar mass of portlandite", round(M["CH"], 4), "g/mol", ATOMIC),),
             rf"CH = {f:.4f} \times \frac{{0.3 \times {M['CH']:.3f}}}{{{M['C2S']:.3f}}}",
             round(ch, 4), "kg/kg", "CH"),
        Step(f"Sensitivity: chemical shrinkage with the set '{other}'",
             r"\varepsilon_{ch}' \text{ as above, C-S-H density } \rho'_{CSH}",
             (Input("ρ'_{CSH}", "C-S-H density of the other set", odens["C1.7SH4"], "kg/m³",
                    f"{DENS}, set '{other}'"),),
             rf"\varepsilon_{{ch}}' = {100 * oshrink:.2f}\,\%,\ \Delta V_s' = "
             rf"{100 * osolid:.1f}\,\%", round(100 * oshrink, 3), "%", "ε_ch'"),
        Step("For comparison: lime–pozzolan reaction, chemical shrinkage",
             r"\varepsilon_{poz} = \frac{(V_{CH} + V_S + V_H) - V_{CSH}}{V_{CH} + V_S + V_H}",
             tuple(Input(f"V_{{{'CSH' if s == 'C1.7SH4' else s}}}",
                         f"volume of {n:g} mol {LABEL[s]}", round(pv[s], 3), "cm³",
                         f"n·M/ρ, {POZZ}; {src}") for s, n in POZZ_N),
             rf"\varepsilon_{{poz}} = \frac{{({pv['CH']:.2f} + {pv['S']:.2f} + {pv['H']:.2f}) - "
             rf"{pv['C1.7SH4']:.2f}}}{{{pv['CH']:.2f} + {pv['S']:.2f} + {pv['H']:.2f}}}",
             round(100 * poz, 3), "%", "ε_poz")]

    def rel(d):
        vv, s_, so = _balance(d)
        return {"volumes": {k: round(x / vv["C2S"], 4) for k, x in vv.items()},
                "chemical_shrinkage": round(100 * s_, 3), "solid_volume_increase": round(100 * so, 2)}
    return CheckResult(
        code="CHEM-HYDR", title="Hydration volumes of the belite", subject=subject,
        subject_kind="binder", status="info", value=round(100 * shrink, 3), unit="%",
        basis=(basis, obasis), steps=tuple(steps),
        message=(f"{BELITE}, set '{name}': by volume 1 C2S + {v['H'] / v['C2S']:.2f} H → "
                 f"{v['C1.7SH4'] / v['C2S']:.2f} C-S-H + {v['CH'] / v['C2S']:.2f} CH; chemical "
                 f"shrinkage {100 * shrink:.1f} %, solid volume +{100 * solid:.0f} %; with set "
                 f"'{other}' {100 * oshrink:.1f} % and +{100 * osolid:.0f} %; water for full "
                 f"hydration {w:.3f} kg per kg binder"),
        notes=("the C-S-H density decides the shrinkage: the two sets differ by "
               f"{abs(100 * (shrink - oshrink)):.1f} points",
               "aluminates and other phases are not counted: the belite reaction is the "
               "long-term one"),
        quantities=(Quantity("water_for_full_hydration", round(w, 4), "kg/kg",
                             "water for full hydration"),
                    Quantity("ch_from_hydration", round(ch, 4), "kg/kg", "CH formed"),
                    Quantity("chemical_shrinkage", round(100 * shrink, 3), "%",
                             "chemical shrinkage"),
                    Quantity("solid_volume_increase", round(100 * solid, 2), "%",
                             "solid-volume increase"),
                    Quantity("hydration_volumes", {name: rel(dens), other: rel(odens)}, "",
                             "relative volumes by density set")))


class _Ctx:
    """A check context of one binder's potential belite (%) and a chosen density set."""

    def __init__(self, c2s=None, density_set="bentz_nist", wb=0.55, degree=0.7):
        self.c2s = c2s
        binder = NS(id="B1")
        self.mix = NS(id="MX", water_binder_ratio=wb,
                      binders=[NS(binder="B0", parts=1.0), NS(binder="B1", parts=2.5)])
        self.project = NS(dossier=NS(chemistry=NS(density_set=density_set)),
                          binders={"B1": binder})
        self.rules = {"hydration.degree_of_hydration": NS(
            value=degree, key="hydration.degree_of_hydration",
            basis=Basis("common practice", note="two thirds"))}

    def quantity(self, subject, name):
        assert (subject, name) == ("B1", "c2s_potential")
        return None if self.c2s is None else NS(value=self.c2s)


@pytest.mark.parametrize("c2s, chosen, other", [
    (47.25, "bentz_nist", "rounded_practice"),
    (80.5, "rounded_practice", "bentz_nist"),
])
def test_belite_hydration_sheet_whole(c2s, chosen, other):
    sets = {"bentz_nist": (BENTZ, BENTZ_BASIS), "rounded_practice": (ROUNDED, ROUNDED_BASIS)}
    got = hydration_check(NS(id="B1"), _Ctx(c2s, chosen))
    assert got == _hydr_expected(c2s / 100, "B1", chosen, sets[chosen][0], other,
                                 sets[other][0], sets[chosen][1], sets[other][1])


def test_rounded_set_gives_the_trades_rule_of_thumb():
    # common practice: 1 C2S + 1.5 water -> 2.2 C-S-H + 0.2 CH by volume, shrinkage ~4.5 %.
    # By hand with the rounded set: C2S 172.237/3.30 = 52.19 cm³; water 4.3 × 18.015/1.00 =
    # 77.46 (1.48 of C2S); C-S-H 227.474/2.00 = 113.74 (2.18); CH 0.3 × 74.092/2.24 = 9.92
    # (0.19); shrinkage (129.66 − 123.66)/129.66 = 4.6 %
    got = hydration_check(NS(id="B1"), _Ctx(50.0, "rounded_practice"))
    assert got.message.startswith(f"{BELITE}, set 'rounded_practice': by volume 1 C2S + 1.48 H "
                                  "→ 2.18 C-S-H + 0.19 CH; chemical shrinkage 4.6 %")
    rel = got.quantities[-1].value["rounded_practice"]["volumes"]
    assert (rel["H"], rel["C1.7SH4"], rel["CH"]) == pytest.approx((1.5, 2.2, 0.2), abs=0.05)


def test_binder_without_potential_belite_is_not_assessed_whole():
    got = hydration_check(NS(id="B1"), _Ctx(None))
    assert got == CheckResult(
        code="CHEM-HYDR", title="Hydration volumes of the belite", subject="B1",
        subject_kind="binder", status="not_assessed", value=None, unit="", basis=(BENTZ_BASIS,),
        message="not assessed: no potential belite content: CHEM-PHASES could not assess this "
        "binder")


def test_demo_natural_cement_sheet_is_the_hand_sheet(demo_checked):
    # demo NC1: potential belite 61.633 % (21.5 % SiO2 × M(C2S)/M(SiO2), analyses.yaml NC1-A),
    # density set bentz_nist (the dossier's default)
    project, results = demo_checked
    c2s = results.quantities["NC1"]["c2s_potential"].value
    assert c2s == pytest.approx(21.5 * M["C2S"] / M["S"], abs=1e-3)
    assert results.check("CHEM-HYDR", "NC1") == _hydr_expected(
        c2s / 100, "NC1", "bentz_nist", BENTZ, "rounded_practice", ROUNDED, BENTZ_BASIS,
        ROUNDED_BASIS)


PASTE_BASIS = Basis("common practice", note="Powers' volume model, generalised to the belite "
                    "reaction: products take the C-S-H and CH volumes of the chosen density set")


def _paste_expected(f, wb, degree, dens, name, binder="B1", mix="MX", rule_basis=None,
                    rule_source="rule hydration.degree_of_hydration"):
    """The CHEM-PASTE sheet by Powers' model per kg of binder (litres per kg, L/kg)."""
    v, _, _ = _balance(dens)
    v_prod = (v["C1.7SH4"] + v["CH"]) / M["C2S"]          # L per kg of belite (cm³/g)
    rb, rw = dens["C2S"] / 1000, dens["H"] / 1000          # g/cm³ = kg/L
    vp = f * v_prod + (1 - f) / rb
    v0 = 1 / rb + wb / rw
    # hydration stops when the products fill the water's space: α·(vp − 1/ρb) = w/b / ρw
    alpha = min(degree, 1.0, wb / rw / (vp - 1 / rb))
    cap = max(v0 - (1 - alpha) / rb - alpha * vp, 0.0)
    p, x = cap / v0, alpha * vp / (alpha * vp + cap)
    src = f"{DENS}, set '{name}'"
    steps = (
        Step("Product volume per kg of binder",
             r"v_p = f_{C2S}\,v_{CSH+CH} + \frac{1 - f_{C2S}}{\rho_b}",
             (Input("f_{C2S}", "potential belite", round(100 * f, 3), "%",
                    f"CHEM-PHASES, binder {binder}"),
              Input("v_{CSH+CH}", "solid products per kg of belite", round(v_prod, 5), "L/kg",
                    "CHEM-HYDR"),
              Input("ρ_b", "binder particle density (taken as belite's)", dens["C2S"], "kg/m³",
                    src)),
             rf"v_p = {f:.4f} \times {v_prod:.4f} + \frac{{1 - {f:.4f}}}{{{rb:.3f}}}",
             round(vp, 5), "L/kg", "v_p"),
        Step("Capillary porosity", r"p = \frac{V_0 - (1-\alpha)/\rho_b - \alpha\,v_p}{V_0},\ "
             r"V_0 = \frac{1}{\rho_b} + \frac{w/b}{\rho_w}",
             (Input("w/b", "water/binder ratio", wb, "", f"mixes.yaml, mix {mix}"),
              Input("α", "degree of hydration", degree, "", rule_source),
              Input("ρ_w", "density of water", dens["H"], "kg/m³", src)),
             rf"p = \frac{{{v0:.4f} - {1 - alpha:.3f}/{rb:.3f} - {alpha:.3f} \times {vp:.4f}}}"
             rf"{{{v0:.4f}}}", round(100 * p, 3), "%", "p"),
        Step("Gel-space ratio", r"X = \frac{\alpha\,v_p}{\alpha\,v_p + p\,V_0}", (),
             rf"X = \frac{{{alpha:.3f} \times {vp:.4f}}}{{{alpha:.3f} \times {vp:.4f} + "
             rf"{p:.4f} \times {v0:.4f}}}", round(x, 4), "", "X"))
    notes = ["the non-belite part of the binder is counted at its own volume (no growth); the "
             "model gives trends between mixes, not a measured porosity"]
    if alpha < degree:
        notes.append(f"space-limited: hydration stops at α = {alpha:.2f} for this w/b")
    return CheckResult(
        code="CHEM-PASTE", title="Paste porosity (Powers-type volume model)", subject=mix,
        subject_kind="mix", status="info", value=round(100 * p, 3), unit="%",
        basis=(PASTE_BASIS, rule_basis or Basis("common practice", note="two thirds")),
        steps=steps, notes=tuple(notes),
        message=(f"w/b {wb:g}, α = {alpha:.2f}: capillary porosity {100 * p:.1f} % of the paste, "
                 f"gel-space ratio {x:.2f} (binder {binder}, set '{name}')"),
        quantities=(Quantity("capillary_porosity", round(100 * p, 3), "%", "capillary porosity"),
                    Quantity("gel_space_ratio", round(x, 4), "", "gel-space ratio")))


@pytest.mark.parametrize("c2s, wb, degree, name", [
    (47.25, 0.625, 0.65, "bentz_nist"),
    (80.5, 0.45, 0.7, "rounded_practice"),
])
def test_paste_sheet_whole(c2s, wb, degree, name):
    dens = {"bentz_nist": BENTZ, "rounded_practice": ROUNDED}[name]
    got = paste_check(_Ctx(0, name, wb, degree).mix, _Ctx(c2s, name, wb, degree))
    assert got == _paste_expected(c2s / 100, wb, degree, dens, name)


def test_paste_of_too_little_water_is_space_limited_whole():
    # w/b 0.05 with half belite (Bentz set): the products fill the water's space at
    # α = (0.05/0.9971) / (vp − 1/3.28) ≈ 0.26 < 0.7 — no capillary space is left (p = 0) and
    # the gel-space ratio is 1 (Powers)
    got = paste_check(_Ctx(0, wb=0.05).mix, _Ctx(50.0, wb=0.05))
    want = _paste_expected(0.5, 0.05, 0.7, BENTZ, "bentz_nist")
    assert got == want
    assert (got.value, got.steps[2].result) == (0.0, 1.0)
    assert got.notes[1] == "space-limited: hydration stops at α = 0.26 for this w/b"


def test_paste_without_its_inputs_is_not_assessed_whole():
    basis = (PASTE_BASIS, Basis("common practice", note="two thirds"))
    ctx = _Ctx(None)
    got = paste_check(ctx.mix, ctx)
    assert got == CheckResult(
        code="CHEM-PASTE", title="Paste porosity (Powers-type volume model)", subject="MX",
        subject_kind="mix", status="not_assessed", value=None, unit="", basis=basis,
        message="not assessed: its binder has no potential belite content (CHEM-PHASES)")
    ctx = _Ctx(50.0, wb=None)
    assert paste_check(ctx.mix, ctx).message == (
        "not assessed: the mix gives no mixes.yaml MX.water_binder_ratio")
    ctx = _Ctx(50.0)
    ctx.project.binders = {}                 # the mix's main binder is not in the project
    assert paste_check(ctx.mix, ctx).message == (
        "not assessed: its binder has no potential belite content (CHEM-PHASES)")


def test_demo_paste_sheets_are_the_hand_sheets(demo_checked):
    # demo mixes (mixes.yaml): M1 w/b 0.55 and M2 0.65 on NC1, M3 0.75 on NH35; α 0.7 by the
    # rule hydration.degree_of_hydration, its basis as content/rules/hydration.yaml writes it
    # (common practice); density set bentz_nist
    rule = Basis("common practice", note="belite binders are far from fully hydrated after a "
                 "year; about two thirds reacted is a usual long-term assumption — a project "
                 "with a measured degree should override it")
    project, results = demo_checked
    for mix, wb, binder in (("M1", 0.55, "NC1"), ("M2", 0.65, "NC1"), ("M3", 0.75, "NH35")):
        f = results.quantities[binder]["c2s_potential"].value / 100
        want = _paste_expected(f, wb, 0.7, BENTZ, "bentz_nist", binder, mix, rule)
        assert results.check("CHEM-PASTE", mix) == want, mix
