"""Per-test CPU seconds, a measuring aid for a shared machine (not loaded by default):
``CPUTIME_OUT=/tmp/cpu python3 -m pytest -q -p tests.cputime`` writes, for each worker,
``/tmp/cpu-<worker>.tsv`` with one line per test: CPU seconds (user + system of the worker
and of the child processes it has waited for: builds run as subprocesses, PDF workers),
wall seconds, test id.  A fixture's setup is counted to the first test that needs it."""
from __future__ import annotations

import os
import resource
import time

import pytest

_ROWS: list[tuple[str, float, float]] = []


def _cpu() -> float:
    own = resource.getrusage(resource.RUSAGE_SELF)
    kids = resource.getrusage(resource.RUSAGE_CHILDREN)
    return own.ru_utime + own.ru_stime + kids.ru_utime + kids.ru_stime


@pytest.hookimpl(hookwrapper=True)
def pytest_runtest_protocol(item, nextitem):
    cpu, wall = _cpu(), time.monotonic()
    yield
    _ROWS.append((item.nodeid, _cpu() - cpu, time.monotonic() - wall))


def pytest_sessionfinish(session):
    out = os.environ.get("CPUTIME_OUT")
    if out:
        worker = os.environ.get("PYTEST_XDIST_WORKER", "main")
        with open(f"{out}-{worker}.tsv", "w", encoding="utf-8") as handle:
            for nodeid, cpu, wall in _ROWS:
                handle.write(f"{cpu:.2f}\t{wall:.2f}\t{nodeid}\n")
