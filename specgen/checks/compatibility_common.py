"""Shared pieces of the compatibility checks: pairs of (zone, candidate mix), the fabric of a
zone, the measured properties of a mix, and a uniform result builder.

Every compatibility check runs on a zone and returns one result per candidate mix, with the
subject ``<zone>/<mix>`` (so results.json keeps one set of quantities per pair).
"""
from __future__ import annotations

from specgen.checks.result import Basis, CheckResult, Limit, Step
from specgen.checks.result import not_assessed as _not_assessed
from specgen.errors import ScienceInputError
from specgen.views import Pair, pairs  # noqa: F401  (the subjects of every check here)

MPA, GPA = 1e6, 1e9
PRACTICE = Basis("common practice", note="content/rules/compatibility.yaml")


def each_pair(code: str, zone, ctx, fn) -> list[CheckResult]:
    """``fn(pair, ctx)`` for every candidate of ``zone``; readings the science refuses
    (any :class:`~specgen.errors.ScienceInputError`) give that pair an explicit *not
    assessed* with the reason, and the zone's other pairs are still judged."""
    from specgen.checks.registry import title_of
    out = []
    for pair in pairs(zone, ctx.project):
        try:
            out.append(fn(pair, ctx))
        except ScienceInputError as exc:
            out.append(not_assessed(code, title_of(code), pair, [str(exc)]))
    return out


def result(code: str, title: str, pair: Pair, status: str, value, unit: str, basis,
           message: str, steps=(), limit: Limit | None = None, quantities=(), notes=()) -> CheckResult:
    return CheckResult(code=code, title=title, subject=pair.subject, subject_kind="zone",
                       status=status, value=value, unit=unit, basis=tuple(basis),
                       steps=tuple(steps), limit=limit, message=message,
                       quantities=tuple(quantities), notes=tuple(notes))


def not_assessed(code: str, title: str, pair: Pair, missing: list[str], basis=(PRACTICE,),
                 steps=()) -> CheckResult:
    """An explicit not-assessed result naming everything that is missing."""
    return _not_assessed(code, title, pair.subject, "zone", basis, "; ".join(missing), steps)


def fabric_names(pair: Pair) -> tuple[str, str]:
    u = f"masonry unit {pair.unit.id}" if pair.unit else f"zone {pair.zone.id} names no masonry unit"
    h = (f"historic mortar {pair.historic.id}" if pair.historic
         else f"zone {pair.zone.id} names no historic mortar")
    return u, h


def rule_limit(ctx, key: str, compare: str, text: str, unit: str = "") -> Limit:
    r = ctx.rules[f"compatibility.{key}"]
    kw = {"high": r.value} if compare == "<=" else {"low": r.value}
    return Limit(compare, unit=unit or r.unit, text=text, rule=r.key,
                 overridden=r.justification, **kw)


def rule_basis(ctx, key: str) -> Basis:
    return ctx.rules[f"compatibility.{key}"].basis


def ratio_step(title: str, symbol: str, num_name: str, num_value: float, num_src: str,
               den_name: str, den_value: float, den_src: str, unit: str) -> Step:
    """``symbol = numerator / denominator`` with both inputs and their sources."""
    from specgen.checks.result import Input
    r = num_value / den_value
    return Step(title, rf"{symbol} = \frac{{x_\mathrm{{repair}}}}{{x_\mathrm{{fabric}}}}",
                (Input("x_repair", num_name, round(num_value, 5), unit, num_src),
                 Input("x_fabric", den_name, round(den_value, 5), unit, den_src)),
                rf"{symbol} = \frac{{{num_value:.4g}}}{{{den_value:.4g}}} = {r:.4f}",
                round(r, 5), "", symbol)
