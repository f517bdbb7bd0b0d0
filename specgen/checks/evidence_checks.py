"""EVD-CURE (mix): the curing regime of each strength set against the binder family of its mix.

A lime-rich mortar hardens by carbonation and must have air after its first days; a
hydraulic binder must be kept damp while its silicates hydrate.  Prisms cured in a regime
that does not suit the binder under- or over-state the mortar's strength, so the strength
checks of the mix rest on a set that says little about the mortar in the wall.  The regimes
and the families each suits are data (``content/data/curing_regimes.yaml``, a source and a
tag on every regime); a verdict resting on a regime recalled from memory is held in an
issued revision (``durability_common.memory_gate``).
"""
from __future__ import annotations

from specgen import refdata
from specgen.checks import durability_common as dc
from specgen.checks import strength_common as sc
from specgen.checks.registry import declare, register
from specgen.checks.result import Basis, CheckResult, Input, Quantity, Step, not_assessed
from specgen.views import family_words

TITLE = "Curing regime of the strength prisms against the binder"
BASIS = (Basis("reference", "en1015_11", "storage of the prisms before test, by kind of mortar"),
         Basis("common practice", note="carbonating binders need air, hydraulic binders need "
               "moisture while they harden"))

declare("prism_curing", "", "curing regimes of a mix's strength prisms: {regime: {specimens, "
        "suits, title}}, with the binder families of the mix")


@register("EVD-CURE", TITLE, "mix", order=305)
def curing_check(mix, ctx):
    """Every stated regime must suit every binder family of the mix; unstated ones say so."""
    rows = sc.rows_of(ctx, mix.id)
    if not rows:
        return []                      # no strength set of this mix: nothing was cured
    families = sorted({ctx.project.binders[b.binder].type for b in mix.binders
                       if b.binder in ctx.project.binders})
    regimes = refdata.load("curing_regimes").data["regimes"]
    stated = sorted({r.curing_regime for r in rows if r.curing_regime})
    unstated = [r.specimen for r in rows if not r.curing_regime]
    if not stated:
        return not_assessed("EVD-CURE", TITLE, mix.id, "mix", BASIS,
                            f"no curing regime is stated for the {len(rows)} prisms of {mix.id} "
                            "(the prism series in samples.yaml, or lab/strength.csv)")
    used = {k: regimes[k] for k in stated}
    wrong = {k: [f for f in families if f not in v["suits"]] for k, v in used.items()}
    wrong = {k: fs for k, fs in wrong.items() if fs}
    status = "fail" if wrong else "attention" if unstated else "pass"
    status, notes = dc.memory_gate(ctx, status, (), [f"the curing regime “{_name(v)}”" for v
                                                     in used.values() if v.get("tag") == "memory"])
    steps = tuple(_step(mix, k, v, families, rows) for k, v in used.items())
    if wrong:
        message = "; ".join(f"{_name(used[k])} does not suit {family_words(*fs)}"
                            for k, fs in wrong.items()) + \
            ": the prisms' strength is not that of the mortar in the wall — recast and cure " \
            "them in a regime for the binder"
    elif unstated:
        message = (f"{len(unstated)} of {len(rows)} prisms state no curing regime "
                   f"(first: {unstated[0]}); the others suit {family_words(*families)}")
    else:
        message = (f"{', '.join(_name(used[k]) for k in stated)} suits "
                   f"{family_words(*families)}")
    value = {k: {"specimens": sum(r.curing_regime == k for r in rows),
                 "suits": list(v["suits"]), "title": v["title"]} for k, v in used.items()}
    return CheckResult(code="EVD-CURE", title=TITLE, subject=mix.id, subject_kind="mix",
                       status=status, value=None, unit="", basis=BASIS, steps=steps,
                       message=message, notes=tuple(notes),
                       quantities=(Quantity("prism_curing", {"families": families,
                                                               "regimes": value}, "",
                                            "curing regimes of the strength prisms"),))


def _step(mix, key: str, regime: dict, families: list[str], rows) -> Step:
    suits = list(regime["suits"])
    ok = all(f in suits for f in families)
    n = sum(r.curing_regime == key for r in rows)
    fam = family_words(*families)
    rel = r"\in" if ok else r"\notin"
    members = dc.tex(family_words(*suits))
    words = dc.tex(fam)
    prisms = f"{n} prism{'' if n == 1 else 's'}"
    return Step(
        f"Regime {key} of {prisms} of {mix.id}", r"f \in S(r)",
        (Input("r", "curing regime", key, "", f"lab/strength.csv or the prism series of "
               f"samples.yaml ({prisms}): {regime['title']}"),
         Input("f", "binder families of the mix", fam, "", "materials.yaml binder type, "
               "through mixes.yaml"),
         Input("S(r)", "binder families the regime suits", family_words(*suits), "",
               refdata.shown(str(regime.get("source", "")), str(regime.get("tag", ""))))),
        rf"\text{{{words}}} {rel} \{{\text{{{members}}}\}}", 1.0 if ok else 0.0, "", "")


def _name(regime: dict) -> str:
    """A regime as a message names it: its title up to the colon (the standard and kind)."""
    return str(regime.get("title", "")).split(":", 1)[0]

