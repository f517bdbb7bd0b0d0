"""The generic tools of the strength inference on hand-made inputs: order statistics of
draws, the Laplace fit, importance sampling, systematic resampling, the pure-error
lack-of-fit test and the falls between ages.  Each check value names its source (a
reference library, a closed form or a derivation written here); none builds a demo."""
from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import stats

from specgen.science import inference_tools as it

Z975 = 1.959963984540054     # standard normal 97.5 % quantile (scipy.stats.norm.ppf(0.975))


# ---------------------------------------------------------------- order statistics
def test_one_dimensional_draws_are_numpys_inverted_cdf():
    # reference: numpy's quantile, method "inverted_cdf" (an order statistic, no interpolation)
    x = np.array([5.0, 1.0, 4.0, 2.0, 3.0])
    np.testing.assert_array_equal(it.draw_quantiles(x, [0.2, 0.5, 0.9]), [1.0, 3.0, 5.0])
    np.testing.assert_array_equal(it.draw_quantiles(x, [0.2, 0.5, 0.9]),
                                  np.quantile(x, [0.2, 0.5, 0.9], method="inverted_cdf"))
    # inverted_cdf by its definition: the smallest x with F_n(x) >= p; n = 5, p = 0.2 -> the
    # 1st order statistic (1.0), p = 0.5 -> the 3rd (3.0), p = 0.9 -> the 5th (5.0)


def test_row_quantiles_leave_the_input_alone_unless_told():
    rows = np.array([[3.0, 1.0, 2.0, 5.0, 4.0], [9.0, 7.0, 8.0, 6.0, 10.0]])
    keep = rows.copy()
    got = it.row_quantiles(rows, [0.2, 0.9])
    # by hand: row 1 sorted 1..5, row 2 sorted 6..10; p = 0.2 -> 1st, p = 0.9 -> 5th
    np.testing.assert_array_equal(got, [[1.0, 6.0], [5.0, 10.0]])
    np.testing.assert_array_equal(rows, keep)             # not reordered
    # a transposed (not C-contiguous) array is copied even when overwriting is allowed
    cols = keep.T
    np.testing.assert_array_equal(it.row_quantiles(cols.T, [0.2, 0.9], overwrite=True), got)
    np.testing.assert_array_equal(cols, keep.T)
    # a C-contiguous array may be reordered in place: same numbers out
    work = keep.copy()
    np.testing.assert_array_equal(it.row_quantiles(work, [0.2, 0.9], overwrite=True), got)
    assert sorted(work[0]) == [1.0, 2.0, 3.0, 4.0, 5.0]   # the same values, maybe reordered


def test_a_row_with_nan_gives_nan_and_the_others_their_quantiles():
    # numpy sorts NaN last, so its inverted_cdf quantile of a row with a NaN is NaN
    rows = np.array([[1.0, np.nan, 3.0, 2.0], [4.0, 3.0, 2.0, 1.0]])
    got = it.row_quantiles(rows, [0.5])
    ref = np.quantile(rows.T, [0.5], axis=0, method="inverted_cdf")
    assert math.isnan(got[0, 0]) and math.isnan(ref[0, 0])
    assert got[0, 1] == ref[0, 1] == 2.0        # by hand: 2nd of 1, 2, 3, 4


def test_the_cached_ranks_cannot_be_changed_by_a_caller():
    # the ranks are shared between calls (lru_cache): a writable array could be corrupted
    r = it._ranks(5, (0.2, 0.9))
    np.testing.assert_array_equal(r, [0, 4])    # inverted_cdf ranks, by hand as above
    with pytest.raises(ValueError):
        r[0] = 3


# ---------------------------------------------------------------- Laplace fit
def test_laplace_fit_with_an_analytic_jacobian_and_its_cost():
    # Bayesian linear regression (Bishop, Pattern Recognition and Machine Learning, eq. 3.53-
    # 3.54): posterior covariance (XᵀX/σ² + Λ⁻¹)⁻¹, mean Cov·Xᵀy/σ²; with the Jacobian given
    # the covariance is exact, and the cost is ½|r|² at the mode (computed here).
    x = np.array([0.0, 1.0, 2.0, 4.0])
    y = np.array([0.9, 3.1, 4.9, 9.2])
    sigma, prior_sd = 0.5, np.array([3.0, 2.0])
    xm = np.column_stack([np.ones_like(x), x])
    cov = np.linalg.inv(xm.T @ xm / sigma ** 2 + np.diag(1 / prior_sd ** 2))
    mean = cov @ xm.T @ y / sigma ** 2

    def resid(z):
        return np.concatenate([(y - xm @ z) / sigma, z / prior_sd])

    def jac(z):
        return np.vstack([-xm / sigma, np.diag(1 / prior_sd)])
    lap = it.laplace_fit(resid, [0.0, 0.0], y.size, jac)
    assert lap.mode == pytest.approx(mean, rel=1e-9)
    assert lap.cov == pytest.approx(cov, rel=1e-12)
    assert lap.cost == pytest.approx(0.5 * np.sum(resid(mean) ** 2), rel=1e-9)
    # effective parameters tr(Cov·XᵀX/σ²) (the data's share of the precision)
    assert lap.p_eff == pytest.approx(np.trace(cov @ xm.T @ xm) / sigma ** 2, rel=1e-12)


# ---------------------------------------------------------------- importance sampling
def _gauss_nlp(mu, sd):
    return lambda z: 0.5 * np.sum(((z - mu) / sd) ** 2, axis=1)


def test_importance_weights_are_target_over_the_student_t_proposal():
    # Reference: scipy.stats.multivariate_t (loc = mode, shape = scale²·cov, df) as q; the
    # weights are p/q normalised, p the target written here (a 2-D normal off the mode).
    mu, sd = np.array([0.3, -0.2]), np.array([1.2, 0.7])
    mode, cov = np.array([0.0, 0.0]), np.array([[1.0, 0.3], [0.3, 0.5]])
    z, w, ess = it.importance_sample(_gauss_nlp(mu, sd), mode, cov, 400, 5.0, 1.5, 11)
    q = stats.multivariate_t(loc=mode, shape=1.5 ** 2 * cov, df=5.0)
    log_w = -_gauss_nlp(mu, sd)(z) - q.logpdf(z)
    ref = np.exp(log_w - log_w.max())
    ref /= ref.sum()
    assert z.shape == (400, 2)
    assert w == pytest.approx(ref, rel=1e-6)
    assert w.sum() == pytest.approx(1.0, rel=1e-12)
    assert ess == pytest.approx(1.0 / np.sum(ref ** 2), rel=1e-6)    # Kish's 1/Σw²
    # the same random state gives the same draws; another, other draws
    z2, _, _ = it.importance_sample(_gauss_nlp(mu, sd), mode, cov, 400, 5.0, 1.5, 11)
    z3, _, _ = it.importance_sample(_gauss_nlp(mu, sd), mode, cov, 400, 5.0, 1.5, 12)
    np.testing.assert_array_equal(z, z2)
    assert not np.array_equal(z, z3)


def test_importance_sampling_drops_draws_of_zero_target_and_says_when_none_is_left():
    # a half-normal target (zero density below 0, written here): draws below zero carry no
    # weight and are left out; the rest are weighted as above (scipy.stats.multivariate_t)
    def half(z):
        with np.errstate(divide="ignore"):
            return np.where(z[:, 0] >= 0, 0.5 * z[:, 0] ** 2, np.inf)
    z, w, ess = it.importance_sample(half, [0.5], np.array([[1.0]]), 300, 4.0, 1.0, 3)
    assert np.all(z[:, 0] >= 0) and 0 < z.shape[0] < 300 and w.size == z.shape[0]
    q = stats.multivariate_t(loc=[0.5], shape=[[1.0]], df=4.0)
    ref = np.exp(-0.5 * z[:, 0] ** 2 - q.logpdf(z))
    assert w == pytest.approx(ref / ref.sum(), rel=1e-6)
    # nowhere finite: no draws, no weights, an effective size of zero
    assert it.importance_sample(lambda zz: np.full(zz.shape[0], np.inf), [0.0],
                                np.array([[1.0]]), 50, 4.0, 1.0, 3) == (None, None, 0.0)
    # a covariance that is not positive definite (a negative variance) cannot be sampled
    assert it.importance_sample(_gauss_nlp(0.0, 1.0), [0.0], np.array([[-1.0]]), 50, 4.0, 1.0,
                                3) == (None, None, 0.0)


def test_a_zero_variance_is_sampled_at_the_mode():
    # a singular Laplace covariance (one parameter fixed by the data) still samples: the
    # draws of that parameter sit within 1e-4 of the mode (a jitter of 1e-12 in the variance)
    z, w, _ = it.importance_sample(_gauss_nlp(0.0, 1.0), [0.0, 2.0],
                                   np.array([[1.0, 0.0], [0.0, 0.0]]), 100, 5.0, 1.5, 5)
    assert z.shape == (100, 2) and np.all(np.abs(z[:, 1] - 2.0) < 1e-4)


def test_the_draws_follow_the_multivariate_t():
    # For a k-variate Student-t with df dof, the squared Mahalanobis distance over k follows
    # Snedecor's F(k, df) (Kotz & Nadarajah, Multivariate t Distributions, 2004, sec. 1.10);
    # the test against scipy.stats.f by Kolmogorov-Smirnov on 4000 draws.  Measured on this
    # random state: p = 0.98 at df = 5; the same draws read as F(2, 4) or F(2, 6) give p =
    # 0.02 and 0.09, so p > 0.2 tells the proposal's dof and scale apart.
    mode, cov = np.array([1.0, -1.0]), np.array([[1.0, 0.3], [0.3, 0.5]])
    z, _, _ = it.importance_sample(_gauss_nlp(0.0, 1.0), mode, cov, 4000, 5.0, 1.5, 11)
    chol = np.linalg.cholesky(1.5 ** 2 * cov)
    x = np.linalg.solve(chol, (z - mode).T).T
    assert stats.kstest(np.sum(x ** 2, axis=1) / 2, stats.f(2, 5).cdf).pvalue > 0.2


# ---------------------------------------------------------------- systematic resampling
def test_systematic_resampling_by_hand():
    # Kitagawa (1996): positions (i + u)/n, u one uniform of the random state (numpy's first
    # uniform of default_rng(1)); each position takes the first draw whose cumulative weight
    # reaches it.  Weights 0.5, 0.25, 0.125, 0.125 -> cumulative 0.5, 0.75, 0.875, 1.0.
    u = np.random.default_rng(1).uniform()
    pos = (np.arange(4) + u) / 4
    cum = [0.5, 0.75, 0.875, 1.0]
    expected = [next(i for i, c in enumerate(cum) if c >= p) for p in pos]
    kept = it.resample(np.array([[10.0], [20.0], [30.0], [40.0]]),
                       np.array([0.5, 0.25, 0.125, 0.125]), 4, 1)
    assert kept[:, 0].tolist() == [10.0 * (1 + i) for i in expected]
    assert expected[:2] == [0, 0]          # half the weight: two of the four positions


def test_resampling_weights_short_of_one_keeps_the_last_draw():
    # weights summing to 0.9 (rounding in a long sum, exaggerated): a position above 0.9 has
    # no cumulative weight reaching it and takes the last draw, not an index past the end
    kept = it.resample(np.array([[1.0], [2.0], [3.0]]), np.array([0.3, 0.3, 0.3]), 10, 2)
    assert kept.shape == (10, 1) and kept[-1, 0] == 3.0 and set(kept[:, 0]) <= {1.0, 2.0, 3.0}


# ---------------------------------------------------------------- lack of fit
def test_lack_of_fit_sums_by_hand():
    # groups a (1, 3), b (4, 6), c (8): means 2, 5, 8; pure error (1-2)²+(3-2)²+(4-5)²+(6-5)²
    # = 4 on N - k = 5 - 3 = 2 dof; fitted 2.5, 2.5, 5, 5, 7: lack of fit 2(0.5)² + 0 + 1² = 1.5
    # on k - p = 3 - 1.5 = 1.5 dof; F = (1.5/1.5)/(4/2) = 0.5; p from scipy.stats.f.sf
    got = it.lack_of_fit([1.0, 3.0, 4.0, 6.0, 8.0], ["a", "a", "b", "b", "c"],
                         [2.5, 2.5, 5.0, 5.0, 7.0], 1.5)
    assert (got.ss_pure, got.dof_pure, got.ss_lof, got.dof_lof) == pytest.approx(
        (4.0, 2.0, 1.5, 1.5), rel=1e-12)
    assert got.f == pytest.approx(0.5, rel=1e-12)
    assert got.p_value == pytest.approx(stats.f.sf(0.5, 1.5, 2.0), rel=1e-9)


@pytest.mark.parametrize("values, groups, fitted, p, why", [
    # as many parameters as groups: no degrees of freedom for lack of fit (3 - 3 = 0)
    ([1.0, 3.0, 4.0, 6.0, 8.0], [1, 1, 2, 2, 3], [2.0, 2.0, 5.0, 5.0, 8.0], 3.0, "dof_lof"),
    # replicates that agree exactly: no pure error to compare with (SS_pe = 0)
    ([2.0, 2.0, 5.0, 5.0, 8.0], [1, 1, 2, 2, 3], [2.5, 2.5, 5.0, 5.0, 7.0], 1.0, "ss_pure"),
    # one result per group: N - k = 0
    ([1.0, 2.0, 3.0], [1, 2, 3], [1.1, 1.9, 3.0], 1.0, "dof_pure"),
])
def test_lack_of_fit_not_testable_on_each_edge(values, groups, fitted, p, why):
    got = it.lack_of_fit(values, groups, fitted, p)
    assert got.f is None and got.p_value is None
    # the sums are still reported (by hand: groups and fitted values above)
    edges = {"dof_lof": (got.dof_lof, 0.0), "ss_pure": (got.ss_pure, 0.0),
             "dof_pure": (got.dof_pure, 0.0)}
    assert edges[why][0] == edges[why][1]


def test_lack_of_fit_just_testable_with_a_sliver_of_dof():
    # k - p = 3 - 2.99 = 0.01 dof (a penalised fit's fractional parameters): still tested,
    # F = (SS_lof/0.01)/(SS_pe/2), SS as in the hand example above (4 and 1.5)
    got = it.lack_of_fit([1.0, 3.0, 4.0, 6.0, 8.0], [1, 1, 2, 2, 3],
                         [2.5, 2.5, 5.0, 5.0, 7.0], 2.99)
    assert got.dof_lof == pytest.approx(0.01, rel=1e-9)
    assert got.f == pytest.approx((1.5 / 0.01) / (4.0 / 2.0), rel=1e-9)


# ---------------------------------------------------------------- scores and falls
def test_interval_score_counts_a_miss_only_outside():
    # Gneiting & Raftery (2007) eq. 43: a truth on an edge is not a miss: the width alone
    assert it.interval_score(1.0, 3.0, 1.0) == pytest.approx(2.0)
    assert it.interval_score(1.0, 3.0, 3.0) == pytest.approx(2.0)
    got = it.interval_score([1.0, 1.0], [3.0, 3.0], [0.0, 4.0], alpha=0.2)
    assert got == pytest.approx([2.0 + 10 * 1.0, 2.0 + 10 * 1.0])      # 2/0.2 = 10, by hand


def test_falls_by_hand():
    # ages 7, 28, 90 d; means of ln y: ln 2, ln 4, ln 2.5; three prisms each; σw = 0.05,
    # σb = 0.10: s = sqrt(2·0.01 + 0.0025·(1/3 + 1/3)) = sqrt(0.0216667) = 0.147196;
    # q·s = 1.959964·0.147196 = 0.288499.  7 -> 28 rises (no fall); 28 -> 90 falls by
    # ln 4 - ln 2.5 = 0.470004 > 0.288499: a fall, ratio 2.5/4 = 0.625
    got = it.falls([7.0, 28.0, 90.0], np.log([2.0, 4.0, 2.5]), [3, 3, 3], 0.05, 0.10)
    assert got == [(28.0, 90.0, pytest.approx(0.625, rel=1e-12))]
    assert isinstance(got[0][0], float) and isinstance(got[0][1], float)
    # the same fall within the scatter with a wider batch spread: σb = 0.20 gives
    # s = sqrt(0.08 + 0.0016667) = 0.285774, q·s = 0.560108 > 0.470004: no fall
    assert it.falls([7.0, 28.0, 90.0], np.log([2.0, 4.0, 2.5]), [3, 3, 3], 0.05, 0.20) == []
    # with the counts unequal: s = sqrt(2·0.01 + 0.0025·(1/1 + 1/6)) = 0.151383
    # (counts 1 and 6), q·s = 0.296704 < 0.470004: a fall; at q = 3.2, 0.484424: none;
    # at q = 3.0, 0.454148: a fall
    assert len(it.falls([28.0, 90.0], np.log([4.0, 2.5]), [1, 6], 0.05, 0.10)) == 1
    assert it.falls([28.0, 90.0], np.log([4.0, 2.5]), [1, 6], 0.05, 0.10, q=3.2) == []
    assert it.falls([28.0, 90.0], np.log([4.0, 2.5]), [1, 6], 0.05, 0.10, q=3.0) != []


def test_equal_means_without_scatter_are_no_fall():
    # d = 0 and s = 0: "more than the scatter explains" needs d > q·s strictly
    assert it.falls([7.0, 28.0], [1.0, 1.0], [3, 3], 0.0, 0.0) == []


def test_the_default_quantile_is_the_normal_97_5_percent():
    # a fall of exactly Z975·s + 1e-9 is found at the default q, one of Z975·s − 1e-9 is not
    # (s = sqrt(2·0.01 + 0) with σw = 0: 0.141421)
    s = math.sqrt(2 * 0.01)
    assert it._Z95 == pytest.approx(Z975, rel=1e-12)          # scipy.stats.norm.ppf(0.975)
    assert it.falls([1.0, 2.0], [Z975 * s + 1e-9, 0.0], [3, 3], 0.0, 0.1) != []
    assert it.falls([1.0, 2.0], [Z975 * s - 1e-9, 0.0], [3, 3], 0.0, 0.1) == []


# ---------------------------------------------------------------- the Laplace fit of many series
X_LIN = np.array([0.0, 1.0, 2.0, 4.0])
Y_LIN = np.array([[0.9, 3.1, 4.9, 9.2], [2.0, 1.5, 1.1, 0.2], [-1.0, 0.0, 1.2, 2.9]])
SIG_LIN, PRIOR_SD_LIN = 0.5, np.array([3.0, 2.0])


def _linear_many(z, idx):
    # residuals and Jacobian of Bayesian linear regressions, one per series (rows of Y_LIN)
    xm = np.column_stack([np.ones_like(X_LIN), X_LIN])
    r = np.concatenate([(Y_LIN[idx] - z @ xm.T) / SIG_LIN, z / PRIOR_SD_LIN], axis=1)
    j = np.vstack([-xm / SIG_LIN, np.diag(1 / PRIOR_SD_LIN)])
    return r, np.broadcast_to(j, (len(idx), *j.shape)).copy()


def test_laplace_fit_many_equals_bayesian_linear_regression_per_series():
    # closed form per series (Bishop, Pattern Recognition and Machine Learning, eq. 3.53-3.54):
    # Cov = (XᵀX/σ² + Λ⁻¹)⁻¹, mode = Cov·Xᵀy/σ²; cost ½|r|² and p_eff = tr(Cov·XᵀX/σ²) there
    xm = np.column_stack([np.ones_like(X_LIN), X_LIN])
    cov = np.linalg.inv(xm.T @ xm / SIG_LIN ** 2 + np.diag(1 / PRIOR_SD_LIN ** 2))
    laps = it.laplace_fit_many(_linear_many, np.zeros((3, 2)), X_LIN.size)
    assert len(laps) == 3
    for i, lap in enumerate(laps):
        mode = cov @ xm.T @ Y_LIN[i] / SIG_LIN ** 2
        r, _ = _linear_many(mode[None, :], np.array([i]))
        assert lap.mode == pytest.approx(mode, rel=1e-8, abs=1e-10)
        assert lap.cov == pytest.approx(cov, rel=1e-10)
        assert lap.cost == pytest.approx(0.5 * np.sum(r ** 2), rel=1e-12)
        assert lap.p_eff == pytest.approx(np.trace(cov @ xm.T @ xm) / SIG_LIN ** 2, rel=1e-10)


T_EXP = np.array([0.5, 1.0, 2.0, 4.0, 8.0])
Y_EXP = np.array([[4.1, 3.3, 2.2, 1.0, 0.25], [9.0, 8.1, 6.4, 4.2, 1.9]])


def _exp_many(z, idx):
    # y = a·exp(−b·t), parameters z = (ln a, ln b): residuals and Jacobian per series
    a, b = np.exp(z[:, 0])[:, None], np.exp(z[:, 1])[:, None]
    f = a * np.exp(-b * T_EXP)
    return f - Y_EXP[idx], np.stack([f, -b * T_EXP * f], axis=2)


def test_laplace_fit_many_of_a_nonlinear_law_against_scipy_least_squares():
    # reference: scipy.optimize.least_squares of each series alone, tight tolerances (1e-15)
    from scipy import optimize
    z0 = np.array([[1.0, -1.0], [2.0, -2.0]])
    laps = it.laplace_fit_many(_exp_many, z0, T_EXP.size)
    for i, lap in enumerate(laps):
        ref = optimize.least_squares(
            lambda z: _exp_many(z[None, :], np.array([i]))[0][0], z0[i],
            jac=lambda z: _exp_many(z[None, :], np.array([i]))[1][0],
            ftol=1e-15, xtol=1e-15, gtol=1e-15)
        assert lap.mode == pytest.approx(ref.x, abs=1e-8)
        assert lap.cost == pytest.approx(ref.cost, rel=1e-12)
        j = ref.jac
        assert lap.cov == pytest.approx(np.linalg.inv(j.T @ j), rel=1e-6)
        # all residuals are data here: p_eff = tr(Cov·JᵀJ) = 2 parameters
        assert lap.p_eff == pytest.approx(2.0, rel=1e-9)


def test_laplace_fit_many_gives_none_where_a_series_cannot_be_solved():
    # one step allowed: the nonlinear series do not converge -> None each (fitted alone later)
    assert it.laplace_fit_many(_exp_many, np.array([[1.0, -1.0], [2.0, -2.0]]), T_EXP.size,
                               max_iter=1) == [None, None]

    # a start where the residuals are not finite (the law overflows): None for that series only
    def guarded(z, idx):
        with np.errstate(over="ignore", invalid="ignore"):
            return _exp_many(z, idx)
    laps = it.laplace_fit_many(guarded, np.array([[1.0, -1.0], [800.0, -2.0]]), T_EXP.size)
    assert laps[0] is not None and laps[1] is None


def test_falls_where_the_within_batch_scatter_decides():
    # σb = 0, σw = 0.3, three prisms each: s = sqrt(0.09·(1/3 + 1/3)) = 0.244949,
    # q·s = 1.959964·0.244949 = 0.480091 (by hand); a drop of 0.6 on the log scale is a
    # fall, one of 0.45 is not (the scatter of two means of three falls as 1/n, not as n)
    assert it.falls([28.0, 90.0], [0.6, 0.0], [3, 3], 0.3, 0.0) == [
        (28.0, 90.0, pytest.approx(math.exp(-0.6), rel=1e-12))]
    assert it.falls([28.0, 90.0], [0.45, 0.0], [3, 3], 0.3, 0.0) == []


# ---------------------------------------------------------------- the descent itself, step by step
# Scalar problems r(z) = (atan(z − c), (z − m)/sp): one datum and one prior residual, so the
# descent can be written out here in plain floats, apart from the module's numpy batch.
ATAN = [  # (c, m, sp, z0): a start the Gauss-Newton step overshoots (rejected steps), a
    (0.0, 0.0, 1e6, 2.0),   # gentle start, a start at the minimum itself, a prior pulling away
    (1.0, 1.0, 1e6, 1.5),
    (0.5, 0.5, 1e6, 0.5),
    (0.0, 3.0, 2.0, 2.5),
    (1e4, 1e4, 1e6, 1e4 + 0.5),   # far from zero: the step is measured relative to 1 + |z|
]


def _atan_many(z, idx):
    c, m, sp, _ = (np.array([ATAN[i][k] for i in idx])[:, None] for k in range(4))
    d = z - c
    r = np.concatenate([np.arctan(d), (z - m) / sp], axis=1)
    j = np.stack([1.0 / (1.0 + d ** 2), np.broadcast_to(1.0 / sp, d.shape)], axis=1)
    return r, j


def _lm_by_hand(c, m, sp, z0, lam, max_iter, xtol=1e-10):
    """Levenberg-Marquardt of one parameter as Madsen, Nielsen & Tingleff (2004), Methods
    for non-linear least squares problems, algorithm 3.16 writes it: damping μ·diag(JᵀJ)
    (Marquardt), gain ratio ρ = (F(z) − F(z_new)) / (L(0) − L(h)) with L(0) − L(h) =
    ½·h·(μ·h − g), a step kept when F does not rise, μ ×= max(1/3, 1 − (2ρ − 1)³) and ν = 2
    on a kept step, μ ×= ν and ν ×= 2 on a refused one; stopped (the module's docstring) when
    a kept step is below xtol relative to 1 + |z|, or below √xtol with F falling by no more
    than 1e-14·F, or when μ passes 1e16 on a refused step.  Returns (z, F, J², Jd²) or None
    when max_iter steps do not stop it."""
    def res(z):
        return [math.atan(z - c), (z - m) / sp], [1.0 / (1.0 + (z - c) ** 2), 1.0 / sp]
    z, nu = z0, 2.0
    r, j = res(z)
    f = 0.5 * (r[0] ** 2 + r[1] ** 2)
    for _ in range(max_iter):
        g, h = j[0] * r[0] + j[1] * r[1], j[0] ** 2 + j[1] ** 2
        step = -g / (h + lam * h)
        rn, jn = res(z + step)
        fn = 0.5 * (rn[0] ** 2 + rn[1] ** 2)
        gain = 0.5 * step * (lam * h * step - g)
        size = abs(step) / (1.0 + abs(z))
        small = size <= xtol or (size <= math.sqrt(xtol) and f - fn <= 1e-14 * f)
        rho = (f - fn) / gain if gain > 0 else 0.0
        if fn <= f:
            z, r, j, f = z + step, rn, jn, fn
            lam *= max(1.0 / 3.0, 1.0 - (2.0 * min(max(rho, 0.0), 1.0) - 1.0) ** 3)
            nu = 2.0
            if small:
                return z, f, j[0] ** 2 + j[1] ** 2, j[0] ** 2
        else:
            lam *= nu
            nu *= 2.0
            if lam > 1e16:
                return z, f, j[0] ** 2 + j[1] ** 2, j[0] ** 2
    return None


def _steps_by_hand(i, lam0):
    # the fewest steps after which the descent written out above stops
    return next(k for k in range(1, 200) if _lm_by_hand(*ATAN[i], lam0, k) is not None)


@pytest.mark.parametrize("lam0", it.LM_DAMPINGS)
def test_each_descent_follows_marquardt_with_nielsens_damping_step_by_step(lam0):
    # the batch of four series against the descent written out above, one series at a time:
    # the same point, cost, curvature and data share to rounding, and the same number of steps
    laps = it._lm_path(_atan_many, np.array([[a[3]] for a in ATAN]), 1, 200, 1e-10, lam0)
    for i, lap in enumerate(laps):
        z, f, h, hd = _lm_by_hand(*ATAN[i], lam0, 200)
        assert lap.mode[0] == pytest.approx(z, rel=1e-13, abs=1e-15)
        assert lap.cost == pytest.approx(f, rel=1e-12, abs=1e-300)
        assert lap.cov[0, 0] == pytest.approx(1.0 / h, rel=1e-12)
        assert lap.p_eff == pytest.approx(hd / h, rel=1e-12)
        n = _steps_by_hand(i, lam0)
        one = np.array([[ATAN[i][3]]])
        assert it._lm_path(lambda zz, idx: _atan_many(zz, np.array([i])[idx]), one, 1, n,
                           1e-10, lam0)[0] is not None
        if n > 1:
            assert it._lm_path(lambda zz, idx: _atan_many(zz, np.array([i])[idx]), one, 1,
                               n - 1, 1e-10, lam0) == [None]


def test_the_first_overshooting_step_is_refused_by_hand():
    # atan from z0 = 2 (c = 0; the prior's 1/sp² = 1e-12 is below these digits): g =
    # atan(2)/5 = 1.107149/5 = 0.221430, JᵀJ = 1/25 = 0.04; with μ = 1e-3 the step is
    # −0.221430/(0.04·1.001) = −0.221430/0.04004 = −5.53021 to z = −3.53021, where
    # |atan| = 1.29476 exceeds atan(2) = 1.10715: refused (the first kept step comes later)
    assert _lm_by_hand(0.0, 0.0, 1e6, 2.0, 1e-3, 1) is None
    step = -(math.atan(2.0) / 5.0) / (0.04 * 1.001)
    assert step == pytest.approx(-5.53021, abs=5e-6)
    assert abs(math.atan(2.0 + step)) == pytest.approx(1.29476, abs=5e-6)
    assert abs(math.atan(2.0 + step)) > math.atan(2.0)
    assert _steps_by_hand(0, 1e-3) > 2


def _far_many(z, idx):
    # series 0: r = (e^z − 2, 1e-3/e^(−z) − 2e-3, 0·e^z), minimum at z = ln 2; from z0 = −7 the
    # first step is about 2·e^7/(1 + μ) ≈ 2190, where e^z overflows (e^709 is the largest double), 1/e^(−z) divides
    # by zero and 0·∞ is invalid; series 1: the atan problem ATAN[1] with a third residual 0
    zf = z[:, 0]
    out_r, out_j = np.zeros((len(idx), 3)), np.zeros((len(idx), 3, 1))
    for k, i in enumerate(idx):
        if i == 0:
            e = np.exp(zf[k])
            out_r[k] = [e - 2.0, 1e-3 / np.exp(-zf[k]) - 2e-3, 0.0 * e]
            out_j[k, :, 0] = [e, 1e-3 / np.exp(-zf[k]), 0.0 * e]
        else:
            r, j = _atan_many(z[k:k + 1], np.array([1]))
            out_r[k, :2], out_j[k, :2] = r[0], j[0]
    return out_r, out_j


def test_a_trial_step_into_overflow_warns_nothing_and_leaves_the_other_series_alone():
    import warnings
    with warnings.catch_warnings():
        warnings.simplefilter("error")            # a RuntimeWarning would fail the test
        laps = it._lm_path(_far_many, np.array([[-7.0], [ATAN[1][3]]]), 2, 200, 1e-10, 1e-3)
    assert laps[0].mode[0] == pytest.approx(math.log(2.0), rel=1e-9)   # e^z = 2
    # the second series' descent is the one written out above, untouched by the first's
    # non-finite trial steps
    z, f, h, hd = _lm_by_hand(*ATAN[1], 1e-3, 200)
    assert laps[1].mode[0] == pytest.approx(z, rel=1e-13)
    assert laps[1].cost == pytest.approx(f, rel=1e-12, abs=1e-300)


def test_an_integer_start_is_a_number_not_a_count():
    # a start of 2 (an integer) descends as 2.0 does: the iterates are real numbers
    one = lambda zz, idx: _atan_many(zz, np.array([0])[idx])   # noqa: E731
    got = it._lm_path(one, np.array([[2]]), 1, 200, 1e-10, 1e-3)[0]
    z, f, _, _ = _lm_by_hand(*ATAN[0], 1e-3, 200)
    assert got.mode[0] == pytest.approx(z, rel=1e-13, abs=1e-15)
    assert got.cost == pytest.approx(f, rel=1e-12, abs=1e-300)


def test_a_singular_damped_system_gives_none_for_each_series():
    # residual 1 whatever z is: JᵀJ = 0 and, with no starting damping, the system of the step
    # is singular: each series is left to be fitted alone (None), not an error
    def flat(z, idx):
        return np.ones((len(idx), 1)), np.zeros((len(idx), 1, 1))
    assert it._lm_path(flat, np.zeros((2, 1)), 1, 50, 1e-10, 0.0) == [None, None]


# ---------------------------------------------------------------- edges found by the mutation run
def test_adjacent_ranks_are_numpys_inverted_cdf():
    # probabilities one draw apart (ranks k and k + 1, placed one after the other by the
    # partial sorts): numpy's inverted-CDF quantiles (reference library), row by row
    # (64/128, 65/128, 66/128 are exact in binary: ranks 63, 64, 65 of 128)
    rows = np.random.default_rng(8).normal(size=(3, 128))
    probs = [0.5, 0.5078125, 0.515625, 0.9]
    assert np.array_equal(it.row_quantiles(rows, probs),
                          np.quantile(rows.T, probs, axis=0, method="inverted_cdf"))


def test_importance_weights_ignore_a_constant_in_the_target():
    # self-normalised weights p/q: a constant factor in p (here e^800, beyond a float's range
    # on its own) cancels (MacKay 2003, ch. 29), so the weights are those of the target without it
    mu, sd = np.array([0.3, -0.2]), np.array([1.2, 0.7])
    mode, cov = np.array([0.0, 0.0]), np.array([[1.0, 0.3], [0.3, 0.5]])
    _, w, _ = it.importance_sample(_gauss_nlp(mu, sd), mode, cov, 400, 5.0, 1.5, 11)
    _, w_big, _ = it.importance_sample(lambda z: _gauss_nlp(mu, sd)(z) - 800.0, mode, cov,
                                       400, 5.0, 1.5, 11)
    assert w_big == pytest.approx(w, rel=1e-9)


def test_lack_of_fit_with_one_replicate_pair_and_the_sums_of_an_untestable_one():
    # groups a (1, 3), b (4), c (8): pure error (1−2)² + (3−2)² = 2 on N − k = 4 − 3 = 1 dof;
    # fitted 2.5, 2.5, 4, 7: lack of fit 2(0.5)² + 0 + 1² = 1.5 on 3 − 1 = 2 dof;
    # F = (1.5/2)/(2/1) = 0.375 (by hand), p from scipy.stats.f.sf
    got = it.lack_of_fit([1.0, 3.0, 4.0, 8.0], ["a", "a", "b", "c"], [2.5, 2.5, 4.0, 7.0], 1.0)
    assert got.f == pytest.approx(0.375, rel=1e-12)
    assert got.p_value == pytest.approx(stats.f.sf(0.375, 2.0, 1.0), rel=1e-9)
    # one result per group: not testable, its lack-of-fit sum still reported:
    # (1 − 1.1)² + (2 − 1.9)² + 0 = 0.02 on 3 − 1 = 2 dof
    none = it.lack_of_fit([1.0, 2.0, 3.0], [1, 2, 3], [1.1, 1.9, 3.0], 1.0)
    assert (none.ss_lof, none.dof_lof) == (pytest.approx(0.02, rel=1e-9), 2.0)


def test_falls_with_unequal_counts_at_their_critical_quantile():
    # s = sqrt(2σb² + σw²(1/n_a + 1/n_b)), σw = 0.05, σb = 0.10; a fall when d > q·s, so the
    # critical q is d/s (by hand).  Counts 1 and 6, d = ln 4 − ln 2.5 = 0.470004:
    # s = sqrt(0.02 + 0.0025·7/6) = 0.151383, q* = 3.10474
    d2 = np.log([4.0, 2.5])
    assert it.falls([28.0, 90.0], d2, [1, 6], 0.05, 0.10, q=3.09) != []
    assert it.falls([28.0, 90.0], d2, [1, 6], 0.05, 0.10, q=3.12) == []
    # three ages, counts 1, 6, 2, the drop of 0.5 between the second and third:
    # s = sqrt(0.02 + 0.0025·(1/6 + 1/2)) = 0.147196, q* = 3.39683
    means3 = [0.0, 0.0, -0.5]
    assert it.falls([7.0, 28.0, 90.0], means3, [1, 6, 2], 0.05, 0.10, q=3.38) == [
        (28.0, 90.0, pytest.approx(math.exp(-0.5), rel=1e-12))]
    assert it.falls([7.0, 28.0, 90.0], means3, [1, 6, 2], 0.05, 0.10, q=3.41) == []
