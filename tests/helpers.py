"""Small helpers shared by the scenario tests (edits to a copy of the demo, refusals)."""
from __future__ import annotations

import pytest

from specgen.build import check
from specgen.errors import InputErrors


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
