"""Strength-age models: EN 1992-1-1 age function, WLS fits, standard errors, AICc, refusals."""
import math

import numpy as np
import pytest
from scipy import optimize, stats

from specgen.science import strength_models as sm
from specgen.science.strength_models import (
    DAY, StrengthFitError, age_function_en1992, components, fit_all, fit_model)

MPA = 1e6
EARLY = [1, 3, 7, 14, 28]                # d, the usual test ages up to 28 d


# The three model formulas written out again here, independently of the module (MPa, d), so
# that a wrong formula in the module cannot also make the data it is tested on.
def _en1992(x, t):
    f28, s = x                      # EN 1992-1-1 eq. 3.2: f28 * exp{s [1 - (28/t)^0.5]}
    return f28 * np.exp(s * (1.0 - (28.0 / np.asarray(t, float)) ** 0.5))


def _hyperbolic(x, t):
    f_inf, k = x                    # f_inf * t / (k + t): half of f_inf at t = k
    t = np.asarray(t, float)
    return f_inf * t / (k + t)


def _two_component(x, t):
    f_a, tau_a, f_s, tau_s, b = x   # fA (1 - e^(-t/tauA)) + fS (1 - e^(-(t/tauS)^b))
    t = np.asarray(t, float)
    return f_a * (1.0 - np.exp(-t / tau_a)) + f_s * (1.0 - np.exp(-((t / tau_s) ** b)))


TRUTH = {"en1992_age": _en1992, "hyperbolic": _hyperbolic, "two_component": _two_component}


def _data(model, x, ages_d, cv=0.05, rng_state=0, reps=3):
    """Synthetic results (invented data) from known internal parameters (MPa, d), made with
    the formulas above (not the module's)."""
    t = np.repeat(np.asarray(ages_d, float), reps)
    rng = np.random.default_rng(rng_state)
    y = TRUTH[model](x, t) * (1 + cv * rng.standard_normal(t.size))
    return t * DAY, y * MPA


@pytest.mark.parametrize("s, t_d, beta", [
    # EN 1992-1-1 eq. 3.2; by hand: (28/7)^0.5 = 2 -> exp(s*(1-2)) = exp(-s)
    (0.25, 7, 0.7788),     # exp(-0.25) = 0.77880  (EN 1992-1-1 3.1.2; DOMAIN primer 0.7788)
    (0.38, 7, 0.6839),     # exp(-0.38) = 0.68386
    (0.20, 7, 0.8187),     # exp(-0.20) = 0.81873
    (0.25, 28, 1.0),       # 1 - (28/28)^0.5 = 0 -> 1 by definition
    (0.25, 112, 1.1331),   # (28/112)^0.5 = 0.5 -> exp(0.125) = 1.13315
])
def test_en1992_age_function(s, t_d, beta):
    assert float(age_function_en1992(t_d * DAY, s)) == pytest.approx(beta, abs=5e-5)


def test_en1992_fit_recovers_exact_parameters_and_eq_3_2():
    # Noise-free data from f28 = 5 MPa, s = 0.25: the fit returns them, and the fitted curve
    # at 7 d is 0.7788 * 5 = 3.894 MPa (EN 1992-1-1 eq. 3.2, by hand above).
    t, y = _data("en1992_age", [5.0, 0.25], EARLY, cv=0.0)
    fit = fit_model("en1992_age", t, y)
    assert fit.params["f28"] / MPA == pytest.approx(5.0, rel=1e-4)
    assert fit.params["s"] == pytest.approx(0.25, rel=1e-4)
    assert sm.MODELS["en1992_age"].f(np.array(fit.x), np.array([7.0]))[0] == \
        pytest.approx(3.894, abs=1e-3)


def test_standard_errors_match_scipy_curve_fit():
    # Reference: scipy.optimize.curve_fit (absolute_sigma=False gives s²(JᵀWJ)⁻¹), same
    # weights (sigma = mean at age, the module's relative weighting).
    t, y = _data("en1992_age", [5.0, 0.3], EARLY, cv=0.06, rng_state=3)
    fit = fit_model("en1992_age", t, y)
    td, ym = t / DAY, y / MPA
    means = {a: ym[td == a].mean() for a in np.unique(td)}
    sig = np.array([means[a] for a in td])
    p, pcov = optimize.curve_fit(lambda tt, f28, s: f28 * np.exp(s * (1 - np.sqrt(28 / tt))),
                                 td, ym, p0=[4, 0.2], sigma=sig, absolute_sigma=False)
    assert fit.params["f28"] / MPA == pytest.approx(p[0], rel=1e-4)
    assert fit.params["s"] == pytest.approx(p[1], rel=1e-4)
    assert fit.std_errors["f28"] / MPA == pytest.approx(math.sqrt(pcov[0, 0]), rel=1e-3)
    assert fit.std_errors["s"] == pytest.approx(math.sqrt(pcov[1, 1]), rel=1e-3)


def test_hyperbolic_fit_recovers_parameters():
    t, y = _data("hyperbolic", [8.0, 20.0], EARLY + [56, 90], cv=0.03, rng_state=5)
    fit = fit_model("hyperbolic", t, y)
    assert fit.params["f_inf"] / MPA == pytest.approx(8.0, rel=0.15)
    assert fit.params["k"] / DAY == pytest.approx(20.0, rel=0.25)
    # the truth lies within about 3 standard errors (invented data, fixed rng_state)
    assert abs(fit.params["f_inf"] / MPA - 8.0) < 3 * fit.std_errors["f_inf"] / MPA


TRUE_TWO = [1.5, 1 / 24, 10.0, 90.0, 1.2]    # fA MPa, tauA d (1 h), fS MPa, tauS d, b


def test_two_component_attributes_strength_to_the_right_stage():
    # Common practice (DOMAIN primer sec. 1): the aluminate part gives < 2 MPa in the first
    # day; the silicate (C2S) part dominates only after about four weeks and grows for months.
    t, y = _data("two_component", TRUE_TWO, EARLY + [56, 90], cv=0.05, rng_state=11)
    assert y[t == DAY].mean() < 2 * MPA
    sel = fit_all(t, y)
    assert sel.best.model == "two_component"
    fit = sel.best
    assert fit.params["f_A"] / MPA == pytest.approx(1.5, rel=0.2)
    assert "tau_A" in fit.fixed and "held" in fit.notes[0]
    parts = components(fit, np.array([1, 3, 56, 90, 365]) * DAY)
    al, si = parts["aluminate"], parts["silicate"]
    assert al[0] > si[0] and al[1] > si[1]              # early strength is aluminate
    assert np.all(si[2:] > al[2:]) and si[-1] > 3 * al[-1]   # later strength is silicate
    total = _two_component(fit.x, [90.0])[0] * MPA     # the formula written out above
    assert al[3] + si[3] == pytest.approx(total, rel=1e-9)


def test_two_component_fits_tau_a_with_early_ages():
    # Ages of 1 h, 3 h and 6 h resolve the aluminate time constant (true 2 h, invented data).
    x = [1.5, 2 / 24, 10.0, 90.0, 1.2]
    t, y = _data("two_component", x, [1 / 24, 3 / 24, 6 / 24, 1, 3, 7, 28, 90], cv=0.03, rng_state=2)
    fit = fit_model("two_component", t, y)
    assert "tau_A" in fit.params and not fit.fixed
    assert fit.params["tau_A"] / 3600 == pytest.approx(2.0, rel=0.35)
    assert 60 <= fit.params["tau_A"] <= 12 * 3600


def test_refusal_says_what_is_needed():
    t, y = _data("two_component", TRUE_TWO, [1, 7, 28, 90], cv=0.05)
    with pytest.raises(StrengthFitError, match="4 parameters and needs results at >= 5 "
                                               "distinct ages; got 4"):
        fit_model("two_component", t, y)
    t, y = _data("en1992_age", [5.0, 0.3], [7, 28], cv=0.05)
    with pytest.raises(StrengthFitError, match="needs results at >= 3 distinct ages; got 2"):
        fit_model("en1992_age", t, y)
    sel = fit_all(t, y)
    assert sel.best is None and sel.reasoning.startswith("not assessed")
    with pytest.raises(StrengthFitError, match=">= 2 distinct ages; got 1"):
        fit_all([28 * DAY] * 3, [4e6, 4.2e6, 4.1e6])


def test_fit_all_lists_unsupported_models_and_ranks_the_rest():
    t, y = _data("en1992_age", [5.0, 0.3], [3, 7, 28], cv=0.05, rng_state=4)
    sel = fit_all(t, y)
    assert "two_component" in sel.not_assessed
    assert "distinct ages" in sel.not_assessed["two_component"]
    assert sel.best is not None and "AICc" in sel.reasoning
    assert sum(sel.akaike_weights.values()) == pytest.approx(1.0)


@pytest.mark.parametrize("ages, values, words", [
    ([DAY, 7 * DAY, 28 * DAY], [3e6, 3e6, 3e6], "all results are equal"),
    ([DAY, 7 * DAY, 28 * DAY], [0.0, 2e6, 3e6], "greater than zero"),
    ([DAY, 7 * DAY, 28 * DAY], [1e6, float("nan"), 3e6], "finite"),
    ([0.0, 7 * DAY, 28 * DAY], [1e6, 2e6, 3e6], "ages must be greater than zero"),
    ([DAY, 7 * DAY], [1e6, 2e6, 3e6], "one age per result"),
])
def test_bad_data_give_clear_errors(ages, values, words):
    for model in sm.MODELS:
        with pytest.raises(StrengthFitError, match=words):
            fit_model(model, ages, values)


def test_aicc_differences_match_scipy_normal_log_likelihood():
    # AICc = -2 ln L + 2k + 2k(k+1)/(n-k-1), ln L from scipy.stats.norm.logpdf of the
    # weighted residuals at the MLE sigma² = RSS/n (k = parameters + 1).
    t, y = _data("two_component", TRUE_TWO, EARLY + [56, 90], cv=0.05, rng_state=8)
    sel = fit_all(t, y)
    ref = {}
    td, ym = t / DAY, y / MPA
    w = 1 / np.array([ym[td == a].mean() for a in td])
    for fit in sel.fits:
        r = (TRUTH[fit.model](fit.x, td) - ym) * w
        n, k = r.size, len(fit.params) + 1
        lnl = stats.norm.logpdf(r, scale=math.sqrt(np.mean(r ** 2))).sum()
        ref[fit.model] = -2 * lnl + 2 * k + 2 * k * (k + 1) / (n - k - 1)
    base = sel.fits[0].model
    for fit in sel.fits:
        assert sel.delta_aicc[fit.model] == pytest.approx(ref[fit.model] - ref[base], abs=1e-6)


def test_parsimony_rule_prefers_fewer_parameters_within_two():
    # Data from the EN 1992 function: the two-parameter curves should be chosen.
    t, y = _data("en1992_age", [5.0, 0.3], EARLY + [56, 90], cv=0.05, rng_state=1)
    sel = fit_all(t, y)
    assert len(sel.best.params) == 2
    assert all(f.aicc >= sel.best.aicc - 2.0 for f in sel.fits)


def test_noise_free_fit_gives_finite_zero_standard_errors_not_nan():
    t, y = _data("hyperbolic", [8.0, 20.0], EARLY, cv=0.0)
    fit = fit_model("hyperbolic", t, y)
    se = np.array([fit.std_errors["f_inf"], fit.std_errors["k"] / DAY])
    assert np.all(np.isfinite(se)) and np.all(se < 1e-6 * np.array([8 * MPA, 20.0]))
    assert fit.aicc is not None and math.isfinite(fit.aicc)


def test_plain_names_and_units_of_parameters():
    t, y = _data("two_component", TRUE_TWO, EARLY + [56, 90], cv=0.05, rng_state=11)
    fit = fit_model("two_component", t, y)
    assert fit.units["f_S"] == "Pa" and fit.units["tau_S"] == "s"
    assert set(fit.std_errors) <= set(fit.params)
    assert all(math.isfinite(v) and v >= 0 for v in fit.std_errors.values())


# Points (MPa, d) at which the module's formulas are compared with the ones written above.
X_TWO = [1.5, 1 / 24, 10.0, 90.0, 1.2]
AGES_D = np.array([0.05, 0.5, 1, 3, 7, 28, 90, 365])


def test_model_formulas_against_the_independent_expressions():
    # Module formulas (internal units MPa, d) against the expressions written out above.
    for model, x in (("en1992_age", [5.0, 0.25]), ("hyperbolic", [8.0, 20.0]),
                     ("two_component", X_TWO)):
        got = sm.MODELS[model].f(np.asarray(x, float), AGES_D)
        assert got == pytest.approx(TRUTH[model](x, AGES_D), rel=1e-12), model
    # Values by hand: hyperbolic at t = k is half of f_inf (8 MPa, k = 20 d -> 4 MPa);
    # two-component at 90 d: 1.5 (1 - e^-2160) + 10 (1 - e^-1) = 1.5 + 6.3212 = 7.8212 MPa.
    assert sm.MODELS["hyperbolic"].f(np.array([8.0, 20.0]), np.array([20.0]))[0] == 4.0
    assert sm.MODELS["two_component"].f(np.array(X_TWO), np.array([90.0]))[0] == \
        pytest.approx(1.5 + 10 * (1 - math.exp(-1)), rel=1e-12)


@pytest.mark.parametrize("model, x", [
    ("en1992_age", [5.0, 0.25]), ("hyperbolic", [8.0, 20.0]), ("two_component", X_TWO)])
def test_analytic_jacobians_against_finite_differences(model, x):
    # Reference: central finite differences of the independent formulas above (numpy), step
    # 1e-6 relative; the analytic Jacobian must agree to about 1e-6 of the largest column.
    x = np.asarray(x, float)
    jac = sm.MODELS[model].jac(x, AGES_D)
    cols = []
    for j in range(x.size):
        h = 1e-6 * abs(x[j])
        e = np.zeros_like(x)
        e[j] = h
        cols.append((TRUTH[model](x + e, AGES_D) - TRUTH[model](x - e, AGES_D)) / (2 * h))
    ref = np.column_stack(cols)
    assert jac.shape == ref.shape
    for j in range(x.size):
        scale = max(np.max(np.abs(ref[:, j])), 1e-12)
        assert np.max(np.abs(jac[:, j] - ref[:, j])) <= 1e-6 * scale, (model, j)


def test_hyperbolic_fit_of_noise_free_data_against_the_linearised_form():
    # Noise-free data from f = f_inf t / (k + t): 1/f = 1/f_inf + (k/f_inf)(1/t) is a straight
    # line in 1/t (the double-reciprocal form), so numpy's polyfit gives f_inf and k exactly.
    ages = np.array([1, 3, 7, 14, 28, 56, 90], float)
    f = 6.5 * ages / (12.0 + ages)                          # f_inf 6.5 MPa, k 12 d (invented)
    slope, icept = np.polyfit(1 / ages, 1 / f, 1)
    f_inf, k = 1 / icept, slope / icept
    fit = fit_model("hyperbolic", np.repeat(ages, 3) * DAY, np.repeat(f, 3) * MPA)
    assert fit.params["f_inf"] / MPA == pytest.approx(f_inf, rel=1e-6)
    assert fit.params["k"] / DAY == pytest.approx(k, rel=1e-6)
    assert (f_inf, k) == (pytest.approx(6.5, rel=1e-9), pytest.approx(12.0, rel=1e-9))


def test_hyperbolic_fit_and_errors_match_scipy_curve_fit():
    # Reference: scipy.optimize.curve_fit on the independent formula, the module's relative
    # weights (sigma = mean at that age), covariance s^2 (J'WJ)^-1 (absolute_sigma=False).
    t, y = _data("hyperbolic", [8.0, 20.0], EARLY + [56, 90], cv=0.04, rng_state=7)
    fit = fit_model("hyperbolic", t, y)
    td, ym = t / DAY, y / MPA
    sig = np.array([ym[td == a].mean() for a in td])
    p, pcov = optimize.curve_fit(lambda tt, fi, k: _hyperbolic([fi, k], tt), td, ym, p0=[7, 15],
                                 sigma=sig,
                                 absolute_sigma=False)
    assert fit.params["f_inf"] / MPA == pytest.approx(p[0], rel=1e-4)
    assert fit.params["k"] / DAY == pytest.approx(p[1], rel=1e-4)
    assert fit.std_errors["f_inf"] / MPA == pytest.approx(math.sqrt(pcov[0, 0]), rel=1e-3)
    assert fit.std_errors["k"] / DAY == pytest.approx(math.sqrt(pcov[1, 1]), rel=1e-3)


def test_two_component_fit_with_held_tau_a_matches_scipy_curve_fit():
    # Without ages under half a day tauA is held at 1 h (module default, common practice);
    # reference: scipy.optimize.curve_fit of the independent formula with tauA = 1/24 d fixed,
    # same relative weights, started at the truth (invented data).
    x = [1.5, 1 / 24, 10.0, 90.0, 1.2]
    t, y = _data("two_component", x, EARLY + [56, 90, 180], cv=0.03, rng_state=12)
    fit = fit_model("two_component", t, y)
    assert fit.fixed == {"tau_A": 3600.0}
    td, ym = t / DAY, y / MPA
    sig = np.array([ym[td == a].mean() for a in td])
    p, pcov = optimize.curve_fit(lambda tt, fa, fs, ts, b: _two_component([fa, 1 / 24, fs, ts, b],
                                                                          tt),
                                 td, ym, p0=[1.5, 10.0, 90.0, 1.2], sigma=sig,
                                 absolute_sigma=False)
    got = [fit.params["f_A"] / MPA, fit.params["f_S"] / MPA, fit.params["tau_S"] / DAY,
           fit.params["b"]]
    assert got == pytest.approx(list(p), rel=1e-3)
    se = [fit.std_errors["f_A"] / MPA, fit.std_errors["f_S"] / MPA,
          fit.std_errors["tau_S"] / DAY, fit.std_errors["b"]]
    assert se == pytest.approx(list(np.sqrt(np.diag(pcov))), rel=1e-2)


def test_grid_start_nnls_equals_scipy_nnls():
    """The grid start solves its two-amplitude non-negative least squares in closed form, one
    problem per grid point at once; reference: ``scipy.optimize.nnls`` of each problem
    (reference library), on random problems in which either, both or neither bound binds."""
    from scipy import optimize
    from specgen.science.strength_models import _nnls2
    rng = np.random.default_rng(3)
    for _ in range(40):
        n = int(rng.integers(3, 12))
        a, cols = rng.uniform(0, 1, n), rng.uniform(0, 1, (65, n))
        b = rng.normal(0.3, 1.0, n)
        amp, rn = _nnls2(a, cols, b)
        for k in range(cols.shape[0]):
            ref, ref_rn = optimize.nnls(np.column_stack([a, cols[k]]), b)
            assert amp[k] == pytest.approx(ref, rel=1e-9, abs=1e-12)
            assert rn[k] == pytest.approx(ref_rn, rel=1e-9, abs=1e-12)
