"""SITE-GAUGE (works_gauging_checks) read whole: the demo's results (``demo_checked``), every
value by hand from the demo's mixes.yaml, materials.yaml, dossier.yaml, content/rules/works.yaml
and content/data/site_measures.yaml beside it; the branches the demo never takes on projects
changed in memory (no copy checked)."""
from __future__ import annotations

import math

import pytest

from specgen.checks import works_gauging_checks as wg
from specgen.checks.result import Basis, Input
from tests.helpers import Swapped, checked_context

GAUGE = Basis("common practice", note="gauging sized to the workable life (EN 1015-9 where "
              "measured), the crew's placing rate and a safety factor")
RHO_W = 998.2   # kg/m³ water at 20 °C as content/data gives it (IAPWS-95 998.207)
SAFETY = ("rule works.gauging_safety_factor (common practice — about 1.2-2 in practice: time to "
          "mix, carry and place, and stoppages, so no gauging outlives its workable life)")
MEASURE = ("rule works.measure_volume (common practice — small gaugings are measured in a "
           "one-litre gauging cup, levelled off)")
DAY = ("rule works.working_day (common practice — about 5-7 h of placing in a site day after "
       "setting up, breaks and cleaning down)")
MOST = ("rule works.max_gaugings_per_day (common practice — above this the mixer falls behind "
        "the crew; a retarder trial or a second mixer is needed)")


def _vf(parts_rho, wb, air, rho_p_binder):
    """Fresh volume (m³) of a batch of 1 m³ loose binder per part (absolute volume)."""
    binder = parts_rho[0][0] * parts_rho[0][1]
    solid = binder / rho_p_binder + sum(p * r / 2650 for p, r in parts_rho[1:])
    return (solid + wb * binder / RHO_W) / (1 - air)


def test_site_gauge_of_m1_whole(demo_checked):
    """M1: workable life 30 min measured (mixes.yaml, EN 1015-9); γ = 1.5; Z1 8 L/h and Z2
    25 L/h (dossier.yaml): V_max = 30 × q/60 / 1.5 = 2.667 and 8.333 L, Z1 governs.  Y_b =
    V_f per m³ of loose binder (absolute volume, as MIX-YIELD: NC1 850 kg/m³ loose, particle
    2900; S1 1550, S2 0.5 × 1450, particle 2650; w/b 0.55; air 4.5 %).  N = ⌊2.667 / (1 ×
    Y_b)⌋ = 1 one-litre measure; k = ⌊V_max / V_g⌋; n = ⌈q T / (k V_g)⌉ with T = 6 h."""
    _, results = demo_checked
    c = results.check("SITE-GAUGE", "M1")
    yb = _vf([(1, 850), (1, 1550), (0.5, 1450)], 0.55, 0.045, 2900)
    vmax = {"Z1": 30 * 8 / 60 / 1.5, "Z2": 30 * 25 / 60 / 1.5}
    n = math.floor(vmax["Z1"] / yb)
    vg = n * 1 * yb
    k = {z: max(1, math.floor(v / vg)) for z, v in vmax.items()}
    per_day = {z: math.ceil(q * 6 / (k[z] * vg)) for z, q in (("Z1", 8), ("Z2", 25))}
    assert (n, k, per_day) == (1, {"Z1": 1, "Z2": 4}, {"Z1": 29, "Z2": 23})
    assert (c.title, c.status, c.unit, c.subject_kind, c.basis, c.notes) == (
        "Site gauging size", "info", "L", "mix", (GAUGE,), ())
    assert c.value == round(vg, 3)
    v, g, d = c.steps
    assert (v.title, v.formula, v.unit, v.symbol) == (
        "Largest gauging placed within the workable life", r"V_{\max} = t_w\,q/\gamma", "L", "V_max")
    assert v.inputs == (
        Input("t_w", "workable life", 30.0, "min", "mixes.yaml M1.workable_life, EN 1015-9 "
              "(Northstead Materials Laboratory, NML-4460)"),
        Input("γ", "safety factor", 1.5, "", SAFETY),
        Input("q_Z1", "placing rate, zone Z1", 8.0, "L/h", "dossier.yaml Z1.placing_rate"),
        Input("q_Z2", "placing rate, zone Z2", 25.0, "L/h", "dossier.yaml Z2.placing_rate"))
    assert v.substituted == (r"V_{\max,Z1} = \frac{30 \times 8/60}{1.5} = 2.667\ \mathrm{L},\ "
                             r"V_{\max,Z2} = \frac{30 \times 25/60}{1.5} = 8.333\ \mathrm{L}")
    assert v.result == round(vmax["Z1"], 4)
    assert (g.title, g.unit, g.symbol) == ("Binder measures per gauging and its volume", "L", "V_g")
    assert g.formula == (r"N = \lfloor V_{\max} / (V_m Y_b) \rfloor\ (V_m\ \text{the largest "
                         r"real measure with}\ N \geq 1),\quad V_g = N V_m Y_b,\quad m_i = c_i V_g")
    assert g.inputs == (
        Input("V_max", "largest gauging (zone Z1, governing)", round(vmax["Z1"], 4), "L",
              "step above"),
        Input("V_m", "measure volume", 1.0, "L", MEASURE),
        Input("Y_b", "fresh mortar per volume of loose binder", round(yb, 4), "",
              "MIX-YIELD/M1: V_f / Σ binder parts"))
    assert g.substituted == (rf"N = \left\lfloor \frac{{2.667}}{{1 \times {yb:.3f}}}\right\rfloor"
                             rf" = 1;\ V_g = 1 \times 1 \times {yb:.3f} = {vg:.3f}\ \mathrm{{L}}")
    assert g.result == round(vg, 4)
    assert (d.title, d.result, d.unit, d.symbol) == ("Gaugings per working day", 29, "", "n")
    assert d.formula == (r"k = \max(1, \lfloor V_{\max} / V_g \rfloor),\quad "
                         r"n = \lceil q\,T / (k\,V_g) \rceil \leq n_{\max}")
    assert d.inputs == (Input("T", "placing hours per day", 6.0, "h", DAY),
                        Input("V_g", "gauging volume", round(vg, 4), "L", "step above"),
                        Input("n_max", "most gaugings a day", 40.0, "", MOST))
    assert d.substituted == (rf"k_{{\mathrm{{Z1}}}} = 1,\ n_{{\mathrm{{Z1}}}} = \lceil 8 \times 6 / "
                             rf"(1 \times {vg:.3f}) \rceil = 29,\ k_{{\mathrm{{Z2}}}} = 4,\ "
                             rf"n_{{\mathrm{{Z2}}}} = \lceil 25 \times 6 / (4 \times {vg:.3f}) "
                             rf"\rceil = 23")
    water = 0.55 * 0.85                   # kg in the gauging: w/b × 1 L of NC1 at 850 kg/m³
    assert c.message == (f"30 min workable life (measured): at most 2.67 L per gauging (zone Z1);"
                         f" gauge 1 × 1 L measure of binder = {vg:.3g} L of mortar with "
                         f"{water / RHO_W * 1000:.2f} L of water")
    q = {x.name: x for x in c.quantities}
    assert [(x.name, x.unit, x.label) for x in c.quantities] == [
        ("max_gauging_volume", "L", "largest gauging placed in time"),
        ("workable_life", "min", "workable life used"),
        ("gauging", "", "gauging on the batching card"),
        ("gaugings_per_day", "", "gaugings per working day"),
        ("gauging_by_zone", "", "card gaugings mixed at once and gaugings per day, by zone")]
    assert q["max_gauging_volume"].value == {z: round(x, 3) for z, x in vmax.items()}
    assert q["workable_life"].value == {"value": 30.0, "measured": True}
    assert q["gauging"].value == {
        "binder_measures": 1, "measure_L": 1.0, "halved_from_L": None,
        "volume_L": round(vg, 3), "governing_zone": "Z1",
        "measures": {"NC1": 1.0, "S1": 1.0, "S2": 0.5},
        "loose_L": {"NC1": 1.0, "S1": 1.0, "S2": 0.5},
        # 1 L loose × bulk density: 0.85, 1.55, 0.725 kg; water 0.4675 kg; citric acid
        # 0.2 % of 0.85 kg = 1.7 g
        "mass_kg": pytest.approx({"NC1": 0.85, "S1": 1.55, "S2": 0.725, "water": 0.4675,
                                  "citric acid solution": 0.0017}, abs=1e-9),
        "water_L": round(water / RHO_W * 1000, 3),
        "admixture_g": {"citric acid solution": 1.7}}
    assert q["gaugings_per_day"].value == per_day
    assert q["gauging_by_zone"].value == {z: {"times": k[z], "volume_L": round(k[z] * vg, 3),
                                              "per_day": per_day[z]} for z in k}


def test_site_gauge_of_m2_quarter_scoop_and_too_many_gaugings(demo_checked):
    """M2 (natural cement, no workable life measured): works.workable_life_natural_cement
    10 min; V_max Z1 = 10 × 8/60 / 1.5 = 0.889 L, below one litre of binder × Y_b, so the
    0.25 L scoop (content/data/site_measures.yaml) is used; per day Z1 ⌈48 / V_g⌉ > 40."""
    _, results = demo_checked
    c = results.check("SITE-GAUGE", "M2")
    # the air content M2's yield used (the rule works.default_air_content: none measured)
    air = next(i for i in results.check("MIX-YIELD", "M2").steps[1].inputs if i.symbol == "a")
    yb = _vf([(1, 850), (2, 1550), (0.5, 1450)], 0.65, air.value / 100, 2900)
    vg = 0.25e-3 * yb * 1000
    assert c.status == "attention"
    assert c.value == round(vg, 3)
    g = c.steps[1]
    assert g.inputs[-1] == Input("V_m,min", "smallest measure", 0.25, "L", "rule works."
                                 "smallest_measure (common practice — " + g.inputs[-1].source.split(
                                     "(common practice — ", 1)[1])
    assert g.substituted.startswith(r"V_m\ \text{reduced to the}\ 0.25\ \mathrm{L}\ \text{scoop};\ ")
    rates = {"Z1": 8, "Z2": 25, "Z3": 12}
    vmax = {z: 10 * q / 60 / 1.5 for z, q in rates.items()}
    k = {z: max(1, math.floor(v / vg + 1e-9)) for z, v in vmax.items()}
    per_day = {z: math.ceil(q * 6 / (k[z] * vg)) for z, q in rates.items()}
    assert c.quantities[3].value == per_day
    busy = ", ".join(f"zone {z} needs {n} gaugings a day" for z, n in per_day.items() if n > 40)
    assert c.message == (
        f"10 min workable life (default): at most {vmax['Z1']:.3g} L per gauging (zone Z1); "
        f"gauge 1 × 0.25 L measure of binder = {vg:.3g} L of mortar with "
        f"{0.65 * 0.2125 / RHO_W * 1000:.2f} L of water — one 1 L measure of binder would make "
        f"more than can be placed in time, so a 0.25 L scoop is used; {busy}, more than the 40 a "
        "mixer can keep up with: extend the workable life with a retarder trial (EN 1015-9), or "
        "add a mixer")
    assert c.quantities[2].value["halved_from_L"] == 1.0
    assert c.quantities[2].value["loose_L"] == {"NC1": 0.25, "S1": 0.5, "S2": 0.125}
    src = "rule works.workable_life_natural_cement"
    assert c.notes == (f"assumption: workable life not measured, 10 min used ({src} (common "
                       f"practice — {c.notes[0].split('(common practice — ', 1)[1]}",)
    assert c.notes[0].endswith("— a quick-setting binder: measure before site work")


def test_site_gauge_of_m3_default_life_flagged_not_urgent(demo_checked):
    """M3 (NHL 3.5): works.workable_life_nhl 120 min (≥ 30 min: no 'quick-setting' words);
    V_max Z1 = 120 × 8/60 / 1.5 = 10.667 L; N = ⌊10.667 / Y_b⌋ one-litre measures."""
    _, results = demo_checked
    c = results.check("SITE-GAUGE", "M3")
    assert c.status == "attention"
    assert len(c.notes) == 1
    assert c.notes[0].startswith("assumption: workable life not measured, 120 min used (rule "
                                 "works.workable_life_nhl")
    assert c.notes[0].endswith("; measure it on the trial mix (EN 1015-9) and record it with "
                               "the mix")
    assert c.quantities[0].value == {"Z1": round(120 * 8 / 60 / 1.5, 3),
                                     "Z3": round(120 * 12 / 60 / 1.5, 3)}
    assert c.quantities[1].value == {"value": 120.0, "measured": False}


def test_site_gauge_smallest_measure_too_big_no_yield_and_no_zone(demo_checked):
    """M2 in Z1 at 2 L/h: V_max = 10 × 2/60 / 1.5 = 0.222 L, less than the 0.25 L scoop's
    gauging (0.25 × Y_b ≈ 0.6 L): attention, nothing gauged, said why.  A mix gauged to a
    consistence has no yield: not assessed.  A mix no zone uses: no result."""
    project, _ = demo_checked
    zones = [z.model_copy(update={"placing_rate": 2e-3 / 3600}) if z.id == "Z1" else z
             for z in project.dossier.zones if z.id == "Z1"]
    sw = Swapped(project, dossier=project.dossier.model_copy(update={"zones": zones}))
    m2 = next(m for m in (project.mixes.values() if isinstance(project.mixes, dict)
                          else project.mixes) if m.id == "M2")
    c = wg.gauging_check(m2, checked_context(demo_checked, sw))
    assert (c.code, c.status, c.value, c.unit) == ("SITE-GAUGE", "attention",
                                                   round(10 * 2 / 60 / 1.5, 3), "L")
    assert c.message == ("even the smallest measure (0.25 L) of binder makes more than the 0.22 L "
                         "that can be placed in time in zone Z1: measure the workable life with "
                         "a retarder (EN 1015-9) or raise the crew's placing rate")
    assert [s.title for s in c.steps] == ["Largest gauging placed within the workable life"]
    assert [q.name for q in c.quantities] == ["max_gauging_volume", "workable_life"]
    bare = m2.model_copy(update={"water_binder_ratio": None})
    na = wg.gauging_check(bare, checked_context(demo_checked))
    assert (na.status, na.value, na.message, na.title) == (
        "not_assessed", None, "not assessed: the mix has no yield (see MIX-YIELD)",
        "Site gauging size")
    none = Swapped(project, dossier=project.dossier.model_copy(update={"zones": []}))
    assert wg.gauging_check(m2, checked_context(demo_checked, none)) == []


def test_site_gauge_rate_and_admixture_shown_to_their_decimals(demo_checked):
    """SITE-GAUGE of M1 with Z1 at 8.123456 L/h (shown to 4 decimals: 8.1235 L/h) and its
    retarder at 0.1234 % of the binder: 0.85 kg × 0.001234 = 1.0489 g, kept to 2 decimals
    (1.05 g) on the card."""
    project, _ = demo_checked
    zones = [z.model_copy(update={"placing_rate": 8.123456e-3 / 3600}) if z.id == "Z1" else z
             for z in project.dossier.zones]
    sw = Swapped(project, dossier=project.dossier.model_copy(update={"zones": zones}))
    m1 = next(m for m in (project.mixes.values() if isinstance(project.mixes, dict)
                          else project.mixes) if m.id == "M1")
    adm = [m1.admixtures[0].model_copy(update={"dose": 0.001234})]
    c = wg.gauging_check(m1.model_copy(update={"admixtures": adm}), checked_context(demo_checked, sw))
    assert c.code == "SITE-GAUGE"
    assert c.steps[0].inputs[2] == Input("q_Z1", "placing rate, zone Z1", 8.1235, "L/h",
                                         "dossier.yaml Z1.placing_rate")
    assert c.quantities[2].value["admixture_g"] == {"citric acid solution": 1.05}
