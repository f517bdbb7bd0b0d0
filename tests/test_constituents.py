"""Analyses name only the constituents the format knows; volatile ones count as loss; contents
that carry a unit refuse bare numbers (messages asserted word for word)."""
from __future__ import annotations

import pytest

from specgen.build import check
from specgen.project.reference import markdown
from tests.helpers import edit, problems


# An old report of the Blackscar marl printed water and organic matter apart, without a total
# loss on ignition: CO2 30.0, H2O+ 2.6, H2O- 0.9, organic matter 1.3 (invented values).
OLD_REPORT = ("{SiO2: 14.8, Al2O3: 5.6, Fe2O3: 2.9, CaO: 40.1, MgO: 1.6, SO3: 0.6, K2O: 0.8, "
              "Na2O: 0.2, CO2: 30.0, H2O+: 2.6, H2O-: 0.9, organic matter: 1.3}")
DEMO_BS1 = ("{SiO2: 14.8, Al2O3: 5.6, Fe2O3: 2.9, CaO: 40.1, MgO: 1.6, SO3: 0.6, K2O: 0.8, "
            "Na2O: 0.2, CO2: 30.0, LOI: 33.0}")


def test_old_analysis_with_water_and_organic_matter_apart(demo_copy):
    edit(demo_copy / "analyses.yaml", DEMO_BS1, OLD_REPORT)
    _, r = check(demo_copy)
    q = r.quantities["BS-1"]
    # by hand: loss = CO2 + H2O+ + H2O- + organic = 30.0 + 2.6 + 0.9 + 1.3 = 34.8 %
    assert q["loss_on_ignition"].value == pytest.approx(34.8, abs=1e-9)
    # total = 14.8 + 5.6 + 2.9 + 40.1 + 1.6 + 0.6 + 0.8 + 0.2 + 34.8 = 101.4 %
    assert q["analysis_total"].value == pytest.approx(101.4, abs=1e-9)
    # clay (oxide sum) = SiO2 + Al2O3 + Fe2O3 + combined water (H2O+ only)
    #                  = 14.8 + 5.6 + 2.9 + 2.6 = 25.9 %
    assert q["clay_fraction"].value == pytest.approx(25.9, abs=1e-3)
    # loss-free CaO = 40.1 x 100 / (100 - 34.8) = 61.503 %
    assert q["loss_free_composition"].value["CaO"] == pytest.approx(4010 / 65.2, abs=1e-3)


def test_synonyms_become_the_canonical_keys(demo_copy):
    edit(demo_copy / "analyses.yaml", "CO2: 30.0, LOI: 33.0}", "carbonic acid: 30.0, "
          "loss on ignition: 33.0}")
    _, r = check(demo_copy)
    assert r.quantities["BS-1"]["loss_on_ignition"].value == pytest.approx(33.0)
    assert r.quantities["BS-1"]["co2_gap"] is not None


BAD = [
    pytest.param("analyses.yaml", "CO2: 30.0, LOI: 33.0}", "CO2: 30.0, H2O_organic: 7.2, LOI: 33.0}",
                 "analyses.yaml, line 9: analyses[0].mass_percent.H2O_organic: unknown "
                 "constituent 'H2O_organic'. Fix: did you mean 'organic'? Use a name of the list "
                 "in the format reference (content/data/constituents.yaml): oxides such as CaO, "
                 "SiO2; LOI, CO2, H2O+ (combined water), H2O- (moisture), organic matter, "
                 "insoluble residue.", id="unknown_constituent"),
    pytest.param("analyses.yaml", "CO2: 30.0, LOI: 33.0}", "CO2: 30.0, LOI: 33.0, "
                 "loss on ignition: 33.0}",
                 "analyses.yaml, line 9: analyses[0].mass_percent: 'LOI' and 'loss on ignition' "
                 "name the same constituent (LOI). Fix: give it once (keep the value the report "
                 "prints under its own name).", id="one_constituent_twice"),
    pytest.param("materials.yaml", 'chloride: "0.12 %"', "chloride: 0.12",
                 "materials.yaml, line 23: masonry_units[0].salts.chloride: the number 0.12 has "
                 "no unit. Fix: write it with its unit, e.g. '0.12 %' (mass % of the dry "
                 "material) or in ppm.", id="salt_content_without_unit"),
]


@pytest.mark.parametrize("path, old, new, message", BAD)
def test_bad_constituent_input(demo_copy, path, old, new, message):
    edit(demo_copy / path, old, new)
    assert message in problems(demo_copy)


def test_salt_content_in_ppm_is_converted(demo_copy):
    edit(demo_copy / "materials.yaml", 'chloride: "0.12 %"', 'chloride: "5000 ppm"')
    _, r = check(demo_copy)
    # 5000 ppm = 0.5 % (1 % = 10 000 ppm, SI definition of ppm as 1e-6): the lower edge of
    # 'high' chloride in the project's WTA table (over 0,5 M.-%, as salt_summary_wta gives it;
    # a content at the edge falls in the upper class); 0.12 % was 'low'
    assert r.quantities["Z1/M1"]["salt_load_class"].value["EB1"]["chloride"] == "high"


def test_format_reference_lists_constituents_and_real_types():
    text = markdown()
    assert "## Constituents of an analysis (`analyses.yaml`, `mass_percent`)" in text
    assert "| `organic` | organic matter | volatile: counts as loss | `organic matter`" in text
    assert ("| `requirements.min_compressive[].age` | time, e.g. '28 d', '90 min' | required |"
            in text)
    assert "| `masonry_units[].salts.chloride` | mass %, with its unit, e.g. '0.35 %'" in text
