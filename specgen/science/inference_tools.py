"""Generic tools of the strength inference: the Laplace approximation of a penalised
least-squares posterior, its correction by importance sampling, and the pure-error
lack-of-fit F test against replicate groups.
Pure functions on arrays; :mod:`specgen.science.strength_inference` uses them.
"""
from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from specgen.science.distributions import f_sf, norm_ppf

_Z95 = float(norm_ppf(0.975))
LM_DAMPINGS = (1e-3, 10.0)   # starting dampings of laplace_fit_many's paths


# ---------------------------------------------------------------- quantiles of draws
def draw_quantiles(x: np.ndarray, probs: Sequence[float]) -> np.ndarray:
    """``np.quantile(x, probs, axis=0, method="inverted_cdf")`` (rows: draws; a column with
    a NaN gives NaN): the same numbers, as that method returns an order statistic; the rows
    of the result follow ``probs``."""
    x = np.asarray(x, float)
    if x.ndim != 2 or x.shape[0] == 0:
        return np.quantile(x, probs, axis=0, method="inverted_cdf")
    return row_quantiles(x.T, probs)


def row_quantiles(rows: np.ndarray, probs: Sequence[float], overwrite: bool = False
                  ) -> np.ndarray:
    """:func:`draw_quantiles` of ``rows.T`` (each row of ``rows`` holds the draws of one
    column), without the transposed copy; ``overwrite``: ``rows`` (C-contiguous) may be
    reordered in place.  Each order statistic is placed by a partial sort of each row
    (``np.partition`` at one rank, introselect), the next one within the part above it: the
    very values a full sort puts at those ranks, at a fraction of its cost."""
    work = rows if overwrite and rows.flags.c_contiguous else np.array(rows, float, order="C")
    ranks = _ranks(work.shape[1], tuple(float(p) for p in probs))
    nan = np.isnan(work).any(axis=1)
    start = 0
    for k in np.unique(ranks).tolist():   # ascending: all above rank k lie right of it
        work[:, start:].partition(k - start, axis=1)
        start = k + 1
    out = work[:, ranks].T.copy()
    out[:, nan] = np.nan   # a NaN sorts last, so numpy's quantile of that column is NaN
    return out


@lru_cache(maxsize=64)
def _ranks(n: int, probs: tuple[float, ...]) -> np.ndarray:
    # the order statistic numpy's inverted_cdf method takes for each probability, from numpy
    # itself (its rounding of n·p included): the quantiles of the ranks 0 … n-1
    out = np.quantile(np.arange(n, dtype=float), probs, method="inverted_cdf").astype(np.intp)
    out.flags.writeable = False
    return out


# ---------------------------------------------------------------- generic Laplace fit
@dataclass(frozen=True)
class Laplace:
    """Posterior mode and its Laplace covariance; ``p_eff`` data-determined parameters."""

    mode: np.ndarray
    cov: np.ndarray
    p_eff: float
    cost: float


def laplace_fit(residuals: Callable[[np.ndarray], np.ndarray], z0: Sequence[float],
                n_data: int, jac: Callable[[np.ndarray], np.ndarray] | None = None) -> Laplace:
    """Minimise ``½·|r(z)|²`` where ``r`` stacks data residuals (first ``n_data``) and prior
    residuals, each already divided by its standard deviation; return the mode and
    ``(JᵀJ)⁻¹`` (Gauss-Newton Hessian of ``-ln p`` inverted: the Laplace approximation).
    ``jac`` gives ∂r/∂z (by finite differences when None).

    For a model linear in ``z`` with a Gaussian prior this is the exact posterior.
    ``p_eff = tr((JᵀJ)⁻¹·J_dᵀJ_d)``: the effective number of parameters the data fix.
    """
    from scipy import optimize   # only when a fit is made (not when every fit is kept)
    res = optimize.least_squares(residuals, np.asarray(z0, float), method="trf",
                                 x_scale="jac", diff_step=1e-6,
                                 jac=jac if jac is not None else "2-point")
    j = jac(res.x) if jac is not None else res.jac
    h = j.T @ j
    cov = np.linalg.pinv(h)
    jd = j[:n_data]
    p_eff = float(np.trace(cov @ (jd.T @ jd)))
    return Laplace(res.x, cov, p_eff, float(res.cost))


def laplace_fit_many(resid_jac: Callable[[np.ndarray, np.ndarray], tuple[np.ndarray, np.ndarray]],
                     z0: np.ndarray, n_data: int, max_iter: int = 200, xtol: float = 1e-10
                     ) -> list[Laplace | None]:
    """:func:`laplace_fit` of many problems of one structure at once (numpy over a series
    axis): ``resid_jac(z, idx)`` gives the residuals (k x m) and their Jacobian (k x m x p) of
    the series ``idx`` at their parameters ``z`` (k x p); ``z0`` is series x p.

    Levenberg-Marquardt with Marquardt's scaling (the damping ``λ·diag(JᵀJ)``; Nocedal &
    Wright, Numerical Optimization, sec. 10.3), every series stepped together, each with its
    own damping; a series stops when its accepted step is below ``xtol`` (relative to its
    parameters), or when no damping lowers its cost any more (at its minimum to rounding).
    The stopping rule is tighter than ``least_squares``' default (``ftol = xtol = gtol =
    1e-8``), so both find the same mode to within that solver's own tolerance.  A series not
    converged within ``max_iter`` steps gives None: the caller fits it alone.

    A posterior of a nonlinear law may have more than one mode, and which one a descent
    reaches depends on its path: each series is solved along two paths (a bold and a cautious
    starting damping, ``LM_DAMPINGS``) and keeps the lower of the minima they reach."""
    best: list[Laplace | None] = [None] * np.shape(z0)[0]
    for lam0 in LM_DAMPINGS:
        for i, lap in enumerate(_lm_path(resid_jac, z0, n_data, max_iter, xtol, lam0)):
            if lap is not None and (best[i] is None or lap.cost < best[i].cost):
                best[i] = lap
    return best


def _lm_path(resid_jac, z0, n_data: int, max_iter: int, xtol: float, lam0: float):
    """One Levenberg-Marquardt descent of every series from ``z0`` (:func:`laplace_fit_many`)."""
    z = np.array(z0, float)
    s, p = z.shape
    r, jac = resid_jac(z, np.arange(s))
    cost = 0.5 * np.sum(r ** 2, axis=1)
    lam, nu = np.full(s, lam0), np.full(s, 2.0)
    done, ok = ~np.isfinite(cost), np.zeros(s, bool)
    eye = np.eye(p)
    for _ in range(max_iter):
        act = np.flatnonzero(~done)
        if act.size == 0:
            break
        ja = jac[act]
        g = np.einsum("smp,sm->sp", ja, r[act])
        h = np.einsum("smp,smq->spq", ja, ja)
        damp = lam[act, None] * np.maximum(np.einsum("spp->sp", h), 1e-300)
        try:
            step = -np.linalg.solve(h + damp[:, :, None] * eye, g[:, :, None])[:, :, 0]
        except np.linalg.LinAlgError:
            done[act] = True      # not ok: fitted alone
            break
        zn = z[act] + step
        with np.errstate(over="ignore", invalid="ignore", divide="ignore"):
            rn, jn = resid_jac(zn, act)
        cn = 0.5 * np.sum(rn ** 2, axis=1)
        gain = np.sum(step * (damp * step - g), axis=1) * 0.5   # reduction the model predicts
        better = np.isfinite(cn) & np.all(np.isfinite(jn), axis=(1, 2)) & (cn <= cost[act])
        size = np.max(np.abs(step), axis=1) / (1.0 + np.max(np.abs(z[act]), axis=1))
        # converged: a step below xtol, or one below sqrt(xtol) that no longer lowers the
        # cost beyond rounding (the last digits of a cost of m squares)
        small = (size <= xtol) | ((size <= math.sqrt(xtol))
                                  & (cost[act] - cn <= 1e-14 * cost[act]))
        rho = np.where(gain > 0, (cost[act] - cn) / np.where(gain > 0, gain, 1.0), 0.0)
        acc, rej = act[better], act[~better]
        z[acc], r[acc], jac[acc], cost[acc] = zn[better], rn[better], jn[better], cn[better]
        # Nielsen's update of the damping (Madsen, Nielsen & Tingleff 2004, Methods for
        # non-linear least squares problems, sec. 3.2)
        lam[acc] *= np.maximum(1.0 / 3.0, 1.0 - (2.0 * np.clip(rho[better], 0, 1) - 1.0) ** 3)
        nu[acc] = 2.0
        lam[rej] *= nu[rej]
        nu[rej] *= 2.0
        stop = act[(better & small) | (~better & (lam[act] > 1e16))]
        done[stop] = ok[stop] = True
    cov = np.linalg.pinv(np.einsum("smp,smq->spq", jac, jac))
    jd = jac[:, :n_data]
    p_eff = np.einsum("spq,sqp->s", cov, np.einsum("smp,smq->spq", jd, jd))
    return [Laplace(z[i].copy(), cov[i], float(p_eff[i]), float(cost[i])) if ok[i] else None
            for i in range(s)]


def importance_sample(neg_log_post: Callable[[np.ndarray], np.ndarray], mode: Sequence[float],
                      cov: np.ndarray, draws: int, dof: float, scale: float, rng_state: int):
    """Self-normalised importance sampling of ``p ∝ exp(-neg_log_post)`` (MacKay 2003, ch. 29):
    ``draws`` from a multivariate Student-t (``dof``) centred on ``mode`` with covariance
    ``scale² · cov`` (a Laplace approximation widened, heavier-tailed, so ``p/q`` stays
    bounded), each weighted by ``p/q``.  ``neg_log_post`` takes the draws (rows) and returns
    ``-ln p`` up to a constant.  Returns (draws, normalised weights, effective sample size
    ``1/Σw²``), or (None, None, 0) when no draw has a finite weight.  Deterministic (``rng_state``).
    """
    mode = np.asarray(mode, float)
    k = mode.size
    try:
        chol = np.linalg.cholesky(scale ** 2 * np.asarray(cov, float) + 1e-12 * np.eye(k))
    except np.linalg.LinAlgError:
        return None, None, 0.0
    rng = np.random.default_rng(rng_state)
    x = rng.standard_normal((draws, k)) / np.sqrt(rng.chisquare(dof, draws) / dof)[:, None]
    z = mode + x @ chol.T
    log_q = -0.5 * (dof + k) * np.log1p(np.sum(x ** 2, axis=1) / dof)
    with np.errstate(over="ignore", invalid="ignore", divide="ignore"):
        log_w = -np.asarray(neg_log_post(z), float) - log_q
    ok = np.isfinite(log_w)
    if not ok.any():
        return None, None, 0.0
    w = np.exp(log_w[ok] - np.max(log_w[ok]))
    w /= w.sum()
    return z[ok], w, float(1.0 / np.sum(w ** 2))


def resample(draws: np.ndarray, weights: np.ndarray, n: int, rng_state: int) -> np.ndarray:
    """``n`` equally weighted draws from weighted ones by systematic resampling (one uniform
    offset, then a grid of step 1/n through the cumulative weights; Kitagawa 1996): the
    weighted set's quantiles become plain sample quantiles, cheap at any number of ages."""
    u = (np.arange(n) + np.random.default_rng(rng_state).uniform()) / n
    idx = np.searchsorted(np.cumsum(weights), u)
    return np.asarray(draws)[np.minimum(idx, len(weights) - 1)]


# ---------------------------------------------------------------- lack of fit
@dataclass(frozen=True)
class LackOfFit:
    """Pure-error lack-of-fit F test of fitted values against replicate groups."""

    ss_pure: float
    dof_pure: float
    ss_lof: float
    dof_lof: float
    f: float | None
    p_value: float | None


def lack_of_fit(values: Sequence[float], groups: Sequence, fitted: Sequence[float],
                n_params: float) -> LackOfFit:
    """Lack-of-fit F test (pure error from replicates): ``F = (SS_lof/(k - p))/(SS_pe/(N - k))``.

    ``values`` and ``fitted`` per observation, ``groups`` the replicate label of each;
    ``n_params`` may be fractional (effective parameters of a penalised fit).  ``f`` and
    ``p_value`` are None when either side has no degrees of freedom.
    """
    y, fv = np.asarray(values, float), np.asarray(fitted, float)
    _, inv = np.unique(np.asarray(groups), return_inverse=True)
    k, n = int(inv.max()) + 1, y.size
    means = np.bincount(inv, y) / np.bincount(inv)
    ss_pe = float(np.sum((y - means[inv]) ** 2))
    ss_lof = float(np.sum((means[inv] - fv) ** 2))
    d_pe, d_lof = float(n - k), float(k - n_params)
    if d_pe <= 0 or d_lof <= 1e-9 or ss_pe <= 0:
        return LackOfFit(ss_pe, d_pe, ss_lof, d_lof, None, None)
    f = (ss_lof / d_lof) / (ss_pe / d_pe)
    return LackOfFit(ss_pe, d_pe, ss_lof, d_lof, f, float(f_sf(f, d_lof, d_pe)))


# ---------------------------------------------------------------- scores and record checks
def interval_score(lower, upper, truth, alpha: float = 0.05):
    """Interval score (Gneiting & Raftery 2007, eq. 43) of central (1 - alpha) intervals:
    ``(u - l) + (2/alpha)(l - x)·1{x < l} + (2/alpha)(x - u)·1{x > u}``; lower is better."""
    lo, hi, x = (np.asarray(v, float) for v in (lower, upper, truth))
    return (hi - lo) + (2 / alpha) * (lo - x) * (x < lo) + (2 / alpha) * (x - hi) * (x > hi)


def falls(inf_ages: Sequence[float], means_log: Sequence[float], counts: Sequence[float],
          sigma_w: float, sigma_b: float, q: float = _Z95) -> list[tuple[float, float, float]]:
    """Pairs of consecutive ages (a, b, drop ratio) whose mean falls by more than the
    scatter explains: ``ȳ_a - ȳ_b > q·sqrt(2σb² + σw²(1/n_a + 1/n_b))`` on the log scale."""
    out = []
    for i in range(len(inf_ages) - 1):
        d = means_log[i] - means_log[i + 1]
        s = math.sqrt(2 * sigma_b ** 2 + sigma_w ** 2 * (1 / counts[i] + 1 / counts[i + 1]))
        if d > q * s:
            out.append((float(inf_ages[i]), float(inf_ages[i + 1]), math.exp(-d)))
    return out
