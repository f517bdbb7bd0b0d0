"""Stage 2+3, compute and check: run every registered check on every subject.

The result, :class:`Results`, is the contract between computing and everything
after it; ``results.json`` is its serialised form (see ``to_json``).
"""
from __future__ import annotations

from dataclasses import dataclass, field

from specgen import __version__, refdata
from specgen.checks.registry import as_list, audit_rules, checks, is_declared
from specgen.checks.result import STATUSES, CheckResult, Finding, Quantity, not_assessed
from specgen.checks.rules import Rule, RuleBook
from specgen.errors import ScienceInputError
from specgen.jsontext import dumps


@dataclass
class Context:
    """What a check may use: the project, the rules in force, quantities recorded so far."""

    project: object
    rules: RuleBook
    quantities: dict[str, dict[str, Quantity]] = field(default_factory=dict)
    results: list[CheckResult] = field(default_factory=list)  # every result so far, in run order

    def record(self, subject: str, q: Quantity) -> None:
        """Record a computed quantity for ``subject`` (later checks and results.json see it)."""
        self.quantities.setdefault(subject, {})[q.name] = q

    def quantity(self, subject: str, name: str) -> Quantity | None:
        return self.quantities.get(subject, {}).get(name)


@dataclass
class Results:
    """Every check result and every computed quantity of one project revision."""

    project_code: str
    revision: str
    checks: list[CheckResult]
    quantities: dict[str, dict[str, Quantity]]
    subjects: dict[str, str]  # subject id → kind
    specimens: dict[str, dict] = field(default_factory=dict)  # lab results by specimen id
    comments: list[dict] = field(default_factory=list)        # review comments, as given
    findings: list[Finding] = field(default_factory=list)     # the consistency audit's
    previous: str | None = None   # the issued revision this one is compared with
    changes: dict | None = None   # what changed since it (inputs, results, checks, decisions)
    facts: list[str] = field(default_factory=list)  # the revision's description, from inputs
    # the rules in force (content/rules with the project's overrides), by key, in file order
    rules: dict[str, Rule] = field(default_factory=dict)

    def blocking(self) -> list[Finding]:
        """Findings that stop a revision for construction (or approval) from being built."""
        return [f for f in self.findings if f.blocking]

    # every tagged reference value the checks read: {where, table, path, tag, source, title,
    # used_by: [CODE/subject, ...]}, sorted by where (refdata.recording)
    values_used: list[dict] = field(default_factory=list)

    def unconfirmed(self) -> list[dict]:
        """The values this revision rested on that are still tagged ``memory`` (recalled,
        not read in the source): listed on the *Values to confirm* page of a draft, and a
        revision for construction is refused while any remains (specgen.build)."""
        from specgen.refdata import UNCONFIRMED
        return [v for v in self.values_used if v["tag"] == UNCONFIRMED]

    def rule(self, key: str) -> Rule:
        """The rule ``key`` as it was in force for the checks (the project's override applied)."""
        return self.rules[key]

    def rules_overridden(self) -> list[Rule]:
        """Rules the project changed, for the dossier's list of departures."""
        return [r for r in self.rules.values() if r.justification]

    def check(self, code: str, subject: str) -> CheckResult | None:
        """The result of check ``code`` on ``subject`` (None when it did not run).

        Looked up in an index of the results, made again whenever results were added."""
        index = self.__dict__.get("_index")
        if index is None or index[0] != len(self.checks):
            by_key = {}
            for c in self.checks:
                by_key.setdefault((c.code, c.subject), c)
            index = self.__dict__["_index"] = (len(self.checks), by_key)
        return index[1].get((code, subject))

    def value(self, subject: str, name: str):
        """The value of quantity ``name`` recorded for ``subject`` (None when not recorded)."""
        q = self.quantities.get(subject, {}).get(name)
        return q.value if q is not None else None

    def counts(self) -> dict[str, int]:
        """Number of results per status, in severity order."""
        return {s: sum(1 for c in self.checks if c.status == s) for s in STATUSES}

    def worst(self) -> str:
        for s in STATUSES:
            if any(c.status == s for c in self.checks):
                return s
        return "pass"

    def to_dict(self, deep: bool = True) -> dict:
        """The results as results.json records them; ``deep=False``: the checks' and findings'
        steps, quantities and basis left as they are (``to_json`` writes them as they are)."""
        return {
            "format": "specgen-results/1",
            "generator": f"specgen {__version__}",
            "project": self.project_code,
            "revision": self.revision,
            "counts": self.counts(),
            "checks": [c.to_dict(deep) for c in self.checks],
            "quantities": {s: {n: {"value": q.value, "unit": q.unit, "label": q.label}
                               for n, q in sorted(qs.items())}
                           for s, qs in sorted(self.quantities.items())},
            "subjects": dict(sorted(self.subjects.items())),
            "specimens": dict(sorted(self.specimens.items())),
            "comments": self.comments,
            "findings": [f.to_dict(deep) for f in self.findings],
            "previous": self.previous,
            "facts": self.facts,
            "values_used": self.values_used,
            "rules": {k: r.to_dict() for k, r in self.rules.items()},
        }

    def to_json(self) -> str:
        """``json.dumps(self.to_dict(), indent=2, sort_keys=True, ensure_ascii=False)`` and a
        newline: the same text, written without copying the results (``jsontext``)."""
        return dumps(self.to_dict(deep=False)) + "\n"


def subjects_of(project, kind: str) -> list[tuple[str, object]]:
    """(id, object) pairs a check of ``kind`` runs on."""
    if kind == "analysis":
        return list(project.analyses.items())
    if kind == "binder":
        return list(project.binders.items())
    if kind == "mix":
        return list(project.mixes.items())
    if kind == "zone":
        return [(z.id, z) for z in project.dossier.zones]
    return [(project.dossier.project.code, project)]


@dataclass(frozen=True)
class Previous:
    """The issued revision a revision is compared with: its results (results.json content)
    and the SHA-256 of its input files."""

    code: str
    date: str
    description: str
    results: dict
    inputs: dict[str, str]


@dataclass
class AuditContext:
    """What an audit rule reads: the project, every result, the previous issued revision."""

    project: object
    results: Results
    previous: Previous | None = None


def evaluate(project, previous: Previous | None = None) -> Results:
    """Run all checks in order (each may record quantities for later ones), then the
    consistency audit over the whole revision."""
    results = _run_checks(project)
    ctx = AuditContext(project, results, previous)
    results.previous = previous.code if previous else None
    for rule in audit_rules():
        results.findings.extend(rule.fn(ctx))
    return results


def _run_one(spec, sid: str, subject, ctx: Context) -> list[CheckResult]:
    """One check on one subject.  A science input the method refuses becomes *not assessed*
    with the method's message as the reason: the one way a refusal reaches the dossier (a
    check may catch it earlier to keep its basis or to judge other subjects)."""
    try:
        return as_list(spec.fn(subject, ctx))
    except ScienceInputError as exc:
        return [not_assessed(spec.code, spec.title, sid, spec.subject_kind, (), str(exc))]


def _run_checks(project) -> Results:
    ctx = Context(project, RuleBook(project.dossier.rule_overrides))
    out: list[CheckResult] = ctx.results  # later checks (e.g. the selection) read earlier ones
    subjects: dict[str, str] = {}
    used: dict = {}
    for spec in checks():
        for sid, subject in subjects_of(project, spec.subject_kind):
            subjects[sid] = spec.subject_kind
            with refdata.recording() as uses:
                returned = _run_one(spec, sid, subject, ctx)
            for u in uses:
                used.setdefault(u, set()).update(r.key for r in returned)
            for res in returned:
                for q in res.quantities:
                    if not is_declared(q.name):
                        raise ValueError(f"check {spec.code} records undeclared quantity "
                                         f"'{q.name}': declare() it in {spec.fn.__module__}")
                    ctx.record(res.subject, q)
                out.append(res)
    specimens = {r.specimen: {"mix": r.mix, "test": r.test, "age_d": round(r.age / 86400, 6),
                              "value_MPa": round(r.value / 1e6, 6)} for r in project.strength}
    comments = [c.model_dump(mode="json") for c in project.comments]
    values = [{"where": u.where, "table": u.table, "path": u.path, "tag": u.tag,
               "source": u.source, "title": u.title, "used_by": sorted(keys)}
              for u, keys in sorted(used.items(), key=lambda kv: (kv[0].table, kv[0].path))
              if keys]
    return Results(project.dossier.project.code, project.revision.code, out, ctx.quantities,
                   subjects, specimens, comments, values_used=values,
                   rules={k: ctx.rules[k] for k in ctx.rules.keys()})
