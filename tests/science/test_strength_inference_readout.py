"""Strength inference, what is read from a fit: the curve, its two parts, the posterior
summary of each prior term (Laplace normal and posterior draws) and the interval formulas.
The fit is made by hand (a mode, a covariance and draws of our own choosing; no fitting, no
demo), and every check value comes from the two-stage law written out here, numpy's
quantiles or a derivation beside it."""
from __future__ import annotations

import dataclasses
import math

import numpy as np
import pytest
from scipy import stats

from specgen import refdata
from specgen.science import strength_inference as si

PRIORS = refdata.load("strength_priors").data
NC = si.prior_from_table("natural_cement", PRIORS["natural_cement"])
Z975 = 1.959963984540054     # standard normal 97.5 % quantile (scipy.stats.norm.ppf(0.975))

# an invented posterior mode: F = 9 MPa, φ = 0.2, τA = 0.05 d, τS = 40 d, b = 0.7
F, PHI, TA, TS, B = 9.0, 0.2, 0.05, 40.0, 0.7
MODE = np.array([math.log(F), math.log(PHI / (1 - PHI)), math.log(TA), math.log(TS),
                 math.log(B)])
COV = np.diag([0.01, 0.09, 0.16, 0.04, 0.0025])
COV[3, 4] = COV[4, 3] = -0.005


def _law(t, f=F, phi=PHI, ta=TA, ts=TS, b=B):
    # f(t) = F·[φ·(1 − e^(−t/τA)) + (1 − φ)·(1 − e^(−(t/τS)^b))]  (the law as documented)
    t = np.asarray(t, float)
    return f * (phi * (1 - np.exp(-t / ta)) + (1 - phi) * (1 - np.exp(-(t / ts) ** b)))


def _inference(draws=None):
    return si.Inference(prior=NC, ages=np.array([1.0, 7.0, 28.0]), means_log=np.zeros(3),
                        counts=np.full(3, 3.0), mode=MODE.copy(), cov=COV.copy(), p_eff=3.0,
                        sigma_w=0.05, sigma_b=0.08, sigma_w_source="", sigma_b_source="",
                        dof=10.0, lof=None, lof_batch_p=None, last_age=28.0, draws=draws)


def test_the_curve_and_its_two_parts_are_the_law_written_out():
    inf = _inference()
    t = np.array([0.02, 0.05, 1.0, 28.0, 365.0])
    assert si.value(inf, t) == pytest.approx(_law(t), rel=1e-12)
    parts = si.components(inf, t)
    assert parts["aluminate"] == pytest.approx(F * PHI * (1 - np.exp(-t / TA)), rel=1e-12)
    assert parts["silicate"] == pytest.approx(
        F * (1 - PHI) * (1 - np.exp(-(t / TS) ** B)), rel=1e-12)
    # at t = τA the fast part is F·φ·(1 − 1/e) = 9·0.2·0.632121 = 1.137818 MPa (by hand)
    assert si.components(inf, [TA])["aluminate"][0] == pytest.approx(1.137818, abs=1e-6)


@pytest.mark.parametrize("ages", [[0.0], [-1.0], [float("nan")], [28.0, float("inf")]])
def test_the_curve_refuses_ages_word_for_word(ages):
    with pytest.raises(si.InferenceError) as exc:
        si.value(_inference(), ages)
    assert str(exc.value) == "prediction ages must be positive finite numbers of days"


def _gain_log_sd(z, cov):
    # delta method for ln f(365) − ln f(28): its gradient by central differences of the law
    # written out above (step 1e-6 on each term of z), then sqrt(dᵀ·Σ·d)
    def lg(v):
        f, phi, ta, ts, b = (math.exp(v[0]), 1 / (1 + math.exp(-v[1])), math.exp(v[2]),
                             math.exp(v[3]), math.exp(v[4]))
        return math.log(_law(365.0, f, phi, ta, ts, b) / _law(28.0, f, phi, ta, ts, b))
    d = np.array([(lg(z + h) - lg(z - h)) / 2e-6 for h in np.eye(5) * 1e-6])
    return lg(z), math.sqrt(d @ cov @ d)


def test_posterior_summary_from_the_laplace_normal():
    # each shape term: mode and mode ± 1.959964·sd on its own scale, mapped back
    # (logistic for φ, exp for the times and b); the gain by the delta method
    got = si.posterior_summary(_inference())
    sd = np.sqrt(np.diag(COV))
    back = [lambda v: 1 / (1 + math.exp(-v)), math.exp, math.exp, math.exp]
    for k, (name, f) in enumerate(zip(("early_fraction", "tau_fast_d", "tau_slow_d",
                                       "shape_b"), back), start=1):
        assert got[name] == pytest.approx(
            (f(MODE[k]), f(MODE[k] - Z975 * sd[k]), f(MODE[k] + Z975 * sd[k])), rel=1e-12)
    assert got["early_fraction"][0] == pytest.approx(0.2, rel=1e-12)
    lg, s = _gain_log_sd(MODE, COV)
    assert got["gain_365_28"] == pytest.approx(
        (math.exp(lg), math.exp(lg - Z975 * s), math.exp(lg + Z975 * s)), rel=1e-7)
    assert list(got) == ["early_fraction", "tau_fast_d", "tau_slow_d", "shape_b", "gain_365_28"]


def test_posterior_summary_from_the_draws():
    # with draws the range of each term is numpy's inverted-CDF 2.5 % and 97.5 % quantile of
    # the draws (then mapped back); the mode stays the mode
    rng = np.random.default_rng(5)
    draws = MODE + rng.multivariate_normal(np.zeros(5), COV, 400)
    got = si.posterior_summary(_inference(draws))
    back = [lambda v: 1 / (1 + np.exp(-v)), np.exp, np.exp, np.exp]
    for k, (name, f) in enumerate(zip(("early_fraction", "tau_fast_d", "tau_slow_d",
                                       "shape_b"), back), start=1):
        lo, hi = np.quantile(draws[:, k], [0.025, 0.975], method="inverted_cdf")
        assert got[name] == pytest.approx((f(MODE[k]), f(lo), f(hi)), rel=1e-12)
    gains = []
    for v in draws:
        f, phi, ta, ts, b = (math.exp(v[0]), 1 / (1 + math.exp(-v[1])), math.exp(v[2]),
                             math.exp(v[3]), math.exp(v[4]))
        gains.append(_law(365.0, f, phi, ta, ts, b) / _law(28.0, f, phi, ta, ts, b))
    lo, hi = np.quantile(gains, [0.025, 0.975], method="inverted_cdf")
    assert got["gain_365_28"] == pytest.approx(
        (float(_law(365.0) / _law(28.0)), lo, hi), rel=1e-9)


def test_interval_formulas_name_their_method_word_for_word():
    # the formulas of the module docstring ("Intervals"): Laplace fallback exp(ln f ± z·sqrt(gᵀΣg))
    # and exp(ln f ± q·sqrt(gᵀΣg + σb² + σw²/n)); with draws, the central quantiles of ln f(t; z_i)
    # and of ln f(t; z_i) + T_i·sqrt(σb² + σw²/n), T_i Student's t
    laplace = si.interval_formulas(_inference())
    assert laplace == (
        r"e^{\ln\hat f \pm z\sqrt{g^{\mathsf T}\Sigma g}},\ g = \partial \ln f/\partial\theta",
        r"e^{\ln\hat f \pm q\sqrt{g^{\mathsf T}\Sigma g + \sigma_b^2 + \sigma_w^2/n}}")
    sampled = si.interval_formulas(_inference(np.tile(MODE, (3, 1))))
    assert sampled == (
        r"\left[e^{Q_{\alpha/2}},\ e^{Q_{1-\alpha/2}}\right]\ \text{of}\ "
        r"\ln f(t; z_i),\ z_i\ \text{posterior draws}",
        r"\left[e^{Q_{\alpha/2}},\ e^{Q_{1-\alpha/2}}\right]\ \text{of}\ "
        r"\ln f(t; z_i) + T_i\sqrt{\sigma_b^2 + \sigma_w^2/n},\ T_i \sim t_{\nu}")


def _log_law_grad(t):
    # ∂ ln f/∂z at the mode by central differences (step 1e-6) of the law written out above
    def lf(v):
        return np.log(_law(t, math.exp(v[0]), 1 / (1 + math.exp(-v[1])), math.exp(v[2]),
                           math.exp(v[3]), math.exp(v[4])))
    return np.column_stack([(lf(MODE + h) - lf(MODE - h)) / 2e-6 for h in np.eye(5) * 1e-6])


@pytest.mark.parametrize("level, z, q", [
    # z: standard normal and q: Student's t at 10 dof, two-sided (scipy.stats.norm.ppf and
    # scipy.stats.t.ppf; t table: t(0.975, 10) = 2.228, t(0.95, 10) = 1.812)
    (0.95, 1.959963984540054, 2.228138851986274),
    (0.90, 1.6448536269514722, 1.8124611228107335),
])
def test_laplace_bands_by_the_delta_method(level, z, q):
    # band for the mean curve exp(ln f ± z·sqrt(gᵀΣg)); next set of n prisms
    # exp(ln f ± q·sqrt(gᵀΣg + σb² + σw²/n)) (module docstring), σb = 0.08, σw = 0.05
    t = np.array([1.0, 28.0, 90.0, 365.0])
    g = _log_law_grad(t)
    var = np.einsum("ij,jk,ik->i", g, COV, g)
    m = np.log(_law(t))
    for n in (3.0, 1.0, float("inf")):
        got = si.bands(_inference(), t, level, n)
        sp = q * np.sqrt(var + 0.08 ** 2 + 0.05 ** 2 / n)
        assert got["value"] == pytest.approx(np.exp(m), rel=1e-12)
        assert got["mean_lo"] == pytest.approx(np.exp(m - z * np.sqrt(var)), rel=1e-7)
        assert got["mean_hi"] == pytest.approx(np.exp(m + z * np.sqrt(var)), rel=1e-7)
        assert got["pred_lo"] == pytest.approx(np.exp(m - sp), rel=1e-7)
        assert got["pred_hi"] == pytest.approx(np.exp(m + sp), rel=1e-7)


def test_one_interval_whole_and_where_it_turns_indicative():
    # 95 % Laplace; last tested age 28 d, so beyond 3 × 28 = 84 d an interval is indicative
    inf = _inference()
    g = _log_law_grad(np.array([84.0]))[0]
    var = g @ COV @ g
    m = math.log(_law(84.0))
    mean = si.interval(inf, 84.0, "mean")
    assert mean == si.Interval(84.0, pytest.approx(math.exp(m), rel=1e-12),
                               pytest.approx(math.exp(m - Z975 * math.sqrt(var)), rel=1e-7),
                               pytest.approx(math.exp(m + Z975 * math.sqrt(var)), rel=1e-7),
                               "mean curve", 0.95, False)
    sp = 2.228138851986274 * math.sqrt(var + 0.08 ** 2 + 0.05 ** 2 / 3)
    assert si.interval(inf, 84.0, "set") == si.Interval(
        84.0, pytest.approx(math.exp(m), rel=1e-12), pytest.approx(math.exp(m - sp), rel=1e-7),
        pytest.approx(math.exp(m + sp), rel=1e-7), "mean of the next set of 3 prisms", 0.95,
        False)
    assert si.interval(inf, 84.0, "set", n=float("inf")).kind == "one batch"
    assert si.interval(inf, 84.001, "mean").indicative is True
    assert si.interval(inf, 84.001, "mean", limit_factor=3.1).indicative is False
    assert si.interval(inf, 86.8, "mean", limit_factor=3.1).indicative is False   # 3.1·28 = 86.8
    assert si.interval(inf, 86.81, "mean", limit_factor=3.1).indicative is True


def test_band_from_draws_is_their_quantiles():
    # with draws (and no more ages than the nodes), the band for the mean curve is numpy's
    # inverted-CDF quantiles of ln f over the draws, exponentiated.  At the 50 % level the
    # probabilities (1 − 0.5)/2 = 0.25 and 0.75 are exact in binary, so the order statistics
    # are the 250th and 750th of the 1000 draws without any rounding of n·p
    rng = np.random.default_rng(9)
    draws = MODE + rng.multivariate_normal(np.zeros(5), COV, si.KEPT)   # a fit keeps KEPT
    t = np.array([3.0, 28.0, 180.0])
    lf = np.array([np.log(_law(t, math.exp(v[0]), 1 / (1 + math.exp(-v[1])), math.exp(v[2]),
                                 math.exp(v[3]), math.exp(v[4]))) for v in draws])
    lo, hi = np.sort(lf, axis=0)[[249, 749]]
    assert np.array_equal(np.quantile(lf, [0.25, 0.75], axis=0, method="inverted_cdf"),
                          [lo, hi])
    got = si.bands(_inference(draws), t, level=0.5)
    assert got["mean_lo"] == pytest.approx(np.exp(lo), rel=1e-12)
    assert got["mean_hi"] == pytest.approx(np.exp(hi), rel=1e-12)
    assert got["value"] == pytest.approx(_law(t), rel=1e-12)


@pytest.mark.parametrize("ages", [[0.0], [-1.0], [float("nan")], [28.0, float("inf")]])
def test_the_bands_refuse_ages_word_for_word(ages):
    with pytest.raises(si.InferenceError) as exc:
        si.bands(_inference(), ages)
    assert str(exc.value) == "prediction ages must be positive finite numbers of days"


def test_a_laplace_variance_below_zero_by_rounding_gives_a_band_of_no_width():
    # a covariance whose gᵀΣg is negative (as rounding can leave one at a well-fixed age) is
    # read as zero: the band closes on the curve (the law written out), never NaN
    inf = dataclasses.replace(_inference(), cov=-1e-30 * np.eye(5))
    got = si.bands(inf, [28.0])
    assert got["mean_lo"] == pytest.approx(_law([28.0]), rel=1e-12)
    assert got["mean_hi"] == pytest.approx(_law([28.0]), rel=1e-12)


def test_bands_each_keeps_the_positive_ages_at_the_default_level_and_set_size():
    # the defaults are the 95 % level and sets of 3 prisms (the signature, as for bands); an
    # age of 0 d is left for bands to refuse, half a day is kept; each kept band equals the
    # delta method's (Laplace fit: exp(ln f ± z·sqrt(gᵀΣg)) and with q = t(0.975, 10) = 2.228
    # for the set, σb = 0.08, σw = 0.05)
    inf = _inference()
    si.bands_each(inf, [0.0, 0.5, 28.0, 365.0])
    assert set(inf.memo) == {((a,), 0.95, (3.0,)) for a in (0.5, 28.0, 365.0)}
    for a in (0.5, 28.0, 365.0):
        g = _log_law_grad(np.array([a]))[0]
        var = g @ COV @ g
        m = math.log(_law(a))
        sp = 2.228138851986274 * math.sqrt(var + 0.08 ** 2 + 0.05 ** 2 / 3)
        kept = inf.memo[((a,), 0.95, (3.0,))]
        assert kept["mean_lo"][0] == pytest.approx(math.exp(m - Z975 * math.sqrt(var)), rel=1e-7)
        assert kept["pred_hi"][0] == pytest.approx(math.exp(m + sp), rel=1e-7)


def test_an_interval_for_a_set_of_one_prism():
    # n = 1: exp(ln f ± q·sqrt(gᵀΣg + σb² + σw²/1)), q = t(0.975, 10) = 2.228 (scipy.stats.t)
    inf = _inference()
    g = _log_law_grad(np.array([56.0]))[0]
    sp = 2.228138851986274 * math.sqrt(g @ COV @ g + 0.08 ** 2 + 0.05 ** 2)
    m = math.log(_law(56.0))
    got = si.interval(inf, 56.0, "set", n=1.0)
    assert (got.lower, got.upper) == (pytest.approx(math.exp(m - sp), rel=1e-7),
                                      pytest.approx(math.exp(m + sp), rel=1e-7))
    assert got.kind == "mean of the next set of 1 prisms"


def _prior_gain_range(prior, age, level, draws=4000, rng_state=0):
    # the prior alone, written out: the four shape terms drawn from their normals in the
    # order early fraction, τA, τS, b (numpy's generator at the given state), f(age)/f(28 d)
    # of each draw from the law written out above, each weighted by the melded gain term
    # exp(−½((ln f365/f28 − μ)/s)²); the range is the weighted inverted CDF at (1 − level)/2
    # and (1 + level)/2: the smallest ratio whose share of the weight reaches the probability
    # (the largest ratio when rounding leaves the share short of it)
    rng = np.random.default_rng(rng_state)
    shape = [rng.normal(prior.terms[k].mu, prior.terms[k].sd, draws)
             for k in ("early_fraction", "tau_fast_d", "tau_slow_d", "shape_b")]
    phi, ta, ts, b = 1 / (1 + np.exp(-shape[0])), np.exp(shape[1]), np.exp(shape[2]), \
        np.exp(shape[3])
    f28, fa, f365 = (_law(t, 1.0, phi, ta, ts, b) for t in (28.0, age, 365.0))
    mu, sd = prior.penalty("gain_365_28")
    w = np.exp(-0.5 * ((np.log(f365 / f28) - mu) / sd) ** 2)
    ratio = fa / f28
    order = sorted(range(draws), key=lambda i: ratio[i])
    out = []
    for p in ((1 - level) / 2, (1 + level) / 2):
        acc, pick = 0.0, ratio[order[-1]]
        for i in order:
            acc += w[i]
            if acc / w.sum() >= p:
                pick = ratio[i]
                break
        out.append(float(pick))
    return tuple(out)


def test_the_prior_gain_range_at_one_year_is_the_printed_row():
    # f365/f28 under the prior alone: the printed gain row of natural cement, 1.3-3.5
    # (content/data/strength_priors.yaml), within 4 % (Monte Carlo error of a 2.5 % quantile
    # of 4000 draws); the 50 % range lies inside it
    lo, hi = si.prior_gain_interval(NC, 365.0)
    assert (lo, hi) == (pytest.approx(1.3, rel=0.04), pytest.approx(3.5, rel=0.04))
    mid = si.prior_gain_interval(NC, 365.0, level=0.5)
    assert lo < mid[0] < mid[1] < hi


@pytest.mark.parametrize("age, level", [(90.0, 0.95), (90.0, 0.5), (180.0, 1.0)])
def test_the_prior_gain_range_is_the_weighted_quantile_written_out(age, level):
    got = si.prior_gain_interval(NC, age, level)
    assert got == pytest.approx(_prior_gain_range(NC, age, level), rel=1e-9)
    if level < 1:
        assert si.prior_gain_interval(NC, age, level, draws=500, rng_state=3) == \
            pytest.approx(_prior_gain_range(NC, age, level, 500, 3), rel=1e-9)


def test_a_long_age_list_takes_its_bands_from_48_log_spaced_ages_written_out():
    # more ages than si.NODES (48): the module docstring's rule written out.  At 48 ages
    # log-spaced from the first to the last (numpy.geomspace) the band's edges are numpy's
    # inverted-CDF quantiles of ln f over the draws, and the set's of the predictive mixture
    # ln f(t; z_i) + T·e, e = sqrt(σb² + σw²/n) interpolated in ln t to those ages, T the
    # stratified Student-t variates (scipy.stats.t.ppf at (i + ½)/4000, shuffled by numpy's
    # generator at state 20261, four per draw, 10 dof); each edge's offset from ln f at the
    # mode is then interpolated in ln t to every age asked.  48 ages exactly: at the ages.
    # The 50 % level: its probabilities 0.25 and 0.75 are exact in binary (see the band from
    # draws above), so the ranks are numpy's without rounding.
    rng = np.random.default_rng(12)
    draws = MODE + rng.multivariate_normal(np.zeros(5), COV, si.KEPT)
    inf = _inference(draws)

    def ln_law(t, v):
        return np.log(_law(t, math.exp(v[0]), 1 / (1 + math.exp(-v[1])), math.exp(v[2]),
                           math.exp(v[3]), math.exp(v[4])))
    u = (np.arange(4000) + 0.5) / 4000
    noise = stats.t.ppf(np.random.default_rng(20261).permutation(u), 10.0)
    for size in (60, 48):
        t = np.sort(rng.uniform(0.5, 400.0, size))
        n = rng.choice([1.0, 3.0, 6.0], size)
        e = np.sqrt(0.08 ** 2 + 0.05 ** 2 / n)
        nodes = t if size <= 48 else np.geomspace(t[0], t[-1], 48)
        lf = np.array([ln_law(nodes, v) for v in draws])             # draws x nodes
        en = np.interp(np.log(nodes), np.log(t), e)
        mix = [lf[:, j][None, :] + en[j] * noise.reshape(4, -1) for j in range(nodes.size)]
        edges = {"mean_lo": np.quantile(lf, 0.25, axis=0, method="inverted_cdf"),
                 "mean_hi": np.quantile(lf, 0.75, axis=0, method="inverted_cdf"),
                 "pred_lo": np.array([np.quantile(x, 0.25, method="inverted_cdf") for x in mix]),
                 "pred_hi": np.array([np.quantile(x, 0.75, method="inverted_cdf") for x in mix])}
        shuffled = rng.permutation(size)          # the ages asked in any order
        got = si.bands(inf, t[shuffled], 0.5, n[shuffled])
        m = ln_law(t, MODE)
        for k, edge in edges.items():
            want = m + np.interp(np.log(t), np.log(nodes), edge - ln_law(nodes, MODE))
            assert got[k] == pytest.approx(np.exp(want[shuffled]), rel=1e-9), (size, k)
