"""The strength priors read from their table: refusals whole, the row's label, carbonating
flag and sources carried through, and the weighted quantiles by hand and against numpy."""
import copy

import numpy as np
import pytest
from scipy import stats

from specgen import refdata
from specgen.science.strength_priors import (InferenceError, match_gain_term, prior_from_table,
                                            weighted_quantiles)

PRIORS = refdata.load("strength_priors").data
ROW = PRIORS["natural_cement"]


def test_weighted_quantiles_by_hand():
    # x = 3, 1, 2 with weights 1, 1, 2: sorted 1, 2, 3 with weights 1, 2, 1; cumulative 1, 3,
    # 4; mid-points (c − w/2)/4 = 0.125, 0.5, 0.875; linear between, held at the ends
    q = weighted_quantiles(np.array([3.0, 1.0, 2.0]), np.array([1.0, 1.0, 2.0]),
                           [0.0, 0.125, 0.3125, 0.5, 0.6875, 0.875, 1.0])
    assert q == pytest.approx([1.0, 1.0, 1.5, 2.0, 2.5, 3.0, 3.0], rel=1e-12)


def test_weighted_quantiles_with_equal_weights_are_numpys_hazen():
    # equal weights put the mid-points at (i + 0.5)/n: numpy's 'hazen' quantile (reference)
    rng = np.random.default_rng(3)
    x = rng.normal(size=41)
    probs = [0.025, 0.1, 0.5, 0.9, 0.975]
    assert weighted_quantiles(x, np.ones(41), probs) == pytest.approx(
        np.quantile(x, probs, method="hazen"), rel=1e-12)


def test_label_carbonating_and_sources_carried_from_the_row():
    p = prior_from_table("natural_cement", ROW)
    assert p.family == "natural_cement"
    assert p.label == str(ROW.get("label", "natural_cement"))
    assert p.carbonating is bool(ROW.get("carbonating", False))
    for k, t in p.terms.items():
        assert t.source == str(ROW[k]["source"])
    bare = copy.deepcopy(ROW)
    bare.pop("label", None)
    bare.pop("carbonating", None)
    q = prior_from_table("test_family", bare)
    assert (q.label, q.carbonating) == ("test_family", False)
    bare["carbonating"] = True
    assert prior_from_table("test_family", bare).carbonating is True


@pytest.mark.parametrize("key, rng", [
    ("tau_slow_d", [0.0, 400.0]),          # a low edge of zero
    ("tau_slow_d", [20.0, 20.0]),          # low equal to high
    ("early_fraction", [0.1, 1.0]),        # a fraction reaching one
    ("early_fraction", [0.1, 1.5]),
])
def test_range_refusals_whole(key, rng):
    row = copy.deepcopy(ROW)
    row[key]["range"] = rng
    with pytest.raises(InferenceError) as err:
        prior_from_table("natural_cement", row)
    assert str(err.value) == f"prior 'natural_cement.{key}': range must satisfy 0 < low < high"


def test_a_fraction_just_under_one_is_taken():
    row = copy.deepcopy(ROW)
    row["early_fraction"]["range"] = [0.1, 0.99]
    assert prior_from_table("natural_cement", row).terms["early_fraction"].high == 0.99


def test_gain_term_matched_on_normal_draws_is_the_conjugate_normal():
    # Draws of ln f365/f28 laid on a normal N(m0, s0²) (its quantiles at (i + ½)/N, scipy):
    # weighted by a normal term N(c, s²) they are normal with precision 1/s0² + 1/s² and mean
    # (m0/s0² + c/s²)/precision (conjugate normal, Gelman et al., Bayesian Data Analysis,
    # sec. 2.5).  The term whose weighted draws have the central 95 % range low-high has
    # 1/s² = 1/st² − 1/s0² and c = (mt/st² − m0/s0²)·s², mt and st the target's mean and SD
    # on the log scale (st = ln(high/low)/(2 × 1.959964), the normal quantile, scipy).
    n, m0, s0, low, high = 20000, 0.6, 0.35, 1.5, 2.6
    g = m0 + s0 * stats.norm.ppf((np.arange(n) + 0.5) / n)
    mt = 0.5 * (np.log(low) + np.log(high))
    st = (np.log(high) - np.log(low)) / (2 * stats.norm.ppf(0.975))
    s = 1 / np.sqrt(1 / st ** 2 - 1 / s0 ** 2)
    c = (mt / st ** 2 - m0 / s0 ** 2) * s ** 2
    # 0.6959 and 0.1532 (computed above); 1e-6 relative: the grid of draws, not the formula
    assert match_gain_term(g, low, high) == pytest.approx((c, s), rel=1e-6)
