"""The two-stage strength law on the log scale and its gradient, against the law written out
here (ages in d, strengths in MPa; z = (ln F, logit φ, ln τA, ln τS, ln b))."""
import math

import numpy as np
import pytest

from specgen.science import two_stage_law as tsl

AGES = np.array([0.25, 1.0, 3.0, 7.0, 28.0, 90.0, 365.0])


def _law(t, big_f, phi, tau_a, tau_s, b):
    # f(t) = F·[φ·(1 − e^(−t/τA)) + (1 − φ)·(1 − e^(−(t/τS)^b))], written out with plain exp
    t = np.asarray(t, float)
    return big_f * (phi * (1 - np.exp(-t / tau_a)) + (1 - phi) * (1 - np.exp(-(t / tau_s) ** b)))


def _natural(z):
    # z → (F, φ, τA, τS, b): exp, the logistic 1/(1 + e^−x), exp, exp, exp
    return (math.exp(z[0]), 1 / (1 + math.exp(-z[1])), math.exp(z[2]), math.exp(z[3]),
            math.exp(z[4]))


Z = [np.array([2.1, -1.5, -3.0, 4.0, -0.2]),      # natural cement like: small φ, slow silicate
     np.array([1.0, 0.7, 0.5, 2.0, 0.4]),         # φ = 0.668, τA = 1.65 d, b = 1.49
     np.array([3.0, 2.5, -1.0, 5.5, -0.9])]       # φ = 0.924, b = 0.41


def test_two_stage_at_the_time_constants_by_hand():
    # t = τA = τS with b = 1: each stage has reached 1 − 1/e, so f = F·(1 − 1/e)
    assert tsl.two_stage(10.0, 8.0, 0.3, 10.0, 10.0, 1.0) == pytest.approx(8 * (1 - math.exp(-1)),
                                                                         rel=1e-12)
    # φ = 1: the fast stage alone; at t = 2τA, f = F·(1 − e^−2) = 5 × 0.864665 = 4.323324
    assert tsl.two_stage(4.0, 5.0, 1.0, 2.0, 50.0, 0.7) == pytest.approx(4.323324, abs=1e-6)
    # φ = 0: the slow stage alone; t = 4τS with b = 0.5: (t/τS)^b = 2, f = F·(1 − e^−2)
    assert tsl.two_stage(400.0, 5.0, 0.0, 2.0, 100.0, 0.5) == pytest.approx(4.323324, abs=1e-6)


@pytest.mark.parametrize("z", Z)
def test_two_stage_against_the_law_written_out(z):
    p = _natural(z)
    assert tsl.two_stage(AGES, *p) == pytest.approx(_law(AGES, *p), rel=1e-12)


@pytest.mark.parametrize("z", Z)
def test_unpack_by_hand(z):
    assert tsl.unpack(z) == pytest.approx(_natural(z), rel=1e-15)
    # logit 0 is φ = 1/2 (the logistic's midpoint), and ln 1 = 0 gives 1
    assert tsl.unpack([0.0, 0.0, 0.0, 0.0, 0.0]) == (1.0, 0.5, 1.0, 1.0, 1.0)


@pytest.mark.parametrize("z", Z)
def test_log_f_is_the_log_of_the_law(z):
    assert tsl.log_f(z, AGES) == pytest.approx(np.log(_law(AGES, *_natural(z))), rel=1e-12,
                                               abs=1e-12)


@pytest.mark.parametrize("z", Z)
def test_gradient_against_central_differences_of_the_law_written_out(z):
    # reference: central differences (step 1e-6) of ln f from the law above, not from log_f
    def lnf(zz):
        return np.log(_law(AGES, *_natural(zz)))
    num = np.column_stack([(lnf(z + e) - lnf(z - e)) / 2e-6 for e in np.eye(5) * 1e-6])
    g = tsl.log_f_grad(z, AGES)
    assert g.shape == (len(AGES), 5)
    assert g == pytest.approx(num, rel=1e-5, abs=1e-8)
    # ∂ ln f/∂ ln F = 1 at every age (F is a factor)
    assert np.array_equal(g[:, 0], np.ones(len(AGES)))


def test_gradient_of_one_age_given_as_a_number():
    # a single age (not a list) gives one row: ∂ at t = τA = τS, b = 1, φ = 1/2 by hand:
    # shape = 1 − 1/e; ∂/∂ln τA = −φ·(t/τA)·e^−1/shape = −0.5·e^−1/(1 − e^−1) = −0.290988
    g = tsl.log_f_grad([0.0, 0.0, math.log(5.0), math.log(5.0), 0.0], 5.0)
    e1 = math.exp(-1)
    assert g.shape == (1, 5)
    assert g[0] == pytest.approx([1.0, 0.0, -0.5 * e1 / (1 - e1), -0.5 * e1 / (1 - e1), 0.0],
                                 abs=1e-12)


def test_gradient_of_many_vectors_at_one_row_of_ages():
    # log_f_grad_many with one row of ages for every vector (a 1-D age list, as its docstring
    # allows): each vector's rows against central differences (step 1e-6) of ln f from the
    # law written out above, as for one vector
    zs = np.array(Z)
    g = tsl.log_f_grad_many(zs, AGES)
    assert g.shape == (len(Z), len(AGES), 5)
    for z, gz in zip(Z, g):
        def lnf(zz):
            return np.log(_law(AGES, *_natural(zz)))
        num = np.column_stack([(lnf(z + e) - lnf(z - e)) / 2e-6 for e in np.eye(5) * 1e-6])
        assert gz == pytest.approx(num, rel=1e-5, abs=1e-8)
