"""Named points of a build where the fault tests kill it (SIGKILL), one at a time.

A build passes each point in order (``load``, ``check``, ``render``, ``site``, every
``pdf-part-<n>``, ``pdf-front``, ``pdf-assembled``, ``staged``, ``move``, ``moved``,
``versions``, ``index``).  When the environment variable ``SPECGEN_KILL_AT`` names a point,
the process kills itself there, as ``kill -9`` would, so the tests can show that the output
folder is intact at every point (tests/test_kill_points.py).  ``SPECGEN_KILL_TRACE`` names a
file to which each point is appended as it is passed (how the tests learn every point of a
build, one per PDF part included).  Without the variables a point costs two lookups.
"""
from __future__ import annotations

import os
import signal

ENV = "SPECGEN_KILL_AT"
TRACE = "SPECGEN_KILL_TRACE"


def reached(name: str) -> None:
    """Kill this process here if ``SPECGEN_KILL_AT`` names this point."""
    if trace := os.environ.get(TRACE):
        with open(trace, "a", encoding="utf-8") as f:
            f.write(name + "\n")
    if os.environ.get(ENV) == name:
        os.kill(os.getpid(), signal.SIGKILL)
