"""What a check returns: a result that explains itself.

A :class:`CheckResult` carries everything the dossier's calculation sheet shows —
formula, inputs with units and sources, substituted values, result, basis — so the
sheet is rendered from it and never written twice.  Values are stored in the unit
they are shown in (``unit``); the science underneath works in SI.
"""
from __future__ import annotations

import unicodedata
from dataclasses import asdict, dataclass, field
from typing import Literal

from specgen.jsontext import fields_of

Status = Literal["pass", "fail", "needs_decision", "attention", "hold", "not_assessed", "info"]
STATUSES: tuple[str, ...] = ("fail", "needs_decision", "hold", "attention", "not_assessed",
                             "pass", "info")
STATUS_WORDS = {"pass": "pass", "fail": "fail", "needs_decision": "needs decision",
                "attention": "attention", "hold": "hold", "not_assessed": "not assessed",
                "info": "for information"}

_DAY = 86400.0  # s


def age_key(age_s: float) -> str:
    """Key of a tested or predicted age in recorded quantities (``'28 d'``); read it back with
    :func:`key_days`, never by cutting the text."""
    return f"{age_s / _DAY:g} d"


def key_days(key: str) -> float:
    """The age in days of a key written by :func:`age_key`."""
    number, _, unit = key.partition(" ")
    if unit != "d":
        raise ValueError(f"not an age key: {key!r}")
    return float(number)


# Characters with a meaning in the math source, and how a name writes them literally.
_TEX = {"\\": r"\backslash{}", "&": r"\&", "%": r"\%", "$": r"\$", "#": r"\#", "_": r"\_",
        "{": r"\{", "}": r"\}", "~": r"\sim{}", "^": r"\wedge{}", " ": r"\ "}


def tex_name(text: object) -> str:
    r"""A name or id from the project, written literally in the math source (inside
    ``\mathrm{…}`` or a subscript): every character with a meaning in LaTeX escaped,
    spaces kept, control characters dropped.  The one way a project's words reach a
    formula (an admixture named "lime & pozzolan retarder" must not break the markup)."""
    return "".join(_TEX.get(c, c) for c in str(text).replace("\u00a0", " ")
                   if unicodedata.category(c) != "Cc")


@dataclass(frozen=True)
class Basis:
    """Why a limit or formula applies: a reference key + clause, or a kind of basis.

    ``kind`` is ``reference`` (then ``ref`` names an entry of the bibliography),
    ``common practice`` or ``project requirement``.  ``read_in`` names the bibliography
    entry the value was actually read in when that is not ``ref`` itself (a published
    summary of a standard not read in full): the text says so, and both are cited.
    """

    kind: Literal["reference", "common practice", "project requirement"]
    ref: str = ""
    clause: str = ""
    note: str = ""
    read_in: str = ""

    def text(self) -> str:
        if self.kind != "reference":
            return self.kind + (f" — {self.note}" if self.note else "")
        from specgen.refdata import reference_label
        text = reference_label(self.ref) + (f", {self.clause}" if self.clause else "")
        return text + (f" (as stated in {reference_label(self.read_in)})" if self.read_in
                       else "")


@dataclass(frozen=True)
class Input:
    """One input of a calculation: symbol (plain text), meaning, value in its shown unit, source."""

    symbol: str
    name: str
    value: float | str
    unit: str
    source: str


@dataclass(frozen=True)
class Step:
    """One calculation step: formula and substituted expression (LaTeX), inputs, result."""

    title: str
    formula: str
    inputs: tuple[Input, ...]
    substituted: str
    result: float
    unit: str
    symbol: str = ""


@dataclass(frozen=True)
class Limit:
    """The limit a value is compared with; ``compare`` says how (``<=``, ``>=``, ``within``)."""

    compare: str
    low: float | None = None
    high: float | None = None
    unit: str = ""
    text: str = ""
    rule: str = ""
    overridden: str = ""  # the project's written justification, when a default was changed


@dataclass(frozen=True)
class Quantity:
    """A computed quantity for results.json: stable snake_case name, value and unit."""

    name: str
    value: float | str | list | dict
    unit: str
    label: str = ""


@dataclass(frozen=True)
class CheckResult:
    """The outcome of one check on one subject."""

    code: str
    title: str
    subject: str
    subject_kind: str
    status: Status
    value: float | str | None
    unit: str
    basis: tuple[Basis, ...]
    steps: tuple[Step, ...] = ()
    limit: Limit | None = None
    message: str = ""
    quantities: tuple[Quantity, ...] = ()
    notes: tuple[str, ...] = field(default_factory=tuple)

    @property
    def value_symbol(self) -> str:
        """The symbol of the value: that of the step that computed it (the last step whose
        result is the value, in its unit); '' when no step did."""
        return next((s.symbol for s in reversed(self.steps)
                     if s.result == self.value and s.unit == self.unit), "")

    @property
    def key(self) -> str:
        """Unique key of the result in a dossier: ``CODE/subject``."""
        return f"{self.code}/{self.subject}"

    def to_dict(self, deep: bool = True) -> dict:
        """The result as results.json records it; ``deep=False``: its own fields only (the
        steps, quantities and basis left as they are, for ``jsontext.dumps`` to write)."""
        d = asdict(self) if deep else fields_of(self)
        d["status_word"] = STATUS_WORDS[self.status]
        return d


def worst(statuses) -> str:
    """The most severe of ``statuses`` in the order of :data:`STATUSES` ("pass" for none)."""
    statuses = list(statuses)
    return min(statuses, key=STATUSES.index) if statuses else "pass"


def not_assessed(code: str, title: str, subject: str, kind: str, basis, reason: str,
                 steps=()) -> CheckResult:
    """The one way a check says it could not be made, and why (``reason``)."""
    return CheckResult(code=code, title=title, subject=subject, subject_kind=kind,
                       status="not_assessed", value=None, unit="", basis=tuple(basis),
                       steps=tuple(steps), message=f"not assessed: {reason}")


@dataclass(frozen=True)
class Finding:
    """What the consistency audit found wrong with the dossier as a whole (not one check).

    ``places`` are where a reader or the specifier finds it: a page and clause of the dossier
    or an input file and field.  A ``blocking`` finding stops a revision for construction from
    being built; the others are listed for the specifier to confirm.
    """

    code: str
    title: str
    message: str
    places: tuple[str, ...] = ()
    fix: str = ""
    subject: str = ""
    blocking: bool = True

    def to_dict(self, deep: bool = True) -> dict:
        return asdict(self) if deep else fields_of(self)
