"""Why a cell of the validation study scores as it does (``python3 -m
specgen.validation_readings``): the natural-cement cells of :mod:`specgen.validation` scored
again with the exact posterior under several readings of the prior's rows.

The posterior is computed here by a route independent of the fit's Laplace approximation and
importance sampling: draws of the shape terms (φ, τA, τS, b) from a reading of the rows, each
weighted by the likelihood of the record's group means (sampling-importance-resampling from
the prior, Smith & Gelfand 1992, The American Statistician 46, 84-88).  The level ``ln F``
has a flat prior, as in the fit, and enters the data term linearly, so it is integrated out
in closed form: for one shape the group means ``ȳ_i`` less ``ln s(t_i)`` are normal about
``ln F`` with the fit's variances ``v_i``, so ``ln F`` is normal about their weighted mean
``m`` with variance ``1/Σ(1/v_i)``, and the shape's weight is ``exp(-½Σ(ȳ_i - ln s_i - m)²/v_i)``.

Readings (the same rows, ``content/data/strength_priors.yaml``):

* ``as printed`` -- the prior the fit uses (each range a central 95 % log-normal range, the
  gain row melded): checks the fit's sampler, which must score the same;
* ``range as ±1 SD`` -- each range read as one standard deviation either side (gain melded);
* ``gain row as a bound`` -- as printed, but f365/f28 held inside the printed gain row;
* ``rows as bounds`` -- every range a bound, uniform on the scale it is read on (logit φ,
  ln τA, ln τS, ln b), the gain row a bound;
* ``b = 1 known`` -- as printed with the silicate stage held plain exponential (an oracle
  for the exponential law, for diagnosis only);
* ``generating distribution`` -- the very distribution the study draws its laws from (an
  oracle: no prior written before the data can know it); what the record can tell at best.

The baseline is the study's (:func:`specgen.validation.baseline_gains`), and beside it, at
90 d, the range of f90/f28 that the reading itself implies (the baseline it would have).
"""
from __future__ import annotations

import math
from collections.abc import Callable

import numpy as np

from specgen import refdata
from specgen.science import strength_inference as si
from specgen.science.strength_priors import match_gain_term, weighted_quantiles
from specgen.science.two_stage_law import log_f

SHAPE_KEYS = si.PRIOR_KEYS[:4]          # early_fraction, tau_fast_d, tau_slow_d, shape_b
NC_LAWS = ("two-stage exponential", "two-stage stretched")


def _scale(key: str, x):
    x = np.asarray(x, float)
    return np.log(x / (1 - x)) if key == "early_fraction" else np.log(x)


def _stack(cols) -> np.ndarray:
    return np.column_stack([np.zeros(len(cols[0]))] + list(cols))


def _log_gain(z: np.ndarray) -> np.ndarray:
    lf = log_f(z.T[:, :, None], np.array([28.0, 365.0])[None, :])
    return lf[:, 1] - lf[:, 0]


def _melded(z: np.ndarray, row) -> np.ndarray:
    """Log-weights of the gain row melded in as the fit does (:func:`match_gain_term`), the
    term matched on the reading's own shape draws ``z``."""
    g = _log_gain(z)
    mu, sd = match_gain_term(np.sort(g), *row["gain_365_28"]["range"])
    return -0.5 * ((g - mu) / sd) ** 2


def _bounded(z: np.ndarray, row) -> np.ndarray:
    g = _log_gain(z)
    lo, hi = np.log(row["gain_365_28"]["range"])
    return np.where((g >= lo) & (g <= hi), 0.0, -np.inf)


def _normal(rng, row, n, half_sds: float, b_one: bool = False):
    cols = []
    for k in SHAPE_KEYS:
        lo, hi = _scale(k, row[k]["range"])
        cols.append(np.zeros(n) if (b_one and k == "shape_b") else
                    rng.normal((lo + hi) / 2, (hi - lo) / (2 * half_sds), n))
    return _stack(cols)


def _uniform(rng, row, n, b_range=None):
    cols = []
    for k in SHAPE_KEYS:
        r = b_range if (k == "shape_b" and b_range is not None) else row[k]["range"]
        lo, hi = _scale(k, r)
        cols.append(rng.uniform(lo, hi, n) if hi > lo else np.full(n, lo))
    return _stack(cols)


def generating(rng, row, n: int, stretched: bool) -> np.ndarray:
    """``n`` draws of the study's natural-cement laws (:func:`validation._two_stage_from_rows`):
    each row uniform on its scale, b = 1 (or uniform from the b row's lower end to 1 when
    ``stretched``), kept when f365/f28 lies in the gain row."""
    out, got = [], 0
    b = (row["shape_b"]["range"][0], 1.0) if stretched else (1.0, 1.0)
    while got < n:
        z = _uniform(rng, row, n, b)
        if stretched:   # uniform in b itself, as the study draws it
            z[:, 4] = np.log(rng.uniform(*b, n))
        z = z[np.isfinite(_bounded(z, row))]
        out.append(z)
        got += len(z)
    return np.vstack(out)[:n]


def _as_printed(rng, row, n, law):
    z = _normal(rng, row, n, float(si._Z95))
    mu, sd = si.prior_from_table("natural_cement", row).penalty("gain_365_28")
    return z, -0.5 * ((_log_gain(z) - mu) / sd) ** 2


def _one_sd(rng, row, n, law):
    z = _normal(rng, row, n, 1.0)
    return z, _melded(z, row)


def _gain_bound(rng, row, n, law):
    z = _normal(rng, row, n, float(si._Z95))
    return z, _bounded(z, row)


def _all_bounds(rng, row, n, law):
    z = _uniform(rng, row, n)
    return z, _bounded(z, row)


def _b_one(rng, row, n, law):
    z = _normal(rng, row, n, float(si._Z95), b_one=True)
    return z, _melded(z, row)


def _generating(rng, row, n, law):
    return generating(rng, row, n, "stretched" in law), np.zeros(n)


Reading = Callable[[np.random.Generator, dict, int, str], tuple[np.ndarray, np.ndarray]]
READINGS: dict[str, Reading] = {
    "as printed": _as_printed, "range as ±1 SD": _one_sd, "gain row as a bound": _gain_bound,
    "rows as bounds": _all_bounds, "b = 1 known": _b_one, "generating distribution": _generating}


def posterior_band(z: np.ndarray, log_w0: np.ndarray, ages, means_log, var, targets,
                   rng, level: float = 0.95) -> np.ndarray:
    """Central ``level`` band (MPa; rows: lower, upper; columns: ``targets`` d) of the mean
    curve under prior draws ``z`` (shape terms; column 0 unused) with prior log-weights
    ``log_w0``, given group means ``means_log`` (ln MPa) at ``ages`` (d) with variances
    ``var``: likelihood weighting with ``ln F`` integrated out (module docstring)."""
    ages, targets = np.asarray(ages, float), np.asarray(targets, float)
    s = log_f(z.T[:, :, None], np.concatenate([ages, targets])[None, :])
    w_i = 1.0 / np.asarray(var, float)
    r = np.asarray(means_log, float)[None, :] - s[:, :ages.size]
    m = r @ w_i / w_i.sum()
    log_w = log_w0 - 0.5 * ((r - m[:, None]) ** 2) @ w_i
    ok = np.isfinite(log_w)
    w = np.exp(log_w[ok] - log_w[ok].max())
    ln_f = m[ok] + rng.standard_normal(int(ok.sum())) / math.sqrt(w_i.sum())
    a = (1 - level) / 2
    x = ln_f[:, None] + s[ok, ages.size:]
    return np.exp(np.column_stack([weighted_quantiles(x[:, j], w, [a, 1 - a])
                                   for j in range(targets.size)]))


def implied_gain(z: np.ndarray, log_w0: np.ndarray, age_d: float) -> tuple[float, float]:
    """Central 95 % range of f(age)/f(28 d) under a reading's draws (its own baseline)."""
    lf = log_f(z.T[:, :, None], np.array([28.0, age_d])[None, :])
    w = np.exp(log_w0 - log_w0[np.isfinite(log_w0)].max())
    q = weighted_quantiles(lf[:, 1] - lf[:, 0], w, [0.025, 0.975])
    return float(math.exp(q[0])), float(math.exp(q[1]))


def study(series: int = 200, rng_state: int = 7, draws: int = 40000,
          readings=tuple(READINGS)) -> list[dict]:
    """The natural-cement cells of :func:`specgen.validation.study` (same laws, series and
    fits: the fit's variances are used by every reading), scored with the exact posterior of
    each reading.  One dict per law, record and reading: coverage and mean interval score at
    90 and 365 d, the study's baseline and the reading's own 90-day baseline."""
    from specgen import validation as v
    row = refdata.load("strength_priors").data["natural_cement"]
    prior = si.prior_from_table("natural_cement", row)
    base = v.baseline_gains(prior)
    targets = np.array(v.TARGETS)
    out = []
    for law_name in NC_LAWS:
        make = v.LAWS[law_name][0]
        for rec, ages in v.AGES.items():
            rng = np.random.default_rng(rng_state)
            cells = {name: READINGS[name](np.random.default_rng(rng_state + 1), row, draws,
                                          law_name) for name in readings}
            acc = {name: {"hit": np.zeros(2), "score": np.zeros(2), "own": 0.0,
                          "own_gain": implied_gain(*cells[name], 90.0)} for name in readings}
            base_score = np.zeros(2)
            laws, recs = [], []
            for _ in range(series):
                laws.append(make(rng, row))
                recs.append(v.simulate(laws[-1], rng, ages, 0.04))
            fits = si.fit_many([(t, y, prior) for t, y in recs])   # as the study fits them
            for law, (t, y), inf in zip(laws, recs, fits):
                var = inf.sigma_b ** 2 + inf.sigma_w ** 2 / inf.counts
                truth = law(targets)
                f28 = math.exp(np.mean(np.log([b for a, b in zip(t, y) if a == 28])))
                base_score += [float(si.interval_score(f28 * base[a][0], f28 * base[a][1],
                                                       x)) for a, x in zip(targets, truth)]
                pr = np.random.default_rng(rng_state + 2)
                for name, (z, lw0) in cells.items():
                    lo, hi = posterior_band(z, lw0, inf.ages, inf.means_log, var, targets, pr)
                    a = acc[name]
                    a["hit"] += (lo <= truth) & (truth <= hi)
                    a["score"] += si.interval_score(lo, hi, truth)
                    g = a["own_gain"]
                    a["own"] += float(si.interval_score(f28 * g[0], f28 * g[1], truth[0]))
            for name, a in acc.items():
                out.append({"law": law_name, "record": rec, "reading": name, "n": series,
                            "coverage": (a["hit"] / series).tolist(),
                            "score": (a["score"] / series).tolist(),
                            "baseline": (base_score / series).tolist(),
                            "own_baseline_90": a["own"] / series})
    return out


def table(rows: list[dict]) -> str:
    """The readings as a Markdown table."""
    out = ["| law | record | reading | coverage 90 d / 365 d | score 90 d (baseline; "
           "the reading's own) | score 365 d (baseline) |", "|---|---|---|---|---|---|"]
    for r in rows:
        c, s, b = r["coverage"], r["score"], r["baseline"]
        out.append(f"| {r['law']} | {r['record']} | {r['reading']} | {c[0]:.0%} / {c[1]:.0%} "
                   f"| {s[0]:.2f} ({b[0]:.2f}; {r['own_baseline_90']:.2f}) "
                   f"| {s[1]:.2f} ({b[1]:.2f}) |")
    return "\n".join(out)


if __name__ == "__main__":
    import click

    @click.command()
    @click.option("--series", default=200, show_default=True, help="simulated series per law")
    @click.option("--random-state", "rng_state", default=7, show_default=True, help="random state")
    @click.option("--draws", default=40000, show_default=True, help="prior draws per reading")
    def _readings(series: int, rng_state: int, draws: int) -> None:
        """The natural-cement cells of the validation study under readings of the prior."""
        print(table(study(series, rng_state, draws)))

    _readings()
