"""Rules are data: limits and bands declared in ``content/rules/*.yaml`` with their basis.

A rule file holds ``rules:`` keyed by name; the full key is ``<file stem>.<name>``.
Each rule has ``value``, ``unit``, ``description`` and ``basis`` (``kind`` plus
``ref``/``clause`` for a published source).  A project may change a value only
through ``rule_overrides`` in dossier.yaml with a written justification, which the
dossier shows beside every check that used the rule.
"""
from __future__ import annotations

from dataclasses import asdict, dataclass, replace
from functools import lru_cache
from pathlib import Path

from specgen.checks.result import Basis
from specgen.refdata import CONTENT_DIR, content_yaml

RULES_DIR = CONTENT_DIR / "rules"


@dataclass(frozen=True)
class Rule:
    """One limit with its unit, meaning and basis; ``justification`` set when overridden."""

    key: str
    value: float
    unit: str
    description: str
    basis: Basis
    default: float | None = None
    justification: str = ""
    tag: str = ""  # 'memory': recalled from the source, to be confirmed before issue

    @property
    def unconfirmed(self) -> bool:
        """A recalled value still in force (a project override with a justification is not)."""
        return self.tag == "memory" and not self.justification

    def source(self) -> str:
        """Where the value comes from, as an input's source: the rule, its basis and, when
        the project overrides it, the written justification."""
        text = f"rule {self.key} ({self.basis.text()})"
        return text + (f"; project override: {self.justification}" if self.justification else "")

    def to_dict(self) -> dict:
        """The rule as results.json records it (``default``: the built-in value an override
        replaced)."""
        return {"value": self.value, "unit": self.unit, "description": self.description,
                "basis": asdict(self.basis), "default": self.default,
                "justification": self.justification, "tag": self.tag}

    def si(self, kind: str) -> float:
        """The value in SI (``kind`` as in specgen.units); a unitless rule as it stands."""
        from specgen import units
        return units.to_si(self.value, self.unit, kind) if self.unit else self.value


def _basis(raw: dict, where: str) -> Basis:
    if not isinstance(raw, dict) or raw.get("kind") not in {"reference", "common practice",
                                                              "project requirement"}:
        raise ValueError(f"{where}: basis needs kind: reference | common practice | project requirement")
    return Basis(raw["kind"], str(raw.get("ref", "")), str(raw.get("clause", "")),
                 str(raw.get("note", "")), str(raw.get("read_in", "")))


@lru_cache(maxsize=None)
def builtin_rules() -> dict[str, Rule]:
    """Every rule shipped in ``content/rules``."""
    out: dict[str, Rule] = {}
    for path in sorted(Path(RULES_DIR).glob("*.yaml")):
        doc = content_yaml(path) or {}
        for name, raw in (doc.get("rules") or {}).items():
            key = f"{path.stem}.{name}"
            out[key] = Rule(key, float(raw["value"]), str(raw.get("unit", "")),
                            str(raw.get("description", "")), _basis(raw.get("basis"), key),
                            tag=str(raw.get("tag", "")))
    return out


class RuleBook:
    """The rules in force for one project: built-ins with the project's overrides applied."""

    def __init__(self, overrides=()):
        self._rules = dict(builtin_rules())
        for ov in overrides:
            base = self._rules[ov.rule]
            self._rules[ov.rule] = replace(base, value=float(ov.value), default=base.value,
                                           justification=ov.justification)

    def __getitem__(self, key: str) -> Rule:
        rule = self._rules[key]
        if rule.unconfirmed:
            from specgen.refdata import note_rule
            note_rule(key, rule.tag, rule.basis.text(), rule.description)
        return rule

    def keys(self):
        return self._rules.keys()

    def overridden(self) -> list[Rule]:
        """Rules the project changed, for the dossier's list of departures."""
        return [r for r in self._rules.values() if r.justification]
