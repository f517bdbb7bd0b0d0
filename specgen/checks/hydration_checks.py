"""Hydration volumes of a binder's belite and the paste porosity of a mix (Powers-type model).

Belite hydration ``C2S + 4.3 H → C1.7-S-H4 + 0.3 CH``: molar masses from atomic
weights, molar volumes from the density set the project selects
(``chemistry.density_set``; sets in ``content/data/cement_densities.yaml``).  The
results hang on the C-S-H density, so every sheet shows the other set beside the
chosen one.  The belite content is the potential C2S of CHEM-PHASES.
"""
from __future__ import annotations

from specgen.checks.chemistry_common import ATOMIC, BENTZ, atomic_weights, guarded, not_assessed, table
from specgen.checks.registry import declare, register
from specgen.checks.result import Basis, CheckResult, Input, Quantity, Step
from specgen.science import hydration
from specgen.science.calcination import molar_mass

declare("water_for_full_hydration", "kg/kg", "water bound when the binder's belite hydrates "
        "fully, per kg of binder")
declare("ch_from_hydration", "kg/kg", "portlandite (CH) formed when the belite hydrates fully, per "
        "kg of binder")
declare("chemical_shrinkage", "%", "chemical shrinkage of belite hydration, % of the volume of "
        "belite + water (chosen density set)")
declare("solid_volume_increase", "%", "solid-volume increase of belite hydration, % of the belite "
        "volume (chosen density set)")
declare("hydration_volumes", "", "per density set: volumes of the belite reaction relative to the "
        "belite volume by species, chemical shrinkage (%) and solid-volume increase (%)")
declare("capillary_porosity", "%", "capillary porosity of the paste at the assumed degree of "
        "hydration (Powers-type model)")
declare("gel_space_ratio", "", "gel-space ratio of the paste at the assumed degree of hydration")

TITLE = "Hydration volumes of the belite"
PASTE_TITLE = "Paste porosity (Powers-type volume model)"
DENSITY_SRC = "content/data/cement_densities.yaml"
LABELS = {"C2S": "belite C2S", "H": "water", "C1.7SH4": "C-S-H (C1.7-S-H4)", "CH": "portlandite CH",
          "S": "amorphous silica"}


def density_sets() -> dict:
    """name → {values (kg/m³), source, tag}."""
    return table("cement_densities").data


def chosen(project) -> tuple[str, str]:
    """(chosen set, the other set) of the project."""
    name = project.dossier.chemistry.density_set
    others = [k for k in density_sets() if k != name]
    return name, others[0]


def _basis(name: str) -> Basis:
    info = density_sets()[name]
    if info.get("tag") == "common practice":
        return Basis("common practice", note=f"density set '{name}': {info.get('notes', '')}".strip())
    return BENTZ


def _volume_steps(bal, name: str, aw) -> list[Step]:
    """Molar volume of each species, V = n M / ρ, with the set's density."""
    steps = []
    coeff = {s: n for s, n in hydration.BELITE_HYDRATION.reactants + hydration.BELITE_HYDRATION.products}
    for species, n in coeff.items():
        m = molar_mass(hydration.SPECIES[species], aw)
        rho = bal.densities[species]
        v = n * m / rho * 1000.0  # g/mol ÷ kg/m³ → cm³/mol (×1000 / 1000 → cm³ per g·m³/kg)
        steps.append(Step(
            f"Volume of {n:g} mol {LABELS[species]}", r"V = n\,\frac{M}{\rho}",
            (Input("n", "moles per mole of C2S", n, "mol", hydration.BELITE_HYDRATION.text),
             Input("M", f"molar mass of {hydration.SPECIES[species]}", round(m, 4), "g/mol", ATOMIC),
             Input("ρ", f"density of {LABELS[species]}", rho, "kg/m³", f"{DENSITY_SRC}, set "
                   f"'{name}'")),
            rf"V = {n:g} \times \frac{{{m:.3f}}}{{{rho / 1000:.4g}}}", round(v, 3), "cm³", f"V_{species}"))
    return steps


@register("CHEM-HYDR", TITLE, "binder", order=160)
@guarded("CHEM-HYDR", TITLE, "binder", (BENTZ,))
def hydration_check(binder, ctx) -> CheckResult:
    """Water demand, CH produced, chemical shrinkage and solid-volume increase, both density sets."""
    # long: the steps of one calculation sheet, in the order the sheet shows them
    name, other = chosen(ctx.project)
    sets = density_sets()
    q = ctx.quantity(binder.id, "c2s_potential")
    if q is None:
        return not_assessed("CHEM-HYDR", TITLE, binder.id, "binder", (_basis(name),),
                            "no potential belite content: CHEM-PHASES could not assess this binder")
    aw = atomic_weights()
    f_c2s = float(q.value) / 100.0
    bal = hydration.reaction_balance(hydration.BELITE_HYDRATION, aw, sets[name]["values"])
    alt = hydration.reaction_balance(hydration.BELITE_HYDRATION, aw, sets[other]["values"])
    poz = hydration.reaction_balance(hydration.POZZOLANIC, aw, sets[name]["values"])
    v = {s: abs(x) * 1e6 for s, x in bal.volumes.items()}  # cm³ per mol of reaction
    pv = {s: abs(x) * 1e6 for s, x in poz.volumes.items()}
    w = hydration.water_for_full_hydration({"C2S": f_c2s}, {"C2S": bal})
    m_h, m_c2s, m_ch = (molar_mass(hydration.SPECIES[s], aw) for s in ("H", "C2S", "CH"))
    steps = _volume_steps(bal, name, aw) + [
        Step("Chemical shrinkage", r"\varepsilon_{ch} = \frac{(V_{C2S} + V_H) - (V_{CSH} + V_{CH})}"
             r"{V_{C2S} + V_H}", (), rf"\varepsilon_{{ch}} = \frac{{({v['C2S']:.2f} + {v['H']:.2f}) - "
             rf"({v['C1.7SH4']:.2f} + {v['CH']:.2f})}}{{{v['C2S']:.2f} + {v['H']:.2f}}}",
             round(100 * bal.chemical_shrinkage, 3), "%", "ε_ch"),
        Step("Solid-volume increase", r"\Delta V_s = \frac{V_{CSH} + V_{CH} - V_{C2S}}{V_{C2S}}", (),
             rf"\Delta V_s = \frac{{{v['C1.7SH4']:.2f} + {v['CH']:.2f} - {v['C2S']:.2f}}}"
             rf"{{{v['C2S']:.2f}}}", round(100 * bal.solid_volume_increase, 2), "%", "ΔV_s"),
        Step("Water for full hydration of the belite", r"w = f_{C2S} \times \frac{4.3\,M_H}{M_{C2S}}",
             (Input("f_{C2S}", "potential belite of the binder", round(100 * f_c2s, 3), "%",
                    "CHEM-PHASES"),
              Input("M_H", "molar mass of water", round(m_h, 4), "g/mol", ATOMIC),
              Input("M_{C2S}", "molar mass of belite", round(m_c2s, 4), "g/mol", ATOMIC)),
             rf"w = {f_c2s:.4f} \times \frac{{4.3 \times {m_h:.3f}}}{{{m_c2s:.3f}}}", round(w, 4),
             "kg/kg", "w"),
        Step("Portlandite formed", r"CH = f_{C2S} \times \frac{0.3\,M_{CH}}{M_{C2S}}",
             (Input("M_{CH}", "molar mass of portlandite", round(m_ch, 4), "g/mol", ATOMIC),),
             rf"CH = {f_c2s:.4f} \times \frac{{0.3 \times {m_ch:.3f}}}{{{m_c2s:.3f}}}",
             round(f_c2s * bal.ch_per_kg, 4), "kg/kg", "CH"),
        Step(f"Sensitivity: chemical shrinkage with the set '{other}'",
             r"\varepsilon_{ch}' \text{ as above, C-S-H density } \rho'_{CSH}",
             (Input("ρ'_{CSH}", "C-S-H density of the other set", sets[other]["values"]["C1.7SH4"],
                    "kg/m³", f"{DENSITY_SRC}, set '{other}'"),),
             rf"\varepsilon_{{ch}}' = {100 * alt.chemical_shrinkage:.2f}\,\%,\ \Delta V_s' = "
             rf"{100 * alt.solid_volume_increase:.1f}\,\%", round(100 * alt.chemical_shrinkage, 3),
             "%", "ε_ch'"),
        Step("For comparison: lime–pozzolan reaction, chemical shrinkage",
             r"\varepsilon_{poz} = \frac{(V_{CH} + V_S + V_H) - V_{CSH}}{V_{CH} + V_S + V_H}",
             tuple(Input(f"V_{{{'CSH' if sp == 'C1.7SH4' else sp}}}",
                         f"volume of {n:g} mol {LABELS.get(sp, sp)}", round(pv[sp], 3), "cm³",
                         f"n·M/ρ, {hydration.POZZOLANIC.text}; {DENSITY_SRC}, set '{name}'")
                   for sp, n in hydration.POZZOLANIC.reactants + hydration.POZZOLANIC.products),
             rf"\varepsilon_{{poz}} = \frac{{({pv['CH']:.2f} + {pv['S']:.2f} + {pv['H']:.2f}) - "
             rf"{pv['C1.7SH4']:.2f}}}{{{pv['CH']:.2f} + {pv['S']:.2f} + {pv['H']:.2f}}}",
             round(100 * poz.chemical_shrinkage, 3), "%", "ε_poz")]
    rel = {s: {"volumes": {k: round(x, 4) for k, x in b.relative.items()},
               "chemical_shrinkage": round(100 * b.chemical_shrinkage, 3),
               "solid_volume_increase": round(100 * b.solid_volume_increase, 2)}
           for s, b in ((name, bal), (other, alt))}
    return CheckResult(
        code="CHEM-HYDR", title=TITLE, subject=binder.id, subject_kind="binder", status="info",
        value=round(100 * bal.chemical_shrinkage, 3), unit="%", basis=(_basis(name), _basis(other)),
        steps=tuple(steps),
        message=(f"{hydration.BELITE_HYDRATION.text}, set '{name}': by volume 1 C2S + "
                 f"{bal.relative['H']:.2f} H → {bal.relative['C1.7SH4']:.2f} C-S-H + "
                 f"{bal.relative['CH']:.2f} CH; chemical shrinkage {100 * bal.chemical_shrinkage:.1f} %,"
                 f" solid volume +{100 * bal.solid_volume_increase:.0f} %; with set '{other}' "
                 f"{100 * alt.chemical_shrinkage:.1f} % and +{100 * alt.solid_volume_increase:.0f} %; "
                 f"water for full hydration {w:.3f} kg per kg binder"),
        notes=("the C-S-H density decides the shrinkage: the two sets differ by "
               f"{abs(100 * (bal.chemical_shrinkage - alt.chemical_shrinkage)):.1f} points",
               "aluminates and other phases are not counted: the belite reaction is the long-term one"),
        quantities=(Quantity("water_for_full_hydration", round(w, 4), "kg/kg", "water for full hydration"),
                    Quantity("ch_from_hydration", round(f_c2s * bal.ch_per_kg, 4), "kg/kg", "CH formed"),
                    Quantity("chemical_shrinkage", round(100 * bal.chemical_shrinkage, 3), "%",
                             "chemical shrinkage"),
                    Quantity("solid_volume_increase", round(100 * bal.solid_volume_increase, 2), "%",
                             "solid-volume increase"),
                    Quantity("hydration_volumes", rel, "", "relative volumes by density set")))


def main_binder(mix, project):
    """The binder with the most parts by volume in a mix."""
    part = max(mix.binders, key=lambda b: b.parts)
    return project.binders.get(part.binder)


@register("CHEM-PASTE", PASTE_TITLE, "mix", order=165)
@guarded("CHEM-PASTE", PASTE_TITLE, "mix", (Basis("common practice"),))
def paste_check(mix, ctx) -> CheckResult:
    """Capillary porosity and gel-space ratio of the paste at the assumed degree of hydration."""
    rule = ctx.rules["hydration.degree_of_hydration"]
    basis = (Basis("common practice", note="Powers' volume model, generalised to the belite "
                   "reaction: products take the C-S-H and CH volumes of the chosen density set"),
             rule.basis)
    binder = main_binder(mix, ctx.project)
    if mix.water_binder_ratio is None:
        return not_assessed("CHEM-PASTE", PASTE_TITLE, mix.id, "mix", basis,
                            f"the mix gives no mixes.yaml {mix.id}.water_binder_ratio")
    q = ctx.quantity(binder.id, "c2s_potential") if binder else None
    if q is None:
        return not_assessed("CHEM-PASTE", PASTE_TITLE, mix.id, "mix", basis,
                            "its binder has no potential belite content (CHEM-PHASES)")
    name, _ = chosen(ctx.project)
    dens = density_sets()[name]["values"]
    aw = atomic_weights()
    bal = hydration.reaction_balance(hydration.BELITE_HYDRATION, aw, dens)
    f = float(q.value) / 100.0
    rho_b, rho_w = dens["C2S"], dens["H"]
    vp = f * bal.product_volume_per_kg + (1.0 - f) / rho_b
    st = hydration.powers(mix.water_binder_ratio, rule.value, rho_b, vp, rho_w)
    alpha = min(rule.value, st.max_degree)
    v0 = 1 / rho_b + mix.water_binder_ratio / rho_w
    src = f"{DENSITY_SRC}, set '{name}'"
    steps = (
        Step("Product volume per kg of binder", r"v_p = f_{C2S}\,v_{CSH+CH} + \frac{1 - f_{C2S}}{\rho_b}",
             (Input("f_{C2S}", "potential belite", round(100 * f, 3), "%", f"CHEM-PHASES, binder {binder.id}"),
              Input("v_{CSH+CH}", "solid products per kg of belite", round(bal.product_volume_per_kg * 1e3, 5),
                    "L/kg", "CHEM-HYDR"),
              Input("ρ_b", "binder particle density (taken as belite's)", rho_b, "kg/m³", src)),
             rf"v_p = {f:.4f} \times {bal.product_volume_per_kg * 1e3:.4f} + \frac{{1 - {f:.4f}}}"
             rf"{{{rho_b / 1000:.3f}}}", round(vp * 1e3, 5), "L/kg", "v_p"),
        Step("Capillary porosity", r"p = \frac{V_0 - (1-\alpha)/\rho_b - \alpha\,v_p}{V_0},\ "
             r"V_0 = \frac{1}{\rho_b} + \frac{w/b}{\rho_w}",
             (Input("w/b", "water/binder ratio", mix.water_binder_ratio, "", f"mixes.yaml, mix {mix.id}"),
              Input("α", "degree of hydration", rule.value, "", f"rule {rule.key}"),
              Input("ρ_w", "density of water", rho_w, "kg/m³", src)),
             rf"p = \frac{{{v0 * 1e3:.4f} - {1 - alpha:.3f}/{rho_b / 1000:.3f} - {alpha:.3f} \times "
             rf"{vp * 1e3:.4f}}}{{{v0 * 1e3:.4f}}}", round(100 * st.capillary_porosity, 3), "%", "p"),
        Step("Gel-space ratio", r"X = \frac{\alpha\,v_p}{\alpha\,v_p + p\,V_0}", (),
             rf"X = \frac{{{alpha:.3f} \times {vp * 1e3:.4f}}}{{{alpha:.3f} \times {vp * 1e3:.4f} + "
             rf"{st.capillary_porosity:.4f} \times {v0 * 1e3:.4f}}}", round(st.gel_space_ratio, 4), "", "X"))
    notes = ["the non-belite part of the binder is counted at its own volume (no growth); the "
             "model gives trends between mixes, not a measured porosity"]
    if st.space_limited:
        notes.append(f"space-limited: hydration stops at α = {st.max_degree:.2f} for this w/b")
    return CheckResult(
        code="CHEM-PASTE", title=PASTE_TITLE, subject=mix.id, subject_kind="mix", status="info",
        value=round(100 * st.capillary_porosity, 3), unit="%", basis=basis, steps=steps,
        message=(f"w/b {mix.water_binder_ratio:g}, α = {alpha:.2f}: capillary porosity "
                 f"{100 * st.capillary_porosity:.1f} % of the paste, gel-space ratio "
                 f"{st.gel_space_ratio:.2f} (binder {binder.id}, set '{name}')"),
        notes=tuple(notes),
        quantities=(Quantity("capillary_porosity", round(100 * st.capillary_porosity, 3), "%",
                             "capillary porosity"),
                    Quantity("gel_space_ratio", round(st.gel_space_ratio, 4), "", "gel-space ratio")))
