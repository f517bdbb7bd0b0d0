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
            text += f"{self.field}: "
        text += self.message
        if self.fix:
            text += f" Fix: {self.fix}"
        return text


class InputErrors(SpecgenError, ValueError):
    """One or more problems with a project folder (exit status 2)."""

    exit_code = 2

    def __init__(self, problems: Iterable[Problem]):
        self.problems = list(problems)
        super().__init__("\n".join(str(p) for p in self.problems))

    def report(self) -> str:
        """Human-readable listing of all problems, with a count."""
        n = len(self.problems)
        head = f"{n} problem{'s' if n != 1 else ''} in the project folder:"
        return "\n".join([head] + [f"  - {p}" for p in self.problems])


class UsageError(SpecgenError, ValueError):
    """The command was called in a way that cannot work (exit status 2)."""

    exit_code = 2


class PublishError(SpecgenError, OSError):
    """The output could not be written (disk full, read-only folder, issued revision)."""

    exit_code = 2


class RevisionRefused(PublishError):
    """Rebuilding an issued revision with different inputs."""


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
    close = difflib.get_close_matches(str(word), list(choices), n=1, cutoff=0.6)
    return f"did you mean '{close[0]}'?" if close else None


class ProblemLog:
    """Collects problems while loading; raise them all together at the end."""

    def __init__(self) -> None:
        self.problems: list[Problem] = []

    def add(self, file: str, message: str, **where) -> None:
        """Record one problem (keywords: line, row, field, fix)."""
        self.problems.append(Problem(file=file, message=message, **where))

    def raise_if_any(self) -> None:
        """Stop the run with every problem found so far."""
        if self.problems:
            raise InputErrors(self.problems)
