"""Every error specgen shows to a person lives here.

Messages are for people: they name the file, the line or row, the field, what was
expected, what was found, and the fix.  Input problems are collected into one
:class:`InputErrors` so a user sees all of them at once; the run stops before
anything is written.  Each class is also a builtin (``ValueError``/``OSError``) so
library callers can catch them the usual way.
"""
from __future__ import annotations

import difflib
from collections.abc import Iterable
from dataclasses import dataclass


class SpecgenError(Exception):
    """Base of every error specgen raises on purpose."""

    exit_code = 1


class ScienceInputError(SpecgenError, ValueError):
    """Inputs a method of ``specgen.science`` refuses (too few points, a value outside the
    method's range, an inconsistent analysis).  Base of every science module's error; a
    check that meets one is *not assessed*, with this message as the reason
    (``checks.run``: one mechanism for every check)."""


@dataclass(frozen=True)
class Problem:
    """One thing wrong with the input, located as precisely as we can."""

    file: str
    message: str
    line: int | None = None
    row: int | None = None
    field: str | None = None
    fix: str | None = None
    sheet: str | None = None   # a workbook's sheet (lab/*.xlsx)
    cell: str | None = None    # a workbook's cell or range, e.g. 'E7' (then no row is shown)

    def __str__(self) -> str:
        # every part is bounded, whatever a caller put in it: a message never floods a terminal
        where = self.file
        if self.sheet is not None:
            where += f", sheet '{self.sheet}'"
        if self.line is not None:
            where += f", line {self.line}"
        if self.cell is not None:
            where += f", {'cells' if ':' in self.cell else 'cell'} {self.cell}"
        elif self.row is not None:
            where += f", row {self.row}"
        text = f"{where}: "
        if self.field:
            text += f"{quote(self.field)}: "
        text += _cut(self.message, 600)
        if self.fix:
            text += f" Fix: {_cut(self.fix, 400)}"
        return text


def _cut(text: str, limit: int) -> str:
    return text if len(text) <= limit else text[:limit] + f"… ({len(text)} characters)"


class InputErrors(SpecgenError, ValueError):
    """One or more problems with a project folder (exit status 2).

    At most :data:`MAX_PER_FILE` problems of each file are kept and shown; ``more`` counts
    the rest by file (a 19 MB file of one repeated mistake gives a page, not 75 MB).
    """

    exit_code = 2

    def __init__(self, problems: Iterable[Problem], more: dict[str, int] | None = None):
        kept, more = _bounded(problems, dict(more or {}))
        self.problems = kept
        self.more = more
        super().__init__("\n".join([str(p) for p in self.problems] + self._more_lines()))

    def _more_lines(self) -> list[str]:
        return [f"{file}: {n} more problem{'s' if n != 1 else ''} not shown (fix the ones above "
                "first: the rest are often the same mistake)." for file, n in self.more.items()]

    def report(self) -> str:
        """Human-readable listing of all problems, with a count."""
        n = len(self.problems) + sum(self.more.values())
        head = f"{n} problem{'s' if n != 1 else ''} in the project folder:"
        return "\n".join([head] + [f"  - {p}" for p in self.problems]
                         + [f"  - {line}" for line in self._more_lines()])


MAX_PER_FILE = 20


def _bounded(problems: Iterable[Problem], more: dict[str, int]) -> tuple[list[Problem], dict]:
    kept, count = [], {}
    for p in problems:
        count[p.file] = count.get(p.file, 0) + 1
        if count[p.file] <= MAX_PER_FILE:
            kept.append(p)
        else:
            more[p.file] = more.get(p.file, 0) + 1
    return kept, more


class UsageError(SpecgenError, ValueError):
    """The command was called in a way that cannot work (exit status 2)."""

    exit_code = 2


class PublishError(SpecgenError, OSError):
    """The output could not be written (disk full, read-only folder, issued revision)."""

    exit_code = 2


class RevisionRefused(PublishError):
    """Rebuilding an issued revision with different inputs."""


QUOTE_LIMIT = 80  # characters of an offending value shown in a message


def quote(value, limit: int = QUOTE_LIMIT) -> str:
    """``value`` as text for a message, cut to about ``limit`` characters with the length said,
    control characters shown as escapes (a 200 k-character value never floods the output)."""
    text = value if isinstance(value, str) else repr(value)
    text = "".join(c if c.isprintable() else repr(c)[1:-1] for c in text[:limit + 1])
    if len(text) > limit or (isinstance(value, str) and len(value) > limit):
        n = len(value) if isinstance(value, str) else len(repr(value))
        return f"{text[:limit]}… ({n} characters)"
    return text


class AuditRefused(SpecgenError):
    """An issued revision (for construction, or for approval when the project says so) that
    the consistency audit finds not ready: exit status 1, with every blocking finding."""

    exit_code = 1

    def __init__(self, revision, findings):
        self.findings = list(findings)
        head = (f"revision {revision.code} is issued {revision.purpose.replace('_', ' ')} but the "
                f"consistency audit has {len(self.findings)} open finding"
                f"{'s' if len(self.findings) != 1 else ''}; nothing was written:")
        lines = [head]
        for f in self.findings:
            lines.append(f"  - {f.code}: {f.message}")
            if f.places:
                lines.append(f"      where: {'; '.join(f.places)}")
            if f.fix:
                lines.append(f"      fix: {f.fix}")
        lines.append("Fix the findings (or build it as a draft: revision.status: draft, which "
                     "lists them on its Before issue page).")
        super().__init__("\n".join(lines))


def did_you_mean(word: str, choices: Iterable[str]) -> str | None:
    """The nearest valid spelling, phrased for a message, or ``None``."""
    word = str(word)
    if len(word) > 100:  # no real spelling is this long; difflib would take seconds
        return None
    close = difflib.get_close_matches(word, list(choices), n=1, cutoff=0.6)
    return f"did you mean '{close[0]}'?" if close else None


class ProblemLog:
    """Collects problems while loading; raise them all together at the end."""

    def __init__(self) -> None:
        self.problems: list[Problem] = []
        self.more: dict[str, int] = {}   # problems past MAX_PER_FILE, counted, not kept
        self._count: dict[str, int] = {}

    def add(self, file: str, message: str, **where) -> None:
        """Record one problem (keywords: line, row, field, fix)."""
        n = self._count[file] = self._count.get(file, 0) + 1
        if n > MAX_PER_FILE:
            self.more[file] = self.more.get(file, 0) + 1
            return
        self.problems.append(Problem(file=file, message=message, **where))

    def files(self) -> set[str]:
        """Files with at least one problem so far."""
        return set(self._count)

    def raise_if_any(self) -> None:
        """Stop the run with every problem found so far."""
        if self.problems:
            raise InputErrors(self.problems, self.more)
