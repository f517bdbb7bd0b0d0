"""Mix design: volume → mass proportions and the absolute-volume yield, checked by hand and pint."""
import re

import pytest
from hypothesis import given
from hypothesis import strategies as st

from specgen import units
from specgen.science.mix_design import (Constituent, MixDesignError, absolute_volume_yield,
                                        mass_proportions, volume_ratio)

NHL = Constituent("B", "binder", 1.0, 700.0, 2700.0)
SAND = Constituent("S", "sand", 3.0, 1500.0, 2650.0)


def test_hand_worked_absolute_volume_example():
    # Hand-worked example (every number below worked by hand, inputs invented for the test):
    # a 1 : 3 mix by loose volume; loose bulk densities 700 (binder) and 1500 kg/m³ (sand);
    # particle densities 2700 and 2650 kg/m³; water/binder 0.8 by mass; air 5 %; water
    # 1000 kg/m³; a retarder at 0.2 % of the binder mass.
    y = absolute_volume_yield([NHL, SAND], 0.8, 0.05, 1000.0, {"retarder": 0.002})
    # 1. One batch = 1 m³ of loose binder + 3 m³ of loose sand:
    #    m_B = 1 × 700 = 700 kg,  m_S = 3 × 1500 = 4500 kg.
    assert y.masses == {"B": pytest.approx(700.0), "S": pytest.approx(4500.0)}
    # 2. Water m_w = 0.8 × 700 = 560 kg; retarder 0.002 × 700 = 1.4 kg (volume neglected).
    assert y.water == pytest.approx(560.0)
    assert y.admixtures["retarder"] == pytest.approx(1.4)
    # 3. Absolute volumes: 700/2700 = 0.259259 m³, 4500/2650 = 1.698113 m³, 560/1000 = 0.56 m³;
    #    sum 0.259259 + 1.698113 + 0.56 = 2.517372 m³.
    assert y.absolute_volumes["B"] == pytest.approx(0.259259, abs=1e-6)
    assert y.absolute_volumes["S"] == pytest.approx(1.698113, abs=1e-6)
    assert y.absolute_volumes["water"] == pytest.approx(0.56, rel=1e-12)
    assert y.solid_water_volume == pytest.approx(2.517372, abs=1e-6)
    # 4. Fresh volume with 5 % air: 2.517372 / (1 − 0.05) = 2.649866 m³.
    assert y.fresh_volume == pytest.approx(2.649866, abs=1e-6)
    # 5. Per m³ of fresh mortar: 700/2.649866 = 264.16 kg binder, 4500/2.649866 = 1698.20 kg
    #    sand, 560/2.649866 = 211.33 kg water, 1.4/2.649866 = 0.5283 kg retarder.
    assert y.per_m3["B"] == pytest.approx(264.16, abs=0.01)
    assert y.per_m3["S"] == pytest.approx(1698.20, abs=0.01)
    assert y.per_m3["water"] == pytest.approx(211.33, abs=0.01)
    assert y.per_m3["retarder"] == pytest.approx(0.5283, abs=1e-4)
    # 6. Fresh density (700 + 4500 + 560 + 1.4) / 2.649866 = 5761.4 / 2.649866 = 2174.22 kg/m³.
    assert y.fresh_density == pytest.approx(2174.22, abs=0.01)
    assert y.binder_mass_per_m3 == pytest.approx(264.16, abs=0.01)
    assert y.loose_volume == pytest.approx(4.0)


def test_mass_proportions_and_volume_ratio():
    # By hand: sand/binder by mass = (3 × 1500)/(1 × 700) = 6.4286; by volume 3/1 = 3.
    assert mass_proportions([NHL, SAND]) == {"B": pytest.approx(1.0),
                                              "S": pytest.approx(6.428571, abs=1e-6)}
    assert volume_ratio([NHL, SAND]) == pytest.approx(3.0)


def test_bulk_density_conversion_against_pint():
    # A density given in lb/ft³ (the unit ASTM C270 tabulates loose bulk densities in) is
    # converted at the edge; the value must equal pint's own conversion (reference library).
    si = units.to_si(80, "lb/ft^3", "density")
    assert si == pytest.approx(units.ureg.Quantity(80, "lb/ft**3").to("kg/m**3").magnitude)
    # 80 lb/ft³ = 80 × 0.45359237 kg / 0.028316847 m³ = 1281.5 kg/m³ (exact definitions of the
    # pound and the foot); the default loose bulk density of sand in mix_densities.yaml.
    assert si == pytest.approx(1281.5, abs=0.05)


def test_litres_and_percent_against_pint():
    assert units.to_si(1, "L", "volume") == pytest.approx(
        units.ureg.Quantity(1, "L").to("m**3").magnitude)
    assert units.parse("0.2 %", "fraction") == pytest.approx(0.002)


def _whole(words):
    # the whole message, not a fragment of it
    return f"^{re.escape(words)}$"


@pytest.mark.parametrize("items, words", [
    ([SAND], "a mix needs at least one binder"),
    ([], "a mix needs at least one binder"),
    ([Constituent("B", "binder", 0.0, 700.0, 2700.0), SAND],
     "B: parts and densities must be greater than zero"),
    ([NHL, Constituent("S", "sand", 3.0, 0.0, 2650.0)],
     "S: parts and densities must be greater than zero"),
    ([NHL, Constituent("S", "sand", 3.0, -1500.0, -2650.0)],
     "S: parts and densities must be greater than zero"),
    ([NHL, Constituent("S", "sand", 3.0, 1500.0, 0.0)],
     "S: parts and densities must be greater than zero"),
    ([Constituent("B", "binder", 1.0, 2800.0, 2700.0), SAND],
     "B: the loose bulk density (2800 kg/m³) must be below the particle density (2700)"),
    # equal densities would mean a loose heap without voids: refused too
    ([NHL, Constituent("S", "sand", 3.0, 2650.0, 2650.0)],
     "S: the loose bulk density (2650 kg/m³) must be below the particle density (2650)"),
])
def test_unusable_proportions_are_refused(items, words):
    for fn in (mass_proportions, volume_ratio):
        with pytest.raises(MixDesignError, match=_whole(words)):
            fn(items)
    with pytest.raises(MixDesignError, match=_whole(words)):
        absolute_volume_yield(items, 0.8, 0.05, 1000.0)


@pytest.mark.parametrize("wb, air, rho_w, words", [
    (0.0, 0.04, 1000.0, "the water/binder ratio must be greater than zero"),
    (-0.5, 0.04, 1000.0, "the water/binder ratio must be greater than zero"),
    (float("nan"), 0.04, 1000.0, "the water/binder ratio must be greater than zero"),
    (0.8, 0.6, 1000.0, "the air content must lie between 0 and 50 %"),
    (0.8, 0.5, 1000.0, "the air content must lie between 0 and 50 %"),
    (0.8, -0.01, 1000.0, "the air content must lie between 0 and 50 %"),
    (0.8, 0.04, 0.0, "the water density must be greater than zero"),
    (0.8, 0.04, -998.2, "the water density must be greater than zero"),
])
def test_unusable_water_or_air_is_refused(wb, air, rho_w, words):
    with pytest.raises(MixDesignError, match=_whole(words)):
        absolute_volume_yield([NHL, SAND], wb, air, rho_w)


def test_air_at_the_edges_of_its_range():
    # no air: the fresh volume is the absolute volume, 2.517372 m³ (hand example above)
    y = absolute_volume_yield([NHL, SAND], 0.8, 0.0, 1000.0)
    assert y.fresh_volume == pytest.approx(2.517372, abs=1e-6)
    assert y.admixtures == {} and set(y.per_m3) == {"B", "S", "water"}
    # 49 % air, just inside the range: 2.517372 / 0.51 = 4.936024 m³
    assert absolute_volume_yield([NHL, SAND], 0.8, 0.49, 1000.0).fresh_volume == \
        pytest.approx(4.936024, abs=1e-6)


def test_the_method_is_scale_free_in_tonnes():
    # the absolute-volume method is linear in mass: densities in t/m³ (every density of the
    # hand example / 1000, water 1.0 t/m³) give the same volumes and masses / 1000; a
    # lightweight filler with densities below 1 t/m³ (bulk 0.3, particle 0.9) is a mix too
    b = Constituent("B", "binder", 1.0, 0.7, 2.7)
    s = Constituent("S", "sand", 3.0, 1.5, 2.65)
    y = absolute_volume_yield([b, s], 0.8, 0.05, 1.0)
    assert y.fresh_volume == pytest.approx(2.649866, abs=1e-6)
    # without the retarder: (0.7 + 4.5 + 0.56) t / 2.649866 m³ = 2.173695 t/m³
    assert y.fresh_density == pytest.approx(2.173695, abs=1e-6)
    light = Constituent("P", "sand", 1.0, 0.3, 0.9)
    # by hand: 0.7 t binder, 0.3 t filler, water 0.56 t; volumes 0.7/2.7 + 0.3/0.9 + 0.56/1
    # = 0.259259 + 0.333333 + 0.56 = 1.152593 m³ (no air)
    yl = absolute_volume_yield([b, light], 0.8, 0.0, 1.0)
    assert yl.solid_water_volume == pytest.approx(1.152593, abs=1e-6)
    assert mass_proportions([b, light]) == pytest.approx({"B": 1.0, "P": 0.3 / 0.7}, rel=1e-12)


def test_two_binders_and_two_sands_by_hand():
    # binders 1 part × 700 = 700 kg and 0.5 part × 1000 = 500 kg: Σ binder 1200 kg;
    # sands 2 × 1500 = 3000 kg and 1 × 1400 = 1400 kg
    items = [NHL, Constituent("L", "binder", 0.5, 1000.0, 2300.0), Constituent(
        "S", "sand", 2.0, 1500.0, 2650.0), Constituent("F", "sand", 1.0, 1400.0, 2600.0)]
    # per unit binder mass: 700/1200, 500/1200, 3000/1200, 1400/1200
    assert mass_proportions(items) == pytest.approx(
        {"B": 0.583333, "L": 0.416667, "S": 2.5, "F": 1.166667}, abs=1e-6)
    # by loose volume: (2 + 1) sand parts / (1 + 0.5) binder parts = 2
    assert volume_ratio(items) == pytest.approx(2.0, rel=1e-12)
    # yield with w/b 0.5 (600 kg water), no air, water 1000 kg/m³: absolute volumes
    # 700/2700 + 500/2300 + 3000/2650 + 1400/2600 + 0.6 = 0.259259 + 0.217391 + 1.132075
    # + 0.538462 + 0.6 = 2.747187 m³; binder per m³ 1200 / 2.747187 = 436.81 kg
    y = absolute_volume_yield(items, 0.5, 0.0, 1000.0)
    assert y.water == pytest.approx(600.0, rel=1e-12)
    assert y.solid_water_volume == pytest.approx(2.747187, abs=1e-6)
    assert y.binder_mass_per_m3 == pytest.approx(436.81, abs=0.01)
    assert y.loose_volume == pytest.approx(4.5, rel=1e-12)
    # fresh density (1200 + 4400 + 600) / 2.747187 = 2256.85 kg/m³
    assert y.fresh_density == pytest.approx(2256.85, abs=0.01)


@given(st.floats(0.5, 6), st.floats(0.3, 1.2), st.floats(0.0, 0.2))
def test_yield_conserves_mass_and_volume(sand_parts, wb, air):
    # Property: the constituents of one m³ weigh the fresh density, and their absolute
    # volumes plus the air fill exactly one m³.
    items = [NHL, Constituent("S", "sand", sand_parts, 1500.0, 2650.0)]
    y = absolute_volume_yield(items, wb, air, 998.2)
    assert sum(y.per_m3.values()) == pytest.approx(y.fresh_density)
    filled = y.per_m3["B"] / 2700 + y.per_m3["S"] / 2650 + y.per_m3["water"] / 998.2
    assert filled + air == pytest.approx(1.0)
