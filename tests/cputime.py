"""Per-test CPU seconds, a measuring aid for a shared machine (not loaded by default):
``CPUTIME_OUT=/tmp/cpu python3 -m pytest -q -p tests.cputime`` writes, for each worker,
``/tmp/cpu-<worker>.tsv`` with one line per test: CPU seconds (user + system of the worker
and of the child processes it has waited for: builds run as subprocesses, PDF workers),
wall seconds, test id.  A fixture's setup is counted to the first test that needs it.  Each
line is written as its test ends, so a run stopped part way still leaves what it measured."""
from __future__ import annotations

import os
import resource
import time

import pytest

_STARTED: list[str] = []


def _path() -> str | None:
    out = os.environ.get("CPUTIME_OUT")
    return f"{out}-{os.environ.get('PYTEST_XDIST_WORKER', 'main')}.tsv" if out else None


def _cpu() -> float:
    own = resource.getrusage(resource.RUSAGE_SELF)
    kids = resource.getrusage(resource.RUSAGE_CHILDREN)
    return own.ru_utime + own.ru_stime + kids.ru_utime + kids.ru_stime


@pytest.hookimpl(hookwrapper=True)
def pytest_runtest_protocol(item, nextitem):
    cpu, wall = _cpu(), time.monotonic()
    yield
    if path := _path():
        # the first line of this process starts the file afresh: this run's lines only
        with open(path, "a" if _STARTED else "w", encoding="utf-8") as handle:
            handle.write(f"{_cpu() - cpu:.2f}\t{time.monotonic() - wall:.2f}\t{item.nodeid}\n")
        _STARTED.append(path)
