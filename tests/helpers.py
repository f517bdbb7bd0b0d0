"""Small helpers shared by the scenario tests (edits to a copy of the demo, refusals)."""
from __future__ import annotations

import pytest

from specgen.build import check
from specgen.errors import InputErrors


class Swapped:
    """A project with some attributes replaced, everything else read through (a hand-made
    case built on the demo without copying or checking it again)."""

    def __init__(self, project, **swap):
        self._project = project
        self.__dict__.update(swap)

    def __getattr__(self, name):
        return getattr(self._project, name)


def checked_context(demo_checked, project=None):
    """The checks' context of the session's checked demo (``demo_checked``): its rule
    overrides, quantities and results, with ``project`` (e.g. a :class:`Swapped`) in place
    of the demo where given."""
    from specgen.checks.rules import RuleBook
    from specgen.checks.run import Context
    p, results = demo_checked
    return Context(project or p, RuleBook(p.dossier.rule_overrides),
                   quantities=results.quantities, results=results.checks)


def by_check(results) -> dict:
    """Check results keyed by (code, subject)."""
    return {(c.code, c.subject): c for c in results.checks}


def edit(path, old, new) -> None:
    """Replace the first ``old`` in a project file by ``new``; ``old`` must be there."""
    text = path.read_text(encoding="utf-8")
    assert old in text, old
    path.write_text(text.replace(old, new, 1), encoding="utf-8")


def problems(project) -> str:
    """The text of the input errors that ``check`` must raise on ``project``."""
    with pytest.raises(InputErrors) as exc:
        check(project)
    return str(exc.value)


def line_of(path, needle: str) -> int:
    """The line (from 1) of the first line of ``path`` that contains ``needle`` (a test names
    a line of the demo by what is on it, not by a number that moves when the file grows)."""
    for n, text in enumerate(path.read_text(encoding="utf-8").splitlines(), 1):
        if needle in text:
            return n
    raise AssertionError(f"{needle!r} not in {path}")
