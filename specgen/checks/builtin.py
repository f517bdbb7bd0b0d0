"""The checks as the pipeline calls them: every built-in check registered, then run.

Built-in check modules are the modules of this package whose name ends in
``_checks`` (``composition_checks``, ``strength_checks`` ...): adding a module is
all it takes to add a family of checks; extensions use the same decorator.  Importing
this module registers them all; the registry and the runner (the checks' contract) never
import a check module themselves.
"""
from __future__ import annotations

import importlib
import pkgutil
from pathlib import Path

from specgen.checks.registry import checks, names_text  # noqa: F401  (the pipeline's view)
from specgen.checks.run import Previous, Results, evaluate as _evaluate

# the package's folder, found from this file (importing the package here would be a cycle)
for _info in sorted(pkgutil.iter_modules([str(Path(__file__).parent)]), key=lambda m: m.name):
    if _info.name.endswith("_checks"):
        importlib.import_module(f"specgen.checks.{_info.name}")


def evaluate(project, previous: Previous | None = None) -> Results:
    """Every registered check on ``project``, then the consistency audit (``run.evaluate``)."""
    return _evaluate(project, previous=previous)


def previous_of(old) -> Previous | None:
    """What the audit and the change report compare a revision with: the issued one before
    (its results evaluated afresh, its input hashes)."""
    if old is None:
        return None
    rev = old.revision
    return Previous(rev.code, rev.date.isoformat(), rev.description,
                    _evaluate(old).to_dict(), {f.path: f.sha256 for f in old.inputs})
