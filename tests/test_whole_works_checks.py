"""MIX-YIELD, WORKS-QTY and SITE-WEATHER (works_checks, with works_common's inputs) read
whole: the demo's results (``demo_checked``), every value worked by hand from the demo's
mixes.yaml, materials.yaml, dossier.yaml, lab/site-temperature.csv and content/rules/works.yaml
beside it; the branches the demo never takes on projects and mixes changed in memory."""
from __future__ import annotations

import csv
import dataclasses
import datetime as dt

import pytest

from specgen.checks import works_checks as wks
from specgen.checks.result import Basis, Input
from specgen.checks.rules import RuleBook
from tests.conftest import DEMO
from tests.helpers import Swapped, checked_context

PRACTICE = Basis("common practice", note="absolute-volume method; defaults in "
                 "content/data/mix_densities.yaml and content/rules/works.yaml")
WORKS = Basis("common practice", note="quantities from the zone's dimensions; wastage "
              "applied once (content/rules/works.yaml)")
WEATHER = Basis("common practice", note="working-temperature window and curing durations of "
                "content/rules/works.yaml")
QUARTZ = ("default: common practice: a sand taken as quartz (2.65 g/cm³; common sand minerals "
          "2.55-2.71 g/cm³); a measured particle density (EN 1097-6, ASTM C128) in "
          "materials.yaml replaces it")
RHO_W = 998.2   # kg/m³, water at 20 °C (IAPWS-95: 998.207 kg/m³), as content/data gives it


def test_mix_yield_of_m1_whole_by_the_absolute_volume_method(demo_checked):
    """M1 (mixes.yaml): NC1 1 part, S1 1, S2 0.5 by loose volume; bulk densities 850, 1550,
    1450 kg/m³ (materials.yaml); w/b 0.55; air 4.5 % measured; particle densities 2900
    (NC1, common practice default) and 2650 kg/m³ (quartz).  By hand: masses 850, 1550, 725
    kg; water 0.55 × 850 = 467.5 kg; V_f = (850/2900 + 1550/2650 + 725/2650 + 467.5/998.2) /
    (1 − 0.045) m³; c_b = 850 / V_f."""
    _, results = demo_checked
    c = results.check("MIX-YIELD", "M1")
    solid = 850 / 2900 + 1550 / 2650 + 725 / 2650 + 467.5 / RHO_W
    vf = solid / 0.955
    cb = 850 / vf
    assert (c.title, c.status, c.subject_kind, c.unit, c.basis) == (
        "Mix proportions and yield", "info", "mix", "kg/m³", (PRACTICE,))
    assert c.value == round(cb, 1) == 501.1
    mass, yld = c.steps
    names = {"NC1": "Blackscar natural cement (trial firing 2)",
             "S1": "Washed estuary sand 0/4", "S2": "Crushed gritstone fines 0/2"}
    assert (mass.title, mass.formula, mass.result, mass.unit, mass.symbol) == (
        "Masses of one batch (1 part = 1 m³ loose) and proportions by mass",
        r"m_i = V_i\,\rho_{b,i},\qquad m_i / \textstyle\sum_{\mathrm{binders}} m", 850.0, "kg",
        "Σm_b")
    assert mass.inputs == tuple(x for k, parts, rho in (("NC1", 1.0, 850.0), ("S1", 1.0, 1550.0),
                                                         ("S2", 0.5, 1450.0)) for x in (
        Input(f"V_{k}", f"{names[k]}: parts by loose volume", parts, "", "mixes.yaml"),
        Input(f"ρb_{k}", f"{names[k]}: loose bulk density", rho, "kg/m³",
              f"materials.yaml {k}.bulk_density")))
    assert mass.substituted == (r"m_{\mathrm{NC1}} = 1 \times 850 = 850.0,\ m_{\mathrm{S1}} = 1 "
                                r"\times 1550 = 1550.0,\ m_{\mathrm{S2}} = 0.5 \times 1450 = "
                                r"725.0;\ \sum m_b = 850.0\ \mathrm{kg}")
    assert (yld.title, yld.unit, yld.symbol) == (
        "Absolute-volume yield: fresh volume of the batch and kg per m³", "m³", "V_f")
    assert yld.formula == (r"V_f = \frac{\sum_i m_i/\rho_{p,i} + m_w/\rho_w}{1 - a},\quad "
                           r"m_w = (w/b)\sum m_b,\quad c_i = m_i / V_f")
    assert yld.result == pytest.approx(round(vf, 5), abs=1e-12)
    assert yld.inputs == (
        Input("ρp_NC1", f"{names['NC1']}: particle density", 2900.0, "kg/m³",
              "default: common practice"),
        Input("ρp_S1", f"{names['S1']}: particle density", 2650.0, "kg/m³", QUARTZ),
        Input("ρp_S2", f"{names['S2']}: particle density", 2650.0, "kg/m³", QUARTZ),
        Input("w/b", "water/binder ratio by mass", 0.55, "", "mixes.yaml M1.water_binder_ratio"),
        Input("ρ_w", "density of water", RHO_W, "kg/m³", "density of liquid water at 20 °C and "
              "0.101325 MPa by the IAPWS-95 formulation (998.207 kg/m³)"),
        Input("a", "air content", 4.5, "%", "mixes.yaml M1.air_content (measured)"),
        Input("dose_1", "citric acid solution (% of binder mass)", 0.2, "%",
              "mixes.yaml M1.admixtures[0]; volume neglected"))
    assert yld.substituted == (
        rf"V_f = \frac{{\frac{{850.0}}{{2900}} + \frac{{1550.0}}{{2650}} + \frac{{725.0}}{{2650}}"
        rf" + \frac{{467.5}}{{998.2}}}}{{1 - 0.045}} = \frac{{{solid:.4f}}}{{0.955}} = "
        rf"{vf:.4f}\ \mathrm{{m^3}};\ c_b = {cb:.1f}\ \mathrm{{kg/m^3}}")
    rho_fresh = (850 + 1550 + 725 + 467.5 + 0.002 * 850) / vf
    assert c.message == (f"binder : sand 1 : 1.5 (S1 1 + S2 0.5) by loose volume, 1 : "
                         f"{(1550 + 725) / 850:.3g} by mass; {cb:.0f} kg of binder and "
                         f"{467.5 / vf:.0f} kg of water per m³ of fresh mortar (air 4.5 %, "
                         f"fresh density {rho_fresh:.0f} kg/m³)")
    props, per, dens = c.quantities
    assert (props.name, props.unit, props.label) == (
        "mass_proportions", "", "proportions by mass (binder = 1)")
    assert props.value == {"NC1": 1.0, "S1": round(1550 / 850, 4), "S2": round(725 / 850, 4)}
    assert (per.name, per.unit, per.label) == ("yield_per_m3", "kg/m³", "kg per m³ of fresh mortar")
    assert per.value == {"NC1": round(cb, 2), "S1": round(1550 / vf, 2), "S2": round(725 / vf, 2),
                         "water": round(467.5 / vf, 2),
                         "citric acid solution": round(0.002 * 850 / vf, 2)}
    assert (dens.name, dens.value, dens.unit, dens.label) == (
        "fresh_density", round(rho_fresh, 1), "kg/m³", "fresh mortar density")


def test_mix_yield_of_m3_default_air_and_one_sand(demo_checked):
    """M3: NH35 1 : S1 2.5, w/b 0.75, no air measured: the rule works.default_air_content
    (content/rules/works.yaml); one sand, so no '(S1 … + …)' detail in the ratio."""
    _, results = demo_checked
    c = results.check("MIX-YIELD", "M3")
    air = next(i for i in c.steps[1].inputs if i.symbol == "a")
    assert air.source.startswith("rule works.default_air_content (common practice")
    assert c.message.startswith("binder : sand 1 : 2.5 by loose volume, 1 : ")
    assert [i.symbol for i in c.steps[1].inputs][-1] == "a"     # no admixture


def test_mix_yield_not_assessed_without_a_water_ratio(demo_checked):
    """A mix gauged to a consistence (no w/b): not assessed, the target named in mm."""
    project, _ = demo_checked
    ctx = checked_context(demo_checked)
    m2 = project.mixes["M2"] if isinstance(project.mixes, dict) else next(
        m for m in project.mixes if m.id == "M2")
    c = wks.mix_yield_check(m2.model_copy(update={"water_binder_ratio": None,
                                                  "consistence": 0.175}), ctx)
    assert (c.code, c.status, c.value, c.subject) == ("MIX-YIELD", "not_assessed", None, "M2")
    assert c.message.startswith("not assessed: water is gauged to the consistence target "
                                "175 mm (EN 1015-3); give mixes.yaml M2.water_binder_ratio")
    c = wks.mix_yield_check(m2.model_copy(update={"water_binder_ratio": None,
                                                  "consistence": None}), ctx)
    assert "no water/binder ratio is given; give mixes.yaml M2.water_binder_ratio to compute " \
           "the yield" in c.message


def test_works_qty_of_z1_whole_repointing(demo_checked):
    """Z1 repointing (dossier.yaml): A = 240 m², joints 10 mm wide, 20 mm deep; units EB1
    230 × 75 mm (materials.yaml); wastage 15 % (works.wastage_repointing).  Joint length per
    m² of a stretcher-bond face L = (l + j + h) / ((l + j)(h + j)) = 0.315 / (0.24 × 0.085)
    = 15.441 m/m²; V = A L j d (1 + w); bags of 25 kg (materials.yaml bag_mass)."""
    _, results = demo_checked
    c = results.check("WORKS-QTY", "Z1")
    L = (0.23 + 0.01 + 0.075) / ((0.23 + 0.01) * (0.075 + 0.01))
    net = 240 * L * 0.01 * 0.02
    v = net * 1.15
    assert (c.title, c.status, c.unit, c.basis) == ("Works quantities", "info", "m³", (WORKS,))
    assert c.value == round(v, 4)
    vol = c.steps[0]
    assert (vol.title, vol.result, vol.unit, vol.symbol) == (
        "Mortar volume (repointing), wastage applied once", round(v, 5), "m³", "V")
    assert vol.formula == r"L = \frac{l + j + h}{(l + j)(h + j)},\quad V = A\,L\,j\,d\,(1 + w)"
    assert vol.inputs == (
        Input("A", "wall area", 240.0, "m²", "dossier.yaml Z1.area"),
        Input("l", "unit length", 230.0, "mm", "materials.yaml EB1.length"),
        Input("h", "unit height", 75.0, "mm", "materials.yaml EB1.height"),
        Input("j", "joint width", 10.0, "mm", "dossier.yaml Z1.joint_width"),
        Input("d", "joint depth", 20.0, "mm", "dossier.yaml Z1.joint_depth"),
        Input("w", "wastage allowance", 15.0, "%", "rule works.wastage_repointing (common "
              "practice — pointing loses mortar on the hawk, in the joint and on the face)"))
    assert vol.substituted == (rf"L = \frac{{0.23 + 0.01 + 0.075}}{{(0.23 + 0.01)(0.075 + 0.01)}}"
                               rf" = {L:.3f}\ \mathrm{{m/m^2}};\ V = 240 \times {L:.3f} \times "
                               rf"0.01 \times 0.02 \times 1.15 = {v:.4f}")
    y = {m: results.quantities[m]["yield_per_m3"].value for m in ("M1", "M2", "M3")}
    for step, mix, binder in zip(c.steps[1:], ("M1", "M2", "M3"), ("NC1", "NC1", "NH35")):
        per = y[mix]
        assert (step.title, step.unit, step.symbol) == (f"Constituents for mix {mix}", "kg", "m_b")
        assert step.formula == r"m_i = c_i\,V,\quad n = \lceil m_b / m_{bag} \rceil"
        assert step.inputs == (
            (Input("V", "mortar volume with wastage", round(v, 5), "m³", "step above"),)
            + tuple(Input(f"c_{k}", f"{k} per m³ of fresh mortar", val, "kg/m³", f"MIX-YIELD/{mix}")
                    for k, val in per.items())
            + (Input(f"m_bag,{binder}", f"bag mass of {binder}", 25.0, "kg",
                     f"materials.yaml {binder}.bag_mass"),))
        mb = per[binder] * v
        assert step.result == pytest.approx(round(mb, 2), abs=1e-9)
        bags = -(-mb // 25)
        assert step.substituted.endswith(
            rf";\ n_{{\mathrm{{{binder}}}}} = \lceil {mb:.2f} / 25\rceil = {bags:.0f}")
        assert step.substituted.startswith(
            rf"m_{{\mathrm{{{binder}}}}} = {per[binder]:g} \times {v:.4f} = {mb:.2f},\ ")
    m1 = c.steps[1]
    assert r"m_{\mathrm{citric\ acid\ solution}} = 1 \times 0.8524 = 0.85;" in m1.substituted
    q = {x.name: x for x in c.quantities}
    assert [(x.name, x.unit, x.label) for x in c.quantities] == [
        ("mortar_volume", "m³", "mortar volume with wastage"),
        ("mortar_volume_net", "m³", "mortar volume before wastage"),
        ("wastage", "%", "wastage allowance"),
        ("joint_length_per_m2", "m/m²", "joint length per m² of face"),
        ("binder_mass", "kg", "binder mass"), ("sand_mass", "kg", "sand mass"),
        ("water_mass", "kg", "water mass"), ("admixture_mass", "kg", "admixture mass"),
        ("bags", "", "bags")]
    assert (q["mortar_volume"].value, q["mortar_volume_net"].value, q["wastage"].value,
            q["joint_length_per_m2"].value) == (round(v, 5), round(net, 5), 15.0, round(L, 4))
    assert q["binder_mass"].value == {m: {b: round(y[m][b] * v, 2)} for m, b in (
        ("M1", "NC1"), ("M2", "NC1"), ("M3", "NH35"))}
    assert q["sand_mass"].value["M1"] == {"S1": round(y["M1"]["S1"] * v, 2),
                                          "S2": round(y["M1"]["S2"] * v, 2)}
    assert q["water_mass"].value == {m: round(y[m]["water"] * v, 2) for m in y}
    # the admixture to 3 decimals (grams), the others to 2
    assert q["admixture_mass"].value == {"M1": {"citric acid solution": round(1.0 * v, 3)}}
    assert q["bags"].value == {m: {b: int(-(-y[m][b] * v // 25))} for m, b in (
        ("M1", "NC1"), ("M2", "NC1"), ("M3", "NH35"))}
    assert c.message == (f"repointing: {net:.3g} m³ net + 15 % wastage = {v:.3g} m³ of mortar; "
                         "binder " + ", ".join(f"{m}: {y[m][b] * v:.0f} kg {b}" for m, b in (
                             ("M1", "NC1"), ("M2", "NC1"), ("M3", "NH35"))))


def test_works_qty_render_and_bedding_volume_steps(demo_checked):
    """Z2 render: 85 m² × (12 + 8 mm) × 1.10 (works.wastage_render) = 1.87 m³; Z3 bedding:
    1.8 m³ of masonry × 20 % mortar × 1.12 (dossier.yaml wastage 12 %) = 0.4032 m³."""
    _, results = demo_checked
    z2 = results.check("WORKS-QTY", "Z2")
    vol = z2.steps[0]
    assert (vol.title, vol.formula) == ("Mortar volume (render), wastage applied once",
                                        r"V = A \sum_k t_k\,(1 + w)")
    assert vol.substituted == r"V = 85 \times (0.012 + 0.008) \times 1.1 = 1.8700"
    assert z2.value == pytest.approx(85 * 0.020 * 1.10, abs=1e-12)
    assert [(i.symbol, i.unit) for i in vol.inputs][-1] == ("w", "%")
    assert "joint_length_per_m2" not in {q.name for q in z2.quantities}
    z3 = results.check("WORKS-QTY", "Z3")
    vol = z3.steps[0]
    assert (vol.title, vol.formula) == ("Mortar volume (bedding), wastage applied once",
                                        r"V = V_m\,f\,(1 + w)")
    assert vol.substituted == r"V = 1.8 \times 0.2 \times 1.12 = 0.4032"
    assert vol.inputs[-1] == Input("w", "wastage allowance", 12.0, "%", "dossier.yaml Z3.wastage")
    assert z3.message.startswith("bedding: 0.36 m³ net + 12 % wastage = 0.403 m³ of mortar; binder ")


def _temperatures():
    with (DEMO / "lab" / "site-temperature.csv").open(encoding="utf-8") as f:
        rows = list(csv.reader(f))[1:]
    return [(float(d), float(t)) for d, t in rows]


def test_site_weather_whole_from_the_temperature_record(demo_checked):
    """SITE-WEATHER: window 5–30 °C, damp 5 d, protect 7 d (content/rules/works.yaml);
    lab/site-temperature.csv read here: a day at or below 5 °C is cold, above 30 °C hot;
    day 0 is 2027-04-05 (dossier.yaml site_temperature_from)."""
    project, results = demo_checked
    c = results.check("SITE-WEATHER", "WEP-2026")
    rows = _temperatures()
    start = dt.date(2027, 4, 5)
    out = [{"day": d, "temperature": t, "side": "cold" if t <= 5 else "hot",
            "date": (start + dt.timedelta(days=d)).isoformat()} for d, t in rows if t <= 5 or t > 30]
    cold = sum(o["side"] == "cold" for o in out)
    assert (c.title, c.status, c.value, c.unit, c.subject, c.subject_kind, c.basis) == (
        "Working temperature and curing", "attention" if out else "pass", len(out), "d",
        "WEP-2026", "project", (WEATHER,))
    step, = c.steps
    assert (step.title, step.result, step.unit, step.symbol) == (
        "Days of the site record outside the working window", len(out), "d", "n")
    assert step.formula == r"\text{outside} \iff T_d \le T_{\min}\ \text{or}\ T_d > T_{\max}"
    assert [(i.symbol, i.name, i.value, i.unit) for i in step.inputs] == [
        ("T_min", "lowest working temperature", 5.0, "°C"),
        ("T_max", "highest working temperature", 30.0, "°C"),
        ("t_c", "keep damp for", 5.0, "d"), ("t_p", "protect for", 7.0, "d"),
        ("T_d", "daily mean temperatures", f"{len(rows)} readings", "°C")]
    assert [i.source.split(" (")[0] for i in step.inputs] == [
        "rule works.min_working_temperature", "rule works.max_working_temperature",
        "rule works.curing_days", "rule works.protection_days", "lab/site-temperature.csv"]
    assert step.substituted == (rf"{cold}\ \text{{cold}} + {len(out) - cold}\ \text{{hot}}\ "
                                rf"\text{{of}}\ {len(rows)}")
    window, days = c.quantities
    assert (window.name, window.value, window.unit, window.label) == (
        "weather_window", {"low": 5.0, "high": 30.0, "curing_days": 5.0, "protection_days": 7.0},
        "°C", "working window (°C) and curing days")
    assert (days.name, days.value, days.unit, days.label) == (
        "days_outside_window", out, "", "days outside the working window")
    months = ["January", "February", "March", "April", "May", "June", "July", "August",
              "September", "October", "November", "December"]
    first = ", ".join(f"{d.day} {months[d.month - 1]} {d.year}"
                      for d in (dt.date.fromisoformat(o["date"]) for o in out[:8]))
    assert c.message == (f"place mortar only between 5 and 30 °C; keep damp 5 d and protect 7 d;"
                         f" {len(out)} of {len(rows)} days of lab/site-temperature.csv fall "
                         f"outside ({first}{' …' if len(out) > 8 else ''}): plan protection or "
                         "no work")


def test_site_weather_without_a_record_undated_and_a_single_reading(demo_checked):
    """No record: the window alone, status info; an undated record: days after placement;
    one constant reading of 30.5 °C (hot, above 30) and one of exactly 30 °C (inside)."""
    project, _ = demo_checked
    bare = Swapped(project, site_temperature=None)
    c = wks.weather_check(bare, checked_context(demo_checked, bare))
    assert (c.status, c.value, c.unit) == ("info", None, "")
    assert c.message == ("place mortar only between 5 and 30 °C; keep damp 5 d and protect 7 d; "
                         "no site temperature record is given")
    assert (c.steps[0].title, c.steps[0].formula, c.steps[0].substituted) == (
        "Working window", r"T_{\min} < T < T_{\max}", "—")
    assert [q.name for q in c.quantities] == ["weather_window"]
    dossier = project.dossier.model_copy(update={"site_temperature_from": None})
    rec = project.site_temperature
    for kelvin, n in ((303.65, 1), (303.15, 0)):
        one = type(rec)(**{**rec.__dict__, "constant": kelvin})
        sw = Swapped(project, site_temperature=one, dossier=dossier)
        c = wks.weather_check(sw, checked_context(demo_checked, sw))
        assert c.steps[0].inputs[-1].value == "1 reading"
        assert c.value == n
        if n:
            assert c.quantities[1].value == [{"day": 0.0, "temperature": 30.5, "side": "hot",
                                              "date": None}]
            assert c.message.endswith("1 of 1 day of lab/site-temperature.csv fall outside "
                                      "(days 0 after placement; the record is not dated): plan "
                                      "protection or no work")
            assert c.status == "attention"
        else:
            assert c.status == "pass"
            assert c.message.endswith("; 0 of 1 day of lab/site-temperature.csv fall outside")


def test_zone_volume_of_each_kind_with_defaults_and_what_is_missing(demo_checked):
    """works_common.zone_volume by hand on the demo's zones changed in memory: Z1 without a
    joint depth takes 2 × 10 mm (works.joint_depth_ratio 2.0, content/rules/works.yaml); Z2's
    render inputs name each coat; Z3 without a mortar fraction takes 0.25
    (works.bedding_mortar_fraction): 1.8 × 0.25 × 1.12 m³; a missing area, coats or masonry
    volume gives the reason instead of a volume."""
    from specgen.checks import works_common as wc
    project, _ = demo_checked
    rules = RuleBook(project.dossier.rule_overrides)
    z = {x.id: x for x in project.dossier.zones}
    v = wc.zone_volume(z["Z1"].model_copy(update={"joint_depth": None}), project, rules)
    L = (0.23 + 0.01 + 0.075) / ((0.23 + 0.01) * (0.075 + 0.01))
    assert v.net == pytest.approx(240 * L * 0.01 * 0.02, rel=1e-12)
    assert v.total == pytest.approx(v.net * 1.15, rel=1e-12)
    assert v.joint_length == pytest.approx(L, rel=1e-12)
    assert v.inputs[-1][:5] == ("d", "joint depth", pytest.approx(0.02), "mm", 1e-3)
    assert v.inputs[-1][5] == ("joint width × rule works.joint_depth_ratio (common practice — "
                               "joints are raked out to about twice their width, to sound mortar)")
    assert v.wastage.source == ("rule works.wastage_repointing (common practice — pointing loses "
                                "mortar on the hawk, in the joint and on the face)")
    r = wc.zone_volume(z["Z2"], project, rules)
    assert [i[:2] + i[3:] for i in r.inputs] == [
        ("A", "rendered area", "m²", 1, "dossier.yaml Z2.area"),
        ("t_1", "thickness of coat 1", "mm", 1e-3, "dossier.yaml Z2.coats[0]"),
        ("t_2", "thickness of coat 2", "mm", 1e-3, "dossier.yaml Z2.coats[1]")]
    assert (r.net, r.joint_length) == (pytest.approx(85 * 0.020), None)
    b = wc.zone_volume(z["Z3"].model_copy(update={"mortar_fraction": None}), project, rules)
    assert b.total == pytest.approx(1.8 * 0.25 * 1.12, rel=1e-12)
    assert b.inputs[1] == ("f", "mortar fraction", 0.25, "", 1, "rule works.bedding_mortar_"
                           "fraction (common practice — coursed stone and brickwork hold roughly "
                           "a fifth to a third of their volume in mortar)")
    assert b.inputs[0] == ("V_m", "volume of masonry", 1.8, "m³", 1, "dossier.yaml Z3.masonry_volume")
    assert wc.zone_volume(z["Z1"].model_copy(update={"area": None, "joint_width": None}),
                          project, rules).reason == ("give dossier.yaml Z1.area, dossier.yaml "
                                                     "Z1.joint_width")
    assert wc.zone_volume(z["Z1"].model_copy(update={"units": None}), project,
                          rules).reason == "give the unit's length, the unit's height"
    assert wc.zone_volume(z["Z2"].model_copy(update={"coats": []}), project,
                          rules).reason == "give dossier.yaml Z2.coats"
    none = wc.zone_volume(z["Z3"].model_copy(update={"masonry_volume": None}), project, rules)
    assert (none.reason, none.total, none.net) == ("give dossier.yaml Z3.masonry_volume", 0, 0)
    c = wks.works_quantities_check(z["Z3"].model_copy(update={"masonry_volume": None}),
                                   checked_context(demo_checked))
    assert (c.code, c.status, c.value, c.message) == (
        "WORKS-QTY", "not_assessed", None,
        "not assessed: bedding in zone Z3: give dossier.yaml Z3.masonry_volume")


def test_parts_densities_given_or_defaulted(demo_checked):
    """works_common.parts_of: NC1's bulk density given (850, materials.yaml) and its particle
    density the natural-cement default 2900 (content/data/mix_densities.yaml, common
    practice); a binder without a bulk density takes the 900 kg/m³ default; the water density
    998.2 kg/m³ (IAPWS-95, 998.207)."""
    from specgen.checks import works_common as wc
    project, _ = demo_checked
    m1 = next(m for m in (project.mixes.values() if isinstance(project.mixes, dict)
                          else project.mixes) if m.id == "M1")
    nc1 = wc.parts_of(project, m1)[0]
    assert (nc1.bulk.value, nc1.bulk.source) == (850.0, "materials.yaml NC1.bulk_density")
    assert (nc1.particle.value, nc1.particle.source) == (2900.0, "default: common practice")
    assert nc1.label == "Blackscar natural cement (trial firing 2)"
    binders = dict(project.binders)
    binders["NC1"] = binders["NC1"].model_copy(update={"bulk_density": None})
    bare = wc.parts_of(Swapped(project, binders=binders), m1)[0]
    assert (bare.bulk.value, bare.bulk.source) == (900.0, "default: common practice")
    assert wc.water_density().value == 998.2
    assert wc.air_of(m1, RuleBook(project.dossier.rule_overrides)) == wc.Sourced(
        0.045, "mixes.yaml M1.air_content (measured)")


def test_workable_life_source_and_the_initial_set_cap(demo_checked):
    """works_common.workable_life: M1's 30 min measured, with its source named (mixes.yaml
    workable_life_source); without one, '(laboratory)'; a measured 60 min life above M1's
    initial set of 45 min (mixes.yaml setting) is capped at 45 min, said with both figures."""
    from specgen.checks import works_common as wc
    project, _ = demo_checked
    rules = RuleBook(project.dossier.rule_overrides)
    m1 = next(m for m in (project.mixes.values() if isinstance(project.mixes, dict)
                          else project.mixes) if m.id == "M1")
    life, measured = wc.workable_life(project, m1, rules)
    assert (life, measured) == (wc.Sourced(1800.0, "mixes.yaml M1.workable_life, EN 1015-9 "
                                           "(Northstead Materials Laboratory, NML-4460)"), True)
    bare = m1.model_copy(update={"workable_life_source": None})
    assert wc.workable_life(project, bare, rules)[0].source == (
        "mixes.yaml M1.workable_life, EN 1015-9 (laboratory)")
    long = m1.model_copy(update={"workable_life": 3600.0})
    assert wc.workable_life(project, long, rules) == (wc.Sourced(
        2700.0, "mixes.yaml M1.setting.initial (initial set 45 min caps the 60 min of mixes.yaml "
        "M1.workable_life, EN 1015-9 (Northstead Materials Laboratory, NML-4460))"), True)
    binders = dict(project.binders)
    binders["NC1"] = binders["NC1"].model_copy(update={"particle_density": 3000.0})
    given = wc.parts_of(Swapped(project, binders=binders), m1)[0]
    assert (given.particle.value, given.particle.source) == (
        3000.0, "materials.yaml NC1.particle_density")


def test_works_qty_wastage_shown_to_three_decimals_and_weather_days_to_two(demo_checked):
    """A wastage of 12.3456 % (dossier.yaml, fractional) is shown as 12.346 % (3 decimals);
    a curing period of 4.25 d (a rule changed in memory) is kept as 4.25 d, not 4."""
    project, _ = demo_checked
    z3 = next(z for z in project.dossier.zones if z.id == "Z3")
    c = wks.works_quantities_check(z3.model_copy(update={"wastage": 0.123456}), checked_context(demo_checked))
    assert c.steps[0].inputs[-1] == Input("w", "wastage allowance", 12.346, "%",
                                          "dossier.yaml Z3.wastage")
    ctx = checked_context(demo_checked)
    book = ctx.rules
    rule = book["works.curing_days"]

    class _Rules:
        def __getitem__(self, key):
            return dataclasses.replace(rule, value=4.25) if key == "works.curing_days" \
                else book[key]
    ctx.rules = _Rules()
    w = wks.weather_check(project, ctx)
    assert w.quantities[0].value["curing_days"] == 4.25
    assert w.steps[0].inputs[2].value == 4.25
