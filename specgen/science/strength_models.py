"""Strength-versus-age models: fit and compare by AICc (the model comparison on the
calculation sheet).

API units are SI: ages in seconds (``DAY`` = 86400 s), strengths in Pa; parameter
estimates and standard errors are reported in SI (Pa, s, dimensionless).  Internally the
fit works in days and MPa so that the parameters are of order one.

The laws (``MODELS``) are in :mod:`specgen.science.strength_laws`.

Fitting is weighted least squares (``scipy.optimize.least_squares``, analytic Jacobians)
on individual results, within physical bounds, from a grid start in which the linear
amplitudes are solved exactly.  Default weights are relative (1 / mean at that age:
scatter taken proportional to strength, i.e. a constant CV); ``equal`` weights or given
per-result standard deviations are also accepted.  Standard errors come from the Jacobian
at the optimum, ``Cov = s²·(JᵀJ)⁻¹``.  Models are compared by AICc (Burnham & Anderson).
Predictions, their intervals and the extrapolation limit are the strength inference's
(:mod:`specgen.science.strength_inference`), not this module's.
"""
from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

# the laws and their constants, importable from here as before
from specgen.science.strength_laws import (  # noqa: F401
    _COND_LIMIT, _MPA, DAY, EARLY_AGE_S, MODELS, TAU_A_BOUNDS_S, TAU_A_DEFAULT_S,
    StrengthFitError, age_function_en1992, n_parameters)


@dataclass(frozen=True, eq=False)
class FitResult:
    """One fitted model.  ``params``/``std_errors`` in SI; ``fixed`` = held parameters."""

    model: str
    title: str
    formula: str
    params: dict[str, float]
    std_errors: dict[str, float]
    units: dict[str, str]
    fixed: dict[str, float]
    n_obs: int
    n_ages: int
    dof: int
    sigma_hat: float          # residual SD in weighted units (relative weights: a CV)
    aicc: float | None        # None when n is too small for AICc
    age_min: float            # s
    age_max: float            # s
    weighting: str
    at_bounds: tuple[str, ...]
    notes: tuple[str, ...]
    x: tuple[float, ...]      # internal full parameter vector (MPa, d)
    free: tuple[bool, ...]    # parameters the covariance is estimated for
    cov: tuple[tuple[float, ...], ...]   # internal covariance of the free parameters


def validate_data(ages_s: Sequence[float], values_pa: Sequence[float]):
    """Checked arrays (ages s, strengths Pa); raises :class:`StrengthFitError` with the fix."""
    t = np.asarray(ages_s, dtype=float).ravel()
    y = np.asarray(values_pa, dtype=float).ravel()
    if t.size != y.size:
        raise StrengthFitError(f"{t.size} ages but {y.size} strength results; "
                               "give one age per result")
    if not (np.all(np.isfinite(t)) and np.all(np.isfinite(y))):
        raise StrengthFitError("ages and strengths must be finite numbers (found NaN or inf)")
    if np.any(t <= 0.0):
        raise StrengthFitError("ages must be greater than zero")
    if np.any(y <= 0.0):
        raise StrengthFitError("strength results must be greater than zero; a zero result "
                               "is not a test result (check the specimen record)")
    n_ages = np.unique(t).size
    if n_ages < 2:
        raise StrengthFitError("a strength-age fit needs results at >= 2 distinct ages; "
                               f"got {n_ages}")
    if np.ptp(y) == 0.0:
        raise StrengthFitError(f"all results are equal ({y[0] / _MPA:g} MPa at every age): "
                               "there is no strength development to fit; check the data")
    return t, y


def _weights(t_d, y, weighting, sigma_pa):
    if sigma_pa is not None:
        sig = np.broadcast_to(np.asarray(sigma_pa, float), y.shape) / _MPA
        if not np.all(np.isfinite(sig)) or np.any(sig <= 0):
            raise StrengthFitError("given standard deviations must be finite and > 0")
        return 1.0 / sig, "weights 1/sigma² from the given standard deviations"
    if weighting == "relative":
        ages, inv = np.unique(t_d, return_inverse=True)
        means = np.bincount(inv, y) / np.bincount(inv)
        return 1.0 / means[inv], "relative: weights 1/(mean at age)², constant CV assumed"
    if weighting == "equal":
        return np.full(y.shape, 1.0 / y.mean()), "equal weights"
    raise StrengthFitError(f"unknown weighting '{weighting}'; use 'relative' or 'equal'")


def _start(spec, t, y, w, x_fixed):
    """Grid over the nonlinear parameters with the amplitudes solved by NNLS, every grid
    point at once (numpy over the grid axis); the first best point of the grid in its order."""
    if spec.key == "two_component":
        ts, b = (a.ravel() for a in np.meshgrid(np.geomspace(1.0, 3000.0, 13),
                                                (0.5, 0.75, 1.0, 1.5, 2.2), indexing="ij"))
        ta = x_fixed[1]
        col_a = -np.expm1(-t / ta) * w
        col_s = -np.expm1(-(t[None, :] / ts[:, None]) ** b[:, None]) * w
        amp, rn = _nnls2(col_a, col_s, y * w)
        i = int(np.argmin(rn))
        return np.array([amp[i, 0], ta, amp[i, 1], ts[i], b[i]])
    q = (np.linspace(0.02, 2.5, 40) if spec.key == "en1992_age"
         else np.geomspace(0.01, 3000.0, 40))
    col = spec.f([1.0, q[:, None]], t[None, :]) * w
    amp = np.maximum(col @ (y * w) / np.sum(col * col, axis=1), 1e-3)
    rn = np.sum((amp[:, None] * col - y * w) ** 2, axis=1)
    i = int(np.argmin(rn))
    return np.array([amp[i], q[i]])


def _nnls2(a, cols, b):
    """Non-negative least squares of ``b`` on two columns, ``a`` (shared) and each row of
    ``cols``, in closed form (the same answers as ``scipy.optimize.nnls``, one problem per
    row): the unconstrained solution when both amplitudes are >= 0, else the better of the
    two one-column fits (each >= 0).  Returns (amplitudes rows x 2, residual norms)."""
    aa, ab, bb = a @ a, cols @ a, np.sum(cols * cols, axis=1)
    ya, yb = a @ b, cols @ b
    det = aa * bb - ab * ab
    with np.errstate(divide="ignore", invalid="ignore"):
        x0 = (ya * bb - yb * ab) / det
        x1 = (yb * aa - ya * ab) / det
        only_a = np.full(bb.shape, max(ya / aa, 0.0) if aa > 0 else 0.0)
        only_b = np.where(bb > 0, np.maximum(yb / bb, 0.0), 0.0)
    both = np.isfinite(x0) & np.isfinite(x1) & (x0 >= 0) & (x1 >= 0) & (det > 0)
    cand = [np.column_stack([np.where(both, x0, 0.0), np.where(both, x1, 0.0)]),
            np.column_stack([only_a, np.zeros_like(only_a)]),
            np.column_stack([np.zeros_like(only_b), only_b])]
    norms = [np.linalg.norm(c[:, :1] * a + c[:, 1:] * cols - b, axis=1) for c in cand]
    norms[0] = np.where(both, norms[0], np.inf)
    k = np.argmin(np.vstack(norms), axis=0)
    pick = np.arange(k.size)
    return np.stack(cand)[k, pick], np.vstack(norms)[k, pick]


def fit_model(model: str, ages_s: Sequence[float], values_pa: Sequence[float], *,
              weighting: str = "relative", sigma_pa: Sequence[float] | None = None,
              tau_a_s: float = TAU_A_DEFAULT_S) -> FitResult:
    """Fit one model (key of ``MODELS``) to results (ages s, strengths Pa) by WLS.

    Refuses (:class:`StrengthFitError`) when there are fewer distinct ages than
    parameters + 1, or the parameters cannot be separated with the ages given.
    """
    if model not in MODELS:
        raise StrengthFitError(f"unknown model '{model}'; choose from {', '.join(MODELS)}")
    spec = MODELS[model]
    t_s, y_pa = validate_data(ages_s, values_pa)
    t, y = t_s / DAY, y_pa / _MPA
    p, n_ages = n_parameters(model, t_s), np.unique(t).size
    if n_ages < p + 1:
        raise StrengthFitError(f"the {spec.title} has {p} parameters and needs results at "
                               f">= {p + 1} distinct ages; got {n_ages}")
    w, wdesc = _weights(t, y, weighting, sigma_pa)
    lo, hi = (np.array(b, float) for b in spec.bounds(float(y.max()), t))
    free = np.ones(len(spec.names), bool)
    x_full = np.zeros(len(spec.names))
    notes = []
    if model == "two_component":
        if not TAU_A_BOUNDS_S[0] <= tau_a_s <= TAU_A_BOUNDS_S[1]:
            raise StrengthFitError("the aluminate time constant τ_A must lie between 1 min and 12 h")
        x_full[1] = tau_a_s / DAY
        if p == 4:
            free[1] = False
            notes.append(f"τ_A held at {tau_a_s / 60:g} min: fewer than two ages under half a "
                         "day, so the aluminate stage's time constant cannot be fitted")
    x0 = np.clip(_start(spec, t, y, w, x_full), lo, hi)
    return _solve(spec, t, y, w, wdesc, x0, free, lo, hi, notes, t_s)


def _solve(spec, t, y, w, wdesc, x0, free, lo, hi, notes, t_s) -> FitResult:
    base = x0.copy()

    def full(z):
        x = base.copy()
        x[free] = z
        return x

    from scipy import optimize   # only when a fit is made (not when every fit is kept)
    res = optimize.least_squares(
        lambda z: (spec.f(full(z), t) - y) * w, x0[free],
        jac=lambda z: spec.jac(full(z), t)[:, free] * w[:, None],
        bounds=(lo[free], hi[free]), method="trf", x_scale="jac")
    x = full(res.x)
    n, p, rss = y.size, int(free.sum()), float(np.sum(res.fun ** 2))
    span = hi - lo
    at = free & ((x - lo < 1e-4 * span) | (hi - x < 1e-4 * span))
    est, cov = _covariance(spec, x, t, w, free, at, rss / (n - p))
    names = spec.names
    at_b = tuple(nm for i, nm in enumerate(names) if at[i])
    if at_b:
        notes.append("at a bound: " + ", ".join(at_b) + ("; held there for the standard "
                     "errors, so the band is conditional on it" if (at & ~est).any() else
                     " (its standard error from the Jacobian is not reliable)"))
    return _result(spec, x, free, est, cov, rss, n, p, t, t_s, wdesc, at_b, notes)


def _result(spec, x, free, est, cov, rss, n, p, t, t_s, wdesc, at_b, notes) -> FitResult:
    names = spec.names
    se = np.zeros(x.size)
    se[est] = np.sqrt(np.clip(np.diag(cov), 0.0, None))
    return FitResult(
        model=spec.key, title=spec.title, formula=spec.formula,
        params={nm: float(x[i] * spec.si[i]) for i, nm in enumerate(names) if free[i]},
        std_errors={nm: float(se[i] * spec.si[i]) for i, nm in enumerate(names) if est[i]},
        units=dict(zip(names, spec.units)),
        fixed={nm: float(x[i] * spec.si[i]) for i, nm in enumerate(names) if not free[i]},
        n_obs=n, n_ages=int(np.unique(t).size), dof=n - p, sigma_hat=math.sqrt(rss / (n - p)),
        aicc=_aicc(rss, n, p), age_min=float(t_s.min()), age_max=float(t_s.max()),
        weighting=wdesc, at_bounds=at_b, notes=tuple(notes), x=tuple(map(float, x)),
        free=tuple(map(bool, est)), cov=tuple(tuple(map(float, r)) for r in cov))


def _covariance(spec, x, t, w, free, at, s2):
    """``s²·(JᵀJ)⁻¹`` over the free parameters; if singular, hold those at a bound."""
    for est in (free, free & ~at):
        jw = spec.jac(x, t)[:, est] * w[:, None]
        jtj = jw.T @ jw
        d = np.sqrt(np.diag(jtj))
        # condition of the scale-free (correlation-like) matrix: near-collinear columns
        if est.any() and np.all(np.isfinite(jtj)) and np.all(d > 0) and \
                np.linalg.cond(jtj / np.outer(d, d)) < _COND_LIMIT:
            return est, np.linalg.inv(jtj) * s2
    raise StrengthFitError(f"the {spec.title}: its parameters cannot be separated with "
                           "these ages; results at more (and later) ages are needed")


def _aicc(rss: float, n: int, p: int) -> float | None:
    """AICc of a least-squares fit, k = p + 1 (the residual variance counts)."""
    k = p + 1
    if n - k - 1 <= 0:
        return None
    rss = max(rss, n * 1e-24)          # an exact fit must not give log(0)
    return n * math.log(rss / n) + 2 * k + 2 * k * (k + 1) / (n - k - 1)


def components(fit: FitResult, ages_s: Sequence[float]) -> dict[str, np.ndarray]:
    """Contributions (Pa) at ages (s): aluminate and silicate for the two-component model."""
    t = np.atleast_1d(np.asarray(ages_s, float)) / DAY
    if np.any(t <= 0) or not np.all(np.isfinite(t)):
        raise StrengthFitError("ages must be positive finite numbers of seconds")
    x = np.array(fit.x)
    if fit.model != "two_component":
        return {fit.model: MODELS[fit.model].f(x, t) * _MPA}
    fa, ta, fs, ts, b = x
    return {"aluminate": fa * -np.expm1(-t / ta) * _MPA,
            "silicate": fs * -np.expm1(-(t / ts) ** b) * _MPA}


@dataclass(frozen=True, eq=False)
class Selection:
    """Models compared by AICc; ``best`` is None when no model could be fitted."""

    best: FitResult | None
    fits: tuple[FitResult, ...]          # ranked, lowest AICc first
    delta_aicc: dict[str, float]
    akaike_weights: dict[str, float]
    not_assessed: dict[str, str]         # model -> reason it was not fitted
    reasoning: str


def _support(delta: float) -> str:
    # Burnham & Anderson (2002), Model Selection and Multimodel Inference, sec. 2.6 (from memory)
    if delta <= 2.0:
        return "substantial support"
    if delta <= 7.0:
        return "considerably less support"
    return "essentially no support" if delta > 10.0 else "little support"


def fit_all(ages_s: Sequence[float], values_pa: Sequence[float],
            models: Sequence[str] = tuple(MODELS), **kw) -> Selection:
    """Fit every model that the data can support and choose one by AICc.

    Rule: lowest AICc, except that a model with fewer parameters within ΔAICc <= 2 of the
    lowest is preferred (parsimony).  Bad data raise :class:`StrengthFitError`; a model the
    data cannot support is listed in ``not_assessed`` with the reason.
    """
    validate_data(ages_s, values_pa)
    fits, skipped = [], {}
    for m in models:
        try:
            fits.append(fit_model(m, ages_s, values_pa, **kw))
        except StrengthFitError as exc:
            skipped[m] = str(exc)
    ranked = [f for f in fits if f.aicc is not None]
    for f in fits:
        if f.aicc is None:
            skipped[f.model] = (f"{f.n_obs} results are too few for AICc with "
                                f"{len(f.params)} parameters")
    if not ranked:
        why = "; ".join(f"{MODELS[m].title}: {r}" for m, r in skipped.items())
        return Selection(None, (), {}, {}, skipped, "not assessed: " + why)
    ranked.sort(key=lambda f: f.aicc)
    low = ranked[0].aicc
    delta = {f.model: f.aicc - low for f in ranked}
    rel = {m: math.exp(-0.5 * d) for m, d in delta.items()}
    tot = sum(rel.values())
    weights = {m: r / tot for m, r in rel.items()}
    near = [f for f in ranked if delta[f.model] <= 2.0]
    best = min(near, key=lambda f: (len(f.params), f.aicc))
    return Selection(best, tuple(ranked), delta, weights, skipped,
                     _reasoning(best, ranked, delta, weights, skipped))


def _reasoning(best, ranked, delta, weights, skipped) -> str:
    out = [f"Chosen: {best.title} (AICc {best.aicc:.2f}, Akaike weight "
           f"{weights[best.model]:.2f}, {len(best.params)} parameters)."]
    if best is not ranked[0]:
        out.append(f"It has fewer parameters than {ranked[0].title} and lies within ΔAICc = "
                   f"{delta[best.model]:.2f} <= 2 of it, so the simpler model is preferred.")
    out += [f"{f.title}: AICc {f.aicc:.2f}, ΔAICc {f.aicc - best.aicc:+.2f} against the chosen "
            f"model ({_support(abs(f.aicc - best.aicc))} relative to it)."
            for f in ranked if f is not best]
    out += [f"{MODELS[m].title} not fitted: {r}." for m, r in skipped.items()]
    return " ".join(out)
