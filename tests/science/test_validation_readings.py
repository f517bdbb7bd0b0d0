"""The validation study's readings of the prior (``specgen.validation_readings``): an exact
posterior computed independently of the fit, used to say why a cell scores as it does.

Each check value names its source beside it."""
from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import stats

from specgen import refdata
from specgen import validation as v
from specgen import validation_readings as vr
from specgen.science import strength_inference as si

ROW = refdata.load("strength_priors").data["natural_cement"]
PRIOR = si.prior_from_table("natural_cement", ROW)


def test_one_shape_gives_the_closed_form_normal_level():
    # every draw the same shape: ln F has a flat prior and group means normal about
    # ln F + ln s(t_i) with variances v_i, so ln f(t) ~ N(m + ln s(t), 1/Σ(1/v_i)), m the
    # precision-weighted mean of ȳ_i - ln s(t_i) (closed form; Gelman et al., Bayesian Data
    # Analysis, sec. 2.5); its 2.5 and 97.5 % points from scipy.stats.norm
    z = np.tile([0.0, -1.2, -3.0, 4.2, 0.0], (200000, 1))
    ages, t = np.array([1.0, 3.0, 7.0, 28.0]), np.array([90.0, 365.0])
    means = np.log([1.1, 1.6, 2.2, 4.1])
    var = np.array([0.004, 0.005, 0.004, 0.006])
    band = vr.posterior_band(z, np.zeros(len(z)), ages, means, var, t, np.random.default_rng(1))
    s = si._log_f(z[0], np.concatenate([ages, t]))
    w = 1 / var
    m = np.sum(w * (means - s[:4])) / w.sum()
    lo, hi = stats.norm.ppf([0.025, 0.975], loc=m + s[4:, None], scale=1 / math.sqrt(w.sum())).T
    assert band[0] == pytest.approx(np.exp(lo), rel=2e-3)
    assert band[1] == pytest.approx(np.exp(hi), rel=2e-3)


def test_the_fit_s_band_is_the_exact_posterior_of_its_prior():
    # reference: the posterior by likelihood-weighted draws of the prior (sampling-importance-
    # resampling from the prior, Smith & Gelfand 1992), 100 000 draws, against the fit's
    # Laplace-proposal importance sampling (1000 kept draws).  Tolerance: 7 % on each edge
    # (the Monte Carlo error of a 2.5 % quantile of about 300-1200 effective draws; measured
    # at most 5.1 % over eight series) and 2 % on the mean log ratio (no bias).
    z, lw0 = vr.READINGS["as printed"](np.random.default_rng(3), ROW, 100000, "")
    rng, ratios = np.random.default_rng(5), []
    for _ in range(6):
        law = v.LAWS["two-stage exponential"][0](rng, ROW)
        t, y = v.simulate(law, rng, (1, 3, 7, 28), 0.04)
        inf = si.fit(t, y, PRIOR)
        b = si.bands(inf, [90.0, 365.0])
        ref = vr.posterior_band(z, lw0, inf.ages, inf.means_log,
                                inf.sigma_b ** 2 + inf.sigma_w ** 2 / inf.counts, [90.0, 365.0],
                                np.random.default_rng(6))
        ratios.append(np.vstack([b["mean_lo"], b["mean_hi"]]) / ref)
    r = np.array(ratios)
    assert np.all(np.abs(r - 1) < 0.07), r
    assert abs(float(np.mean(np.log(r)))) < 0.02


def test_as_printed_is_the_fit_s_prior():
    # the reading "as printed" is the fit's own prior: its gain f365/f28 has the printed row
    # as its central 95 % range (content/data/strength_priors.yaml: 1.3-3.5; tolerance 2 %,
    # Monte Carlo error of a 2.5 % quantile of 100 000 weighted draws)
    z, lw0 = vr.READINGS["as printed"](np.random.default_rng(8), ROW, 100000, "")
    assert vr.implied_gain(z, lw0, 365.0) == (pytest.approx(1.3, rel=0.02),
                                              pytest.approx(3.5, rel=0.02))


@pytest.mark.parametrize("stretched", [False, True])
def test_the_generating_distribution_keeps_every_row(stretched):
    # the study's natural-cement laws (specgen.validation._two_stage_from_rows): every
    # parameter inside its printed row (content/data/strength_priors.yaml), b = 1 for the
    # exponential law, and f365/f28 inside the gain row
    z = vr.generating(np.random.default_rng(2), ROW, 5000, stretched)
    phi, ta, ts, b = 1 / (1 + np.exp(-z[:, 1])), np.exp(z[:, 2]), np.exp(z[:, 3]), np.exp(z[:, 4])
    for x, key in ((phi, "early_fraction"), (ta, "tau_fast_d"), (ts, "tau_slow_d")):
        lo, hi = ROW[key]["range"]
        assert np.all((x >= lo * (1 - 1e-12)) & (x <= hi * (1 + 1e-12))), key
    if stretched:
        assert np.all((b >= 0.35) & (b <= 1.0)) and b.std() > 0.1
    else:
        assert np.all(b == 1.0)
    g = np.exp(vr._log_gain(z))
    assert np.all((g >= 1.3 * (1 - 1e-12)) & (g <= 3.5 * (1 + 1e-12)))


def test_a_bound_gives_no_weight_outside_the_row():
    # "gain row as a bound": a draw whose f365/f28 lies outside 1.3-3.5 (the printed row)
    # has weight zero, one inside weight one
    z, lw0 = vr.READINGS["gain row as a bound"](np.random.default_rng(9), ROW, 20000, "")
    g = np.exp(vr._log_gain(z))
    inside = (g >= 1.3) & (g <= 3.5)
    assert np.all(lw0[inside] == 0.0) and np.all(np.isneginf(lw0[~inside]))
    assert 0 < inside.mean() < 1
