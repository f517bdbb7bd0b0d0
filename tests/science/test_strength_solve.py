"""The posterior mode's parts, one record at a time (``specgen.science.strength_solve``): the
record's groups and refusals word for word, its variances and their sources by hand, the prior
residuals and the starting point by hand, and the single-record solve against
``scipy.optimize.least_squares`` (reference library) on residuals written out here.  Ages in
d, strengths in MPa; z = (ln F, logit φ, ln τA, ln τS, ln b).  Records and priors are invented."""
import math

import numpy as np
import pytest
from scipy import optimize, stats

from specgen.science import strength_solve as ss
from specgen.science.inference_tools import Laplace
from specgen.science.strength_priors import InferenceError, Prior, PriorTerm

Z95 = stats.norm.ppf(0.975)        # 1.959964, scipy


def _term(name, low, high):
    return PriorTerm(name, low, high, "invented range of this test")


# an invented family: every range ours, the gain term's (centre, SD) given directly
PRIOR = Prior("test_family", "test family",
              {"early_fraction": _term("early_fraction", 0.1, 0.4),
               "tau_fast_d": _term("tau_fast_d", 0.01, 1.0),
               "tau_slow_d": _term("tau_slow_d", 20.0, 200.0),
               "shape_b": _term("shape_b", 0.4, 1.2),
               "gain_365_28": _term("gain_365_28", 1.3, 3.0)},
              _term("batch_cv", 0.03, 0.12), _term("within_cv", 0.03, 0.12), False,
              (0.8, 0.25))


def _ln_law(z, t):
    # ln f(t) = ln F + ln[φ(1 − e^(−t/τA)) + (1 − φ)(1 − e^(−(t/τS)^b))], written out
    f, phi, ta, ts, b = (math.exp(z[0]), 1 / (1 + math.exp(-z[1])), math.exp(z[2]),
                         math.exp(z[3]), math.exp(z[4]))
    t = np.asarray(t, float)
    return np.log(f * (phi * (1 - np.exp(-t / ta)) + (1 - phi) * (1 - np.exp(-(t / ts) ** b))))


def _centre_sd(low, high, logit=False):
    # a central 95 % range on the log (logit) scale: centre the mid-point, SD range / (2 × 1.96)
    tr = (lambda p: math.log(p / (1 - p))) if logit else math.log
    return 0.5 * (tr(low) + tr(high)), (tr(high) - tr(low)) / (2 * Z95)


# ------------------------------------------------------------------ the record's groups
@pytest.mark.parametrize("ages, values, message", [
    ([7, 28, 90], [1.0, 2.0], "3 ages but 2 results; give one age per result"),
    ([], [], "0 ages but 0 results; give one age per result"),
    ([0, 28, 90], [1.0, 2.0, 3.0], "ages and results must be finite numbers greater than zero"),
    ([7, 28, 90], [1.0, 0.0, 3.0], "ages and results must be finite numbers greater than zero"),
    ([7, 28, 90], [1.0, -2.0, 3.0], "ages and results must be finite numbers greater than zero"),
    ([7, -28, 90], [1.0, 2.0, 3.0], "ages and results must be finite numbers greater than zero"),
    ([7, math.nan, 90], [1.0, 2.0, 3.0],
     "ages and results must be finite numbers greater than zero"),
    ([7, 28, 90], [1.0, math.inf, 3.0],
     "ages and results must be finite numbers greater than zero"),
])
def test_a_record_refused_whole(ages, values, message):
    with pytest.raises(InferenceError) as err:
        ss._Prep.of(ages, values, PRIOR)
    assert str(err.value) == message


def test_two_ages_refused_with_the_ages_named():
    with pytest.raises(InferenceError) as err:
        ss._Prep.of([7, 7, 28], [1.0, 1.1, 2.0], PRIOR)
    assert str(err.value) == ("results at 2 age(s) (7 d, 28 d); the two-stage law is fitted "
                              "to three or more ages: test at 7, 28 and 90 days")


def test_groups_variances_and_sources_by_hand():
    ages = [28, 7, 7, 28, 90, 28]
    y = [4.0, 2.0, 2.2, 4.4, 6.0, 4.2]
    p = ss._Prep.of(ages, y, PRIOR)
    assert p.ages.tolist() == [7.0, 28.0, 90.0]
    assert p.inv.tolist() == [1, 0, 0, 1, 2, 1]
    assert p.ly == pytest.approx(np.log(y), rel=1e-15)
    assert p.counts.tolist() == [2.0, 3.0, 1.0]
    m7, m28 = (math.log(2.0) + math.log(2.2)) / 2, (math.log(4.0 * 4.4 * 4.2)) / 3
    assert p.means == pytest.approx([m7, m28, math.log(6.0)], rel=1e-14)
    # replicate dof (2 − 1) + (3 − 1) + (1 − 1) = 3; scaled-inverse-χ² update with the
    # prior's centre sqrt(0.03 × 0.12) = 0.06 at 4 dof (module docstring of strength_inference)
    ss_w = ((math.log(2.0) - m7) ** 2 + (math.log(2.2) - m7) ** 2
            + sum((math.log(v) - m28) ** 2 for v in (4.0, 4.4, 4.2)))
    assert p.d_w == 3.0
    assert p.sw2 == pytest.approx((4 * 0.06 ** 2 + ss_w) / (4 + 3), rel=1e-12)
    assert p.w_src == "pooled replicates (3 dof) with the prior's 6.0 % (4 dof)"
    # batch: the prior's centre sqrt(0.03 × 0.12) = 0.06 until the fit gives a lack of fit
    assert p.s0b == pytest.approx(0.06, rel=1e-12)
    assert p.sb2 == pytest.approx(0.0036, rel=1e-12)
    assert p.b_src == "prior only (6.0 %)"


def test_no_replicates_take_the_prior_alone():
    p = ss._Prep.of([7, 28, 90], [2.0, 4.0, 6.0], PRIOR)
    assert p.d_w == 0.0
    assert p.sw2 == pytest.approx(0.06 ** 2, rel=1e-12)       # (4 × 0.06² + 0)/(4 + 0)
    assert p.w_src == "prior only (6.0 %): no replicates"
    # one replicate pair: 1 dof pooled with the prior's 4
    one = ss._Prep.of([7, 7, 28, 90], [2.0, 2.2, 4.0, 6.0], PRIOR)
    assert one.d_w == 1.0
    assert one.sw2 == pytest.approx((4 * 0.06 ** 2 + 0.5 * math.log(1.1) ** 2) / 5, rel=1e-12)
    assert one.w_src == "pooled replicates (1 dof) with the prior's 6.0 % (4 dof)"


# ------------------------------------------------------------------ the batch variance
Z_FIT = np.array([1.9, -1.0, -2.0, 4.0, -0.3])


def _prep_with_fit(means, p_eff):
    t = [a for a in (7, 28, 90) for _ in range(3)]
    y = [math.exp(m) * f for m in means for f in (0.97, 1.0, 1.03)]
    p = ss._Prep.of(t, y, PRIOR)
    p.lap = Laplace(Z_FIT, np.eye(5), p_eff, 0.0)
    return p


def _ms_lof(p, d_lof):
    # Σ n_i (ȳ_i − ln f(t_i))² / d_lof, the curve written out
    return float(np.sum(p.counts * (p.means - _ln_law(Z_FIT, p.ages)) ** 2)) / d_lof


@pytest.mark.parametrize("p_eff, refitted", [(2.6, False), (2.5, True), (2.0, True)])
def test_batch_variance_only_with_half_a_dof_beyond_the_curve(p_eff, refitted):
    curve = _ln_law(Z_FIT, [7.0, 28.0, 90.0])
    p = _prep_with_fit(curve + np.array([0.1, -0.12, 0.08]), p_eff)
    assert p.batch_variance() is refitted
    d_lof = 3 - p_eff
    if not refitted:        # 0.4 dof: below the half dof the method asks
        assert p.sb2 == pytest.approx(0.0036, rel=1e-12)
        assert p.b_src == ("prior only (6.0 %): the ages leave no degrees of freedom beyond "
                           "the curve")
        return
    excess = (_ms_lof(p, d_lof) - p.sw2) / 3.0        # three prisms per age
    assert excess > 0
    assert p.sb2 == pytest.approx((4 * 0.06 ** 2 + d_lof * excess) / (4 + d_lof), rel=1e-12)
    assert p.b_src == (f"lack-of-fit mean square beyond the pure error ({d_lof:.2f} dof) with "
                       "the prior's 6.0 % (4 dof)")


def test_a_lack_of_fit_within_the_pure_error_adds_no_batch_variance():
    curve = _ln_law(Z_FIT, [7.0, 28.0, 90.0])
    p = _prep_with_fit(curve + np.array([0.001, -0.001, 0.0]), 2.0)
    assert _ms_lof(p, 1.0) < p.sw2
    assert p.batch_variance() is True
    # the excess is max(0, ·) = 0: the prior's 0.06² at 4 dof pooled with 0 at 1 dof
    assert p.sb2 == pytest.approx(4 * 0.06 ** 2 / 5, rel=1e-12)


# ------------------------------------------------------------------ prior residuals, start
def test_prior_residuals_by_hand():
    z = np.array([1.5, -0.4, -1.2, 3.9, -0.2])
    gain = _ln_law(z, [365.0])[0] - _ln_law(z, [28.0])[0]
    want = [(z[1] - _centre_sd(0.1, 0.4, logit=True)[0]) / _centre_sd(0.1, 0.4, logit=True)[1],
            (z[2] - _centre_sd(0.01, 1.0)[0]) / _centre_sd(0.01, 1.0)[1],
            (z[3] - _centre_sd(20.0, 200.0)[0]) / _centre_sd(20.0, 200.0)[1],
            (z[4] - _centre_sd(0.4, 1.2)[0]) / _centre_sd(0.4, 1.2)[1],
            (gain - 0.8) / 0.25]
    assert ss._prior_residuals(z, PRIOR) == pytest.approx(want, rel=1e-12)


def test_start_is_the_prior_centre_lifted_onto_the_highest_mean():
    ages, means = np.array([7.0, 28.0, 90.0]), np.array([0.7, 1.4, 1.5])
    centre = [_centre_sd(0.1, 0.4, logit=True)[0], _centre_sd(0.01, 1.0)[0],
              _centre_sd(20.0, 200.0)[0], _centre_sd(0.4, 1.2)[0]]
    shape = _ln_law([0.0, *centre], ages)         # ln of the law with F = 1
    z0 = ss._start(ages, means, PRIOR)
    assert z0[1:] == pytest.approx(centre, rel=1e-12)
    assert z0[0] == pytest.approx(max(means - shape), rel=1e-12)
    # the curve from there touches the highest mean and lies on or above every other
    assert np.min(z0[0] + shape - means) == pytest.approx(0.0, abs=1e-12)


# ------------------------------------------------------------------ one record solved alone
def _reference(p, z0):
    """scipy.optimize.least_squares from ``z0`` with the settings laplace_fit documents (trf,
    x_scale 'jac'), the residuals written out here: data (ȳ − ln f)/sd, sd² = σb² + σw²/n,
    then the prior terms (h − μ)/s; the law and its gradient from two_stage_law (tested against
    the law written out in test_two_stage_law.py).  Returns the mode, the covariance (JᵀJ)⁻¹
    at it, p_eff = tr(Σ·J_dᵀJ_d) (data rows only) and the cost."""
    from specgen.science.two_stage_law import log_f, log_f_grad
    sd = np.sqrt(p.sb2 + p.sw2 / p.counts)
    mu, psd = np.array([p.prior.penalty(k) for k in ss.PRIOR_KEYS]).T
    gt = np.array([28.0, 365.0])

    def resid(z):
        g = log_f(z, gt)
        return np.concatenate([(p.means - log_f(z, p.ages)) / sd,
                               (np.array([*z[1:5], g[1] - g[0]]) - mu) / psd])

    def jac(z):
        g = log_f_grad(z, gt)
        return np.vstack([-log_f_grad(z, p.ages) / sd[:, None],
                          np.vstack([np.eye(5)[1:5], g[1] - g[0]]) / psd[:, None]])
    res = optimize.least_squares(resid, z0, jac=jac, method="trf", x_scale="jac",
                                 diff_step=1e-6)
    j = jac(res.x)
    cov = np.linalg.inv(j.T @ j)
    jd = j[:p.ages.size]
    return res.x, cov, float(np.trace(cov @ jd.T @ jd)), float(res.cost)


RECORDS = [([1, 1, 3, 3, 7, 7, 28, 28], [0.9, 1.0, 1.6, 1.5, 2.3, 2.2, 4.6, 4.9]),
           ([7, 7, 7, 28, 28, 28, 90, 90, 90], [2.0, 2.1, 2.2, 3.9, 4.1, 4.0, 6.5, 6.9, 7.2])]


@pytest.mark.parametrize("ages, values", RECORDS)
def test_one_record_solved_alone_is_scipys_least_squares(ages, values):
    p = ss._Prep.of(ages, values, PRIOR)
    p.sb2 = 0.003          # as a first fit's lack of fit might leave it
    for z0 in (None, ss._start(p.ages, p.means, PRIOR) + np.array([0.2, 0.3, -0.5, 0.4, 0.1])):
        start = ss._start(p.ages, p.means, PRIOR) if z0 is None else z0
        mode, cov, p_eff, cost = _reference(p, start)
        lap = ss._solve(p.ages, p.means, p.counts, p.sb2, p.sw2, PRIOR, z0)
        assert lap.mode == pytest.approx(mode, rel=1e-9, abs=1e-12)
        assert lap.cov == pytest.approx(cov, rel=1e-7, abs=1e-12)
        assert lap.p_eff == pytest.approx(p_eff, rel=1e-9)
        assert 0 < lap.p_eff < 5          # the prior carries part of the five parameters
        assert lap.cost == pytest.approx(cost, rel=1e-12)
