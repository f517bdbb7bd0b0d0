"""Progress on the terminal for long work (``build``, ``serve``), with rich.

On a terminal: one line per stage with a spinner and its elapsed time, and a bar with
``done/total`` where the work is counted (the PDF's parts).  Anywhere else (a pipe, a log, CI):
plain lines, one per stage and one per counted step, so a log reads the same as the screen.
Used as the ``progress`` callback of :func:`specgen.build.build`.
"""
from __future__ import annotations

import sys
import time


class Progress:
    """``progress(step, done=None, total=None)`` shown on ``stream`` (standard error)."""

    def __init__(self, stream=None, *, quiet: bool = False, terminal: bool | None = None):
        self.stream = stream or sys.stderr
        self.quiet = quiet
        isatty = getattr(self.stream, "isatty", lambda: False)
        self.terminal = isatty() if terminal is None else terminal
        self.n = 0
        self.step = None
        self.started = time.monotonic()
        self._rich = None
        self._task = None

    def __enter__(self) -> "Progress":
        if self.terminal and not self.quiet:
            from rich.console import Console
            from rich.progress import (BarColumn, MofNCompleteColumn, Progress as Bar,
                                       SpinnerColumn, TextColumn, TimeElapsedColumn)
            console = Console(file=self.stream, force_terminal=True)
            self._rich = Bar(SpinnerColumn(finished_text="✓"), TextColumn("{task.description}"),
                             BarColumn(), MofNCompleteColumn(), TimeElapsedColumn(),
                             console=console, transient=False)
            self._rich.start()
        return self

    def __exit__(self, *exc) -> None:
        if self._rich is not None:
            self._finish()
            self._rich.stop()

    def __call__(self, step: str, done: int | None = None, total: int | None = None) -> None:
        if self.quiet:
            return
        if step != self.step:
            self.n += 1
            self.step = step
            self._new(f"[{self.n}] {step}")
        if done is not None and total:
            self._count(step, done, total)

    # the two displays
    def _new(self, text: str) -> None:
        if self._rich is None:
            print(f"{text} ({time.monotonic() - self.started:.1f} s)", file=self.stream,
                  flush=True)
            return
        self._finish()
        self._task = self._rich.add_task(text, total=None)

    def _count(self, step: str, done: int, total: int) -> None:
        if self._rich is None:
            print(f"    {step}: {done}/{total}", file=self.stream, flush=True)
            return
        self._rich.update(self._task, completed=done, total=total)
        self._rich.refresh()   # each part shown as it comes, not at the next tick

    def _finish(self) -> None:
        if self._task is not None:
            task = self._rich.tasks[-1]
            self._rich.update(self._task, total=task.total or 1,
                              completed=task.total or 1)
