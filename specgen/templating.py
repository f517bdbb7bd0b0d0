"""Template environments: every template (ours and a project's) runs in Jinja's sandbox.

A project may override any template by placing a file of the same name in its
``templates/`` folder.  Such a file is input, not code: it is rendered in Jinja's
:class:`~jinja2.sandbox.ImmutableSandboxedEnvironment`, which refuses attributes that
start with an underscore (``__globals__``, ``__subclasses__``, ``__init__`` …),
refuses changes to the objects handed in, and calls nothing it was not given.  The
globals are only what specgen hands a template (no ``cycler``, ``joiner`` or
``lipsum``); ``**`` and ``*`` are bounded so a template cannot exhaust memory or CPU.

Any failure inside a project template (a refused attribute, an unknown name, a syntax
error, a failing expression) becomes an :class:`~specgen.errors.InputErrors` naming the
template file and line; a failure inside one of our own templates stays a bug.
"""
from __future__ import annotations

import contextlib
import operator
import threading
from pathlib import Path

import jinja2
from jinja2.sandbox import ImmutableSandboxedEnvironment
from jinja2.utils import Namespace

from specgen.errors import InputErrors, Problem, quote

MAX_POWER_RESULT = 10 ** 12   # a template formats numbers; it never needs huge ones
MAX_REPEAT = 100_000          # characters a template may make by 'text' * n


class _Sandbox(ImmutableSandboxedEnvironment):
    """The sandbox with bounded ``**`` and sequence repetition (see module docstring)."""

    intercepted_binops = frozenset(["**", "*"])

    def call_binop(self, context, operator_, left, right):
        if operator_ == "**":
            if _number(left) and _number(right) and (abs(right) > 64 or abs(left) > 10 ** 6):
                raise jinja2.sandbox.SecurityError("a power this large is not allowed in a "
                                                   "template")
            result = operator.pow(left, right)
            if _number(result) and abs(result) > MAX_POWER_RESULT:
                raise jinja2.sandbox.SecurityError("a power this large is not allowed in a "
                                                   "template")
            return result
        if operator_ == "*":
            for seq, n in ((left, right), (right, left)):
                if isinstance(seq, (str, list, tuple)) and isinstance(n, int) \
                        and len(seq) * n > MAX_REPEAT:
                    raise jinja2.sandbox.SecurityError("repeating text or a list this many times "
                                                       "is not allowed in a template")
            return operator.mul(left, right)
        return super().call_binop(context, operator_, left, right)


def _number(x) -> bool:
    return isinstance(x, (int, float)) and not isinstance(x, bool)


class CompiledTemplates(jinja2.BytecodeCache):
    """Templates compiled once per process and kept in memory (never on disk, so no file can
    hand the process code to run), reused while a template's source is unchanged (Jinja checks
    its checksum).  One instance serves environments of identical settings only: the code
    compiled for one set of options is not valid for another."""

    def __init__(self):
        self._code: dict[str, tuple[str, object]] = {}
        self._lock = threading.Lock()

    def load_bytecode(self, bucket) -> None:
        with self._lock:
            entry = self._code.get(bucket.key)
        if entry is not None and entry[0] == bucket.checksum:
            bucket.code = entry[1]

    def dump_bytecode(self, bucket) -> None:
        with self._lock:
            self._code[bucket.key] = (bucket.checksum, bucket.code)


_COMPILED: dict[str, CompiledTemplates] = {}   # by the options of the environments they serve


def sandboxed(loader: jinja2.BaseLoader, **options) -> jinja2.Environment:
    """A sandboxed environment whose globals are only ``namespace`` (for counters); its
    templates are compiled once per process (:class:`CompiledTemplates`)."""
    code = _COMPILED.setdefault(repr(sorted(options.items())), CompiledTemplates())
    env = _Sandbox(loader=loader, autoescape=True, bytecode_cache=code, **options)
    env.globals.clear()
    env.globals["namespace"] = Namespace
    return env


def project_templates(project_root) -> Path | None:
    """The project's ``templates/`` folder, if it has one."""
    if project_root is None:
        return None
    folder = Path(project_root) / "templates"
    return folder if folder.is_dir() else None


def _template_frame(exc: BaseException, folder: Path) -> tuple[str, int] | None:
    """(file, line) of the innermost frame of ``exc`` inside a template of ``folder``.

    Jinja rewrites a rendering traceback so each template frame carries the template's
    file name and line; a syntax error carries them itself.
    """
    if isinstance(exc, jinja2.TemplateSyntaxError) and exc.filename:
        return exc.filename, exc.lineno
    found = None
    tb = exc.__traceback__
    while tb is not None:
        name = tb.tb_frame.f_code.co_filename
        if _is_inside(name, folder):
            found = (name, tb.tb_lineno)
        tb = tb.tb_next
    return found


def _is_inside(name: str, folder: Path) -> bool:
    try:
        return Path(name).resolve().is_relative_to(folder.resolve())
    except (OSError, ValueError):
        return False


def _message(exc: BaseException) -> tuple[str, str]:
    """What went wrong in plain words, and the fix."""
    if isinstance(exc, jinja2.sandbox.SecurityError):
        return (f"the template tried something templates may not do "
                f"({quote(str(exc).rstrip('.'))}).",
                "use only the values the page hands the template (see the template of the same "
                "name in specgen's content/templates); templates cannot reach Python internals, "
                "files or commands.")
    if isinstance(exc, jinja2.UndefinedError):
        return (f"{quote(str(exc))}: the template uses a name the page does not hand it.",
                "use only the values of the page (start from the template of the same name in "
                "specgen's content/templates).")
    if isinstance(exc, jinja2.TemplateSyntaxError):
        return f"is not a valid template: {quote(exc.message or str(exc))}.", \
            "check the {{ }} and {% %} tags near that line."
    return (f"the template failed: {type(exc).__name__}: {quote(str(exc))}.",
            "correct the expression on that line.")


@contextlib.contextmanager
def project_template_errors(project_root):
    """Turn a failure inside one of the project's own templates into a located input error."""
    folder = project_templates(project_root)
    try:
        yield
    except Exception as exc:  # noqa: BLE001 - re-raised unless a project template caused it
        where = _template_frame(exc, folder) if folder is not None else None
        if where is None:
            raise
        file, line = where
        try:
            rel = Path(file).resolve().relative_to(Path(project_root).resolve()).as_posix()
        except ValueError:
            rel = Path(file).name
        message, fix = _message(exc)
        raise InputErrors([Problem(rel, message, line=line, fix=fix)]) from None
