"""Aggregate grading: sieve analysis, fineness modulus, envelopes, blends, binder:aggregate.

Sieve apertures in m; percentages as fractions 0–1 inside (the trade writes %, shown so at
the edge).  The standard sieve series and the fineness-modulus sieves are reference data
(``content/data/sieve_series.yaml``) passed in by the caller.

* Fineness modulus [ASTM C125]: the sum of the cumulative percentages retained on the
  150 µm, 300 µm, 600 µm, 1.18 mm, 2.36 mm, 4.75 mm sieves (and 9.5 mm and coarser in the
  2:1 series), divided by 100.  As a fraction: FM = Σ cumulative retained (0–1).
* Blend: proportions x ≥ 0 with Σx = 1 minimising the squared difference of passing on the
  common sieves, solved as a non-negative least-squares problem (scipy.optimize.nnls) with
  the sum constraint added as a heavily weighted row.
* Binder:aggregate from acid digestion: the acid-insoluble residue is the aggregate, the
  loss the binder (as found, e.g. carbonated lime); by volume with the bulk densities.
"""
from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from specgen.errors import ScienceInputError

# Two apertures closer than this (relative) are the same sieve: files write 0.6 or 0.600 mm.
SAME_SIEVE = 0.02


class GradingInputError(ScienceInputError):
    """A sieve analysis or grading input that cannot be used."""


@dataclass(frozen=True)
class Grading:
    """A sieve analysis on a series of sieves, coarsest first (fractions 0–1)."""

    sieves: tuple[float, ...]          # m, descending
    retained: tuple[float, ...]        # fraction of the total retained on each sieve
    cumulative: tuple[float, ...]      # cumulative fraction retained
    passing: tuple[float, ...]         # cumulative fraction passing
    pan: float                         # fraction passing the finest sieve
    series: str = ""                   # key of the sieve series it was graded on ('' unknown)


def match_sieve(size: float, series: Sequence[float]) -> float | None:
    """The standard aperture equal to ``size`` (within SAME_SIEVE), or None."""
    for s in series:
        if abs(size - s) <= SAME_SIEVE * s:
            return float(s)
    return None


def _on_series(sizes: Sequence[float], series: Sequence[float]) -> list[float]:
    out = []
    for s in sizes:
        m = match_sieve(s, series)
        if m is None:
            raise GradingInputError(f"sieve {s * 1000:g} mm is not in the standard series "
                                    f"({', '.join(f'{x * 1000:g}' for x in sorted(series))} mm)")
        out.append(m)
    if len(set(out)) != len(out):
        raise GradingInputError("a sieve appears twice in the analysis")
    return out


def _no_gaps(sizes: list[float], series: Sequence[float]) -> None:
    ordered = sorted(series)
    lo, hi = ordered.index(min(sizes)), ordered.index(max(sizes))
    missing = [s for s in ordered[lo:hi + 1] if s not in sizes]
    if missing:
        raise GradingInputError("the sieve series has gaps: no result for "
                                + ", ".join(f"{s * 1000:g} mm" for s in missing))


def from_passing(sizes: Sequence[float], passing: Sequence[float],
                 series: Sequence[float]) -> Grading:
    """A grading from cumulative fractions passing each sieve."""
    if len(sizes) != len(passing) or len(sizes) < 2:
        raise GradingInputError("a grading needs at least two sieves, each with a passing value")
    sz = _on_series(sizes, series)
    _no_gaps(sz, series)
    order = np.argsort(sz)[::-1]
    s = np.array(sz)[order]
    p = np.array(passing, float)[order]
    if np.any(p < 0) or np.any(p > 1):
        raise GradingInputError("passing must lie between 0 and 100 %")
    rises = [i for i in range(1, len(p)) if p[i] > p[i - 1] + 1e-9]
    if rises:
        i = rises[0]
        raise GradingInputError(
            f"cumulative passing is not monotone: {100 * p[i]:g} % passes {s[i] * 1000:g} mm "
            f"but only {100 * p[i - 1]:g} % passes the coarser {s[i - 1] * 1000:g} mm")
    ret = np.concatenate([[1.0 - p[0]], -np.diff(p)])
    return Grading(tuple(s), tuple(ret), tuple(1.0 - p), tuple(p), float(p[-1]))


def from_retained(sizes: Sequence[float], masses: Sequence[float], series: Sequence[float],
                  pan: float = 0.0) -> Grading:
    """A grading from masses retained on each sieve (any mass unit) and in the pan."""
    m = np.array(masses, float)
    if np.any(m < 0) or pan < 0:
        raise GradingInputError("masses retained cannot be negative")
    total = m.sum() + pan
    if total <= 0:
        raise GradingInputError("the masses retained add up to zero")
    sz = _on_series(sizes, series)
    order = np.argsort(sz)[::-1]
    cum = np.cumsum(m[order]) / total
    return from_passing(np.array(sz)[order], 1.0 - cum, series)


def fineness_modulus(g: Grading, fm_sieves: Sequence[float]) -> float:
    """ASTM C125 fineness modulus (Σ cumulative % retained on the FM sieves / 100).

    Sieves of the FM set coarser than the coarsest tested are counted 0 retained only if
    everything passed the coarsest tested sieve; any other missing FM sieve is an error.
    """
    top = g.sieves[0]
    total = 0.0
    for s in fm_sieves:
        m = match_sieve(s, g.sieves)
        if m is not None:
            total += g.cumulative[g.sieves.index(m)]
        elif s > top and g.passing[0] >= 1.0 - 1e-9:
            continue
        else:
            raise GradingInputError(f"the fineness modulus needs the {s * 1000:g} mm sieve")
    return total


def known_at(g: Grading, size: float) -> bool:
    """Whether ``g`` gives the passing at ``size``: a sieve of the analysis, or one coarser
    than its top sieve when everything passed there."""
    return (match_sieve(size, g.sieves) is not None
            or (size > g.sieves[0] and g.passing[0] >= 1.0 - 1e-9))


def passing_at(g: Grading, sieves: Sequence[float]) -> np.ndarray:
    """Passing fractions of ``g`` at ``sieves`` (each must be :func:`known_at`)."""
    out = []
    for s in sieves:
        if not known_at(g, s):
            raise GradingInputError(f"no result on the {s * 1000:g} mm sieve")
        m = match_sieve(s, g.sieves)
        out.append(g.passing[g.sieves.index(m)] if m is not None else 1.0)
    return np.array(out)


def interpolated_passing(g: Grading, size: float) -> float | None:
    """Passing of ``g`` at ``size`` read between its sieves, linear in log(aperture).

    On a sieve of ``g`` the value is the measured one; above the top sieve it is 1 when all
    passed there; below the finest sieve it is 0 only when nothing passed it.  Otherwise
    (outside the tested range) ``None``: no extrapolation.
    """
    m = match_sieve(size, g.sieves)
    if m is not None:
        return g.passing[g.sieves.index(m)]
    if size > g.sieves[0]:
        return 1.0 if g.passing[0] >= 1.0 - 1e-9 else None
    if size < g.sieves[-1]:
        return 0.0 if g.passing[-1] <= 1e-9 else None
    for (s1, p1), (s2, p2) in zip(zip(g.sieves, g.passing), zip(g.sieves[1:], g.passing[1:])):
        if s2 <= size <= s1:
            return p2 + (p1 - p2) * float(np.log(size / s2) / np.log(s1 / s2))
    return None


@dataclass(frozen=True)
class EnvelopeComparison:
    """Passing against an envelope on each of its sieves (fractions); ``outside`` > 0 if out."""

    sieves: tuple[float, ...]
    passing: tuple[float, ...]
    low: tuple[float, ...]
    high: tuple[float, ...]
    outside: tuple[float, ...]          # distance outside the band (0 inside)
    interpolated: tuple[bool, ...] = ()  # True where the passing was read between sieves

    @property
    def within(self) -> bool:
        return all(d <= 1e-9 for d in self.outside)


def compare_envelope(g: Grading, envelope: Sequence[tuple[float, float, float]],
                     interpolate: bool = False) -> EnvelopeComparison:
    """Compare with an envelope given as (sieve m, low, high) fractions passing.

    With ``interpolate`` the passing on an envelope sieve that the analysis lacks is read
    between its sieves (:func:`interpolated_passing`); sieves it cannot reach are left out
    (the caller lists them).
    """
    rows = []
    for s, lo, hi in envelope:
        exact = known_at(g, s)
        if exact:
            rows.append((s, float(passing_at(g, [s])[0]), lo, hi, False))
        elif interpolate and (v := interpolated_passing(g, s)) is not None:
            rows.append((s, v, lo, hi, True))
        elif not interpolate:
            raise GradingInputError(f"no result on the {s * 1000:g} mm sieve")
    if not rows:
        raise GradingInputError("the analysis reaches none of the envelope's sieves")
    sv, p, lo, hi, interp = (tuple(col) for col in zip(*rows))
    pa, loa, hia = np.array(p), np.array(lo), np.array(hi)
    out = np.maximum(loa - pa, 0.0) + np.maximum(pa - hia, 0.0)
    return EnvelopeComparison(sv, tuple(float(v) for v in pa), lo, hi, tuple(out), interp)


@dataclass(frozen=True)
class Deviation:
    """Difference of two gradings on their common sieves (fractions passing)."""

    sieves: tuple[float, ...]
    difference: tuple[float, ...]       # a − b on each sieve
    rms: float
    max_abs: float


def common_sieves(*gradings: Grading) -> list[float]:
    """Sieves present in every grading, coarsest first."""
    common = [s for s in gradings[0].sieves
              if all(match_sieve(s, g.sieves) is not None for g in gradings[1:])]
    if len(common) < 2:
        raise GradingInputError("the gradings share fewer than two sieves")
    return common


def deviation(a: Grading, b: Grading) -> Deviation:
    """Root-mean-square and largest difference of passing between two gradings.

    On their common sieves; gradings on two different series share none, so ``b`` is then
    read on the sieves of ``a`` by :func:`interpolated_passing` (within its tested range).
    """
    if a.series and b.series and a.series != b.series:
        sv = [s for s in a.sieves if interpolated_passing(b, s) is not None]
        if len(sv) < 2:
            raise GradingInputError("the gradings share fewer than two sieves, even read "
                                    "between the sieves of the other series")
        pb = np.array([interpolated_passing(b, s) for s in sv])
    else:
        sv = common_sieves(a, b)
        pb = passing_at(b, sv)
    d = passing_at(a, sv) - pb
    return Deviation(tuple(sv), tuple(d), float(np.sqrt(np.mean(d ** 2))), float(np.max(np.abs(d))))


def blend(gradings: Sequence[Grading], fractions: Sequence[float]) -> Grading:
    """The grading of a blend with mass ``fractions`` (summing to 1) of ``gradings``."""
    f = np.asarray(fractions, float)
    if len(f) != len(gradings) or np.any(f < 0) or abs(f.sum() - 1.0) > 1e-9:
        raise GradingInputError("blend fractions must be non-negative and sum to 1")
    sv = common_sieves(*gradings)
    p = sum(fi * passing_at(g, sv) for fi, g in zip(f, gradings))
    series = {g.series for g in gradings}
    return Grading(tuple(sv), tuple(np.concatenate([[1 - p[0]], -np.diff(p)])),
                   tuple(1 - p), tuple(p), float(p[-1]), series.pop() if len(series) == 1 else "")


@dataclass(frozen=True)
class BlendFit:
    """Best non-negative mass proportions of the components to match a target grading."""

    proportions: tuple[float, ...]
    rms: float                          # RMS difference of passing after the fit (fraction)
    sieves: tuple[float, ...]


def fit_blend(components: Sequence[Grading], target: Grading, weight: float = 1e3) -> BlendFit:
    """NNLS fit of proportions x ≥ 0, Σx = 1 (enforced by a row of weight ``weight``)."""
    if len(components) < 1:
        raise GradingInputError("a blend needs at least one sand")
    sv = common_sieves(target, *components)
    A = np.column_stack([passing_at(g, sv) for g in components])
    b = passing_at(target, sv)
    A_aug = np.vstack([A, weight * np.ones(len(components))])
    b_aug = np.concatenate([b, [weight]])
    from scipy import optimize   # only when a blend is fitted
    x, _ = optimize.nnls(A_aug, b_aug)
    x = x / x.sum()
    resid = A @ x - b
    return BlendFit(tuple(float(v) for v in x), float(np.sqrt(np.mean(resid ** 2))), tuple(sv))


def volume_to_mass_fractions(parts: Sequence[float], bulk_densities: Sequence[float]) -> list[float]:
    """Mass fractions of components batched by volume ``parts`` with loose bulk densities."""
    m = np.asarray(parts, float) * np.asarray(bulk_densities, float)
    if np.any(m <= 0):
        raise GradingInputError("parts and bulk densities must be greater than zero")
    return [float(v) for v in m / m.sum()]


@dataclass(frozen=True)
class BinderAggregate:
    """Binder:aggregate of a historic mortar from acid digestion (aggregate = 1)."""

    binder_mass: float                  # kg, as found (acid-soluble loss)
    aggregate_mass: float               # kg
    by_mass: float                      # binder / aggregate, by mass (binder as found)
    by_volume: float | None             # binder / aggregate, by loose volume
    binder_loss: float = 0.0            # fraction of the binder as found lost on ignition
    by_mass_loss_free: float | None = None  # binder net of its CO2 and bound water


def binder_aggregate(sample_mass: float, residue_mass: float,
                     binder_bulk_density: float | None = None,
                     aggregate_bulk_density: float | None = None,
                     binder_loss: float | None = None) -> BinderAggregate:
    """Acid digestion: residue = aggregate, loss = binder; ratio by mass and by volume.

    ``binder_loss`` (0–1, the loss on ignition of the binder fraction's analysis) removes the
    CO2 taken up in carbonation and the bound water, which are not binder as batched:
    binder = (m_s − m_r)·(1 − LOI).  The ratio by volume then uses that binder mass.
    """
    if sample_mass <= 0 or residue_mass <= 0:
        raise GradingInputError("sample and residue masses must be greater than zero")
    if residue_mass >= sample_mass:
        raise GradingInputError("the insoluble residue must be lighter than the sample")
    if binder_loss is not None and not 0 <= binder_loss < 1:
        raise GradingInputError("the binder's loss on ignition must lie in 0–100 %")
    binder = sample_mass - residue_mass
    net = binder * (1 - binder_loss) if binder_loss is not None else binder
    vol = None
    if binder_bulk_density and aggregate_bulk_density:
        vol = (net / binder_bulk_density) / (residue_mass / aggregate_bulk_density)
    return BinderAggregate(binder, residue_mass, binder / residue_mass, vol, binder_loss or 0.0,
                           net / residue_mass if binder_loss is not None else None)
