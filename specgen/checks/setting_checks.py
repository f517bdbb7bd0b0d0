"""SITE-SET (mix): initial and final setting time against the binder family, and what they
mean for the gaugings.

The measured initial set caps the workable life the gaugings are sized to
(``works_common.workable_life``); the setting test must be made at the retarder dose the
batching card gives, else the card's times are not the tested ones.  Limits: EN 459-1 for
building limes with hydraulic properties, EN 197-1 for portland cement (both recalled, so
held in an issued revision until confirmed); natural cement has no current standard — its
set of minutes is shown against the gaugings, not judged.  No setting time: *hold*.
"""
from __future__ import annotations

from specgen.checks import durability_common as dc
from specgen.checks import works_common as wc
from specgen.checks.registry import register
from specgen.checks.result import Basis, CheckResult, Input, Step
from specgen.views import family_words

TITLE = "Setting time and workable life"
METHOD = {"vicat_en196_3": "Vicat, EN 196-3", "vicat_en459_2": "Vicat, EN 459-2",
          "vicat_astm_c191": "Vicat, ASTM C191", "gillmore_astm_c266": "Gillmore, ASTM C266"}
LIMES = {"nhl", "hl", "fl"}
BASIS = Basis("reference", "en196_3", "setting times (Vicat)")


def _result(mix, status, value, msg, steps=(), notes=(), q=(), basis=(BASIS,)) -> CheckResult:
    return CheckResult(code="SITE-SET", title=TITLE, subject=mix.id, subject_kind="mix",
                       status=status, value=value, unit="min" if value is not None else "",
                       basis=tuple(basis), steps=tuple(steps), message=msg, notes=tuple(notes),
                       quantities=tuple(q))


@register("SITE-SET", TITLE, "mix", order=615, matrix="durability", column="setting")
def setting_check(mix, ctx) -> CheckResult:
    """Setting times against the family's limits, the retarder dose and the workable life."""
    fams = {f for _, f in dc.binder_types(mix, ctx.project)}
    if fams <= {"air_lime"}:
        return _result(mix, "info", None, "air lime hardens by carbonation: a setting time does "
                       "not apply; the mortar stays workable while kept from drying")
    s = mix.setting
    if s is None:
        test = dc.asked("initial and final setting time", "Vicat (EN 196-3; EN 459-2 for "
                        "building limes) on the paste at the retarder dose of the card",
                        f"sizes the gaugings of {mix.id}", "SITE-SET")
        return _result(mix, "hold", None, "no setting time: commission " + test["method"] +
                       "; until then the gaugings rest on the workable life alone",
                       q=dc.tests_quantity(ctx, mix.id, [test]))
    src = f"mixes.yaml {mix.id}.setting ({METHOD[s.method]}; {s.source or 'laboratory not named'})"
    inputs = [Input("t_i", "initial set", round(s.initial / 60, 2), "min", src),
              Input("t_f", "final set", round(s.final / 60, 2), "min", src)]
    words, verdicts, used = [f"initial {s.initial / 60:g} min, final {s.final / 60:g} min "
                             f"({METHOD[s.method]})"], [], []
    for fam in sorted(fams & (LIMES | {"portland"})):
        v, w, r = _family_limits(fam, s, ctx)
        verdicts += v
        words += w
        used += r
        inputs += [dc.rule_input(ctx, SYMBOL[x.key.split(".")[1]], x.key.split(".")[1])
                   for x in r]
    if fams & {"natural_cement"}:
        words.append("natural cement: no current standard limit; the set governs the gaugings")
    verdicts += _retarder(mix, s, words)
    life, measured = wc.workable_life(ctx.project, mix, ctx.rules)
    if mix.workable_life is not None and mix.workable_life > s.initial:
        verdicts.append("attention")
        words.append(f"measured workable life {mix.workable_life / 60:g} min is longer than the "
                     f"initial set: the gaugings use {s.initial / 60:g} min; check the two tests")
    inputs.append(Input("t_w,0", "workable life measured (EN 1015-9), else the binder default",
                        round(_life0(mix, ctx) / 60, 2), "min",
                        f"mixes.yaml {mix.id}.workable_life" if measured
                        else "default workable life of the binder family (common practice)"))
    inputs.append(Input("t_w", "workable life used for the gaugings", round(life.value / 60, 2),
                        "min", life.source))
    step = Step("Setting times and the workable life the gaugings use",
                r"t_i < t_f,\quad t_w = \min(t_{w,0},\ t_i)",
                tuple(inputs), rf"t_i = {s.initial / 60:g},\ t_f = {s.final / 60:g},\ "
                rf"t_w = {life.value / 60:g}\ \mathrm{{min}}", round(life.value / 60, 2), "min",
                "t_w")
    status = "fail" if "fail" in verdicts else ("attention" if "attention" in verdicts else "pass")
    status, notes = dc.memory_gate(ctx, status, used)
    if not measured:
        notes.append("the workable life is not measured (EN 1015-9): the gaugings rest on "
                     f"{life.source}")
    return _result(mix, status, round(s.initial / 60, 2), "; ".join(words), [step], notes,
                   basis=[BASIS] + [r.basis for r in used])


#: the symbol each setting-time limit has on the sheet
SYMBOL = {"setting_initial_min_lime": "t_i,min", "setting_final_max_lime": "t_f,max",
          "setting_initial_min_portland": "t_i,min"}


def _life0(mix, ctx) -> float:
    """The workable life before the initial set caps it (s)."""
    if mix.workable_life is not None:
        return mix.workable_life
    return min(wc.rule_si(ctx.rules, f"workable_life_{f}", "time").value
               for _, f in dc.binder_types(mix, ctx.project))


def _family_limits(fam, s, ctx):
    if fam == "portland":
        r = dc.rule(ctx, "setting_initial_min_portland")
        ok = s.initial / 60 >= r.value
        words = f"{family_words(fam)}: initial set {'≥' if ok else '<'} {r.value:g} min"
        return ["pass" if ok else "fail"], [words], [r]
    lo, hi = dc.rule(ctx, "setting_initial_min_lime"), dc.rule(ctx, "setting_final_max_lime")
    ok_lo, ok_hi = s.initial / 60 >= lo.value, s.final / 3600 <= hi.value
    return (["pass" if ok_lo and ok_hi else "fail"],
            [f"{family_words(fam)}: initial {'≥' if ok_lo else '<'} {lo.value:g} min, final "
             f"{'≤' if ok_hi else '>'} {hi.value:g} h"], [lo, hi])


def _retarder(mix, s, words) -> list[str]:
    """The test's retarder dose must be the card's (dose of the admixtures whose purpose or
    name says retarder)."""
    card = sum(a.dose for a in mix.admixtures if "retard" in (a.purpose + a.name).lower())
    tested = s.retarder_dose or 0.0
    if abs(card - tested) > 1e-9:
        words.append(f"tested at {100 * tested:g} % retarder but the card doses "
                     f"{100 * card:g} %: repeat the test at the card's dose")
        return ["attention"]
    if card:
        words.append(f"tested at the card's retarder dose ({100 * card:g} %)")
    return []
