"""What the check stage derives from the loaded inputs before any check runs.

The loader reads and validates files and computes nothing (its arrows end at the Project
object); the pipeline hands :func:`derive` in to :func:`specgen.project.load_project`, which
calls it once every file is read, so its problems are input problems (file, row, field, fix)
reported in the same round as the loader's, before anything is written:

* sieve analyses of lab/sieves.csv, grouped per sample, become gradings
  (:mod:`specgen.science.grading`);
* sieve analyses on another series than the grading envelope's, without a stated reason;
* analysis totals outside the sanity window (a copying or unit error, not chemistry;
  a modest gap is left to the closure check, which reports it with its calculation).

Each sieve sample must use one kind of value (masses retained or cumulative % passing) on sieves
of one standard series (content/data/sieve_series.yaml: ASTM E11 or EN 933-2 / ISO 565)
without gaps, with passing never rising on a finer sieve; the series it is on is recorded.  A sample given by masses retained is taken as complete: the
total is the sum of its masses (record the pan on the finest sieve's row if it was weighed).
Problems are logged against the file and the rows of the sample.
"""
from __future__ import annotations

import dataclasses

from specgen import practice as pr
from specgen import refdata
from specgen.errors import ProblemLog
from specgen.science import grading
from specgen.science.oxides import ChemistryInputError, closure

ROOT = "dossier.yaml"
ANALYSES = "analyses.yaml"
# An analysis whose total is this far from 100 % is a copying or unit error, not chemistry.
TOTAL_WINDOW = (85.0, 115.0)


def derive(project, located: dict, log: ProblemLog) -> None:
    """Set ``project.gradings`` and log every problem of the derived inputs (see above)."""
    project.gradings = gradings(project.sieves, log)
    sieves_on_envelope_series(project, located, log)
    analysis_totals(project, located, log)


def _line(located: dict, rel: str, path: tuple) -> int | None:
    where = located.get(rel)
    return where.line_of(path) if where else None


def analysis_totals(project, located: dict, log: ProblemLog) -> None:
    """An analysis whose constituents add up far from 100 % (CO2 and H2O inside a reported
    LOI count once, :func:`specgen.science.oxides.closure`)."""
    for i, a in enumerate(project.analyses.values()):
        where = dict(line=_line(located, ANALYSES, ("analyses", i, "mass_percent")),
                     field=f"analyses[{i}].mass_percent")
        try:
            total = closure(a.mass_percent).total
        except ChemistryInputError as exc:
            log.add(ANALYSES, f"analysis '{a.id}': {exc}.", **where,
                    fix="check the value against the laboratory report.")
            continue
        if not TOTAL_WINDOW[0] <= total <= TOTAL_WINDOW[1]:
            log.add(ANALYSES, f"constituents of analysis '{a.id}' add up to {total:.1f} %; "
                    f"expected close to 100 % (accepted {TOTAL_WINDOW[0]:g}–{TOTAL_WINDOW[1]:g} %).",
                    **where,
                    fix="check for a mistyped value, a missing LOI, or values not in mass %.")


def sieves_on_envelope_series(project, located: dict, log: ProblemLog) -> None:
    """Sieve analyses on another series than the envelope's, without a stated reason (the
    envelope is then read by interpolation, stated on the sheet)."""
    d = project.dossier
    p = pr.resolve(d)
    if p.mixing_reason:
        return
    env = refdata.load("grading_envelopes").data[p.grading_envelope]
    env_key = ("compatibility", "grading_envelope") if d.compatibility.grading_envelope \
        else ("practice", "follows")
    series = env.get("series", "")
    rows: dict[str, int] = {}
    for r in project.sieves:
        rows.setdefault(r.sample, r.row)
    off = {s: g.series for s, g in project.gradings.items() if g.series and g.series != series}
    if not off or not series:
        return
    names = ", ".join(f"'{s}' (row {rows.get(s, '?')})" for s in sorted(off))
    other = next(iter(off.values()))
    log.add(ROOT, f"the grading envelope '{p.grading_envelope}' is written on the "
            f"{pr.series_title(series).split(' (')[0]}, but lab/sieves.csv gives "
            f"{names} on the {pr.series_title(other).split(' (')[0]}.",
            line=_line(located, ROOT, env_key), field=".".join(env_key),
            fix="give the sieve analyses on the envelope's series, choose an envelope written "
            "on the series the laboratory used, or say why the project mixes the two in "
            "practice.mixing_reason (the envelope is then read by interpolation, stated on "
            "the sheet).")


def series_of(sizes) -> str | None:
    """The key of the one series every aperture of ``sizes`` belongs to, or None."""
    for key, s in refdata.load("sieve_series").data["series"].items():
        if all(grading.match_sieve(x, s["apertures"]) is not None for x in sizes):
            return key
    return None


def _series_problem(sizes) -> str:
    table = refdata.load("sieve_series").data["series"]
    off = [x for x in sizes if not any(grading.match_sieve(x, s["apertures"]) is not None
                                        for s in table.values())]
    if off:
        return (f"sieve {off[0] * 1000:g} mm is on none of the standard series ("
                + "; ".join(f"{s['title'].split(' (')[0]}: "
                            + ", ".join(f"{a * 1000:g}" for a in sorted(s["apertures"])) + " mm"
                            for s in table.values()) + ")")
    first = {k: [x for x in sizes if grading.match_sieve(x, s["apertures"]) is not None]
             for k, s in table.items()}
    return "its sieves come from two series: " + "; ".join(
        ", ".join(f"{x * 1000:g}" for x in xs) + f" mm on {table[k]['title'].split(' (')[0]}"
        for k, xs in first.items() if xs)


def gradings(rows, log: ProblemLog) -> dict[str, grading.Grading]:
    """Sample id → :class:`~specgen.science.grading.Grading`; problems logged, samples left out."""
    by_sample: dict[str, list] = {}
    for r in rows:
        by_sample.setdefault(r.sample, []).append(r)
    out = {}
    for sample, rs in by_sample.items():
        where = ", ".join(str(r.row) for r in rs[:8]) + (" …" if len(rs) > 8 else "")
        kinds = {("passing" if r.passing is not None else "retained") for r in rs}
        if any(r.passing is None and r.retained is None for r in rs):
            log.add(rs[0].file, f"sample '{sample}' has a row with neither a mass retained nor "
                    "a passing value.", row=rs[0].row, field="retained/passing",
                    fix="fill in one of the two on every row.")
            continue
        if len(kinds) > 1:
            log.add(rs[0].file, f"sample '{sample}' mixes masses retained and % passing "
                    f"(rows {where}).", row=rs[0].row, field="retained/passing",
                    fix="give one kind of value for all sieves of a sample.")
            continue
        sizes = [r.sieve for r in rs]
        key = series_of(sizes)
        try:
            if key is None:
                raise grading.GradingInputError(_series_problem(sizes))
            series = refdata.load("sieve_series").data["series"][key]["apertures"]
            if kinds == {"passing"}:
                g = grading.from_passing(sizes, [r.passing for r in rs], series)
            else:
                g = grading.from_retained(sizes, [r.retained for r in rs], series)
            out[sample] = dataclasses.replace(g, series=key)
        except grading.GradingInputError as exc:
            log.add(rs[0].file, f"sample '{sample}' (rows {where}): {exc}.", row=rs[0].row,
                    field="sieve", fix=_fix(str(exc)))
    return out


def _fix(message: str) -> str:
    if "gaps" in message:
        return "add the missing sieves (every sieve of the series between the coarsest and finest used)."
    if "standard series" in message:
        return ("give apertures of one standard series: ASTM E11 (e.g. 0.600 mm for No. 30) or "
                "EN 933-2 / ISO 565 (e.g. 0.5 mm).")
    if "two series" in message:
        return "sieve each sample on one series, or split the rows into two samples."
    if "monotone" in message:
        return "cumulative passing must fall (or stay equal) from each sieve to the next finer one: check the values as copied from the report."
    return "check the sieve analysis against the laboratory report."
