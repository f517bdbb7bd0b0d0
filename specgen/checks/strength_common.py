"""Strength development of one mix and test kind, computed once per run and shared.

Gathers the specimens of a mix, converts lab curing to equivalent age at the reference
temperature (ASTM C1074), aggregates each tested age (EN 1990 Annex D characteristic
value, Grubbs screen), fits the least-squares strength-age models (AICc selection, for
comparison) and the two-stage law with the binder family's prior (``Series.run``, see
``strength_prior_common``), from which every prediction and decision comes.  The checks read
from here, so a number is never computed twice in two ways; the chapter reads Results.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from specgen import refdata
from specgen.checks import fits
from specgen.checks import strength_prior_common as spc
from specgen.science import maturity, strength_models as sm, strength_stats as ss

DAY = sm.DAY
MPA = 1e6
TESTS = ("compressive", "flexural")


@dataclass(frozen=True)
class Group:
    """The results of one tested age: kept specimens, statistics, outlier screen."""

    test: str
    age: float                       # s, nominal age at test
    te: float                        # s, mean equivalent age at Tref
    specimens: tuple                 # StrengthResult rows, all of them
    kept: tuple                      # rows kept after the screen
    flagged: tuple                   # (row, reason) pairs excluded by the screen
    summary: ss.Summary
    characteristic: ss.Characteristic | None
    known: ss.Characteristic | None  # with the project's known CV, when given
    screen: ss.OutlierScreen
    noted: tuple = ()                # (row, reason) flagged by the screen but kept (n too small)


@dataclass
class Series:
    """Everything about one mix and test kind."""

    mix: str
    test: str
    groups: list[Group] = field(default_factory=list)
    implausible: list[str] = field(default_factory=list)
    t_fit: np.ndarray | None = None  # equivalent ages (s) of the kept results
    y_fit: np.ndarray | None = None  # Pa
    selection: sm.Selection | None = None
    fit_error: str = ""
    run: spc.InferenceRun | None = None   # the two-stage law fitted with the family's prior

    @property
    def fit(self) -> sm.FitResult | None:
        return self.selection.best if self.selection else None

    @property
    def last_age(self) -> float:
        return max(g.te for g in self.groups)


@dataclass(frozen=True)
class Settings:
    """Maturity settings in force (SI) and where each came from."""

    method: str
    activation_energy: float        # J/mol: the measured value, or the default's at >= 20 °C
    energy_source: str
    datum: float
    t_ref: float
    warning: str
    energy_slope: float = 0.0       # J/(mol·K) below ``energy_split``: temperature-dependent
    energy_split: float = 293.15    # K
    datum_source: str = ""

    @property
    def energy(self):
        """E for the Arrhenius factor: a number (measured) or a function of T (default)."""
        if self.energy_slope:
            return maturity.fhp_energy(self.activation_energy, self.energy_slope,
                                       self.energy_split)
        return self.activation_energy

    @property
    def energy_text(self) -> str:
        e = f"{self.activation_energy / 1000:g} kJ/mol"
        if not self.energy_slope:
            return e
        return (f"{e} at or above {self.energy_split - 273.15:g} °C, plus "
                f"{self.energy_slope / 1000:g} kJ/mol per kelvin below (temperature-dependent)")


def settings(project) -> Settings:
    """The project's maturity settings, defaults from content/data/maturity_defaults.yaml.

    Without a measured activation energy the default is the temperature-dependent form."""
    d = refdata.load("maturity_defaults").data
    s = project.dossier.strength
    e, ae = s.activation_energy, d["activation_energy"]
    src = "project input (dossier.yaml strength.activation_energy)" if e else (
        "default, temperature-dependent form: " + refdata.shown(ae["source"], ae.get("tag", "")))
    below = ae["below_reference"]
    datum = d["nurse_saul_datum"]
    return Settings(s.maturity_method, e or float(ae["value"]), src,
                    s.datum_temperature or float(datum["value"]),
                    float(d["reference_temperature"]["value"]),
                    "" if e else " ".join(ae["warning"].split()),
                    0.0 if e else float(below["slope"]), float(below["split_temperature"]),
                    "project input (dossier.yaml strength.datum_temperature)"
                    if s.datum_temperature else f"{datum['source']}: {datum['notes']}")


def lab_factor(temp_k: float | None, st: Settings) -> float:
    """Equivalent-age rate of constant lab curing at ``temp_k`` (None: the reference)."""
    if temp_k is None:
        return 1.0
    # every specimen of a project asks for one of a few curing temperatures: one per check run
    return fits.once(("lab_factor", float(temp_k), st), lambda: _lab_factor(float(temp_k), st))


def _lab_factor(temp_k: float, st: Settings) -> float:
    if st.method == "nurse_saul":
        return float(maturity.equivalent_age_nurse_saul(
            [0.0, 1.0], temp_k, datum_k=st.datum, t_ref_k=st.t_ref)[-1])
    return float(maturity.arrhenius_factor(temp_k, st.energy, st.t_ref))


def analyse(project, rules) -> dict[tuple[str, str], Series]:
    """Series of every mix and test kind that has results (key: (mix id, test))."""
    st = settings(project)
    rows: dict[tuple[str, str], list] = {}
    for r in project.strength:
        rows.setdefault((r.mix, r.test), []).append(r)
    plaus = refdata.load("strength_classes").data["plausible_range"]
    out = {key: _series(key, rows[key], st, rules, plaus[key[1]], project)
           for key in sorted(rows)}
    # the fits of every series made together (the inference's solves batched; on two cores
    # when there are many), then each series takes its own (``fits.inference`` and
    # ``fits.selection`` find them kept)
    fams = {key: spc.family(project, project.mixes[key[0]]) for key in out
            if key[0] in project.mixes}
    fits.made_together([spc.fit_record(out[k], fam) for k, fam in fams.items()
                        if not out[k].implausible],
                       [(s.t_fit, s.y_fit) for s in out.values() if not s.implausible])
    for key, s in out.items():
        _fit(s, fams.get(key), rules)
    return out


def cached(ctx) -> dict[tuple[str, str], Series]:
    """:func:`analyse` once per run (kept on the check context)."""
    found = ctx.__dict__.get("_strength")
    if found is None:
        found = ctx.__dict__["_strength"] = analyse(ctx.project, ctx.rules)
    return found


def rows_of(ctx, mix: str) -> list:
    """The strength rows of ``mix`` in file order: the project's rows indexed by mix once per
    run (kept on the check context), not scanned again for every mix."""
    found = ctx.__dict__.get("_rows_by_mix")
    if found is None:
        found = ctx.__dict__["_rows_by_mix"] = {}
        for r in ctx.project.strength:
            found.setdefault(r.mix, []).append(r)
    return found.get(mix, [])


def _series(key, rows, st, rules, plaus, project) -> Series:
    s = Series(*key)
    sigma_cv = project.dossier.strength.known_cv
    by_age: dict[float, list] = {}
    for r in rows:
        by_age.setdefault(r.age, []).append(r)
    s.implausible = [f"{r.specimen} (row {r.row}): {m.split(': ', 1)[1]}" for r in rows
                     for m in ss.check_plausible([r.value], plaus["low_mpa"] * MPA,
                                                 plaus["high_mpa"] * MPA)]
    t_fit, y_fit = [], []
    for age in sorted(by_age):
        g = _group(key[1], age, by_age[age], st, rules, sigma_cv)
        s.groups.append(g)
        t_fit += [r.age * lab_factor(r.curing_temperature, st) for r in g.kept]
        y_fit += [r.value for r in g.kept]
    s.t_fit, s.y_fit = np.array(t_fit), np.array(y_fit)
    return s


def _fit(s: Series, fam, rules) -> None:
    """The series' two fits: the inference with its family's prior (``fam``; None when the
    mix is not in the project) and the model comparison."""
    if fam is not None:
        s.run = spc.infer(s, fam, rules)
    if s.implausible:
        s.fit_error = ("results of implausible magnitude (see the aggregation check): "
                       "correct the unit or the values before fitting")
        return
    try:
        s.selection = fits.selection(s.t_fit, s.y_fit)
        if s.selection.best is None:
            s.fit_error = s.selection.reasoning
    except sm.StrengthFitError as exc:
        s.fit_error = str(exc)


def _group(test, age, rows, st, rules, known_cv) -> Group:
    values = [r.value for r in rows]
    screen = ss.grubbs_screen(values, alpha=rules["strength.grubbs_alpha"].value)
    if len(rows) >= rules["strength.grubbs_min_n"].value:
        kept = tuple(rows[f.index] for f in screen.kept)
        flagged = tuple((rows[f.index], f.reason) for f in screen.flagged)
        noted = ()
    else:   # too few to drop one: the flag is reported and the result kept
        kept, flagged = tuple(rows), ()
        noted = tuple((rows[f.index], f.reason + _bound_note(len(rows), screen.statistic))
                      for f in screen.flagged)
    kv = [r.value for r in kept]
    summ = ss.summarise(kv)
    frac = rules["strength.fractile"].value
    char = ss.characteristic_value(kv, fractile=frac) if summ.n >= 2 else None
    known = (ss.characteristic_value(kv, sigma=known_cv * summ.mean, fractile=frac)
             if known_cv else None)
    te = float(np.mean([r.age * lab_factor(r.curing_temperature, st) for r in kept]))
    return Group(test, age, te, tuple(rows), kept, flagged, summ, char, known, screen, noted)


def _bound_note(n: int, g: float) -> str:
    # For n values G can never exceed (n - 1)/sqrt(n); two equal (rounded) results of three
    # put it exactly there, so at n = 3 a tie alone "fails" the test at alpha = 0.05.
    top = (n - 1) / math.sqrt(n)
    return (f"; G is at its upper bound (n−1)/√n = {top:.4f}: two results are equal, as "
            "rounding makes likely" if g >= top - 1e-6 else "")


def site_history(project, horizon_s: float) -> tuple[np.ndarray, np.ndarray] | None:
    """(times s, temperatures K) of the site record; a constant is laid out daily."""
    site = project.site_temperature
    if site is None:
        return None
    if site.constant is not None:
        t = np.arange(0.0, math.ceil(horizon_s / DAY) + 1.0) * DAY
        return t, np.full(t.size, site.constant)
    pts = np.array(site.points, float)
    return pts[:, 0] - pts[0, 0], pts[:, 1]


def site_equivalent_age(project, st: Settings, method: str, horizon_s: float):
    """(times s, equivalent ages s) in the wall by ``method``, or None without a record."""
    hist = site_history(project, horizon_s)
    if hist is None:
        return None
    t, temp = hist
    # one site record for every mix: its equivalent ages once per check run (read-only arrays)
    return fits.once(("site_te", method, st, tuple(t.tolist()), tuple(temp.tolist())),
                     lambda: _frozen(t, maturity.equivalent_age(
                         t, temp, method=method, activation_energy=st.energy, datum_k=st.datum,
                         t_ref_k=st.t_ref)))


def _frozen(*arrays) -> tuple:
    for a in arrays:
        a.flags.writeable = False
    return arrays
