"""Shared pieces of the binder-chemistry checks: prepared analyses, links, guarded checks.

Not a check module itself (its name does not end in ``_checks``): the check
modules import it.  The science raises :class:`ChemistryInputError` for input it
cannot use; :func:`guarded` turns that into a ``not_assessed`` result with the
reason, so bad input never stops the run and never reaches a result as NaN.
"""
from __future__ import annotations

import functools
import math
from dataclasses import dataclass

from specgen.checks.result import Basis, Input, not_assessed
from specgen.science.oxides import ChemistryInputError, split_lumped
from specgen.views import binder_analysis, raw_analyses  # noqa: F401  (the checks read them here)

TAYLOR = Basis("reference", "taylor1997", "lime saturation factor, silica and alumina ratios")
VICAT = Basis("common practice", note="hydraulic index in Vicat's form (S + A + F)/(C + M), "
              "recalled; other schemes exist, so the scheme is named with the value")
ASTM_C150 = Basis("reference", "astmc150", "Annex A1, potential phase composition")
BENTZ = Basis("reference", "bentz1997", "phase densities for chemical shrinkage")
ATOMIC = "content/data/atomic_weights.yaml (IUPAC/CIAAW standard atomic weights)"


def source(analysis) -> str:
    """Where an analysis value comes from (for the inputs table of a sheet)."""
    return f"analysis {analysis.id}" + (f" ({analysis.laboratory})" if analysis.laboratory else "")


@dataclass(frozen=True)
class Prepared:
    """An analysis ready for the formulas: lumped oxides split, assumptions in words."""

    ox: dict[str, float]
    assumptions: tuple[str, ...]


def prepared(analysis) -> Prepared:
    """The analysis with lumped keys split by its declared ``lumped_split``.

    A lumped key without a split raises :class:`ChemistryInputError` naming the file
    and field to add, so the check reports *not assessed* with the fix.
    """
    ox = dict(analysis.mass_percent)
    lumped = [k for k in ox if "+" in k]
    missing = [k for k in lumped if k not in analysis.lumped_split]
    if missing:
        parts = ", ".join(f"{p}: …" for p in missing[0].split("+"))
        raise ChemistryInputError(
            f"'{missing[0]}' is reported lumped and no split is declared; add to analysis "
            f"'{analysis.id}' in analyses.yaml: lumped_split: {{'{missing[0]}': {{{parts}}}}}")
    if not lumped:
        return Prepared(ox, ())
    split = split_lumped(ox, analysis.lumped_split)
    return Prepared(split.analysis, split.assumptions)


def guarded(code: str, title: str, kind: str, basis: tuple):
    """Decorator: a :class:`ChemistryInputError` becomes a *not assessed* result."""
    def deco(fn):
        @functools.wraps(fn)
        def wrapper(subject, ctx):
            try:
                return fn(subject, ctx)
            except ChemistryInputError as exc:
                return not_assessed(code, title, subject.id, kind, basis, str(exc))
        return wrapper
    return deco


def finite(value: float, what: str) -> float:
    """Refuse NaN/inf before a value reaches a result."""
    if not math.isfinite(value):
        raise ChemistryInputError(f"{what} came out non-finite; check the analysis")
    return value


def oxide_inputs(analysis, ox: dict, names) -> tuple[Input, ...]:
    """Inputs table rows for the named oxides (absent ones shown as 0, 'not reported')."""
    return tuple(Input(sym, name, ox.get(name, 0.0), "%",
                       source(analysis) if name in ox else "not reported: taken as 0")
                 for sym, name in names)


# --- links between analyses and binders ------------------------------------------------

def binder_of(analysis, project):
    """The binder an analysis belongs to (``material:``), or None."""
    return project.binders.get(analysis.material) if analysis.material else None


def is_clinker(binder) -> bool:
    """Sintered clinker present: Portland binders or a declared ``contains_clinker``."""
    return binder is not None and (binder.type == "portland" or binder.contains_clinker)


def table(name: str):
    """A reference table of content/data (loaded once)."""
    from specgen import refdata
    return refdata.load(name)


def atomic_weights() -> dict:
    return table("atomic_weights").data
