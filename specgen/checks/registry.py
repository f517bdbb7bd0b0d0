"""The registry of checks.  Built-in checks use the same decorator an extension would.

A check is a function ``fn(subject, ctx) -> CheckResult | Iterable[CheckResult]``
registered with a unique code, a title, the kind of subject it runs on, and an
``order`` (checks run in ascending order, so a check may read quantities that an
earlier one recorded in ``ctx``).
"""
from __future__ import annotations

from collections.abc import Callable, Iterable
from dataclasses import dataclass

SUBJECT_KINDS = ("analysis", "binder", "mix", "zone", "project")


@dataclass(frozen=True)
class CheckSpec:
    """A registered check."""

    code: str
    title: str
    subject_kind: str
    order: int
    fn: Callable
    description: str = ""
    matrix: str = ""   # the compatibility chapter's table it belongs to ("compatibility", "durability")
    column: str = ""   # its short column heading there ("" = listed under the findings only)


_REGISTRY: dict[str, CheckSpec] = {}


class DuplicateCheckCode(ValueError):
    """Two checks claimed the same code."""


def register(code: str, title: str, subject_kind: str, order: int = 500, description: str = "",
             matrix: str = "", column: str = ""):
    """Decorator: add a check under ``code``; a second check with the same code is refused.

    ``matrix`` and ``column`` place the check in a table of the compatibility chapter (its
    column heading there, in run order); the chapter reads them from :func:`in_matrix`."""
    if subject_kind not in SUBJECT_KINDS:
        raise ValueError(f"subject kind must be one of {SUBJECT_KINDS}; got {subject_kind!r}")

    def deco(fn: Callable) -> Callable:
        if code in _REGISTRY:
            raise DuplicateCheckCode(f"check code '{code}' is already registered by "
                                     f"{_REGISTRY[code].fn.__module__}.{_REGISTRY[code].fn.__name__}")
        _REGISTRY[code] = CheckSpec(code, title, subject_kind, order, fn,
                                    description or (fn.__doc__ or "").strip().split("\n")[0],
                                    matrix, column)
        return fn
    return deco


def title_of(code: str) -> str:
    """The registered title of check ``code`` (one place for it)."""
    return _REGISTRY[code].title


def unregister(code: str) -> None:
    """Remove a check (for tests and extensions replacing a built-in one)."""
    _REGISTRY.pop(code, None)


def checks() -> list[CheckSpec]:
    """All registered checks in run order."""
    return sorted(_REGISTRY.values(), key=lambda s: (s.order, s.code))


def in_matrix(matrix: str) -> list[CheckSpec]:
    """The checks of one table of the compatibility chapter, in run order."""
    return [s for s in checks() if s.matrix == matrix]


def as_list(out) -> list:
    if out is None:
        return []
    if isinstance(out, Iterable) and not hasattr(out, "code"):
        return list(out)
    return [out]


@dataclass(frozen=True)
class QuantityName:
    """A documented name of results.json: stable snake_case, unit shown, meaning."""

    name: str
    unit: str
    description: str
    module: str


_NAMES: dict[str, QuantityName] = {}


def declare(name: str, unit: str, description: str) -> None:
    """Declare a results.json quantity name (once; same name with another unit is refused)."""
    import re
    import sys
    if not re.fullmatch(r"[a-z][a-z0-9_]*", name):
        raise ValueError(f"quantity name '{name}' must be snake_case")
    # the declaring module, from the caller's frame only (inspect.stack() would read the
    # source of every frame and costs seconds over all declarations)
    module = sys._getframe(1).f_globals.get("__name__", "")
    old = _NAMES.get(name)
    if old and (old.unit, old.description) != (unit, description):
        raise DuplicateCheckCode(f"quantity '{name}' is declared twice ({old.module}, {module})")
    _NAMES[name] = QuantityName(name, unit, description, module)


def quantity_names() -> list[QuantityName]:
    """Every declared results.json name, sorted."""
    return sorted(_NAMES.values(), key=lambda q: q.name)


def is_declared(name: str) -> bool:
    return name in _NAMES


# ---------------------------------------------------------------- consistency audit
@dataclass(frozen=True)
class AuditRule:
    """A registered rule of the consistency audit: it reads the whole revision (project,
    results, the previous issued revision) after every check has run, and returns findings."""

    code: str
    title: str
    order: int
    fn: Callable


_AUDIT: dict[str, AuditRule] = {}


def audit_rule(code: str, title: str, order: int = 500):
    """Decorator: add an audit rule ``fn(ctx) -> list[Finding]`` under a unique ``code``."""
    def deco(fn: Callable) -> Callable:
        if code in _AUDIT or code in _REGISTRY:
            raise DuplicateCheckCode(f"audit rule code '{code}' is already registered")
        _AUDIT[code] = AuditRule(code, title, order, fn)
        return fn
    return deco


def audit_rules() -> list[AuditRule]:
    """Every audit rule in run order."""
    return sorted(_AUDIT.values(), key=lambda r: (r.order, r.code))


def names_text(markdown: bool = False) -> str:
    """Every results.json quantity name with its unit and meaning: a table for a terminal, or
    Markdown (the contributor guide's list)."""
    rows = quantity_names()
    if markdown:
        return "\n".join(["| name | unit | meaning |\n|---|---|---|"] + [
            f"| `{q.name}` | {q.unit or '—'} | {q.description} |" for q in rows])
    width = max(len(q.name) for q in rows)
    return "\n".join(f"{q.name.ljust(width)}  {(q.unit or '-').ljust(8)}  {q.description}"
                     for q in rows)
