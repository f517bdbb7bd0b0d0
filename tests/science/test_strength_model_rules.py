"""Strength-age models, the rules around the fit: weightings against scipy curve_fit, AICc and
its support bands by hand, the components, and every
refusal word for word.  Data are invented, made with the formulas written out in the test."""
import math

import numpy as np
import pytest
from scipy import optimize

from specgen.science import strength_models as sm
from specgen.science.strength_models import (
    DAY, StrengthFitError, components, fit_all, fit_model)

MPA = 1e6
AGES = [1, 3, 7, 14, 28]              # d


def _en1992(t, f28, s):
    # EN 1992-1-1 eq. 3.2 written out (MPa, d): f28 exp{s [1 - (28/t)^0.5]}
    return f28 * np.exp(s * (1.0 - np.sqrt(28.0 / np.asarray(t, float))))


def _hyperbolic(t, f_inf, k):
    t = np.asarray(t, float)
    return f_inf * t / (k + t)


def _data(rng_state=4, cv=0.06, f28=5.0, s=0.3):
    rng = np.random.default_rng(rng_state)
    t = np.repeat(np.asarray(AGES, float), 3)
    y = _en1992(t, f28, s) * (1 + cv * rng.standard_normal(t.size))
    return t, y                        # d, MPa


# ------------------------------------------------------------------ weightings
def test_given_standard_deviations_weight_as_scipy_curve_fit_sigma():
    # reference: scipy.optimize.curve_fit with sigma = the given SDs (absolute_sigma=False:
    # Cov = s² (JᵀWJ)⁻¹, the module's rule); the SDs grow with age (invented)
    t, y = _data()
    sd = 0.1 + 0.02 * t                                   # MPa
    fit = fit_model("en1992_age", t * DAY, y * MPA, sigma_pa=sd * MPA)
    p, pcov = optimize.curve_fit(_en1992, t, y, p0=[4, 0.2], sigma=sd, absolute_sigma=False)
    assert fit.params["f28"] / MPA == pytest.approx(p[0], rel=1e-5)
    assert fit.params["s"] == pytest.approx(p[1], rel=1e-5)
    assert fit.std_errors["f28"] / MPA == pytest.approx(math.sqrt(pcov[0, 0]), rel=1e-3)
    assert fit.std_errors["s"] == pytest.approx(math.sqrt(pcov[1, 1]), rel=1e-3)
    # residual SD in weighted units: sqrt(Σ((f - y)/sd)² / (n - 2)), by hand from scipy's fit
    r = (_en1992(t, *p) - y) / sd
    assert fit.sigma_hat == pytest.approx(math.sqrt(np.sum(r ** 2) / (t.size - 2)), rel=1e-4)
    assert fit.weighting == "weights 1/sigma² from the given standard deviations"
    # one SD for every result: the same as equal weights (the scale cancels in s²(JᵀJ)⁻¹)
    one = fit_model("en1992_age", t * DAY, y * MPA, sigma_pa=0.25 * MPA)
    q, qcov = optimize.curve_fit(_en1992, t, y, p0=[4, 0.2])
    assert one.params["f28"] / MPA == pytest.approx(q[0], rel=1e-5)
    assert one.std_errors["s"] == pytest.approx(math.sqrt(qcov[1, 1]), rel=1e-3)


def test_equal_weights_as_unweighted_curve_fit():
    t, y = _data(rng_state=8)
    fit = fit_model("en1992_age", t * DAY, y * MPA, weighting="equal")
    p, pcov = optimize.curve_fit(_en1992, t, y, p0=[4, 0.2])    # unweighted reference
    assert fit.params["f28"] / MPA == pytest.approx(p[0], rel=1e-5)
    assert fit.std_errors["f28"] / MPA == pytest.approx(math.sqrt(pcov[0, 0]), rel=1e-3)
    # residual SD relative to the mean result: sqrt(Σ(f - y)² / (n - 2)) / ȳ
    rss = float(np.sum((_en1992(t, *p) - y) ** 2))
    assert fit.sigma_hat == pytest.approx(math.sqrt(rss / (t.size - 2)) / y.mean(), rel=1e-4)
    assert fit.weighting == "equal weights"
    rel = fit_model("en1992_age", t * DAY, y * MPA)
    assert rel.weighting == "relative: weights 1/(mean at age)², constant CV assumed"
    # relative weights: residual SD as a CV, sqrt(Σ((f - y)/mean at age)² / (n - 2)), with
    # the parameters of curve_fit(sigma = mean at age)
    means = np.array([y[t == a].mean() for a in t])
    q, _ = optimize.curve_fit(_en1992, t, y, p0=[4, 0.2], sigma=means)
    cv = math.sqrt(np.sum(((_en1992(t, *q) - y) / means) ** 2) / (t.size - 2))
    assert rel.sigma_hat == pytest.approx(cv, rel=1e-4)


@pytest.mark.parametrize("kw, message", [
    ({"sigma_pa": [0.0] * 15}, "given standard deviations must be finite and > 0"),
    ({"sigma_pa": [float("nan")] * 15}, "given standard deviations must be finite and > 0"),
    ({"weighting": "robust"}, "unknown weighting 'robust'; use 'relative' or 'equal'"),
])
def test_weighting_refusals_word_for_word(kw, message):
    t, y = _data()
    with pytest.raises(StrengthFitError) as exc:
        fit_model("en1992_age", t * DAY, y * MPA, **kw)
    assert str(exc.value) == message


def test_a_standard_deviation_below_one_mpa_is_accepted():
    # 0.5 MPa is a plausible SD for a prism series (it is > 0; the unit is not a threshold)
    t, y = _data()
    fit = fit_model("en1992_age", t * DAY, y * MPA, sigma_pa=0.5 * MPA)
    assert fit.weighting == "weights 1/sigma² from the given standard deviations"


# ------------------------------------------------------------------ data and model refusals
@pytest.mark.parametrize("ages, values, message", [
    ([1, 2], [1e6], "2 ages but 1 strength results; give one age per result"),
    ([1, float("inf")], [1e6, 2e6],
     "ages and strengths must be finite numbers (found NaN or inf)"),
    ([0, 86400], [1e6, 2e6], "ages must be greater than zero"),
    ([86400, 2 * 86400], [0.0, 2e6], "strength results must be greater than zero; a zero result "
     "is not a test result (check the specimen record)"),
    ([86400, 86400], [1e6, 2e6],
     "a strength-age fit needs results at >= 2 distinct ages; got 1"),
    ([86400, 2 * 86400, 3 * 86400], [2.5e6, 2.5e6, 2.5e6],
     "all results are equal (2.5 MPa at every age): there is no strength development to "
     "fit; check the data"),
])
def test_data_refusals_word_for_word(ages, values, message):
    with pytest.raises(StrengthFitError) as exc:
        sm.validate_data(ages, values)
    assert str(exc.value) == message


def test_small_positive_ages_and_strengths_are_data():
    # half a second and half a pascal are positive (no unit threshold hides in the check)
    t, y = sm.validate_data([0.5, 86400], [0.5, 2e6])
    assert t.tolist() == [0.5, 86400.0] and y.tolist() == [0.5, 2e6]
    # integers are read as numbers (ages and results typed without decimals)
    t, y = sm.validate_data([86400, 172800], [1000000, 2000000])
    assert t.dtype == np.float64 and y.dtype == np.float64


def test_model_refusals_word_for_word():
    t, y = _data()
    with pytest.raises(StrengthFitError) as exc:
        fit_model("logistic", t * DAY, y * MPA)
    assert str(exc.value) == ("unknown model 'logistic'; choose from "
                              + ", ".join(sm.MODELS))
    for tau in (59.0, 12 * 3600.0 + 1):          # the bounds are 1 min and 12 h, inclusive
        with pytest.raises(StrengthFitError) as exc:
            fit_model("two_component", t * DAY, y * MPA, tau_a_s=tau)
        assert str(exc.value) == "the aluminate time constant τ_A must lie between 1 min and 12 h"


def test_tau_a_on_its_bounds_is_held_and_said_in_minutes():
    # no age under half a day: tau_A is held where it is given; 60 s = 1 min, 43 200 s = 720 min
    t, y = _data()
    for tau, words in ((60.0, "τ_A held at 1 min"), (12 * 3600.0, "τ_A held at 720 min")):
        fit = fit_model("two_component", t * DAY, y * MPA, tau_a_s=tau)
        assert fit.fixed == {"tau_A": tau}
        assert fit.notes[0] == (f"{words}: fewer than two ages under half a day, so the "
                                "aluminate stage's time constant cannot be fitted")


# ------------------------------------------------------------------ AICc and support
@pytest.mark.parametrize("rss, n, p, expected", [
    # AICc = n ln(RSS/n) + 2k + 2k(k+1)/(n-k-1), k = p + 1 (Burnham & Anderson 2002, eq. 2.14,
    # from memory; the residual variance counts as a parameter).  By hand:
    (0.5, 5, 2, 5 * math.log(0.1) + 6 + 24 / 1),         # = -11.5129 + 30 = 18.4871
    (2.0, 15, 2, 15 * math.log(2 / 15) + 6 + 24 / 11),   # = -30.224 + 8.182 = -22.042
    (1.0, 4, 2, None),                                    # n - k - 1 = 0: undefined
    (1.0, 3, 2, None),                                    # negative: undefined
])
def test_aicc_by_hand(rss, n, p, expected):
    got = sm._aicc(rss, n, p)
    assert got is None if expected is None else got == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize("delta, words", [
    # Burnham & Anderson (2002) sec. 2.6 (from memory): Δ <= 2 substantial, 4-7 considerably
    # less, > 10 essentially none; the gaps (2-4, 7-10) go to the nearer weaker band
    (0.0, "substantial support"), (2.0, "substantial support"),
    (2.0001, "considerably less support"), (7.0, "considerably less support"),
    (7.0001, "little support"), (10.0, "little support"),
    (10.0001, "essentially no support"),
])
def test_support_bands_at_their_edges(delta, words):
    assert sm._support(delta) == words


def test_fit_all_passes_the_weighting_and_lists_models_too_few_for_aicc():
    t, y = _data()
    sel = fit_all(t * DAY, y * MPA, models=("en1992_age", "hyperbolic"), weighting="equal")
    assert {f.weighting for f in sel.fits} == {"equal weights"}
    # 3 ages, one result each: a 2-parameter fit has n - k - 1 = 3 - 3 - 1 < 0 (no AICc)
    few = fit_all(np.array([1, 7, 28]) * DAY, np.array([1.2, 3.1, 4.4]) * MPA,
                  models=("en1992_age",))
    assert few.best is None and few.fits == ()
    assert few.not_assessed == {"en1992_age": "3 results are too few for AICc with 2 "
                                              "parameters"}
    title = sm.MODELS["en1992_age"].title
    assert few.reasoning == f"not assessed: {title}: 3 results are too few for AICc with 2 " \
                            "parameters"


# ------------------------------------------------------------------ components
def _fit():
    t, y = _data()
    return fit_model("en1992_age", t * DAY, y * MPA)


def test_components_of_a_one_term_model_are_its_formula():
    fit = _fit()
    f28, s = fit.params["f28"] / MPA, fit.params["s"]
    got = components(fit, [7 * DAY, 90 * DAY])
    assert list(got) == ["en1992_age"]
    assert got["en1992_age"] == pytest.approx(_en1992([7, 90], f28, s) * MPA, rel=1e-9)


def test_two_component_parts_are_the_written_out_terms():
    t = np.repeat(np.asarray([1, 3, 7, 14, 28, 56, 90], float), 3)
    rng = np.random.default_rng(2)
    # fA (1 - e^(-t/tauA)) + fS (1 - e^(-(t/tauS)^b)), tauA = 1 h held (no early ages)
    y = (1.0 * (1 - np.exp(-t * 24)) + 4.0 * (1 - np.exp(-(t / 20) ** 0.8))) \
        * (1 + 0.03 * rng.standard_normal(t.size))
    fit = fit_model("two_component", t * DAY, y * MPA)
    pa = fit.params
    at = np.array([2.0, 60.0])                            # d
    got = components(fit, at * DAY)
    ta = fit.fixed["tau_A"] / DAY
    assert got["aluminate"] == pytest.approx(pa["f_A"] * (1 - np.exp(-at / ta)), rel=1e-9)
    assert got["silicate"] == pytest.approx(
        pa["f_S"] * (1 - np.exp(-(at / (pa["tau_S"] / DAY)) ** pa["b"])), rel=1e-9)


@pytest.mark.parametrize("ages", [[0.0], [-DAY], [float("inf")], [DAY, float("nan")]])
def test_components_refuse_ages_word_for_word(ages):
    with pytest.raises(StrengthFitError) as exc:
        components(_fit(), ages)
    assert str(exc.value) == "ages must be positive finite numbers of seconds"


# ------------------------------------------------------------------ the grid start, a bound, the whole result
def _best_on_grid(columns, yw, floor=0.0):
    """The grid start as the module's docstring states it: each grid point's amplitudes by
    non-negative least squares (scipy.optimize.nnls, reference library; a one-column
    amplitude no lower than ``floor``), the first point of least residual in grid order."""
    best = None
    for k, cols in enumerate(columns):
        amp, _ = optimize.nnls(np.column_stack(cols), yw)
        amp = np.maximum(amp, floor)
        rn = float(np.sum((np.column_stack(cols) @ amp - yw) ** 2))
        if best is None or rn < best[0] - 1e-12 * abs(best[0]):
            best = (rn, k, amp)
    return best[1], best[2]


T_GRID = np.array([0.5, 1.0, 3.0, 7.0, 28.0, 90.0])            # d
Y_GRID = np.array([0.9, 1.4, 2.3, 3.0, 4.1, 4.6])              # MPa, invented
W_GRID = 1.0 / Y_GRID                                         # relative weights


@pytest.mark.parametrize("model, grid, law", [
    # EN 1992: s on 40 even points 0.02 ... 2.5; hyperbolic: k on 40 geometric points
    # 0.01 ... 3000 d (the module's docstring of _start); the laws written out above
    ("en1992_age", np.linspace(0.02, 2.5, 40), lambda q: _en1992(T_GRID, 1.0, q)),
    ("hyperbolic", np.geomspace(0.01, 3000.0, 40), lambda q: _hyperbolic(T_GRID, 1.0, q)),
])
@pytest.mark.parametrize("scale", [1.0, 0.1])      # 0.1: strengths under 1 MPa (a weak lime)
def test_one_amplitude_grid_start_is_the_best_grid_point(model, grid, law, scale):
    y = Y_GRID * scale
    k, amp = _best_on_grid([[law(q) * W_GRID] for q in grid], y * W_GRID, floor=1e-3)
    got = sm._start(sm.MODELS[model], T_GRID, y, W_GRID, np.zeros(2))
    assert got == pytest.approx([amp[0], grid[k]], rel=1e-12)


def test_two_component_grid_start_is_the_best_grid_point():
    # tauS on 13 geometric points 1 ... 3000 d times b in (0.5, 0.75, 1, 1.5, 2.2), tauA held
    # at its given value (here 2 h); both amplitudes by NNLS at each point
    ta = 2.0 / 24.0
    grid = [(ts, b) for ts in np.geomspace(1.0, 3000.0, 13) for b in (0.5, 0.75, 1.0, 1.5, 2.2)]
    cols = [[(1 - np.exp(-T_GRID / ta)) * W_GRID, (1 - np.exp(-(T_GRID / ts) ** b)) * W_GRID]
            for ts, b in grid]
    k, amp = _best_on_grid(cols, Y_GRID * W_GRID)
    got = sm._start(sm.MODELS["two_component"], T_GRID, Y_GRID, W_GRID,
                    np.array([0.0, ta, 0.0, 0.0, 0.0]))
    assert got == pytest.approx([amp[0], ta, amp[1], grid[k][0], grid[k][1]], rel=1e-9)


def test_closed_form_nnls_on_degenerate_columns_equals_scipy_nnls():
    # reference: scipy.optimize.nnls; a zero shared column, zero and repeated grid columns,
    # and targets whose best fit wants a negative amplitude on one or the other column
    from specgen.science.strength_models import _nnls2
    a = np.array([1.0, 2.0, 0.5, 1.5])
    cases = [
        (np.zeros(4), np.array([[1.0, 0.0, 2.0, 1.0], [0.0, 0.0, 0.0, 0.0]]), np.array([1.0, 0.5, 2.0, 0.7])),
        (a, np.array([[0.0, 0.0, 0.0, 0.0], a, 2.0 * a]), np.array([1.2, 2.1, 0.4, 1.4])),
        (a, np.array([[1.0, 0.2, 3.0, 0.1], [0.3, 2.0, 0.1, 1.0]]), np.array([-1.0, 0.5, 3.0, -0.2])),
        (a, np.array([[1.0, 0.2, 3.0, 0.1], [0.3, 2.0, 0.1, 1.0]]), np.array([2.0, 4.0, -0.5, 3.0])),
        (a, np.array([[1.0, 1.0, 1.0, 1.0]]), -np.ones(4)),
    ]
    for aa, cols, b in cases:
        amp, rn = _nnls2(aa, cols, b)
        for k in range(cols.shape[0]):
            ref, ref_rn = optimize.nnls(np.column_stack([aa, cols[k]]), b)
            assert np.column_stack([aa, cols[k]]) @ amp[k] == pytest.approx(
                np.column_stack([aa, cols[k]]) @ ref, rel=1e-9, abs=1e-12)
            assert rn[k] == pytest.approx(ref_rn, rel=1e-9, abs=1e-12)
            assert np.all(amp[k] >= 0.0)


T_FALL = np.array([7.0, 7.0, 28.0, 28.0, 90.0, 90.0])        # d
Y_FALL = np.array([5.0, 5.1, 4.6, 4.5, 4.1, 4.0])            # MPa, invented: falling with age


def test_a_fit_pressed_on_a_bound_is_said_and_whole():
    # strengths falling with age want s < 0; its lower bound is 0.01 (the module's bounds), so
    # s rests there.  With s = 0.01 the fit is linear in f28: weighted least squares by hand,
    # f28 = Σw²·e·y / Σw²·e², e = exp{0.01[1 − (28/t)^0.5]}, w = 1/(mean at the age)
    fit = fit_model("en1992_age", T_FALL * DAY, Y_FALL * MPA)
    means = {7.0: 5.05, 28.0: 4.55, 90.0: 4.05}                # by hand
    w = np.array([1.0 / means[a] for a in T_FALL])
    e = np.exp(0.01 * (1.0 - np.sqrt(28.0 / T_FALL)))
    f28 = np.sum(w ** 2 * e * Y_FALL) / np.sum(w ** 2 * e ** 2)
    assert fit.params["s"] == pytest.approx(0.01, abs=1e-9)
    assert fit.params["f28"] / MPA == pytest.approx(f28, rel=1e-6)
    assert fit.at_bounds == ("s",)
    assert fit.notes == ("at a bound: s (its standard error from the Jacobian is not reliable)",)
    assert fit.title == "EN 1992-1-1 age function (fitted s, f28)"
    assert fit.formula == "f = f28·exp{s[1 - (28 d/t)^0.5]}"
    assert (fit.n_obs, fit.n_ages, fit.dof) == (6, 3, 4)
    assert (fit.age_min, fit.age_max) == (7 * DAY, 90 * DAY)
    assert fit.free == (True, True) and fit.fixed == {}
    assert fit.x == pytest.approx((fit.params["f28"] / MPA, fit.params["s"]), rel=1e-15)
    # Cov = s²·(JᵀJ)⁻¹ with the weighted Jacobian written out: ∂f/∂f28 = e, ∂f/∂s = f28·e·g
    g = 1.0 - np.sqrt(28.0 / T_FALL)
    x0, x1 = fit.x
    r = (x0 * np.exp(x1 * g) - Y_FALL) * w
    s2 = np.sum(r ** 2) / 4
    jw = np.column_stack([np.exp(x1 * g), x0 * np.exp(x1 * g) * g]) * w[:, None]
    assert np.array(fit.cov) == pytest.approx(s2 * np.linalg.inv(jw.T @ jw), rel=1e-6)
    assert fit.sigma_hat == pytest.approx(math.sqrt(s2), rel=1e-9)


def test_aluminate_part_within_its_first_hours():
    # at ages of the order of tauA the aluminate term fA (1 − e^(−t/tauA)) is far from fA:
    # at t = tauA it is fA (1 − 1/e) = 0.632121·fA (by hand)
    t = np.repeat(np.asarray([1, 3, 7, 14, 28, 56, 90], float), 2)
    y = 1.0 * (1 - np.exp(-t * 24)) + 4.0 * (1 - np.exp(-(t / 20) ** 0.8))
    fit = fit_model("two_component", t * DAY, y * MPA)
    ta = fit.fixed["tau_A"]
    got = components(fit, [ta, 0.5 * ta])
    assert got["aluminate"] == pytest.approx(
        fit.params["f_A"] * np.array([0.632121, 1 - math.exp(-0.5)]), rel=1e-6)


def test_akaike_weights_by_hand_and_nothing_ranked_when_nothing_fits():
    # Akaike weights (Burnham & Anderson 2002, eq. 2.14): exp(−Δ/2) / Σ exp(−Δ/2)
    t, y = _data(rng_state=6)
    sel = fit_all(t * DAY, y * MPA)
    rel = {m: math.exp(-0.5 * d) for m, d in sel.delta_aicc.items()}
    assert sel.akaike_weights == pytest.approx({m: v / sum(rel.values()) for m, v in rel.items()},
                                               rel=1e-12)
    assert len(sel.delta_aicc) == 3 and max(sel.delta_aicc.values()) > 0.5   # 5 ages: all three
    none = fit_all([7 * DAY, 28 * DAY], [2e6, 3e6])
    assert (none.best, none.fits, none.delta_aicc, none.akaike_weights) == (None, (), {}, {})
    assert none.reasoning == (
        "not assessed: "
        "two-component model (aluminate + silicate): the two-component model (aluminate + "
        "silicate) has 4 parameters and needs results at >= 5 distinct ages; got 2; "
        "EN 1992-1-1 age function (fitted s, f28): the EN 1992-1-1 age function (fitted s, "
        "f28) has 2 parameters and needs results at >= 3 distinct ages; got 2; "
        "hyperbolic law: the hyperbolic law has 2 parameters and needs results at >= 3 "
        "distinct ages; got 2")


def test_the_comparison_in_words_whole():
    # five ages: all three laws are fitted.  Each AICc again from the fitted parameters with the
    # laws written out, in the least-squares form n·ln(RSS/n) + 2k + 2k(k+1)/(n−k−1),
    # k = parameters + 1 (Burnham & Anderson 2002, Model Selection and Multimodel Inference,
    # sec. 2.2 and eq. 2.3; −2 ln L less its constant n(1 + ln 2π)); support bands of ΔAICc (from memory, as the module): <= 2 substantial, <= 7
    # considerably less, <= 10 little, beyond essentially none
    t, y = _data(rng_state=6)
    sel = fit_all(t * DAY, y * MPA)
    means = {a: y[t == a].mean() for a in AGES}
    w = np.array([1.0 / means[a] for a in t])

    def two(x, tt):
        fa, ta, fs, ts, b = x
        return fa * (1 - np.exp(-tt / ta)) + fs * (1 - np.exp(-(tt / ts) ** b))
    laws = {"en1992_age": lambda x: _en1992(t, *x), "hyperbolic": lambda x: _hyperbolic(t, *x),
            "two_component": lambda x: two(x, t)}
    aicc = {}
    for f in sel.fits:
        r = (laws[f.model](f.x) - y) * w
        n, k = r.size, len(f.params) + 1
        aicc[f.model] = n * math.log(np.sum(r ** 2) / n) + 2 * k + 2 * k * (k + 1) / (n - k - 1)
    order = sorted(aicc, key=aicc.get)
    assert order == ["hyperbolic", "en1992_age", "two_component"]
    d = {m: aicc[m] - aicc["hyperbolic"] for m in order}
    assert 0 < d["en1992_age"] <= 2.0 and 7.0 < d["two_component"] <= 10.0   # the two bands
    wts = {m: math.exp(-0.5 * v) for m, v in d.items()}
    w_best = wts["hyperbolic"] / sum(wts.values())
    title = {"hyperbolic": "hyperbolic law", "en1992_age": "EN 1992-1-1 age function (fitted s, "
             "f28)", "two_component": "two-component model (aluminate + silicate)"}
    assert sel.reasoning == (
        f"Chosen: hyperbolic law (AICc {aicc['hyperbolic']:.2f}, Akaike weight {w_best:.2f}, "
        "2 parameters). "
        f"{title['en1992_age']}: AICc {aicc['en1992_age']:.2f}, ΔAICc {d['en1992_age']:+.2f} "
        "against the chosen model (substantial support relative to it). "
        f"{title['two_component']}: AICc {aicc['two_component']:.2f}, ΔAICc "
        f"{d['two_component']:+.2f} against the chosen model (little support relative to it).")
