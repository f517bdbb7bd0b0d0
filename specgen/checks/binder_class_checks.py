"""BIND-CLASS: a binder against the class or designation it is declared to, as a binder (never
a mix).  A building lime (NHL, FL, HL of EN 459-1) is judged on what the project measured of
it — SO3 of its analysis, and its class tests (available lime, free water, strength in the
standard mortar) — each one result, so against the standard's limit values for single
results.  A natural cement declared by a designation of ASTM C10/C10M is named, not judged:
that specification's requirement tables have not been read.
"""
from __future__ import annotations

import re

from specgen import refdata
from specgen.checks.chemistry_common import binder_analysis, source
from specgen.checks.registry import register
from specgen.checks.result import Basis, CheckResult, Input, Step, not_assessed

TITLE = "Binder against its declared class"
LIME = re.compile(r"^\s*(NHL|HL)\s*(2|3[.,]5|5)\s*$", re.IGNORECASE)
FORMULATED = re.compile(r"^\s*FL\s*([ABC])\s*(2|3[.,]5|5)?\s*$", re.IGNORECASE)
LIME_TYPES = {"nhl": "NHL", "fl": "FL", "hl": "HL"}
SOURCE = "EN 459-1, Annex A, Table A.4 (content/data/binder_classes.yaml)"


def _basis(table: dict) -> Basis:
    return Basis("reference", table["ref"], table["clause"])


@register("BIND-CLASS", TITLE, "binder", order=158)
def binder_class_check(binder, ctx):
    """A declared NHL, FL or HL against EN 459-1's single-result limits; a declared natural
    cement named by its ASTM C10/C10M designation."""
    if binder.type == "natural_cement":
        return _natural_cement(binder) if binder.declared_class else []
    if binder.type not in LIME_TYPES:
        return []                      # EN 459-1's lime with hydraulic properties only
    table = refdata.load("binder_classes").data["en459_1"]
    declared = _lime_class(binder)
    if declared is None:
        return not_assessed("BIND-CLASS", TITLE, binder.id, "binder", (_basis(table),),
                            f"binder {binder.id} declares "
                            + (f"'{binder.declared_class}', which is " if binder.declared_class
                               else "")
                            + f"no EN 459-1 class of {LIME_TYPES[binder.type]} such as "
                            f"{_example(binder.type)} (materials.yaml declared_class)")
    family, category, strength = declared
    steps = _lime_steps(binder, ctx, table, family, category, strength)
    name = " ".join(p for p in (family, category, strength) if p)
    if not steps:
        return not_assessed("BIND-CLASS", TITLE, binder.id, "binder", (_basis(table),),
                            f"nothing measured of {binder.id} to judge {name} by: no SO3 in "
                            f"its analysis and no materials.yaml {binder.id}.class_tests")
    bad = [s for s, ok in steps if not ok]
    return CheckResult(
        code="BIND-CLASS", title=TITLE, subject=binder.id, subject_kind="binder",
        status="fail" if bad else "pass", value=None, unit="", basis=(_basis(table),),
        steps=tuple(s for s, _ in steps),
        message=(f"declared {name}: " + ("; ".join(_said(s) for s in bad) + " beyond the "
                 "single-result limit" if bad else ", ".join(_said(s) for s, _ in steps)
                 + " within the single-result limits")),
        notes=("each measured value is one result, judged against the limit values for single "
               "results; the supplier's declared (characteristic) values are not judged from "
               "one sample",
               "setting times, fineness, soundness, air content and water retention are "
               "declared by the supplier to EN 459-2 and not judged here"))


def _example(kind: str) -> str:
    return {"nhl": "'NHL 3.5'", "fl": "'FL B 3.5'", "hl": "'HL 5'"}[kind]


def _lime_class(binder) -> tuple[str, str, str] | None:
    """(family, available-lime category, strength class) of the declaration, or None when
    it names no class of the binder's own family."""
    text = binder.declared_class or ""
    m = LIME.match(text)
    if m and m.group(1).upper() == LIME_TYPES[binder.type]:
        return m.group(1).upper(), "", m.group(2).replace(",", ".")
    m = FORMULATED.match(text)
    if m and binder.type == "fl":
        return "FL", m.group(1).upper(), (m.group(2) or "").replace(",", ".")
    return None


def _lime_steps(binder, ctx, table, family, category, strength) -> list[tuple[Step, bool]]:
    """One step per measured value: (step, within its single-result limit)."""
    req = table["families"][family]
    tests = binder.class_tests
    lab = (tests.laboratory if tests and tests.laboratory else "materials.yaml class_tests")
    out = []
    analysis = binder_analysis(binder, ctx.project)
    if analysis is not None and "SO3" in analysis.mass_percent:
        out.append(_step("SO3", (r"\bar{S}", "", "S̄"), analysis.mass_percent["SO3"], "%", None,
                         req["so3_max"], source(analysis)))
    key = category or strength
    if tests and tests.available_lime is not None and key in req["available_lime_min"]:
        out.append(_step("available lime", (r"\mathrm{AL}", "", "AL"), tests.available_lime, "%",
                         req["available_lime_min"][key], None, lab))
    if tests and tests.free_water is not None:
        out.append(_step("free water", ("w", "f", "wf"), tests.free_water, "%", None,
                         table["free_water_max"], lab))
    limits = table["strength"].get(strength, {})
    for age in ("7d", "28d"):
        value = getattr(tests, f"strength_{age}", None) if tests else None
        if value is not None and (f"min_{age}" in limits or f"max_{age}" in limits):
            out.append(_step(f"{age[:-1]}-d strength", ("f", f"c,{age[:-1]}", f"fc{age[:-1]}"),
                             value / 1e6,
                             "MPa", limits.get(f"min_{age}"), limits.get(f"max_{age}"), lab))
    return out


def _said(step: Step) -> str:
    """'SO3 0.8 %': what a step measured, for the message."""
    first = step.inputs[0]
    return f"{first.name.removesuffix(' measured')} {first.value:g} {first.unit}"


def _tex(base: str, sub: str, bound: str = "") -> str:
    """``base`` with its subscript and bound in one subscript (no double subscripts)."""
    parts = ",".join(p for p in (sub, bound) if p)
    return f"{base}_{{{parts}}}" if parts else base


def _step(what, sym, value, unit, low, high, where) -> tuple[Step, bool]:
    """``value`` against [low, high] (either may be open), as one step of the sheet.
    ``sym`` is (LaTeX base, LaTeX subscript, plain symbol)."""
    base, sub, plain = sym
    ok = (low is None or value >= low) and (high is None or value <= high)
    inputs = [Input(plain, f"{what} measured", value, unit, where)]
    if low is not None:
        inputs.append(Input(f"{plain}min", f"least {what}, single result", low, unit, SOURCE))
    if high is not None:
        inputs.append(Input(f"{plain}max", f"largest {what}, single result", high, unit, SOURCE))
    x, lo_s, hi_s = _tex(base, sub), _tex(base, sub, "min"), _tex(base, sub, "max")
    formula = (f"{lo_s} \\le {x}" if high is None else f"{x} \\le {hi_s}" if low is None
               else f"{lo_s} \\le {x} \\le {hi_s}")
    lo = "" if low is None else (f"{low:g} \\le " if value >= low else f"{low:g} > ")
    hi = "" if high is None else (f" \\le {high:g}" if value <= high else f" > {high:g}")
    return Step(f"{what[0].upper()}{what[1:]} against the single-result limit", formula,
                tuple(inputs), f"{lo}{value:g}{hi}", value, unit, plain), ok


def _natural_cement(binder) -> CheckResult:
    table = refdata.load("binder_classes").data["astm_c10"]
    said = re.sub(r"\(?\s*astm\s*c\s*10(/c\s*10\s*m)?\s*\)?", "", binder.declared_class,
                  flags=re.IGNORECASE)
    said = " ".join(said.replace("-", " ").lower().split())
    names = [d for d in table["designations"] if d.replace("-", " ") == said]
    if not names:
        return not_assessed("BIND-CLASS", TITLE, binder.id, "binder", (_basis(table),),
                            f"binder {binder.id} declares '{binder.declared_class}', which is "
                            "no designation of a natural cement in ASTM C10/C10M (known: "
                            f"{', '.join(table['designations'])})")
    return CheckResult(
        code="BIND-CLASS", title=TITLE, subject=binder.id, subject_kind="binder",
        status="info", value=None, unit="", basis=(_basis(table),), steps=(),
        message=(f"declared as {names[0]} (ASTM C10/C10M); the specification's chemical and "
                 "physical requirements have not been read here, so the declaration is named, "
                 "not judged"),
        notes=("judge the binder by the strength, soundness and setting records of this "
               "dossier, which do not rest on the designation",))
