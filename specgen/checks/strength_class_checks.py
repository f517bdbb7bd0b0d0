"""STR-CLASS: the descriptive mortar class of the 28-d mean by the practice's classification
(EN 998-2 M-classes or ASTM C270 types).  EN 459-1 classes belong to the *binder* (tested in
the standard mortar of EN 196-1), so a mix is never placed in them.
"""
from __future__ import annotations

from specgen import refdata
from specgen.checks.registry import declare, register
from specgen.checks.result import Basis, CheckResult, Input, Quantity, Step
from specgen.checks.strength_acceptance_checks import DAY, MPA, _comp, _group_at
from specgen.checks.strength_checks import not_assessed
from specgen.science import strength_classes as scl

C270 = Basis("reference", "astmc270", "property specification, minimum 28-d compressive strength")
EN998 = Basis("reference", "en998_2", "compressive strength classes M1 … M20 on the mean at 28 d "
              "(tested to EN 1015-11)", read_in="ziegel_moertel")
# standard, its word for one class and for several, basis
MORTAR_CLASSES = {"astm_c270": ("ASTM C270", "type", "types", C270),
                  "en998_2": ("EN 998-2", "class", "classes", EN998)}
declare("strength_classes", "", "mortar class met by the 28-d mean by the practice's "
        "classification (EN 998-2 or ASTM C270), descriptive: {standard, table, classes}")


@register("STR-CLASS", "Strength class (descriptive)", "mix", order=450)
def class_check(mix, ctx):
    """The 28-d mean compressive strength placed in the mortar classes of the practice."""
    from specgen import practice
    s, title = _comp(ctx, mix.id), "Strength class (descriptive)"
    key = practice.resolve(ctx.project.dossier).mortar_classes
    standard, word, words, basis = MORTAR_CLASSES[key]
    g28 = _group_at(s, 28 * DAY)
    if g28 is None:
        return not_assessed("STR-CLASS", title, mix.id, "no compressive results at 28 d, the "
                            "age at which the classes are defined", (basis,))
    table = refdata.load("strength_classes").data[key]
    m = g28.summary.mean
    cmp = scl.strongest_minimum(m, scl.classes_from_table(table), standard=standard,
                                source=table["source"])
    met = (f"{standard} {word} {', '.join(cmp.matches)}" if cmp.matches
           else f"below the lowest {standard} {word}")
    text = (f"28-d mean {m / MPA:.3g} MPa: {met} (descriptive: the mean of "
            "the laboratory prisms, not a declared or characteristic value)")
    step = Step(f"28-d mean against the {standard} {words}", r"\bar{f}_{28} \ge f_{min}",
                (Input("f̄28", "28-d mean compressive strength", round(m / MPA, 4), "MPa",
                       "STR-AGG"),),
                r"\bar{f}_{28} = " + f"{m / MPA:.3f}", round(m / MPA, 4), "MPa", "f̄28")
    return CheckResult(
        code="STR-CLASS", title=title, subject=mix.id, subject_kind="mix", status="info",
        value=round(m / MPA, 4), unit="MPa", basis=(basis,), steps=(step,), message=text,
        notes=tuple(cmp.lines) + (f"{standard} table: "
                                  + refdata.shown(cmp.source, table.get("tag", "")),
                                  _binder_class_note(mix, ctx.project)),
        quantities=(Quantity("strength_classes", {"standard": standard, "table": key,
                                                  "classes": list(cmp.matches)}, "",
                             "mortar class met (descriptive)"),))


def _binder_class_note(mix, project) -> str:
    """EN 459-1 classes are the binder's: say which the binders declare, never infer one."""
    declared = []
    for part in mix.binders:
        b = project.binders.get(part.binder)
        if b is not None:
            declared.append(f"{b.id} {b.declared_class or 'no class declared'}")
    return ("EN 459-1 strength classes (NHL 2, 3.5, 5 …) belong to the binder, tested in the "
            "standard mortar of EN 196-1 (EN 459-2), not to this mix; declared: "
            + ("; ".join(declared) or "—"))
