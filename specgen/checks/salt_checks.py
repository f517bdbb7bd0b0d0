"""Soluble salts of the fabric and the sulfate expansion risk of each candidate binder.

COMP-SALT classifies the chloride, nitrate and sulfate contents (mass %) of the units and the
historic mortar of a zone with the published salt-load table the project selects
(``dossier.yaml compatibility.salt_table``; the tables in content/data/salt_load.yaml
disagree, so the dossier names the one used).  What the sulfate does to each candidate
binder is assessed by DUR-ETT (ettringite: aluminate + sulfate + water) and DUR-TSA
(thaumasite: any C-S-H + sulfate + water + carbonate + cold), from the classes recorded here
and the zone's exposure.  :func:`aluminate_rich` is shared with DUR-ETT.
"""
from __future__ import annotations

from specgen import refdata
from specgen.checks import compatibility_common as cc
from specgen.checks.registry import declare, register
from specgen.checks.result import Basis, Input, Quantity, Step
from specgen.views import family_words

declare("salt_load_class", "", "salt-load class of chloride, nitrate and sulfate in each fabric "
        "material by the project's table {material: {ion: class}}, with the table")

IONS = ("chloride", "nitrate", "sulfate")
# Families whose binder carries reactive aluminate even without an analysis (declared assumption).
ALUMINATE_FAMILIES = {"natural_cement", "portland", "hl", "fl"}


def classify(value: float, edges: list[float], classes: list[str]) -> str:
    """Class of a content: at or above an edge falls in the higher class."""
    k = sum(1 for e in edges if value >= e)
    return classes[k]


def table(ctx) -> tuple[str, dict]:
    key = ctx.project.dossier.compatibility.salt_table
    return key, refdata.load("salt_load").data[key]


def _fabric_salts(pair):
    return [(kind, m) for kind, m in (("units", pair.unit), ("historic mortar", pair.historic))
            if m is not None and m.salts is not None]


def aluminate_rich(mix, project, ctx) -> tuple[bool, str]:
    """Whether any binder of the mix is aluminate-rich, and why (analysis or family)."""
    limit = ctx.rules["compatibility.aluminate_rich_al2o3"].value
    reasons, rich = [], False
    for part in mix.binders:
        b = project.binders.get(part.binder)
        if b is None:
            continue
        an = project.analyses.get(b.analysis) if b.analysis else None
        al = an.mass_percent.get("Al2O3") if an else None
        if al is not None:
            yes = al >= limit
            reasons.append(f"{b.id}: Al2O3 {al:g} % in analysis {an.id} "
                           f"{'≥' if yes else '<'} {limit:g} %")
        else:
            yes = b.type in ALUMINATE_FAMILIES
            reasons.append(f"{b.id}: no Al2O3 in an analysis; family {family_words(b.type)} "
                           f"{'carries' if yes else 'does not carry'} reactive aluminate (assumed)")
        rich = rich or yes
    return rich, "; ".join(reasons)


@register("COMP-SALT", "Salt load of the fabric", "zone", order=540,
          matrix="compatibility", column="salts")
def salt_check(zone, ctx):
    """Salt-load classes of the fabric by the chosen table."""
    return cc.each_pair("COMP-SALT", zone, ctx, _salt_one)


def _salt_one(pair, ctx):
    code, title = "COMP-SALT", "Salt load of the fabric"
    key, tab = table(ctx)
    basis = Basis("reference", tab["ref"], tab["title"])
    fabric = _fabric_salts(pair)
    if not fabric:
        return cc.not_assessed(code, title, pair, [
            f"no salt contents for the fabric of zone {pair.zone.id}: add 'salts:' (chloride, "
            "nitrate, sulfate in mass %) to its masonry unit or historic mortar in materials.yaml"],
            basis=(basis,))
    classes, steps, notes, top = {}, [], [], {}
    order = tab["classes"]
    for kind, m in fabric:
        got, inputs = {}, []
        for ion in IONS:
            v = getattr(m.salts, ion)
            if v is None:
                notes.append(f"{ion} of {kind} {m.id} not measured: not classified")
                continue
            c = classify(v, tab["edges"][ion], order)
            got[ion] = c
            top[ion] = max(top.get(ion, order[0]), c, key=order.index)
            lo, hi = tab["edges"][ion]
            inputs.append(Input(ion, f"{ion}, {kind} {m.id} → {c}", v, "mass %",
                                f"materials.yaml {m.id}.salts; classes < {lo:g} low, "
                                f"{lo:g}–{hi:g} medium, ≥ {hi:g} high"))
        classes[m.id] = got
        if inputs:
            steps.append(Step(f"Salt load of {kind} {m.id} ({tab['title']})",
                              r"\text{class} = \text{band of the table containing the content}",
                              tuple(inputs), ", ".join(f"{i}: {c}" for i, c in got.items()),
                              float(max((order.index(c) for c in got.values()), default=0)), "",
                              "class"))
    status, msg = "pass", []
    if any(c == "high" for c in top.values()):
        status = "attention"
        msg.append("high salt load (" + ", ".join(i for i, c in top.items() if c == "high") + ")")
    if top.get("sulfate") in ("medium", "high"):
        notes.append(f"{top['sulfate']} sulfate: its effect on the binder of {pair.mix_id} is "
                     f"assessed by DUR-ETT/{pair.subject} (ettringite) and "
                     f"DUR-TSA/{pair.subject} (thaumasite)")
    if not msg:
        msg.append("no class above medium")
    notes.append(f"table: {tab['title']} — {refdata.shown(tab['source'], tab.get('tag', ''))}; published "
                 "salt-load tables disagree, this one is the project's choice")
    return cc.result(code, title, pair, status, max(top.values(), key=order.index) if top else None,
                     "", [basis], f"{'; '.join(msg)} ({key})", steps=steps, notes=notes,
                     quantities=[Quantity("salt_load_class", {"table": key, **classes}, "",
                                          "salt-load classes")])
