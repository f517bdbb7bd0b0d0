"""The posterior mode of the strength inference's two-stage law: one record's groups and
variances (:class:`_Prep`), its penalised least-squares problem, and the solves of many
records made together (numpy over a series axis, :func:`_solve_many`).
:mod:`specgen.science.strength_inference` (its module docstring states the model) fits with
them; ages in days, strengths in MPa, parameters ``z = (ln F, logit φ, ln τA, ln τS, ln b)``.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from specgen.science.inference_tools import Laplace, laplace_fit, laplace_fit_many
from specgen.science.strength_priors import PRIOR_KEYS, InferenceError, Prior, _central_cv
from specgen.science.two_stage_law import log_f as _log_f
from specgen.science.two_stage_law import log_f_grad as _log_f_grad
from specgen.science.two_stage_law import log_f_grad_many as _log_f_grad_many

PRIOR_DOF = 4.0          # weight of the prior's variances, as degrees of freedom (common practice)
GAIN_AGES_D = (28.0, 365.0)


def _groups(ages_d, values_mpa):
    t = np.asarray(ages_d, float).ravel()
    y = np.asarray(values_mpa, float).ravel()
    if t.size != y.size or t.size == 0:
        raise InferenceError(f"{t.size} ages but {y.size} results; give one age per result")
    if not (np.all(np.isfinite(t)) and np.all(np.isfinite(y))) or np.any(t <= 0) or np.any(y <= 0):
        raise InferenceError("ages and results must be finite numbers greater than zero")
    ages, inv = np.unique(t, return_inverse=True)
    return t, np.log(y), ages, inv



@dataclass(eq=False)
class _Prep:
    """One record on its way through :func:`fit_many`: its groups, variances and fit."""

    prior: Prior
    ages: np.ndarray
    inv: np.ndarray
    ly: np.ndarray
    counts: np.ndarray
    means: np.ndarray
    d_w: float
    sw2: float
    w_src: str
    s0b: float
    sb2: float
    b_src: str
    lap: Laplace | None = None

    @classmethod
    def of(cls, ages_d, values_mpa, prior: Prior) -> "_Prep":
        t, ly, ages, inv = _groups(ages_d, values_mpa)
        if ages.size < 3:
            raise InferenceError(
                f"results at {ages.size} age(s) ({', '.join(f'{a:g} d' for a in ages)}); the "
                "two-stage law is fitted to three or more ages: test at 7, 28 and 90 days")
        counts = np.bincount(inv).astype(float)
        means = np.bincount(inv, ly) / counts
        d_w = float(np.sum(counts - 1))
        ss_w = float(np.sum((ly - means[inv]) ** 2))
        s0w = _central_cv(prior.within_cv)
        sw2 = (PRIOR_DOF * s0w ** 2 + ss_w) / (PRIOR_DOF + d_w)
        w_src = (f"pooled replicates ({d_w:g} dof) with the prior's {100 * s0w:.1f} % "
                 f"({PRIOR_DOF:g} dof)" if d_w > 0 else
                 f"prior only ({100 * s0w:.1f} %): no replicates")
        s0b = _central_cv(prior.batch_cv)
        return cls(prior, ages, inv, ly, counts, means, d_w, sw2, w_src, s0b, s0b ** 2,
                   f"prior only ({100 * s0b:.1f} %)")

    def batch_variance(self) -> bool:
        """Batch variance from the lack-of-fit mean square of the first fit; True when the
        curve is to be fitted again with it."""
        d_lof = self.ages.size - self.lap.p_eff
        if d_lof < 0.5:
            self.b_src = (f"prior only ({100 * self.s0b:.1f} %): the ages leave no degrees of "
                          "freedom beyond the curve")
            return False
        ms_lof = float(np.sum(self.counts * (self.means - _log_f(self.lap.mode, self.ages)) ** 2)
                       ) / d_lof
        excess = max(0.0, (ms_lof - self.sw2) / self.counts.mean())
        self.sb2 = (PRIOR_DOF * self.s0b ** 2 + d_lof * excess) / (PRIOR_DOF + d_lof)
        self.b_src = (f"lack-of-fit mean square beyond the pure error ({d_lof:.2f} dof) with "
                      f"the prior's {100 * self.s0b:.1f} % ({PRIOR_DOF:g} dof)")
        return True


def _prior_residuals(z, prior: Prior) -> np.ndarray:
    ln_f, lg_phi, ln_ta, ln_ts, ln_b = z
    gain = _log_f(z, np.array(GAIN_AGES_D))
    h = (lg_phi, ln_ta, ln_ts, ln_b, gain[1] - gain[0])
    return np.array([(v - mu) / sd for v, (mu, sd) in zip(h, map(prior.penalty, PRIOR_KEYS))])


def _solve(ages, means, counts, sb2, sw2, prior: Prior, z0=None) -> Laplace:
    sd = np.sqrt(sb2 + sw2 / counts)
    sds = np.array([prior.penalty(k)[1] for k in PRIOR_KEYS])
    gain_ages = np.array(GAIN_AGES_D)

    def resid(z):
        return np.concatenate([(means - _log_f(z, ages)) / sd, _prior_residuals(z, prior)])

    def jac(z):
        g = _log_f_grad(z, gain_ages)
        prior_rows = np.vstack([np.eye(5)[1:5], g[1] - g[0]]) / sds[:, None]
        return np.vstack([-_log_f_grad(z, ages) / sd[:, None], prior_rows])
    return laplace_fit(resid, _start(ages, means, prior) if z0 is None else z0, ages.size, jac)


def _start(ages, means, prior: Prior) -> np.ndarray:
    """Starting point: the prior's centre, ln F lifting the curve onto the highest mean."""
    z0 = np.array([0.0] + [prior.penalty(k)[0] for k in PRIOR_KEYS[:4]])
    z0[0] = float(np.max(means - _log_f(z0, ages)))
    return z0


def _solve_many(items) -> list[Laplace]:
    """:func:`_solve` of each ``(prep, z0)`` (z0 None: :func:`_start`), the records with the
    same number of ages solved together (``laplace_fit_many``); a record that solver leaves
    unconverged is solved alone by :func:`_solve`."""
    out: list = [None] * len(items)
    by_m: dict[int, list[int]] = {}
    for i, (p, _) in enumerate(items):
        by_m.setdefault(p.ages.size, []).append(i)
    for m, idx in by_m.items():
        ps = [items[i][0] for i in idx]
        ages = np.array([p.ages for p in ps])
        means = np.array([p.means for p in ps])
        sd = np.sqrt(np.array([p.sb2 for p in ps])[:, None]
                     + np.array([p.sw2 for p in ps])[:, None] / np.array([p.counts for p in ps]))
        pen = np.array([[p.prior.penalty(k) for k in PRIOR_KEYS] for p in ps])   # k x 5 x 2
        z0 = np.array([_start(p.ages, p.means, p.prior) if z is None else z
                       for p, (_, z) in ((p, items[i]) for p, i in zip(ps, idx))])
        laps = laplace_fit_many(_batched_residuals(ages, means, sd, pen[:, :, 0], pen[:, :, 1]),
                                z0, m)
        for i, p, lap, z in zip(idx, ps, laps, z0):
            out[i] = lap if lap is not None else _solve(p.ages, p.means, p.counts, p.sb2, p.sw2,
                                                        p.prior, z)
    return out


def _batched_residuals(ages, means, sd, mu, psd):
    """``resid_jac(z, idx)`` of :func:`_solve`'s residuals for many records (rows)."""
    gain_ages = np.array(GAIN_AGES_D)[None, :]
    pick = np.vstack([np.eye(5)[1:5], np.zeros(5)])[None, :, :]

    def resid_jac(z, idx):
        zc = tuple(z[:, k:k + 1] for k in range(5))
        data = (means[idx] - _log_f(zc, ages[idx])) / sd[idx]
        gain = _log_f(zc, gain_ages)
        h = np.column_stack([z[:, 1:5], gain[:, 1] - gain[:, 0]])
        g = _log_f_grad_many(z, gain_ages)
        prior_rows = pick + (g[:, 1] - g[:, 0])[:, None, :] * (np.arange(5) == 4)[None, :, None]
        jac = np.concatenate([-_log_f_grad_many(z, ages[idx]) / sd[idx][:, :, None],
                              prior_rows / psd[idx][:, :, None]], axis=1)
        return np.concatenate([data, (h - mu[idx]) / psd[idx]], axis=1), jac
    return resid_jac


