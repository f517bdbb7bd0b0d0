"""Sieve analyses of lab/sieves.csv, grouped per sample and checked before any check runs.

Each sample must use one kind of value (masses retained or cumulative % passing) on sieves
of one standard series (content/data/sieve_series.yaml: ASTM E11 or EN 933-2 / ISO 565)
without gaps, with passing never rising on a finer sieve; the series it is on is recorded.  A sample given by masses retained is taken as complete: the
total is the sum of its masses (record the pan on the finest sieve's row if it was weighed).
Problems are logged against the file and the rows of the sample.
"""
from __future__ import annotations

import dataclasses

from specgen import refdata
from specgen.errors import ProblemLog
from specgen.science import grading


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
        return "cumulative passing must fall (or stay equal) from each sieve to the next finer one: check the transcription."
    return "check the sieve analysis against the laboratory report."
