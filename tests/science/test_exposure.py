"""Exposure classes, carbonation front and soundness bounds: tables and worked examples.

Sources beside each value: EN 1996-1-1 Annex A Table A.1 (from memory), ASTM C270 Table X1.1
(from memory), worked by hand, or a reference library (numpy).
"""
from __future__ import annotations

import math

import numpy as np
import pytest

from specgen import refdata, units
from specgen.science import carbonation as cb
from specgen.science import exposure as ex
from specgen.science import soundness as sd

VOCAB = refdata.load("exposure_classes").data["conditions"]


@pytest.mark.parametrize("conditions, freezing, designation", [
    # EN 1996-1-1 Annex A, Table A.1 (from memory): MX1 dry; MX2.1 moisture; MX2.2 severe
    # wetting; MX3.1 / MX3.2 the same with freeze-thaw; MX4 salt air, sea water or de-icing
    # salts; MX5 aggressive chemicals.
    (["internal"], True, "MX1"),
    (["sheltered"], False, "MX2.1"),
    (["parapet"], False, "MX2.2"),
    (["sheltered"], True, "MX3.1"),
    (["parapet", "coping"], True, "MX3.2"),
    (["exposed", "salt_spray"], True, "MX4 with MX3.1"),
    (["tidal", "splash"], True, "MX4 with MX3.2"),
    (["submerged"], True, "MX4 with MX2.2"),            # permanently immersed: not cycled
    (["submerged", "splash"], True, "MX4 with MX3.2"),  # the splash part is cycled
    (["aggressive_ground"], False, "MX5 with MX2.2"),
    (["exposed", "deicing_salts"], False, "MX4 with MX2.1"),
])
def test_micro_conditions(conditions, freezing, designation):
    assert ex.classify(conditions, VOCAB, freezing).designation == designation


def test_unknown_frost_is_said_not_guessed():
    ec = ex.classify(["parapet"], VOCAB, None)
    assert ec.freeze_thaw is None and ec.base == "MX2.2"
    assert any("site climate not stated" in r for r in ec.reasons)
    assert ex.weathering(ec) == "unknown"


@pytest.mark.parametrize("conditions, location", [
    # ASTM C270 Table X1.1 (from memory): interior; exterior above grade; parapet; at or below
    # grade (foundations, retaining walls, manholes, sewers, pavements)
    (["internal"], "interior"),
    (["exposed"], "exterior_above_grade"),
    (["parapet", "exposed"], "parapet"),
    (["tidal", "splash"], "at_or_below_grade"),
])
def test_american_location(conditions, location):
    assert ex.american_location(conditions) == location
    # recommended type by location, ASTM C270 Table X1.1 (from memory): N, N, N, S
    table = refdata.load("exposure_classes").data["american"]
    assert table[location]["recommended"] == {"interior": "N", "exterior_above_grade": "N",
                                              "parapet": "N", "at_or_below_grade": "S"}[location]


def test_weathering_severity():
    # common practice reading of the weathering regions: frost + severe wetting → severe
    assert ex.weathering(ex.classify(["tidal"], VOCAB, True)) == "severe"
    assert ex.weathering(ex.classify(["exposed"], VOCAB, True)) == "moderate"
    assert ex.weathering(ex.classify(["exposed"], VOCAB, False)) == "negligible"


def test_carbonation_coefficient_worked_by_hand():
    day = 86400.0
    ages, depths = [28 * day, 90 * day], [4.5e-3, 8.0e-3]
    k = cb.fit_coefficient(ages, depths)
    # by hand: K = (4.5·√28 + 8·√90) / (28 + 90) = (23.812 + 75.895) / 118 = 0.84497 mm/√d
    assert k * 1e3 * math.sqrt(day) == pytest.approx(0.84497, abs=1e-4)
    # by hand: t = (20 / 0.84497)² = 560.2 d
    assert cb.time_to_depth(20e-3, k) / day == pytest.approx(560.2, abs=0.1)
    # reference library: least squares through the origin of x on √t (numpy.linalg.lstsq)
    a = np.sqrt(np.array(ages))[:, None]
    ref = np.linalg.lstsq(a, np.array(depths), rcond=None)[0][0]
    assert k == pytest.approx(ref, rel=1e-12)


def test_carbonation_refuses_bad_readings():
    with pytest.raises(ValueError, match="ages must be positive"):
        cb.fit_coefficient([0.0], [1e-3])
    with pytest.raises(ValueError, match="as many depths as ages"):
        cb.fit_coefficient([1.0, 2.0], [1e-3])


def test_free_lime_range_worked_by_hand():
    aw = refdata.load("atomic_weights").data
    ox = {"SiO2": 21.5, "Al2O3": 8.1, "Fe2O3": 4.2, "CaO": 57.9, "MgO": 2.3, "SO3": 0.9,
          "K2O": 1.1, "Na2O": 0.3, "CO2": 1.9, "LOI": 3.2}     # demo analysis NC1-A
    rng = sd.free_oxide_range(ox, aw)
    # by hand, amorphous assignment: CaO to calcite 1.9 × 56.077/44.009 = 2.421, to CaSO4
    # 0.9 × 56.077/80.063 = 0.630, to C2S 21.5 × 2 × 56.077/60.084 = 40.133 → free lime
    # 57.9 − 2.421 − 0.630 − 40.133 = 14.716 %
    assert rng.free_lime["amorphous"] == pytest.approx(14.716, abs=0.01)
    # C4AF + C3A binds lime to all the alumina and iron, and belite then takes what is left
    # (lime-limited): no free lime — so the range over the assignments is 0 to 14.7 %
    assert rng.low == pytest.approx(0.0, abs=1e-9) and rng.high == rng.free_lime["amorphous"]
    assert rng.periclase == pytest.approx(2.3)                 # all MgO: the upper bound


@pytest.mark.parametrize("peak, where", [(850, "under"), (930, "within"), (1150, "over")])
def test_firing_position(peak, where):
    # kiln stages, common practice (content/data/kiln_stages.yaml): calcite decomposition
    # 800–900 °C, usual natural-cement firing 750–1100 °C
    assert sd.firing_position(peak, refdata.load("kiln_stages").data)[0] == where


def test_absorption_rate_unit():
    # 30 g/min over 30 in² (1 in = 25.4 mm exactly): 1 g/(min·in²) = 1.5500 kg/(m²·min)
    v = units.parse("1 g/(min*in^2)", "absorption_rate") * 60
    assert v == pytest.approx(1e-3 / 0.0254 ** 2, rel=1e-12)
    assert v == pytest.approx(1.5500, abs=1e-4)


# The reasoning of each classification, step by step: the steps of EN 1996-1-1 Annex A
# Table A.1 (from memory: wetting level, then freeze-thaw, then salt and chemical sources),
# in our words; each step is written out here as the dossier shows it.
DRY_STEP = "dry: no wetting, so no freeze-thaw cycling → MX1"
SALT_STEP = "salt air, sea water or de-icing salts → MX4"
CHEM_STEP = "aggressive chemical environment → MX5"
NOT_STATED = ("site climate not stated (dossier.yaml durability.freezing): taken without "
              "freeze-thaw until it is")


@pytest.mark.parametrize("conditions, freezing, whole", [
    # internal: dry, so no cycling even on a freezing site (Table A.1 MX1)
    (["internal"], True, ex.ExposureClass(
        "dry", False, (), False, "MX1", ("MX1",),
        ("internal: dry wetting", DRY_STEP))),
    # sheltered, climate not stated: MX2.1 held until the climate is stated
    (["sheltered"], None, ex.ExposureClass(
        "moisture", None, (), False, "MX2.1", ("MX2.1",),
        ("sheltered: moisture wetting",
         f"moisture wetting (MX2.1/MX3.1); {NOT_STATED} → MX2.1"))),
    (["sheltered"], False, ex.ExposureClass(
        "moisture", False, (), False, "MX2.1", ("MX2.1",),
        ("sheltered: moisture wetting",
         "moisture wetting (MX2.1/MX3.1); no freeze-thaw cycling (site without frost) → MX2.1"))),
    (["parapet"], True, ex.ExposureClass(
        "severe", True, (), False, "MX3.2", ("MX3.2",),
        ("parapet: severe wetting",
         "severe wetting (MX2.2/MX3.2); freezing site and the masonry wet → freeze-thaw "
         "cycling → MX3.2"))),
    # permanently immersed: sea water (MX4) but not cycled by frost (MX2.2)
    (["submerged"], True, ex.ExposureClass(
        "severe", False, ("permanent immersion",), False, "MX2.2", ("MX4", "MX2.2"),
        ("submerged: severe wetting; salt source: permanent immersion; not cycled by frost "
         "while immersed",
         "severe wetting (MX2.2/MX3.2); no freeze-thaw cycling (permanently immersed) → MX2.2",
         SALT_STEP))),
    (["tidal", "splash"], True, ex.ExposureClass(
        "severe", True, ("tidal wetting and drying", "splash and wave overtopping"), False,
        "MX3.2", ("MX4", "MX3.2"),
        ("tidal: severe wetting; salt source: tidal wetting and drying",
         "splash: severe wetting; salt source: splash and wave overtopping",
         "severe wetting (MX2.2/MX3.2); freezing site and the masonry wet → freeze-thaw "
         "cycling → MX3.2", SALT_STEP))),
    (["aggressive_ground"], False, ex.ExposureClass(
        "severe", False, (), True, "MX2.2", ("MX5", "MX2.2"),
        ("aggressive ground: severe wetting; aggressive chemical environment",
         "severe wetting (MX2.2/MX3.2); no freeze-thaw cycling (site without frost) → MX2.2",
         CHEM_STEP))),
    # one source named twice is listed once
    (["salt_spray", "exposed", "salt_spray"], True, ex.ExposureClass(
        "moisture", True, ("salt air or spray",), False, "MX3.1", ("MX4", "MX3.1"),
        ("salt spray: moisture wetting; salt source: salt air or spray",
         "exposed: moisture wetting",
         "salt spray: moisture wetting; salt source: salt air or spray",
         "moisture wetting (MX2.1/MX3.1); freezing site and the masonry wet → freeze-thaw "
         "cycling → MX3.1", SALT_STEP))),
])
def test_classification_whole_with_its_reasoning(conditions, freezing, whole):
    assert ex.classify(conditions, VOCAB, freezing) == whole


def test_no_condition_is_refused_with_the_whole_message():
    with pytest.raises(ValueError) as exc:
        ex.classify([], VOCAB, True)
    assert str(exc.value) == "no exposure condition given"


@pytest.mark.parametrize("condition, location", [
    # ASTM C270 Table X1.1 (from memory): foundation and retaining walls, manholes, sewers are
    # "at or below grade"; each of our below-grade conditions alone lands there
    ("below_dpc", "at_or_below_grade"), ("ground_contact", "at_or_below_grade"),
    ("submerged", "at_or_below_grade"), ("tidal", "at_or_below_grade"),
    ("aggressive_ground", "at_or_below_grade"),
    ("parapet", "parapet"), ("coping", "parapet"),          # a coping tops a parapet wall
    ("sheltered", "exterior_above_grade"), ("driving_rain", "exterior_above_grade"),
])
def test_american_location_of_each_condition_alone(condition, location):
    assert ex.american_location([condition]) == location


def test_carbonation_edges_worked_by_hand():
    day = 86400.0
    # a depth of zero (front not yet found) is a reading: K = (0·√7 + 3·√63)/(7 + 63) mm/√d
    # = 23.8118/70 = 0.340168 mm/√d
    k = cb.fit_coefficient([7 * day, 63 * day], [0.0, 3e-3])
    assert k * 1e3 * math.sqrt(day) == pytest.approx(0.340168, abs=1e-6)
    # an age of one second is positive: K = 1 mm / √1 s
    assert cb.fit_coefficient([1.0], [1e-3]) == pytest.approx(1e-3, rel=1e-12)


@pytest.mark.parametrize("ages, depths, message", [
    ([], [], "give as many depths as ages, at least one"),
    ([1.0, 2.0], [1e-3], "give as many depths as ages, at least one"),
    ([0.0], [1e-3], "ages must be positive and depths not negative"),
    ([1.0], [-1e-3], "ages must be positive and depths not negative"),
])
def test_carbonation_refusals_whole(ages, depths, message):
    with pytest.raises(ValueError) as exc:
        cb.fit_coefficient(ages, depths)
    assert str(exc.value) == message


@pytest.mark.parametrize("k", [0.0, -1e-9])
def test_time_to_depth_refuses_a_coefficient_not_positive(k):
    with pytest.raises(ValueError) as exc:
        cb.time_to_depth(1e-3, k)
    assert str(exc.value) == "the carbonation coefficient must be positive"


def test_free_oxide_range_without_magnesia():
    aw = refdata.load("atomic_weights").data
    ox = {"SiO2": 21.5, "Al2O3": 8.1, "Fe2O3": 4.2, "CaO": 57.9, "SO3": 0.9, "CO2": 1.9}
    # no MgO in the analysis: no periclase at all (upper bound 0 %)
    assert sd.free_oxide_range(ox, aw).periclase == 0.0


STAGES_C = refdata.load("kiln_stages").data


@pytest.mark.parametrize("peak, where, reason", [
    # kiln stages, common practice: calcite decomposition ends at 900 C, the usual
    # natural-cement firing is 750-1100 C; each edge itself belongs to the usual range
    (899, "under", "peak 899 °C below the end of calcite decomposition (900 °C): carbonate "
                   "left and lime not yet combined with the clay's silica"),
    (900, "within", "peak 900 °C within the usual range (750–1100 °C) and past calcite "
                    "decomposition"),
    (1100, "within", "peak 1100 °C within the usual range (750–1100 °C) and past calcite "
                     "decomposition"),
    (1101, "over", "peak 1101 °C above the usual natural-cement range (to 1100 °C): "
                   "hard-burnt lime and periclase slake late"),
])
def test_firing_position_edges_and_reasons(peak, where, reason):
    assert sd.firing_position(peak, STAGES_C) == (where, reason)
