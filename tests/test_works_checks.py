"""Works checks on the demo and on edited copies: quantities, gaugings, bad input, CSV, cards."""
from __future__ import annotations

import json
import re

import pytest

from specgen.build import check
from tests.conftest import shared_scope

DEMO_NAMES = ("joint_length_per_m2", "mortar_volume", "binder_mass", "bags",
              "max_gauging_volume", "yield_per_m3")


def edit(path, old: str, new: str) -> None:
    text = path.read_text(encoding="utf-8")
    assert old in text, f"test setup: {old!r} not in {path.name}"
    path.write_text(text.replace(old, new, 1), encoding="utf-8")


@pytest.fixture(scope=shared_scope("module"))
def demo(demo_checked):
    return demo_checked


def by(results):
    return {(c.code, c.subject): c for c in results.checks}


def test_quantities_are_assessed_for_every_zone(demo):
    p, r = demo
    for z in ("Z1", "Z2", "Z3"):
        assert by(r)[("WORKS-QTY", z)].status == "info", by(r)[("WORKS-QTY", z)].message
    # Largest gauging = workable life x placing rate / 1.5 (rule gauging_safety_factor,
    # common practice), zone Z1 at 8 L/h (demo dossier.yaml):
    #   M1 measured 30 min -> 2.667 L; one 1 L measure of binder makes 1.696 L (yield by
    #      hand in test_demo_repointing_volume_by_hand) -> 1 measure, info;
    #   M2 default 10 min (natural cement, common practice) -> 0.889 L < 1 L measure's mortar
    #      -> the measure is halved, attention (test_quick_set_halves_the_measure);
    #   M3 default 120 min (NHL, common practice) -> 10.667 L; 1 L of NH35 makes 2.341 L
    #      (below) -> floor(10.667 / 2.341) = 4 measures; attention all the same, because a
    #      workable life that was not measured is an assumption the sheet flags (EN 1015-9).
    expected = {"M1": ("info", 1, 1.696), "M2": ("attention", 1, 0.596),
                "M3": ("attention", 4, 9.364)}
    for m, (status, measures, volume) in expected.items():
        g = r.quantities[m]["gauging"].value
        assert (by(r)[("SITE-GAUGE", m)].status, g["binder_measures"]) == (status, measures)
        assert g["volume_L"] == pytest.approx(volume, abs=1e-3)
    # M3 by hand, absolute volumes per 1 L of NH35 (700 kg/m³) + 2.5 L of S1 (1550 kg/m³),
    # w/b 0.75, particle densities 2700 / 2650, water 998.2 (content/data/mix_densities.yaml),
    # air 4 % (rule default_air_content, common practice):
    #   0.7/2700 + 3.875/2650 + 0.525/998.2 = 0.259259 + 1.462264 + 0.525947 = 2.247470 L
    #   / (1 - 0.04) = 2.341115 L per measure; x 4 = 9.364 L
    assert (0.7 / 2700 + 3.875 / 2650 + 0.525 / 998.2) / 0.96 * 1000 == pytest.approx(2.341115,
                                                                                   abs=1e-6)


def test_results_json_names_for_the_demo(demo):
    _, r = demo
    found = {n for qs in json.loads(r.to_json())["quantities"].values() for n in qs}
    assert set(DEMO_NAMES) <= found


def test_demo_repointing_volume_by_hand(demo):
    _, r = demo
    q = r.quantities["Z1"]
    # EB1 230 × 75 mm, 10 mm joints: (0.24 + 0.075)/(0.24 × 0.085) = 15.441 m/m² (by hand);
    # 240 m² × 15.441 × 0.010 × 0.020 = 0.74118 m³; with 15 % wastage 0.85235 m³.
    assert q["joint_length_per_m2"].value == pytest.approx(15.4412, abs=1e-4)
    assert q["mortar_volume_net"].value == pytest.approx(0.74118, abs=1e-5)
    assert q["mortar_volume"].value == pytest.approx(0.85235, abs=1e-5)
    # Binder per m³ of fresh mortar by hand (absolute volumes, mix_design module docstring;
    # densities from demo materials.yaml and content/data/mix_densities.yaml):
    #   M1: 850 kg NC1 + 1550 kg S1 + 725 kg S2 + 467.5 kg water per m³ of loose binder:
    #       850/2900 + 1550/2650 + 725/2650 + 467.5/998.2 = 0.293103 + 0.584906 + 0.273585
    #       + 0.468343 = 1.619937 m³, air 4.5 % -> 1.696269 m³ -> 501.10 kg NC1 per m³
    #   M2: 850/2900 + 3100/2650 + 725/2650 + 552.5/998.2 = 2.289995 m³, air 4 % (rule
    #       default_air_content) -> 2.385411 m³ -> 356.33 kg NC1 per m³
    #   M3: 700/2700 + 3875/2650 + 525/998.2 = 2.247470 m³ per m³ of loose NH35, air 4 %
    #       -> 2.341115 m³ -> 299.00 kg NH35 per m³
    per_m3 = {"M1": 850 / (1.619937 / 0.955), "M2": 850 / (2.289995 / 0.96),
              "M3": 700 / (2.247470 / 0.96)}
    assert per_m3["M1"] == pytest.approx(501.10, abs=0.01)
    assert per_m3["M2"] == pytest.approx(356.33, abs=0.01)
    assert per_m3["M3"] == pytest.approx(299.00, abs=0.01)
    # Z1: 0.85235 m³ x binder per m³, then whole 25 kg bags (demo bag_mass), rounded up:
    #   M1 427.11 kg -> 17.08 -> 18 bags; M2 303.72 kg -> 12.15 -> 13; M3 254.85 kg -> 10.19 -> 11
    masses = {"M1": ("NC1", 427.11, 18), "M2": ("NC1", 303.72, 13), "M3": ("NH35", 254.85, 11)}
    for mix, (binder, kg, bags) in masses.items():
        assert 0.85235 * per_m3[mix] == pytest.approx(kg, abs=0.01)
        assert q["binder_mass"].value[mix][binder] == pytest.approx(kg, abs=0.01)
        assert q["bags"].value[mix][binder] == bags


def test_render_and_bedding_by_hand(demo):
    _, r = demo
    # Z2: 85 m² × (12 + 8) mm = 1.7 m³, + 10 % = 1.87 m³; Z3: 1.8 m³ × 20 % = 0.36, + 12 %.
    assert r.quantities["Z2"]["mortar_volume"].value == pytest.approx(1.87)
    assert r.quantities["Z3"]["mortar_volume"].value == pytest.approx(0.4032)


def test_quick_set_halves_the_measure(demo):
    _, r = demo
    c = by(r)[("SITE-GAUGE", "M2")]
    g = r.quantities["M2"]["gauging"].value
    # M2 has no measured workable life: the natural-cement default of 10 min (common practice)
    # at 8 L/h and γ = 1.5 allows 0.889 L, so the 0.25 L scoop of the site's real measures
    # (content/data/site_measures.yaml, common practice) is used instead of the 1 L measure.
    assert c.status == "attention"
    assert (g["measure_L"], g["halved_from_L"], g["binder_measures"]) == (0.25, 1.0, 1)
    assert "so a 0.25 L scoop is used" in c.message
    # the first step as the sheet shows it: V_max = t_w·q/γ = (10/60 h) × 8 L/h / 1.5
    # = 0.8889 L, by hand from the same inputs
    first = c.steps[0]
    assert (first.title, first.unit, first.symbol) == (
        "Largest gauging placed within the workable life", "L", "V_max")
    assert first.result == pytest.approx(10 / 60 * 8 / 1.5, abs=1e-4)
    # Z1: 8 L/h × 6 h = 48 L in gaugings of 0.596 L: ⌈80.5⌉ = 81 gaugings a day, more than
    # the 40 one mixer keeps up with (rule of common practice): the check says so
    assert r.quantities["M2"]["gauging_by_zone"].value["Z1"]["per_day"] == 81
    assert "zone Z1 needs 81 gaugings a day" in c.message
    assert r.quantities["M2"]["max_gauging_volume"].value["Z1"] == pytest.approx(0.889)


def test_quantities_not_assessed_without_dimensions(demo_copy):
    edit(demo_copy / "dossier.yaml", '    coats: ["12 mm", "8 mm"]\n', "")
    _, r = check(demo_copy)
    c = by(r)[("WORKS-QTY", "Z2")]
    assert c.status == "not_assessed"
    assert c.message == "not assessed: render in zone Z2: give dossier.yaml Z2.coats"


def run_check(cli, project) -> str:
    result = cli("check", project)
    assert result.exit_code == 2, result.output
    assert "Traceback" not in result.output
    return result.output


def test_joint_wider_than_the_unit(cli, demo_copy):
    edit(demo_copy / "dossier.yaml", 'joint_width: "10 mm"', 'joint_width: "80 mm"')
    assert ("dossier.yaml, line 39: zones[0].joint_width: zone 'Z1': the joint width 80 mm is not "
            "narrower than the unit EB1 (230 × 75 mm) it is laid between. Fix: give the joint "
            "width with its unit, e.g. '10 mm', or correct the unit's length and height in "
            "materials.yaml.") in run_check(cli, demo_copy)


@pytest.mark.parametrize("area", ["0 m^2", "-85 m^2"])
def test_zero_or_negative_area(cli, demo_copy, area):
    edit(demo_copy / "dossier.yaml", 'area: "85 m^2"', f'area: "{area}"')
    assert (f"dossier.yaml, line 48: zones[1].area: must be greater than zero (found '{area}'). "
            "Fix: give an amount greater than zero, with its unit (wall area of the works, e.g. "
            "'120 m^2').") in run_check(cli, demo_copy)


def test_mix_whose_proportions_sum_to_nothing(cli, demo_copy):
    edit(demo_copy / "mixes.yaml", "binders: [{binder: NH35, parts: 1}]",
         "binders: [{binder: NH35, parts: 0}]")
    edit(demo_copy / "mixes.yaml", "sands: [{sand: S1, parts: 2.5}]", "sands: [{sand: S1, parts: 0}]")
    out = run_check(cli, demo_copy)
    assert ("mixes.yaml, line 15: mixes[2].binders: mix 'M3': the binder parts sum to 0, so the "
            "mix has no binder to batch. Fix: give each binder its parts by loose volume, e.g. "
            "'binders: [{binder: B1, parts: 1}]'.") in out
    assert ("mixes.yaml, line 16: mixes[2].sands[0].parts: parts by loose volume must be greater "
            "than zero; found 0. Fix: give the sand's share of the mix by loose volume, e.g. "
            "'parts: 2.5', or remove the sand from the mix.") in out


def test_mix_without_binders(cli, demo_copy):
    edit(demo_copy / "mixes.yaml", "binders: [{binder: NH35, parts: 1}]", "binders: []")
    assert ("mixes.yaml, line 15: mixes[2].binders: mix 'M3': the binder parts sum to 0, so the "
            "mix has no binder to batch.") in run_check(cli, demo_copy)


def test_bag_mass_missing_when_bags_are_asked_for(cli, demo_copy):
    edit(demo_copy / "materials.yaml", '    bulk_density: "700 kg/m^3"\n    bag_mass: "25 kg"\n',
         '    bulk_density: "700 kg/m^3"\n')
    assert ("materials.yaml, line 12: binders[1].bag_mass: dossier.yaml asks for whole bags "
            "(works.bags: true) but binder 'NH35' has no bag mass. Fix: add 'bag_mass:' with the "
            "mass of one bag as supplied, e.g. '25 kg', or set works.bags: false in "
            "dossier.yaml.") in run_check(cli, demo_copy)


def test_fractions_air_and_densities_out_of_range(cli, demo_copy):
    edit(demo_copy / "mixes.yaml", 'air_content: "4.5 %"', 'air_content: "60 %"')
    edit(demo_copy / "dossier.yaml", 'mortar_fraction: "20 %"', 'mortar_fraction: "120 %"')
    edit(demo_copy / "materials.yaml", 'Washed estuary sand 0/4, bulk_density: "1550 kg/m^3"',
         'Washed estuary sand 0/4, bulk_density: "2750 kg/m^3"')
    out = run_check(cli, demo_copy)
    assert ("mixes.yaml, line 4: mixes[0].air_content: mix 'M1': an air content of 60 % is out "
            "of range; the yield takes 0–50 % of air. Fix: give the air content of the fresh "
            "mortar (EN 1015-7) as a percentage, e.g. '5 %'.") in out
    assert ("dossier.yaml, line 60: zones[2].mortar_fraction: zone 'Z3': mortar as a fraction of "
            "the masonry volume must be below 100 %; found 120 %. Fix: give it as a percentage, "
            "e.g. 'mortar_fraction: \"22 %\"'.") in out
    # 2650 kg/m³: the default particle density of quartz sand (content/data/mix_densities.yaml)
    assert ("materials.yaml, line 40: sands[0].bulk_density: sand 'S1': the loose bulk density "
            "2750 kg/m³ is not below its particle density 2650 kg/m³ (loose material holds "
            "voids).") in out


def test_no_bags_needed_when_not_asked(demo_copy):
    edit(demo_copy / "materials.yaml", '    bulk_density: "700 kg/m^3"\n    bag_mass: "25 kg"\n',
         '    bulk_density: "700 kg/m^3"\n')
    edit(demo_copy / "dossier.yaml", "  bags: true\n", "  bags: false\n")
    _, r = check(demo_copy)
    assert "bags" not in r.quantities["Z1"]
    assert by(r)[("WORKS-QTY", "Z1")].status == "info"


def test_schedule_csv_is_sorted_fixed_and_repeatable(demo):
    from specgen.report import works_schedule as ws
    p, r = demo
    a = ws.to_csv(ws.schedule(p, r))
    # repeatable across runs: a fresh load and check of the same folder gives the same bytes
    assert ws.to_csv(ws.schedule(*check(p.root))) == a
    lines = a.decode("utf-8").split("\r\n")
    assert lines[0] == "zone,works,mix,kind,item,description,value,unit"
    assert "Z1,repointing,,volume,mortar_volume_net,mortar volume before wastage,0.7412,m3" in lines
    # by hand: 0.85235 m³ (Z1 with wastage) × 501.10 kg NC1 per m³ of M1 (absolute volumes,
    # test_demo_repointing_volume_by_hand) = 427.11 kg; / 25 kg a bag (demo materials.yaml
    # bag_mass) = 17.08 → 18 whole bags
    assert "Z1,repointing,M1,bags,NC1,bags of 25 kg,18,bag" in lines
    assert [ln.split(",")[0] for ln in lines[1:-1]] == sorted(ln.split(",")[0] for ln in lines[1:-1])


def test_csv_cells_never_become_formulas():
    from specgen.report.works_schedule import _cell
    assert _cell("=HYPERLINK(\"x\")") == "'=HYPERLINK(\"x\")"
    assert _cell("S1 — sand") == "S1 — sand"


def test_card_cautions_come_from_the_library(demo):
    from specgen.report.cautions import card_cautions
    p, _ = demo
    chosen, closing = card_cautions(p, p.mixes["M1"])
    # M1 serves Z2 (splash, demo dossier.yaml) on a site that freezes: tidal and frost cautions
    assert [c["id"] for c in chosen] == ["alkaline", "quick_set", "dust", "bags", "tidal", "frost"]
    assert "safety data sheet" in closing and "competent person" in closing
    nhl, _ = card_cautions(p, p.mixes["M3"])
    assert "quick_set" not in [c["id"] for c in nhl]   # NHL: no natural cement in M3


def _render_works(project, results):
    """The works page and the card pages, rendered from their chapter functions alone."""
    from specgen.report import works_chapters as wch
    from specgen.report.mathsvg import MathAssets
    from specgen.report.pageset import PageSet
    from specgen.report.render import RenderEnv, template_env
    pages = PageSet()
    env = RenderEnv(project, results, pages, MathAssets(pages))
    jenv = template_env(None)
    base = {"project": project.dossier.project, "revision": project.revision, "narrative": ""}
    text = jenv.get_template("works.md.j2").render(**base, **wch.works(env), title="Works")
    cards = [jenv.get_template("card.md.j2").render(**base, **{k: v for k, v in c.items()
                                                               if k != "path"})
             for c in wch.cards(env)]
    return text, cards, pages


def test_works_page_and_cards_from_the_demo(demo):
    text, cards, pages = _render_works(*demo)
    assert '<a href="./WEP-2026-R3-quantities.csv">quantities schedule (spreadsheet, CSV)</a>' in text
    # Z1 bags of NC1 for M1, M2, M3: 18 and 13 by hand (test_demo_repointing_volume_by_hand);
    # M3 uses NH35, so no NC1 bags
    assert "| NC1: bags of 25 kg | bags | 18 | 13 | — |" in text
    assert "(calculations.md#calc-works-qty-z1)" in text
    assert list(pages.downloads) == ["WEP-2026-R3-quantities.csv"]
    assert len(cards) == 3
    m1 = cards[0]
    # Water per gauging by hand: one 1 L measure of NC1 at 850 kg/m³ (demo materials.yaml)
    # = 0.85 kg of binder; × w/b 0.55 (demo mixes.yaml) = 0.4675 kg of water, / 998.2 kg/m³
    # (content/data/mix_densities.yaml) = 0.4683 L, shown 0.47 L and, to the 10 g a site
    # scale reads (common practice), 0.47 kg; retarder 0.2 % of 0.85 kg binder = 1.7 g.
    # value and unit joined by a narrow no-break space (U+202F), as everywhere in the dossier
    m1 = m1.replace("\u202f", " ")
    assert "| 1 | Pour the gauging water into a marked jug | jug | 0.47 L | 0.47 kg |" in m1
    assert "| 2 | Dissolve the citric acid solution (retarder) in the water | scale | — | 1.7 g |" in m1
    assert "Workable life **30 min** (measured)" in m1
    # Z2 may place 8.33 L in time: four card mixes of 1.696 L at once (6.785 L); its crew
    # places 25 L/h × 6 h = 150 L a day → ⌈150 / 6.785⌉ = ⌈22.1⌉ = 23 gaugings (by hand)
    assert "| Z2 | 4 × this card | 6.79 L | 23 | 8.33 L |" in m1
    assert "one mixer cannot keep up" in cards[1] and "one mixer cannot keep up" not in m1


def test_works_page_says_so_without_data(demo_copy):
    text = (demo_copy / "dossier.yaml").read_text(encoding="utf-8")
    start, end = text.index("zones:\n"), text.index("requirements:\n")
    (demo_copy / "dossier.yaml").write_text(text[:start] + "zones: []\n\n" + text[end:],
                                            encoding="utf-8")
    (demo_copy / "mixes.yaml").write_text("mixes: []\n", encoding="utf-8")
    (demo_copy / "lab" / "strength.csv").unlink()
    (demo_copy / "specification.yaml").unlink(missing_ok=True)
    # the sample register names the zones: without zones, without register (and results that
    # name no sample)
    (demo_copy / "samples.yaml").unlink()
    (demo_copy / "method.yaml").unlink()   # its wording is for zone Z3
    for name, pattern in (("analyses.yaml", r"    lab_sample: \S+\n"),
                          ("materials.yaml", r" lab_samples: \[[^\]]*\],")):
        path = demo_copy / name
        path.write_text(re.sub(pattern, "", path.read_text(encoding="utf-8")), encoding="utf-8")
    for name in ("capillary.csv", "colour.csv"):
        (demo_copy / "lab" / name).unlink()
    (demo_copy / "materials.yaml").write_text(
        (demo_copy / "materials.yaml").read_text(encoding="utf-8").split("\n# Properties")[0],
        encoding="utf-8")
    text, cards, pages = _render_works(*check(demo_copy))
    assert "No mixes are in the project yet (mixes.yaml)." in text
    assert "No zones of work are defined yet (dossier.yaml, zones)." in text
    assert "No batching card can be made yet" in text
    assert cards == [] and pages.downloads == {}
