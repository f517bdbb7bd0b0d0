"""BIND-CLASS: a building lime against the requirements of the EN 459-1 class it is declared
to, as a binder (never a mix): SO3 of its analysis against the class's limit, and the class's
28-d strength range in the standard mortar (EN 196-1) shown beside it.  Available lime and the
physical requirements are the supplier's declaration; the sheet names what was not checked.
"""
from __future__ import annotations

import re

from specgen import refdata
from specgen.checks.chemistry_common import binder_analysis, source
from specgen.checks.registry import register
from specgen.checks.result import Basis, CheckResult, Input, Limit, Step, not_assessed

TITLE = "Building lime against its declared EN 459-1 class"
EN459 = Basis("reference", "en459", "chemical requirements and strength classes of building "
              "limes (NHL, HL)")
CLASS = re.compile(r"^\s*(NHL|HL)\s*(2|3\.5|5)\s*$", re.IGNORECASE)


@register("BIND-CLASS", TITLE, "binder", order=158)
def binder_class_check(binder, ctx):
    """SO3 of a declared NHL or HL against its class; the class's strength range shown."""
    if binder.type not in ("nhl", "hl"):
        return []                      # the EN 459-1 NHL/HL classes apply to these only
    m = CLASS.match(binder.declared_class or "")
    if m is None:
        return not_assessed("BIND-CLASS", TITLE, binder.id, "binder", (EN459,),
                            f"binder {binder.id} declares no EN 459-1 class such as 'NHL 3.5' "
                            "(materials.yaml declared_class)")
    family, cls = m.group(1).upper(), m.group(2)
    req = refdata.load("binder_classes").data["en459_1"]["families"][family]
    strength = refdata.load("strength_classes").data["en459_1"]
    row = next(c for c in strength["classes"] if c["name"] == f"NHL {cls}")
    analysis = binder_analysis(binder, ctx.project)
    rng = (f"{family} {cls}: 28-d strength of the binder in the standard mortar (EN 196-1) "
           f"{row['lower_mpa']:g}–{row['upper_mpa']:g} MPa; available lime at least "
           f"{req['available_lime_min'][cls]:g} % (supplier's declaration, not measured here)")
    if analysis is None or "SO3" not in analysis.mass_percent:
        return not_assessed("BIND-CLASS", TITLE, binder.id, "binder", (EN459,),
                            f"no analysis of binder {binder.id} with SO3; {rng}")
    so3 = analysis.mass_percent["SO3"]
    ok = so3 <= req["so3_max"]
    rel = r"\le" if ok else ">"
    step = Step(f"SO3 of {binder.id} against {family} {cls}", r"\bar{S} \le \bar{S}_{max}",
                (Input("S̄", "SO3 of the binder", so3, "%", source(analysis)),
                 Input("S̄max", f"largest SO3 of {family}", req["so3_max"], "%",
                       "content/data/binder_classes.yaml")),
                rf"\bar{{S}} = {so3:g} {rel} {req['so3_max']:g}", so3, "%", "S̄")
    return CheckResult(
        code="BIND-CLASS", title=TITLE, subject=binder.id, subject_kind="binder",
        status="pass" if ok else "fail", value=so3, unit="%", basis=(EN459,), steps=(step,),
        limit=Limit("<=", high=req["so3_max"], unit="%", text=f"SO3 ≤ {req['so3_max']:g} %"),
        message=(f"declared {family} {cls}: SO3 {so3:g} % "
                 f"{'within' if ok else 'above'} the {req['so3_max']:g} % of the class"),
        notes=(rng, "fineness, setting times, soundness and free water are declared by the "
               "supplier to EN 459-2 and not recomputed here"))
