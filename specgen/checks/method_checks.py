"""MTH-RAKE (zone): the depth a repointing zone's joints are raked out to, by the stated rule.

The method statement's preparation clause quotes this depth: ``d = max(r · j, d_min)``, the
joint width ``j`` times the ratio of practice (``works.joint_depth_ratio``, the same rule the
quantities use), never shallower than ``method.rake_out_min``.  A depth the project gives is
compared with the rule and with the deepest sensible rake-out (``method.rake_out_max_ratio``).
A joint finer than ``d_min / r_max`` (5 mm with the rules of practice) cannot meet both rules:
the check holds it, and the method statement names no depth for it, until a trial bay decides.
"""
from __future__ import annotations

from specgen.checks.registry import declare, register
from specgen.checks.result import Basis, CheckResult, Input, Limit, Quantity, Step
from specgen.science import works as wk

TITLE = "Rake-out depth of the joints"
BASIS = (Basis("common practice", note="joints are raked out to about twice their width, to "
               "sound mortar, and never less than about 15 mm"),)
MM = 1e-3

declare("rake_out_depth", "mm", "depth the joints of a repointing zone are raked out to: "
        "{depth, rule, given, deepest} in mm (given: the project's depth or null)")


@register("MTH-RAKE", TITLE, "zone", order=640)
def rake_out_check(zone, ctx):
    """The rule's depth from the joint width; the project's depth (if given) against it."""
    if zone.works != "repointing" or zone.joint_width is None:
        return []                    # only repointing rakes joints out to a depth
    rules = ctx.rules
    ratio, dmin, rmax = (rules["works.joint_depth_ratio"], rules["method.rake_out_min"],
                         rules["method.rake_out_max_ratio"])
    w = zone.joint_width
    rule = wk.rake_out_depth(w, ratio.value, dmin.si("length"))
    deepest = rmax.value * w
    given = zone.joint_depth
    inputs = (Input("j", "joint width", round(w / MM, 3), "mm", f"dossier.yaml {zone.id}.joint_width"),
              Input("r", "depth as a multiple of the width", ratio.value, "", ratio.source()),
              Input("d_min", "shallowest rake-out", dmin.value, "mm", dmin.source()))
    steps = [Step("Rake-out depth by the rule", r"d = \max(r \cdot j,\ d_{\min})", inputs,
                  rf"d = \max({ratio.value:g} \cdot {w / MM:g},\ {dmin.value:g})",
                  round(rule / MM, 3), "mm", "d")]
    status, message = "pass", f"rake out to {rule / MM:g} mm (the rule)"
    limit = None
    if rule > deepest + 1e-9:        # j < d_min / r_max: the two rules cannot both hold
        steps.append(Step("The rule's depth against the deepest rake-out",
                          r"d \le r_{\max} \cdot j",
                          (Input("r_max", "deepest rake-out as a multiple of the width",
                                 rmax.value, "", rmax.source()),),
                          rf"{rule / MM:g} > {rmax.value:g} \cdot {w / MM:g} = {deepest / MM:g}",
                          round(deepest / MM, 3), "mm", "d_max"))
        return _rake_result(zone, "hold", given if given is not None else rule, rule, given,
                            deepest, steps, None, _too_fine(w, rule, deepest, given))
    if given is not None:
        ok = rule - 1e-9 <= given <= deepest + 1e-9
        lo_rel = r"\le" if given >= rule else ">"
        hi_rel = r"\le" if given <= deepest else ">"
        status = "pass" if ok else "attention"
        steps.append(Step("The project's depth against the rule",
                          r"d \le d_{given} \le r_{\max} \cdot j",
                          (Input("d_given", "depth given for the zone", round(given / MM, 3), "mm",
                                 f"dossier.yaml {zone.id}.joint_depth"),
                           Input("r_max", "deepest rake-out as a multiple of the width",
                                 rmax.value, "", rmax.source())),
                          rf"{rule / MM:g} {lo_rel} {given / MM:g} {hi_rel} {deepest / MM:g}",
                          round(given / MM, 3), "mm", "d_given"))
        limit = Limit("within", low=round(rule / MM, 3), high=round(deepest / MM, 3), unit="mm",
                      text=f"{rule / MM:g}–{deepest / MM:g} mm")
        message = (f"rake out to {given / MM:g} mm as given: within the rule's "
                   f"{rule / MM:g}–{deepest / MM:g} mm" if ok else
                   f"the depth given, {given / MM:g} mm, is "
                   + ("shallower than the rule's " f"{rule / MM:g} mm: the repair may not key"
                      if given < rule else f"deeper than {deepest / MM:g} mm: it takes more "
                      "original mortar than the repair needs")
                   + "; confirm it on the trial bay or change it")
    return _rake_result(zone, status, given if given is not None else rule, rule, given,
                        deepest, steps, limit, message)


def _too_fine(width: float, rule: float, deepest: float, given) -> str:
    """Why a joint this fine is held: the least depth of practice is deeper than the deepest
    rake-out its width allows, so no depth meets both rules; what decides is a trial bay."""
    said = f"; the depth given, {given / MM:g} mm, cannot settle it" if given is not None else ""
    return (f"joints {width / MM:g} mm wide are too fine for both rules of practice: the least "
            f"depth, {rule / MM:g} mm, is deeper than the deepest the width allows, "
            f"{deepest / MM:g} mm{said}; agree on a trial bay, with the heritage authority, "
            "whether these joints are raked out at all and to what depth")


def _rake_result(zone, status, depth, rule, given, deepest, steps, limit, message):
    q = Quantity("rake_out_depth", {"depth": round(depth / MM, 3), "rule": round(rule / MM, 3),
                                    "given": round(given / MM, 3) if given else None,
                                    "deepest": round(deepest / MM, 3)}, "mm",
                 "rake-out depth of the joints")
    return CheckResult(code="MTH-RAKE", title=TITLE, subject=zone.id, subject_kind="zone",
                       status=status, value=round(depth / MM, 3), unit="mm", basis=BASIS,
                       steps=tuple(steps), limit=limit, message=message, quantities=(q,))


BAY_TITLE = "Bay size of a day's work"
BAY_BASIS = (Basis("common practice", note="work by area is done in bays that one crew "
                   "finishes in a day, so no bay is left raked out, part-pointed or with an "
                   "open render coat overnight"),)
declare("bay_area", "m²", "face area of a bay, the work of one crew for a day, in a zone worked "
        "by area: {area, per_m2_l, per_day_l, zone_area} (m², L/m², L, m²)")


@register("MTH-BAY", BAY_TITLE, "zone", order=641)
def bay_check(zone, ctx):
    """Bay area ``min(q · T · A / V, A)`` of a repointing or render zone, from the mortar a
    crew places in a day and the mortar a square metre of the face takes."""
    from specgen.checks.works_common import rule_si
    vol = ctx.quantity(zone.id, "mortar_volume_net")
    if zone.works not in ("repointing", "render") or vol is None or not zone.area:
        return []                    # bedding goes block by block; no quantities, no bay
    default = rule_si(ctx.rules, "placing_rate", "volume_rate")
    rate = ((zone.placing_rate, f"dossier.yaml {zone.id}.placing_rate") if zone.placing_rate
            else (default.value, default.source))
    day = rule_si(ctx.rules, "working_day", "time")
    bay = wk.bay_area(rate[0], day.value, vol.value, zone.area)
    per_m2 = vol.value / zone.area * 1e3          # L of mortar per m² of face
    per_day = rate[0] * day.value * 1e3            # L placed in a day
    inputs = (Input("q", "placing rate", round(rate[0] * 3.6e6, 4), "L/h", rate[1]),
              Input("T", "placing hours per day", day.value / 3600, "h", day.source),
              Input("V", "mortar volume before wastage", vol.value, "m³",
                    f"WORKS-QTY/{zone.id}"),
              Input("A", "face area of the zone", zone.area, "m²", f"dossier.yaml {zone.id}.area"))
    step = Step("Face area one crew fills in a day", r"A_{bay} = \min(q\,T\,A / V,\ A)", inputs,
                rf"A_{{bay}} = \min({per_day:.4g}\ \mathrm{{L}} \times {zone.area:g} / "
                rf"{vol.value * 1e3:.4g}\ \mathrm{{L}},\ {zone.area:g}) = {bay:.3g}",
                round(bay, 2), "m²", "A_bay")
    q = Quantity("bay_area", {"area": round(bay, 2), "per_m2_l": round(per_m2, 3),
                              "per_day_l": round(per_day, 3), "zone_area": zone.area}, "m²",
                 "bay area of a day's work")
    return CheckResult(code="MTH-BAY", title=BAY_TITLE, subject=zone.id, subject_kind="zone",
                       status="info", value=round(bay, 2), unit="m²", basis=BAY_BASIS,
                       steps=(step,), message=f"bays of about {bay:.3g} m² a crew-day "
                       f"({per_day:.3g} L a day at {per_m2:.3g} L per m² of face)",
                       quantities=(q,))
