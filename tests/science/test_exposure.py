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
