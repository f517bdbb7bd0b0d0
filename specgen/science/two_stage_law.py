"""The two-stage strength law of the strength inference, on the log scale, with its analytic
gradient (ages in days, strengths in MPa, parameters ``z = (ln F, logit φ, ln τA, ln τS, ln b)``):
``f(t) = F·[φ·(1 - exp(-t/τA)) + (1 - φ)·(1 - exp(-(t/τS)^b))]``.
:mod:`specgen.science.strength_inference` fits it.
"""
from __future__ import annotations

import math

import numpy as np


def two_stage(t_d, big_f: float, phi: float, tau_a: float, tau_s: float, b: float):
    """Two-stage law (MPa) at ages ``t_d`` (d)."""
    t = np.asarray(t_d, float)
    return big_f * (phi * -np.expm1(-t / tau_a) + (1 - phi) * -np.expm1(-(t / tau_s) ** b))


def unpack(z) -> tuple[float, float, float, float, float]:
    ln_f, lg_phi, ln_ta, ln_ts, ln_b = z
    return (math.exp(ln_f), 1.0 / (1.0 + math.exp(-lg_phi)), math.exp(ln_ta),
            math.exp(ln_ts), math.exp(ln_b))


def log_f(z, t_d) -> np.ndarray:
    """``ln f`` at ages ``t_d`` (d) for parameters ``z`` (each term a number, or an array
    broadcast against ``t_d``: many draws at many ages at once)."""
    ln_f, lg_phi, ln_ta, ln_ts, ln_b = z
    phi = 1.0 / (1.0 + np.exp(-lg_phi))
    t = np.asarray(t_d, float)
    # (t/τS)^b as exp(b·(ln t - ln τS)): the same number, cheaper over many draws and ages;
    # the steps of phi·-expm1(-t/τA) + (1-phi)·-expm1(-(t/τS)^b) written into two buffers the
    # size of the result (a draws x ages grid makes no other temporaries): the same operations
    # in the same order, so the same numbers
    fast = np.asarray(-t * np.exp(-ln_ta))
    np.negative(np.expm1(fast, out=fast), out=fast)
    np.multiply(phi, fast, out=fast)
    slow = np.asarray(np.exp(ln_b) * (np.log(t) - ln_ts))
    np.negative(np.exp(slow, out=slow), out=slow)
    np.negative(np.expm1(slow, out=slow), out=slow)
    np.multiply(1 - phi, slow, out=slow)
    np.add(fast, slow, out=fast)
    np.log(np.maximum(fast, 1e-300, out=fast), out=fast)
    return np.add(ln_f, fast, out=fast)


def log_f_grad(z, t_d) -> np.ndarray:
    """∂ ln f/∂z, analytic (rows: ages; columns: ln F, logit φ, ln τA, ln τS, ln b): the one
    parameter vector case of :func:`log_f_grad_many`."""
    t = np.atleast_1d(np.asarray(t_d, float))
    return log_f_grad_many(np.asarray(z, float)[None, :], t[None, :])[0]


def log_f_grad_many(z, t_d) -> np.ndarray:
    """:func:`log_f_grad` of many parameter vectors at once: ``z`` (series x 5), ``t_d``
    (series x ages, or one row of ages for all); returns series x ages x 5, the same formula
    term by term."""
    z = np.asarray(z, float)
    lg_phi, ln_ta, ln_ts, ln_b = (z[:, k:k + 1] for k in range(1, 5))
    phi, ta, ts, b = 1.0 / (1.0 + np.exp(-lg_phi)), np.exp(ln_ta), np.exp(ln_ts), np.exp(ln_b)
    t = np.broadcast_to(np.asarray(t_d, float), (z.shape[0], np.shape(t_d)[-1]))
    ea = np.exp(-t / ta)
    u = (t / ts) ** b
    eb = np.exp(-u)
    a_, b_ = -np.expm1(-t / ta), -np.expm1(-u)
    shape = np.maximum(phi * a_ + (1 - phi) * b_, 1e-300)
    return np.stack([
        np.ones_like(t), (a_ - b_) * phi * (1 - phi) / shape,
        -phi * (t / ta) * ea / shape, -(1 - phi) * b * u * eb / shape,
        (1 - phi) * eb * b * u * np.log(t / ts) / shape], axis=-1)
