"""Which prior a mix's strength record is read with, and the intervals decisions use.

A mix's binder family (``materials.yaml`` binder ``type`` and ``declared_class``) picks a row
of ``content/data/strength_priors.yaml``; a family with no row gets the widest prior and the
dossier says so.  :func:`infer` fits the two-stage law with that prior
(``specgen.science.strength_inference``) to a series' groups at their equivalent ages.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from specgen import refdata
from specgen.checks import fits
from specgen.science import strength_inference as si
from specgen.views import family_words

DAY, MPA = 86400.0, 1e6
_NHL = {"NHL2": "nhl_2", "NHL3.5": "nhl_3_5", "NHL5": "nhl_5"}


@dataclass(frozen=True)
class Family:
    """The prior chosen for a mix and why."""

    prior: si.Prior
    reason: str
    widest: bool


def family(project, mix) -> Family:
    """The binder family of ``mix`` and its prior (widest when the table has none)."""
    table = refdata.load("strength_priors").data
    binders = [project.binders[b.binder] for b in mix.binders if b.binder in project.binders]
    types = sorted({b.type for b in binders})
    key, why = _key(types, binders)
    if key in table:
        return Family(_prior(key, table[key]), why, False)
    return Family(_prior("widest", table["widest"]),
                  f"{why}: no prior for this binder family in content/data/strength_priors.yaml, "
                  "so the widest prior is used (the band is as wide as the families allow)", True)


def _prior(name: str, row) -> si.Prior:
    """:func:`~specgen.science.strength_inference.prior_from_table` of a family's row, made
    once and kept between runs with the fits (its gain term is matched by least squares)."""
    return fits.once(("prior", name, repr(row)), lambda: si.prior_from_table(name, row))


def _key(types: list[str], binders) -> tuple[str, str]:
    names = " + ".join(family_words(t) for t in types) or "no binder"
    if types == ["natural_cement"]:
        return "natural_cement", "binder family natural cement"
    if types == ["nhl"]:
        cls = {_NHL.get("".join(b.declared_class.upper().split())) for b in binders}
        if len(cls) == 1 and None not in cls:
            k = cls.pop()
            return k, f"binder family natural hydraulic lime, declared {binders[0].declared_class}"
        return "nhl", "binder family natural hydraulic lime (no single declared class)"
    if types and set(types) <= {"fl", "hl"}:      # (the empty set is a subset too)
        return "formulated_lime", f"binder family {names}"
    if types == ["air_lime", "pozzolan"]:
        return "lime_pozzolan", "binder family hydrated (air) lime with pozzolan"
    if "portland" in types and set(types) - {"portland", "pozzolan"} and \
            set(types) <= {"portland", "air_lime", "nhl", "pozzolan"}:
        return "cement_lime", f"binder family cement-lime ({names})"
    if types == ["air_lime"]:
        return "air_lime", "binder family air lime (hardens by carbonation)"
    return "_".join(types) or "no binder", f"binder family {names}"


@dataclass
class InferenceRun:
    """The fit of one series (or why there is none), with the record's scatter checks."""

    family: Family
    inference: si.Inference | None = None
    error: str = ""
    falls: tuple = ()          # (age a d, age b d, ratio) where the mean falls beyond scatter
    misfit: tuple = ()         # reasons the fitted law is not used to predict
    outside: tuple = ()        # (age d, mean, lo, hi) measured means outside the set interval
    mean_misses: tuple = ()    # ages whose measured mean lies outside the band for the mean

    @property
    def ok(self) -> bool:
        """True when the fit may be used to predict."""
        return self.inference is not None and not self.falls and not self.misfit


def set_size(project, rules) -> int:
    """Prisms in one site set (specification.yaml site_tests, else the rule)."""
    spec = getattr(project, "specification", None)
    given = spec.doc.site_tests.prisms_per_set if spec else None
    return int(given or rules["specification.prisms_per_set"].value)


def infer(series, fam: Family, rules) -> InferenceRun:
    """Fit the two-stage law with the prior to the series' kept results (equivalent ages),
    then judge whether it fits: the lack-of-fit test and every measured mean against the
    interval for a set of its size."""
    run = _infer(series, fam)
    inf = run.inference
    if inf is None or run.falls:
        return run
    level = rules["strength.confidence_level"].value
    if inf.lof_batch_p is not None and inf.lof_batch_p < rules["strength.lof_alpha"].value:
        run.misfit += (f"lack of fit: p = {inf.lof_batch_p:.3g} below "
                       f"{rules['strength.lof_alpha'].value:g} even allowing the prior's largest "
                       f"batch-to-batch scatter ({100 * fam.prior.batch_cv.high:g} %)",)
    b = si.bands(inf, inf.ages, level, inf.counts)
    for i, (age, ml) in enumerate(zip(inf.ages, inf.means_log)):
        mean = float(np.exp(ml))
        if not b["pred_lo"][i] <= mean <= b["pred_hi"][i]:
            run.outside += ((float(age), mean, float(b["pred_lo"][i]), float(b["pred_hi"][i])),)
        elif not b["mean_lo"][i] <= mean <= b["mean_hi"][i]:
            run.mean_misses += (float(age),)
    if run.outside:
        run.misfit += ("the interval for a set misses the measured mean at " + ", ".join(
            f"{a:.4g} d ({m:.3g} MPa outside [{lo:.3g}, {hi:.3g}])" for a, m, lo, hi in
            run.outside),)
    return run


def fit_record(series, fam: Family) -> tuple[list[float], list[float], si.Prior]:
    """What the inference fits for a series: equivalent ages (d) and values (MPa) of the
    kept results, and the family's prior."""
    return ([g.te / DAY for g in series.groups for _ in g.kept],
            [r.value / MPA for g in series.groups for r in g.kept], fam.prior)


def _infer(series, fam: Family) -> InferenceRun:
    run = InferenceRun(fam)
    t, y, _ = fit_record(series, fam)
    if series.implausible:
        run.error = ("results of implausible magnitude (see the aggregation check): correct "
                     "the unit or the values before the strength can be inferred")
        return run
    try:
        run.inference = inf = fits.inference(t, y, fam.prior)
    except si.InferenceError as exc:
        run.error = str(exc)
        return run
    # against the largest batch scatter the prior allows: the fitted one absorbs the fall itself
    run.falls = tuple(si.falls(inf.ages, inf.means_log, inf.counts, inf.sigma_w,
                               fam.prior.batch_cv.high))
    if run.falls:
        run.error = "; ".join(
            f"the mean falls from {a:g} d to {b:g} d to {100 * r:.0f} % of its value, more than "
            "the scatter explains" for a, b, r in run.falls) + (
            ": check the specimens, their curing and the copying of the results, and retest; the "
            "record is not used to predict")
    return run


def hold_age(target_d: float, last_d: float, limit: float, candidates_d) -> float:
    """The earliest candidate test age after ``last_d`` that brings ``target_d`` within
    ``limit`` times the last tested age (``target_d`` itself when none does)."""
    for a in sorted(candidates_d):
        if a > last_d and a * limit >= target_d:
            return float(min(a, target_d))
    return float(target_d)


def curve_ages(last_d: float, top_d: float) -> np.ndarray:
    """Ages (d) at which curves are recorded for the figures: 0.25 d to ``top_d``."""
    return np.unique(np.concatenate([np.geomspace(0.25, max(top_d, last_d), 90), [28.0]]))
