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
    # a 0.25 L scoop fits once (0.25 × 2.4 = 0.6 L ≤ 0.889 L); the 2.5 L bucket is above the
    # 1 L measure named, so never chosen.  Real measures: common practice.
    v10 = bt.max_gauging_volume(10 * 60, 8 * L / 3600, 1.5)
    real = [m * L for m in (0.25, 0.5, 1.0, 2.5)]
    assert bt.fitting_measure(v10, 1 * L, 2.4, real) == (pytest.approx(0.25 * L), 1)
    assert bt.fitting_measure(v10, 1 * L, 2.4, real[1:]) == (pytest.approx(0.5 * L), 0)
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


# Every refusal, its whole message (anchored: a changed word fails), one argument at a time.
@pytest.mark.parametrize("call, message", [
    (lambda: wk.joint_length_per_m2(0.0, 0.065, 0.01), "length must be greater than zero; found 0.0"),
    (lambda: wk.joint_length_per_m2(0.215, -1.0, 0.01), "height must be greater than zero; found -1.0"),
    (lambda: wk.joint_length_per_m2(0.215, 0.065, 0.0), "joint must be greater than zero; found 0.0"),
    (lambda: wk.joint_length_per_m2(0.215, 0.065, float("nan")),
     "joint must be greater than zero; found nan"),
    (lambda: wk.joint_length_per_m2(0.215, 0.065, 0.065),       # joint = height: refused
     "the joint (0.065 m) is not narrower than the unit (0.215 × 0.065 m)"),
    (lambda: wk.repointing_volume(10.0, 0.0, 0.01, 0.02),
     "joint_length must be greater than zero; found 0.0"),
    (lambda: wk.repointing_volume(10.0, 17.2, 0.0, 0.02),
     "joint_width must be greater than zero; found 0.0"),
    (lambda: wk.repointing_volume(10.0, 17.2, 0.01, 0.0),
     "joint_depth must be greater than zero; found 0.0"),
    (lambda: wk.render_volume(0.0, [0.01]), "area must be greater than zero; found 0.0"),
    (lambda: wk.render_volume(10.0, []), "a render needs at least one coat"),
    (lambda: wk.render_volume(10.0, [0.012, 0.0]), "coat 2 thickness must be greater than zero; found 0.0"),
    (lambda: wk.bedding_volume(0.0, 0.2), "masonry_volume must be greater than zero; found 0.0"),
    (lambda: wk.bedding_volume(1.0, 0.0), "mortar_fraction must be greater than zero; found 0.0"),
    (lambda: wk.bedding_volume(1.0, 1.0), "the mortar fraction must be below 1; found 1"),
    (lambda: wk.with_wastage(0.0, 0.1), "net_volume must be greater than zero; found 0.0"),
    (lambda: wk.with_wastage(1.0, -0.01), "the wastage allowance must lie in 0–100 %; found -0.01"),
    (lambda: wk.with_wastage(1.0, 1.0), "the wastage allowance must lie in 0–100 %; found 1"),
    (lambda: wk.totals(0.0, {"B": 300.0}), "volume must be greater than zero; found 0.0"),
    (lambda: wk.totals(1.0, {"B": 300.0}, {"B": 0.0}),
     "bag mass of B must be greater than zero; found 0.0"),
    (lambda: wk.bags_needed(10.0, -25.0), "bag_mass must be greater than zero; found -25.0"),
])
def test_every_works_refusal_word_for_word(call, message):
    with pytest.raises(wk.WorksInputError) as exc:
        call()
    assert str(exc.value) == message


def test_works_boundaries_by_hand():
    # a joint just narrower than the unit is accepted: (0.215 + 0.0649 + 0.065) /
    # ((0.215 + 0.0649)(0.065 + 0.0649)) = 0.3449 / 0.0363590 = 9.4860 m/m²
    assert wk.joint_length_per_m2(0.215, 0.065, 0.0649) == pytest.approx(9.4860, abs=1e-4)
    # 230 x 75 mm units, 10 mm joints: (0.24 + 0.075) / (0.24 x 0.085) = 15.4412 m/m²
    assert wk.joint_length_per_m2(0.230, 0.075, 0.010) == pytest.approx(15.4412, abs=1e-4)
    # bedding: 1.8 m³ x 0.2 = 0.36 m³; render 85 m² x (12 + 8) mm = 1.7 m³
    assert wk.bedding_volume(1.8, 0.2) == pytest.approx(0.36, rel=1e-12)
    assert wk.render_volume(85.0, [0.012, 0.008]) == pytest.approx(1.7, rel=1e-12)
    # no wastage leaves the volume; 0.999 nearly doubles it
    assert wk.with_wastage(0.5, 0.0) == 0.5
    assert wk.with_wastage(0.5, 0.999) == pytest.approx(0.9995, rel=1e-12)
    # bags: exactly 50 kg is 2 bags of 25 kg (the rounding guard), 0 kg needs none
    assert wk.bags_needed(50.0, 25.0) == 2
    assert wk.bags_needed(50.0 + 1e-12, 25.0) == 2
    assert wk.bags_needed(0.0, 25.0) == 0
    assert wk.bags_needed(0.1, 25.0) == 1
    t = wk.totals(0.5, {"B": 300.0, "S": 1400.0}, {"B": 25.0})
    assert t.bags == {"B": 6} and t.volume == 0.5 and t.masses == {"B": 150.0, "S": 700.0}


@pytest.mark.parametrize("call, message", [
    (lambda: bt.max_gauging_volume(0, 1e-6, 1.5), "workable_life must be greater than zero; found 0"),
    (lambda: bt.max_gauging_volume(600, 0.0, 1.5), "placing_rate must be greater than zero; found 0.0"),
    (lambda: bt.max_gauging_volume(600, 1e-6, 0.99),
     "the safety factor must be at least 1; found 0.99"),
    (lambda: bt.binder_measures(0.0, 1e-3, 1.7), "v_max must be greater than zero; found 0.0"),
    (lambda: bt.binder_measures(1e-3, 0.0, 1.7), "measure must be greater than zero; found 0.0"),
    (lambda: bt.binder_measures(1e-3, 1e-3, 0.0),
     "fresh_per_loose_binder must be greater than zero; found 0.0"),
    (lambda: bt.fitting_measure(1e-3, 1e-3, 1.7, [0.0]), "measure must be greater than zero; found 0.0"),
    (lambda: bt.gaugings_per_day(0.0, 3600.0, 1e-3), "placing_rate must be greater than zero; found 0.0"),
    (lambda: bt.gaugings_per_day(1e-6, 0.0, 1e-3), "working_day must be greater than zero; found 0.0"),
    (lambda: bt.gaugings_per_day(1e-6, 3600.0, 0.0),
     "gauging_volume must be greater than zero; found 0.0"),
    (lambda: bt.gauging(0, 1e-3, {"B": 1}, 1, 1.7, {}), "a gauging needs at least one binder measure"),
    (lambda: bt.gauging(1, 0.0, {"B": 1}, 1, 1.7, {}), "measure must be greater than zero; found 0.0"),
    (lambda: bt.gauging(1, 1e-3, {"B": 1}, 0.0, 1.7, {}),
     "binder_parts must be greater than zero; found 0.0"),
    (lambda: bt.gauging(1, 1e-3, {"B": 1}, 1, 0.0, {}),
     "fresh_per_loose_binder must be greater than zero; found 0.0"),
])
def test_every_batching_refusal_word_for_word(call, message):
    with pytest.raises(bt.BatchingInputError) as exc:
        call()
    assert str(exc.value) == message


def test_batching_boundaries_by_hand():
    # safety factor exactly 1 is allowed: 10 min x 6 L/h = 1 L
    assert bt.max_gauging_volume(600, 6 * L / 3600, 1.0) / L == pytest.approx(1.0, rel=1e-12)
    # exactly one measure's worth: 1.7 L / (1 L x 1.7) = 1 measure (the guard keeps it 1);
    # 3.4 L -> 2 measures
    assert bt.binder_measures(1.7 * L, 1 * L, 1.7) == 1
    assert bt.binder_measures(3.4 * L, 1 * L, 1.7) == 2
    assert bt.binder_measures(1.69 * L, 1 * L, 1.7) == 0
    # a measure that already fits is kept (real measures 0.25, 0.5, 1 L: common practice)
    real = [0.25 * L, 0.5 * L, 1 * L]
    assert bt.fitting_measure(2.0 * L, 1 * L, 1.7, real) == (1 * L, 1)
    # the smallest real measure fits exactly: 0.25 x 2.4 = 0.6 L
    assert bt.fitting_measure(0.6 * L, 1 * L, 2.4, real) == (pytest.approx(0.25 * L), 1)
    # exactly one gauging's worth a day: 48 L in gaugings of 48 L -> 1; 48.1 L -> 2
    assert bt.gaugings_per_day(8 * L / 3600, 6 * 3600, 48 * L) == 1
    assert bt.gaugings_per_day(8.02 * L / 3600, 6 * 3600, 48 * L) == 2
    # one binder measure of a 1 : 2.5 mix: sand 2.5 measures, binder 1; volume 1 x 1 L x 2.34
    g = bt.gauging(1, 1 * L, {"NH35": 1, "S1": 2.5}, 1, 2.341115, {"NH35": 299.0, "water": 224.25})
    assert g.binder_measures == 1 and g.measures == {"NH35": 1.0, "S1": 2.5}
    assert g.volume / L == pytest.approx(2.341115, rel=1e-12)
    assert g.masses == {"NH35": pytest.approx(0.7, abs=1e-4), "water": pytest.approx(0.525, abs=1e-4)}


@pytest.mark.parametrize("width, ratio, minimum, depth", [
    # max(ratio·j, d_min) by hand (common practice: rake out to about twice the joint width,
    # never under a keying depth): 2.5 × 10 mm = 25 mm over a 20 mm least depth; 2 × 8 mm =
    # 16 mm is shallower than 20 mm, so 20 mm; 2 × 10 mm = 20 mm meets it exactly
    (0.010, 2.5, 0.020, 0.025),
    (0.008, 2.0, 0.020, 0.020),
    (0.010, 2.0, 0.020, 0.020),
])
def test_rake_out_depth_by_hand(width, ratio, minimum, depth):
    assert wk.rake_out_depth(width, ratio, minimum) == pytest.approx(depth, rel=1e-12)


@pytest.mark.parametrize("rate, day, volume, area, bay", [
    # min(q·T·A/V, A) by hand: 0.25 m³/h for 8 h = 2 m³ a day; a zone of 40 m² taking 0.8 m³
    # (0.02 m³/m²) -> 2 / 0.02 = 100 m², more than the zone: the bay is the zone, 40 m²;
    # with 4 m³ net (0.1 m³/m²) -> 2 / 0.1 = 20 m²; with exactly 2 m³ (0.05 m³/m²) -> 40 m²
    (0.25 / 3600, 8 * 3600.0, 0.8, 40.0, 40.0),
    (0.25 / 3600, 8 * 3600.0, 4.0, 40.0, 20.0),
    (0.25 / 3600, 8 * 3600.0, 2.0, 40.0, 40.0),
])
def test_bay_area_by_hand(rate, day, volume, area, bay):
    assert wk.bay_area(rate, day, volume, area) == pytest.approx(bay, rel=1e-12)


@pytest.mark.parametrize("call, message", [
    (lambda: wk.rake_out_depth(0.0, 2.0, 0.02), "joint_width must be greater than zero; found 0.0"),
    (lambda: wk.rake_out_depth(0.01, -1.0, 0.02), "ratio must be greater than zero; found -1.0"),
    (lambda: wk.rake_out_depth(0.01, 2.0, float("nan")),
     "minimum must be greater than zero; found nan"),
    (lambda: wk.bay_area(0.0, 1.0, 1.0, 1.0), "rate must be greater than zero; found 0.0"),
    (lambda: wk.bay_area(1.0, -2.0, 1.0, 1.0), "day must be greater than zero; found -2.0"),
    (lambda: wk.bay_area(1.0, 1.0, 0.0, 1.0), "volume_net must be greater than zero; found 0.0"),
    (lambda: wk.bay_area(1.0, 1.0, 1.0, float("inf")),
     "area must be greater than zero; found inf"),
])
def test_rake_out_and_bay_refusals_word_for_word(call, message):
    with pytest.raises(wk.WorksInputError) as exc:
        call()
    assert str(exc.value) == message
