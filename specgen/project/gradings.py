"""Sieve analyses of lab/sieves.csv, grouped per sample and checked before any check runs.

Each sample must use one kind of value (masses retained or cumulative % passing) on sieves
of the standard series (content/data/sieve_series.yaml) without gaps, with passing never
rising on a finer sieve.  A sample given by masses retained is taken as complete: the
total is the sum of its masses (record the pan on the finest sieve's row if it was weighed).
Problems are logged against the file and the rows of the sample.
"""
from __future__ import annotations

from specgen import refdata
from specgen.errors import ProblemLog
from specgen.science import grading


def gradings(rows, log: ProblemLog) -> dict[str, grading.Grading]:
    """Sample id → :class:`~specgen.science.grading.Grading`; problems logged, samples left out."""
    series = refdata.load("sieve_series").data["standard"]
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
        try:
            if kinds == {"passing"}:
                out[sample] = grading.from_passing(sizes, [r.passing for r in rs], series)
            else:
                out[sample] = grading.from_retained(sizes, [r.retained for r in rs], series)
        except grading.GradingInputError as exc:
            log.add(rs[0].file, f"sample '{sample}' (rows {where}): {exc}.", row=rs[0].row,
                    field="sieve", fix=_fix(str(exc)))
    return out


def _fix(message: str) -> str:
    if "gaps" in message:
        return "add the missing sieves (every sieve of the series between the coarsest and finest used)."
    if "standard series" in message:
        return "use the apertures of the standard series (ASTM E11 / C125), e.g. 0.600 mm for No. 30."
    if "monotone" in message:
        return "cumulative passing must fall (or stay equal) from each sieve to the next finer one: check the transcription."
    return "check the sieve analysis against the laboratory report."
