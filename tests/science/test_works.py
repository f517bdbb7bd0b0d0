"""Works quantities and site batching: joint length, volumes, wastage once, bags, gaugings."""
import math

import pytest
from hypothesis import given
from hypothesis import strategies as st

from specgen import units
from specgen.science import batching as bt
from specgen.science import works as wk

MM, L = 1e-3, 1e-3


def test_joint_length_of_brickwork_in_stretcher_bond():
    # 215 × 65 mm bricks with 10 mm joints: about 17.2 m of joint per m² of wall
    # (common practice, computed): bed joints 1/0.075 = 13.333 m/m², perpends
    # 0.065/(0.225 × 0.075) = 3.852 m/m², together 17.185 m/m².
    assert wk.joint_length_per_m2(215 * MM, 65 * MM, 10 * MM) == pytest.approx(17.185, abs=0.001)
    assert wk.joint_length_per_m2(215 * MM, 65 * MM, 10 * MM) == pytest.approx(17.2, abs=0.05)


def test_joint_length_in_other_units_via_pint():
    # The same brick written in inches converts at the edge to the same joint length
    # (8.4646 × 2.5591 in with 0.3937 in joints; pint's inch is exactly 25.4 mm).
    l, h, j = (units.to_si(v, "in", "length") for v in (215 / 25.4, 65 / 25.4, 10 / 25.4))
    assert l == pytest.approx(units.ureg.Quantity(215 / 25.4, "inch").to("m").magnitude)
    assert wk.joint_length_per_m2(l, h, j) == pytest.approx(17.185, abs=0.001)


def test_repointing_render_and_bedding_volumes_by_hand():
    # Repointing 10 m² at 17.185 m/m², joints 10 mm wide raked 20 mm deep:
    # 10 × 17.185 × 0.010 × 0.020 = 0.03437 m³ (by hand).
    assert wk.repointing_volume(10, 17.185, 10 * MM, 20 * MM) == pytest.approx(0.03437)
    # Render 85 m² in coats of 12 and 8 mm: 85 × 0.020 = 1.7 m³ (by hand).
    assert wk.render_volume(85, [12 * MM, 8 * MM]) == pytest.approx(1.7)
    # Rebedding 1.8 m³ of masonry holding 20 % mortar: 0.36 m³ (by hand).
    assert wk.bedding_volume(1.8, 0.20) == pytest.approx(0.36)


def test_totals_and_bags():
    # 0.5 m³ of a mortar with 300 kg binder/m³: 150 kg, six 25 kg bags; 151 kg needs seven.
    t = wk.totals(0.5, {"B": 300.0, "water": 220.0}, {"B": 25.0})
    assert t.masses == {"B": pytest.approx(150.0), "water": pytest.approx(110.0)}
    assert t.bags == {"B": 6}
    assert wk.bags_needed(151.0, 25.0) == 7


@pytest.mark.parametrize("call, words", [
    (lambda: wk.joint_length_per_m2(0.215, 0.065, 0.070), "not narrower than the unit"),
    (lambda: wk.repointing_volume(0.0, 17.2, 0.01, 0.02), "area must be greater than zero"),
    (lambda: wk.repointing_volume(-5.0, 17.2, 0.01, 0.02), "area must be greater than zero"),
    (lambda: wk.render_volume(10.0, []), "at least one coat"),
    (lambda: wk.bedding_volume(1.0, 1.2), "mortar fraction must be below 1"),
    (lambda: wk.with_wastage(1.0, 1.5), "wastage allowance"),
])
def test_unusable_dimensions_are_refused(call, words):
    with pytest.raises(wk.WorksInputError, match=words):
        call()


@given(st.floats(0.5, 5000), st.floats(1.5, 200), st.floats(0.0, 0.5))
def test_quantities_scale_linearly_with_area(area, k, wastage):
    # Property: k times the wall area gives k times every quantity.
    per_m3 = {"B": 350.0, "S": 1400.0, "water": 250.0}

    def masses(a):
        v = wk.with_wastage(wk.repointing_volume(a, 17.185, 10 * MM, 20 * MM), wastage)
        return wk.totals(v, per_m3).masses
    one, many = masses(area), masses(k * area)
    for name in per_m3:
        assert many[name] == pytest.approx(k * one[name], rel=1e-9)


@given(st.floats(0.01, 100), st.floats(0.0, 0.5))
def test_wastage_applied_once(net, wastage):
    # Property: the volume mixed is V_net (1 + w), and constituent totals are c·V with the
    # same V — never a second (1 + w).
    v = wk.with_wastage(net, wastage)
    assert v == pytest.approx(net * (1 + wastage))
    t = wk.totals(v, {"B": 300.0})
    assert t.masses["B"] == pytest.approx(300.0 * net * (1 + wastage))


def test_largest_gauging_and_measures_by_hand():
    # 30 min workable life, 8 L/h crew, safety factor 1.5: 0.5 h × 8 L/h / 1.5 = 2.667 L.
    v = bt.max_gauging_volume(30 * 60, 8 * L / 3600, 1.5)
    assert v / L == pytest.approx(2.6667, abs=1e-4)
    # One litre of loose binder yields 1.7 L of mortar: ⌊2.667 / 1.7⌋ = 1 measure.
    assert bt.binder_measures(v, 1 * L, 1.7) == 1
    # 10 min at 8 L/h / 1.5 = 0.889 L; 1 L and 0.5 L measures are too big for a 2.4 L/L yield,
    # a 0.25 L one fits once (0.25 × 2.4 = 0.6 L ≤ 0.889 L).
    v10 = bt.max_gauging_volume(10 * 60, 8 * L / 3600, 1.5)
    assert bt.fitting_measure(v10, 1 * L, 2.4, 0.25 * L) == (pytest.approx(0.25 * L), 1)
    assert bt.fitting_measure(v10, 1 * L, 2.4, 0.5 * L) == (pytest.approx(0.5 * L), 0)
    # 8 L/h for 6 h in gaugings of 1.7 L: ⌈48 / 1.7⌉ = 29 gaugings.
    assert bt.gaugings_per_day(8 * L / 3600, 6 * 3600, 1.7 * L) == 29


def test_gauging_contents_by_hand():
    # Two 1 L binder measures of a 1 : 1 : 0.5 mix yielding 1.7 L per L of binder:
    # sand measures 2 × 1/1 = 2 and 2 × 0.5/1 = 1; fresh volume 2 × 1 × 1.7 = 3.4 L;
    # water at 275 kg/m³: 275 × 0.0034 = 0.935 kg.
    g = bt.gauging(2, 1 * L, {"B": 1, "S1": 1, "S2": 0.5}, 1, 1.7, {"B": 500.0, "water": 275.0})
    assert g.measures == {"B": 2, "S1": 2, "S2": 1}
    assert g.volume / L == pytest.approx(3.4)
    assert g.masses["water"] == pytest.approx(0.935)
    assert math.isclose(g.masses["B"], 1.7)


@pytest.mark.parametrize("call, words", [
    (lambda: bt.max_gauging_volume(0, 1e-6, 1.5), "workable_life must be greater than zero"),
    (lambda: bt.max_gauging_volume(600, 1e-6, 0.9), "safety factor must be at least 1"),
    (lambda: bt.gauging(0, 1e-3, {"B": 1}, 1, 1.7, {}), "at least one binder measure"),
])
def test_unusable_site_rates_are_refused(call, words):
    with pytest.raises(bt.BatchingInputError, match=words):
        call()
