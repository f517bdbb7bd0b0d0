"""Strength inference: the two-stage law fitted with a prior, by penalised likelihood.

Units: the public API takes ages in days and strengths in MPa (the trade's working units,
as ``strength_models`` uses internally); every function says so.  Priors are passed in as
plain dicts (``content/data/strength_priors.yaml`` is read by the caller).

Law (:mod:`specgen.science.two_stage_law`; ``F`` long-term strength, ``φ`` early fraction):
``f(t) = F·[φ·(1 - exp(-t/τA)) + (1 - φ)·(1 - exp(-(t/τS)^b))]``.

Data model, on the log scale (scatter proportional to strength): the ``j``-th prism of
the batch tested at age ``t_i`` is ``ln y_ij = ln f(t_i) + u_i + e_ij``, with a batch effect
``u_i ~ N(0, σb²)`` shared by the prisms of one age (one batch, one curing history) and a
within-batch scatter ``e_ij ~ N(0, σw²)``.  So the group means ``ȳ_i`` carry the
information about the curve, each with variance ``σb² + σw²/n_i``.

* ``σw²``: the pooled replicate variance (pure error, ``ν_w`` dof) combined with the prior's
  central value as ``ν0`` prior degrees of freedom (scaled-inverse-χ² update);
* ``σb²``: the excess of the lack-of-fit mean square over the pure error,
  ``(MS_lof - σw²)/n̄``, combined with the prior the same way; from the prior alone when
  the ages leave no degrees of freedom for it;
* the curve: the mode of the posterior ``-ln p = ½Σ(ȳ_i - ln f_i)²/v_i + ½Σ((h_k - μ_k)/s_k)²``
  (prior on logit φ, ln τA, ln τS, ln b and, melded in (``strength_priors``), ln f(365)/f(28);
  flat on ln F), found by ``scipy.optimize.least_squares``; its covariance by the Laplace
  approximation, the inverse of the Gauss-Newton Hessian at the mode (:func:`laplace_fit`);
* the posterior itself, not its linearisation: from a short record the law is far from linear
  in its parameters over the range the prior allows (a 28-day record hardly sees the slow
  stage), so the normal approximation misplaces the band at 90 and 365 days.  The intervals
  are therefore read from ``DRAWS`` draws of a Student-t (``PROPOSAL_DOF`` dof, covariance
  ``PROPOSAL_SCALE``² × the Laplace one) about the mode, each weighted by the exact posterior
  over the proposal density (self-normalised importance sampling, MacKay 2003 ch. 29), then
  resampled to ``KEPT`` equally weighted draws, with a fixed random state so a build is repeatable.
  Should the weights degenerate (effective sample size below ``MIN_ESS``) the Laplace
  approximation is used and :attr:`Inference.sampled` says so.

Intervals (never clipped; exponentiated, so always positive and finite):

* band for the mean curve: the central quantiles of ``ln f(t)`` over the kept draws,
  ``[exp(l), exp(h)]`` (Laplace fallback: ``exp(ln f ± z·sqrt(gᵀΣg))``);
* prediction interval for the mean of the next set of ``n`` prisms (one new batch): the
  central quantiles of the posterior predictive mixture ``ln f(t; z_i) + T_i·sqrt(σb² +
  σw²/n)`` over the kept draws ``z_i``, ``T_i`` stratified Student-t variates at ``ν_w + ν0``
  dof (Gelman et al. 2013, Bayesian Data Analysis, sec. 1.3), so a skewed posterior keeps
  its skew; ``n = inf``: one batch's own strength (mortar in the wall).  Laplace fallback:
  ``exp(ln f ± q·sqrt(gᵀΣg + σb² + σw²/n))``, ``q`` Student's t.
"""
from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, field
from functools import lru_cache

import numpy as np

from specgen.science.distributions import f_sf, norm_ppf, t_ppf
# the priors, the generic tools of the fit and the law, importable from here as before
from specgen.science.strength_priors import (PRIOR_KEYS, _Z95, InferenceError,  # noqa: F401
                                             Prior, _central_cv, prior_from_table)
from specgen.science.inference_tools import (Laplace, LackOfFit, draw_quantiles,  # noqa: F401
                                             falls, importance_sample, interval_score, lack_of_fit,
                                             laplace_fit, resample, row_quantiles)
from specgen.science.two_stage_law import log_f as _log_f  # noqa: F401
# the posterior mode (one record's problem, many solved together), importable from here
from specgen.science.strength_solve import (GAIN_AGES_D, PRIOR_DOF, _groups, _Prep,  # noqa: F401
                                            _solve, _solve_many, _start)
from specgen.science.two_stage_law import log_f_grad as _log_f_grad
from specgen.science.two_stage_law import unpack as _unpack

# importance sampling of the posterior (common practice for a Laplace proposal: heavier tails
# and a wider scale than the approximation, so the weights stay bounded; MacKay 2003 ch. 29)
DRAWS, PROPOSAL_DOF, PROPOSAL_SCALE, MIN_ESS, RNG_STATE = 4000, 5.0, 1.5, 100.0, 20260
KEPT = 1000    # equally weighted draws kept after resampling (about the effective sample size)
NODES = 48     # a longer list of ages (a curve) takes the band's offsets from ln f at this many
               # log-spaced ages, interpolated in ln t (the offsets vary slowly with age)
PREDICTIVE_REPEATS = 4   # t variates per draw (stratified); one let MC error cross the mean band


# ---------------------------------------------------------------- the fit
@dataclass(frozen=True, eq=False)
class Inference:
    """A fitted record: posterior, variances, lack of fit, and what the prior carried."""

    prior: Prior
    ages: np.ndarray           # d, one per group (equivalent ages)
    means_log: np.ndarray      # group means of ln y (y in MPa)
    counts: np.ndarray
    mode: np.ndarray           # z = (ln F, logit φ, ln τA, ln τS, ln b)
    cov: np.ndarray
    p_eff: float
    sigma_w: float             # within-batch SD of ln y (≈ CV)
    sigma_b: float             # batch-to-batch SD of ln y
    sigma_w_source: str
    sigma_b_source: str
    dof: float                 # ν_w + ν0, for Student's t
    lof: LackOfFit
    lof_batch_p: float | None  # p of the lack-of-fit test allowing the prior's upper batch CV
    last_age: float            # d
    draws: np.ndarray | None = None     # equally weighted posterior draws of z
    ess: float = 0.0                    # effective sample size of the importance weights
    memo: dict = field(default_factory=dict, repr=False)  # its bands, by (ages, level, n)

    @property
    def sampled(self) -> bool:
        """True when the intervals come from the posterior draws, not the Laplace normal."""
        return self.draws is not None

    @property
    def params(self) -> dict[str, float]:
        """Posterior mode: F (MPa), φ, τA (d), τS (d), b."""
        return dict(zip(("F", "phi", "tau_a", "tau_s", "b"), _unpack(self.mode)))

    def quantile(self, level: float) -> float:
        """Student's t two-sided ``level`` quantile at the fit's degrees of freedom."""
        return _t_quantile(level, self.dof)


@lru_cache(maxsize=256)
def _t_quantile(level: float, dof: float) -> float:
    return float(t_ppf(0.5 + level / 2.0, dof))


@lru_cache(maxsize=32)
def _z_quantile(level: float) -> float:
    return float(norm_ppf(0.5 + level / 2.0))


def fit(ages_d: Sequence[float], values_mpa: Sequence[float], prior: Prior) -> Inference:
    """Fit the two-stage law to results (ages d, MPa) with ``prior``; needs >= 3 ages."""
    out = fit_many([(ages_d, values_mpa, prior)])[0]
    if isinstance(out, InferenceError):
        raise out
    return out


def fit_many(records) -> list[Inference | InferenceError]:
    """:func:`fit` of each ``(ages_d, values_mpa, prior)`` record, the refusal (not raised) of
    each record that cannot be fitted in its place.  The penalised least-squares solves of
    all the records are made together, numpy over a series axis (``laplace_fit_many``), in
    the two rounds :func:`fit` makes (the curve, then again with the batch variance the lack
    of fit gives); the sampling and the rest one record at a time.  A record is fitted the
    same way alone or among others."""
    preps: list = []
    for rec in records:
        try:
            preps.append(_Prep.of(*rec))
        except InferenceError as exc:
            preps.append(exc)
    live = [p for p in preps if isinstance(p, _Prep)]
    for p, lap in zip(live, _solve_many([(p, None) for p in live])):
        p.lap = lap
    again = [p for p in live if p.batch_variance()]
    for p, lap in zip(again, _solve_many([(p, p.lap.mode) for p in again])):
        p.lap = lap
    return [_inference_of(p) if isinstance(p, _Prep) else p for p in preps]


def _inference_of(prep) -> Inference:
    """The :class:`Inference` of a record fitted by :func:`fit_many`: lack of fit, the
    posterior draws."""
    lap, prior, counts = prep.lap, prep.prior, prep.counts
    fitted = _log_f(lap.mode, prep.ages)[prep.inv]
    lof = lack_of_fit(prep.ly, prep.inv, fitted, lap.p_eff)
    lof_b = None
    if lof.f is not None:
        denom = lof.ss_pure / lof.dof_pure + counts.mean() * prior.batch_cv.high ** 2
        lof_b = float(f_sf((lof.ss_lof / lof.dof_lof) / denom, lof.dof_lof, lof.dof_pure))
    draws, ess = _sample(prep.ages, prep.means, counts, prep.sb2, prep.sw2, prior, lap)
    return Inference(prior, prep.ages, prep.means, counts, lap.mode, lap.cov, lap.p_eff,
                     math.sqrt(prep.sw2), math.sqrt(prep.sb2), prep.w_src, prep.b_src,
                     prep.d_w + PRIOR_DOF, lof, lof_b, float(prep.ages.max()), draws, ess)




def _neg_log_post(z, ages, means, sd, prior: Prior) -> np.ndarray:
    """``-ln p`` (up to a constant) of the rows of ``z`` (draws x 5)."""
    zt = z.T[:, :, None]
    data = np.sum(((means - _log_f(zt, ages[None, :])) / sd) ** 2, axis=1)
    gain = _log_f(zt, np.array(GAIN_AGES_D)[None, :])
    h = (z[:, 1], z[:, 2], z[:, 3], z[:, 4], gain[:, 1] - gain[:, 0])
    pri = sum(((v - mu) / sd) ** 2 for v, (mu, sd) in zip(h, map(prior.penalty, PRIOR_KEYS)))
    return 0.5 * (data + pri)


def _sample(ages, means, counts, sb2, sw2, prior: Prior, lap: Laplace):
    """The posterior by importance sampling about the Laplace mode, resampled: (``KEPT``
    draws, effective sample size), or (None, ess) when the weights degenerate (the Laplace
    normal is used instead)."""
    sd = np.sqrt(sb2 + sw2 / counts)
    z, w, ess = importance_sample(lambda zz: _neg_log_post(zz, ages, means, sd, prior),
                                  lap.mode, lap.cov, DRAWS, PROPOSAL_DOF, PROPOSAL_SCALE, RNG_STATE)
    return (None, ess) if z is None or ess < MIN_ESS else (resample(z, w, KEPT, RNG_STATE), ess)


# ---------------------------------------------------------------- predictions
@dataclass(frozen=True)
class Interval:
    """Central estimate and an interval (MPa) at ``age`` (d)."""

    age: float
    value: float
    lower: float
    upper: float
    kind: str       # 'mean curve' or 'next set of n prisms' / 'one batch'
    level: float
    indicative: bool


def _log_bands(inf: Inference, t_d, level: float, extra_sd=None):
    """At ages ``t_d`` (d): ln f at the mode and the central ``level`` band for the mean curve
    on the log scale (lower, upper) -- the posterior's quantiles, or the Laplace normal -- and,
    when ``extra_sd`` (the SD of a new batch's mean on the log scale, one per age or one for
    all) is given, the prediction interval (lower, upper) on the log scale: the quantiles of
    the posterior predictive mixture, or the Laplace fallback (module docstring)."""
    t = np.atleast_1d(np.asarray(t_d, float))
    if np.any(t <= 0) or not np.all(np.isfinite(t)):
        raise InferenceError("prediction ages must be positive finite numbers of days")
    m = _log_f(inf.mode, t)
    if not inf.sampled:
        g = _log_f_grad(inf.mode, t)
        var = np.clip(np.einsum("ij,jk,ik->i", g, inf.cov, g), 0, None)
        s = _z_quantile(level) * np.sqrt(var)
        if extra_sd is None:
            return m, m - s, m + s, None, None
        sp = inf.quantile(level) * np.sqrt(var + np.asarray(extra_sd, float) ** 2)
        return m, m - s, m + s, m - sp, m + sp
    a = (1.0 - level) / 2.0
    nodes = t if t.size <= NODES else np.geomspace(t.min(), t.max(), NODES)
    with np.errstate(over="ignore", invalid="ignore"):
        lf = _log_f(inf.draws.T[:, :, None], nodes[None, :])
    lo, hi = row_quantiles(lf.T, [a, 1.0 - a])
    plo = phi = None
    if extra_sd is not None:
        e = np.broadcast_to(np.asarray(extra_sd, float), t.shape)
        if nodes is not t:
            order = np.argsort(t)
            e = np.interp(np.log(nodes), np.log(t[order]), e[order])
        # one row per age (its REPEATS x KEPT values): order statistics from contiguous rows
        mix = np.multiply(e[:, None, None], _predictive_noise(inf.dof)[None, :, :])
        mix += lf.T[:, None, :]
        plo, phi = row_quantiles(mix.reshape(nodes.size, -1), [a, 1.0 - a], overwrite=True)
    if nodes is t:
        return m, lo, hi, plo, phi
    mn, x, lt = _log_f(inf.mode, nodes), np.log(nodes), np.log(t)

    def at(edge):
        return None if edge is None else m + np.interp(lt, x, edge - mn)
    return m, at(lo), at(hi), at(plo), at(phi)


@lru_cache(maxsize=64)
def _predictive_noise(dof: float) -> np.ndarray:
    """``PREDICTIVE_REPEATS`` x ``KEPT`` Student-t variates (``dof``): the new batch's
    standardised scatter in the predictive mixture.  Stratified (one variate at each of the
    probabilities ``(i + ½)/N``, in an order shuffled with a fixed random state, so builds repeat):
    the variates follow the t distribution exactly in aggregate, and the mixture's quantiles
    carry only the posterior draws' Monte Carlo error (stratified sampling, Owen 2013, Monte
    Carlo theory, methods and examples, ch. 10)."""
    size = PREDICTIVE_REPEATS * KEPT
    u = (np.arange(size) + 0.5) / size
    out = t_ppf(np.random.default_rng(RNG_STATE + 1).permutation(u), dof)
    out = out.reshape(PREDICTIVE_REPEATS, KEPT)
    out.flags.writeable = False
    return out


def value(inf: Inference, t_d) -> np.ndarray:
    """The fitted curve (MPa, posterior mode) at ages ``t_d`` (d), without its intervals."""
    t = np.atleast_1d(np.asarray(t_d, float))
    if np.any(t <= 0) or not np.all(np.isfinite(t)):
        raise InferenceError("prediction ages must be positive finite numbers of days")
    return np.exp(_log_f(inf.mode, t))


def interval_formulas(inf: Inference) -> tuple[str, str]:
    """LaTeX of how the band for the mean curve and the interval for a set are computed for
    this fit (posterior draws, or the Laplace fallback), for the calculation sheet."""
    if inf.sampled:
        return (r"\left[e^{Q_{\alpha/2}},\ e^{Q_{1-\alpha/2}}\right]\ \text{of}\ "
                r"\ln f(t; z_i),\ z_i\ \text{posterior draws}",
                r"\left[e^{Q_{\alpha/2}},\ e^{Q_{1-\alpha/2}}\right]\ \text{of}\ "
                r"\ln f(t; z_i) + T_i\sqrt{\sigma_b^2 + \sigma_w^2/n},\ "
                r"T_i \sim t_{\nu}")
    return (r"e^{\ln\hat f \pm z\sqrt{g^{\mathsf T}\Sigma g}},\ "
            r"g = \partial \ln f/\partial\theta",
            r"e^{\ln\hat f \pm q\sqrt{g^{\mathsf T}\Sigma g + \sigma_b^2 + \sigma_w^2/n}}")


def bands(inf: Inference, t_d, level: float = 0.95, n: float = 3.0) -> dict[str, np.ndarray]:
    """Arrays (MPa) at ages ``t_d`` (d): ``value``, mean band ``mean_lo``/``mean_hi`` and the
    prediction interval for the mean of ``n`` prisms of a new batch ``pred_lo``/``pred_hi``
    (``n = inf``: the batch's own strength; ``n`` may be an array, one per age)."""
    t = np.atleast_1d(np.asarray(t_d, float))
    n_key = tuple(np.broadcast_to(np.asarray(n, float), t.shape).tolist())
    if (key := (tuple(t.tolist()), float(level), n_key)) not in inf.memo:
        inf.memo[key] = _bands(inf, *key)
    return {k: v.copy() for k, v in inf.memo[key].items()}


def bands_each(inf: Inference, t_d, level: float = 0.95, n: float = 3.0) -> None:
    """Keep in the fit's memo the bands at each of the ages ``t_d`` (d) alone -- what
    ``bands(inf, [age], level, n)`` gives for each -- computed together: the checks ask for
    one age at a time, and each age's numbers do not depend on the others asked beside it
    (up to ``NODES`` ages a band is read at the ages themselves).  Ages a prediction refuses
    are left to :func:`bands` to refuse."""
    t = np.atleast_1d(np.asarray(t_d, float))
    ns = np.broadcast_to(np.asarray(n, float), t.shape)
    todo = {}
    for a, k in zip(t.tolist(), ns.tolist()):
        key = ((a,), float(level), (k,))
        if a > 0 and math.isfinite(a) and key not in inf.memo:
            todo[key] = (a, k)
    keys = list(todo)
    for i in range(0, len(keys), NODES):
        part = keys[i:i + NODES]
        got = _bands(inf, tuple(todo[k][0] for k in part), float(level),
                     tuple(todo[k][1] for k in part))
        for j, key in enumerate(part):
            inf.memo[key] = {name: v[j:j + 1].copy() for name, v in got.items()}


def _bands(inf: Inference, t: tuple, level: float, n: tuple) -> dict[str, np.ndarray]:
    e = np.sqrt(inf.sigma_b ** 2 + inf.sigma_w ** 2 / np.asarray(n, float))
    m, lo, hi, plo, phi = _log_bands(inf, np.asarray(t, float), level, e)
    return {"value": np.exp(m), "mean_lo": np.exp(lo), "mean_hi": np.exp(hi),
            "pred_lo": np.exp(plo), "pred_hi": np.exp(phi)}


def interval(inf: Inference, age_d: float, kind: str, level: float = 0.95, n: float = 3.0,
             limit_factor: float = 3.0) -> Interval:
    """One interval at ``age_d``: ``kind`` 'mean' (band for the mean curve) or 'set'
    (prediction for the mean of ``n`` prisms of a new batch); ``indicative`` beyond
    ``limit_factor`` times the last tested age."""
    b = bands(inf, [age_d], level, n)
    lo, hi = ("mean_lo", "mean_hi") if kind == "mean" else ("pred_lo", "pred_hi")
    what = ("mean curve" if kind == "mean" else
            f"mean of the next set of {n:g} prisms" if math.isfinite(n) else "one batch")
    return Interval(float(age_d), float(b["value"][0]), float(b[lo][0]), float(b[hi][0]),
                    what, level, age_d > limit_factor * inf.last_age * (1 + 1e-9))


def components(inf: Inference, t_d) -> dict[str, np.ndarray]:
    """Fast (aluminate) and slow (silicate) contributions (MPa) at ages ``t_d`` (d)."""
    big_f, phi, ta, ts, b = _unpack(inf.mode)
    t = np.asarray(t_d, float)
    return {"aluminate": big_f * phi * -np.expm1(-t / ta),
            "silicate": big_f * (1 - phi) * -np.expm1(-(t / ts) ** b)}


def posterior_summary(inf: Inference) -> dict[str, tuple[float, float, float]]:
    """Per prior term: (posterior mode, lower, upper) of the central 95 % (the posterior draws,
    or the Laplace normal when :attr:`Inference.sampled` is false), in the units the prior is
    written in; ``gain_365_28`` included."""
    z, cov = inf.mode, inf.cov
    back = {"early_fraction": lambda v: 1 / (1 + np.exp(-v)), "tau_fast_d": np.exp,
            "tau_slow_d": np.exp, "shape_b": np.exp}
    g = _log_f_grad(z, np.array(GAIN_AGES_D))
    d = g[1] - g[0]
    lg = float(np.diff(_log_f(z, np.array(GAIN_AGES_D)))[0])
    if inf.sampled:
        with np.errstate(over="ignore", invalid="ignore"):
            gl = _log_f(inf.draws.T[:, :, None], np.array(GAIN_AGES_D)[None, :])
        cols = np.column_stack([inf.draws[:, 1:5], gl[:, 1] - gl[:, 0]])
        q = draw_quantiles(cols, [0.025, 0.975])
    else:
        sds = [math.sqrt(max(cov[i, i], 0.0)) for i in range(1, 5)]
        sds.append(math.sqrt(max(float(d @ cov @ d), 0.0)))
        centre = np.array([*z[1:5], lg])
        q = np.vstack([centre - _Z95 * np.array(sds), centre + _Z95 * np.array(sds)])
    out = {k: (float(f(z[i + 1])), float(f(q[0, i])), float(f(q[1, i])))
           for i, (k, f) in enumerate(back.items())}
    out["gain_365_28"] = (math.exp(lg), math.exp(q[0, 4]), math.exp(q[1, 4]))
    return out


def prior_gain_interval(prior: Prior, age_d: float, level: float = 0.95, draws: int = 4000,
                        rng_state: int = 0) -> tuple[float, float]:
    """Central ``level`` range of f(age)/f(28 d) under the prior alone (Monte Carlo over the
    four shape terms, importance-weighted by the gain term): what a 28-day mean alone gives."""
    rng = np.random.default_rng(rng_state)
    tm = prior.terms
    z = np.column_stack([np.zeros(draws)] + [rng.normal(tm[k].mu, tm[k].sd, draws)
                                             for k in PRIOR_KEYS[:4]])
    lf = _log_f(z.T[:, :, None], np.array([28.0, age_d, 365.0])[None, :])   # draws x 3
    ratio, g365 = np.exp(lf[:, 1] - lf[:, 0]), lf[:, 2] - lf[:, 0]
    mu, sd = prior.penalty("gain_365_28")
    w = np.exp(-0.5 * ((g365 - mu) / sd) ** 2)
    order = np.argsort(ratio)
    cw = np.cumsum(w[order]) / w.sum()
    a = (1 - level) / 2
    return (float(ratio[order][np.searchsorted(cw, a)]),
            float(ratio[order][min(np.searchsorted(cw, 1 - a), draws - 1)]))
