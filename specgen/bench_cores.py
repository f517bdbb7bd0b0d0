"""What the benchmark measures beside wall time (``specgen/bench.py``): CPU seconds of a
build and its children, the idle share of each core while it runs, and the targets.

CPU seconds (user + system of this process and of its children that have ended: the PDF
workers and the site process) can be read on a shared machine; the cores' idle shares come
from ``/proc/stat`` and are the whole machine's, so they are the build's own only on an
otherwise idle machine.
"""
from __future__ import annotations

import os
import statistics
import time
from pathlib import Path


def cpu_seconds() -> float:
    """CPU seconds (user + system) of this process and of its children that have ended."""
    import resource
    own, kids = resource.getrusage(resource.RUSAGE_SELF), resource.getrusage(resource.RUSAGE_CHILDREN)
    return own.ru_utime + own.ru_stime + kids.ru_utime + kids.ru_stime


def median(fn, runs: int) -> float:
    """Median wall seconds of ``runs`` calls of ``fn``."""
    times = []
    for _ in range(runs):
        t = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t)
    return statistics.median(times)


def measured(fn, runs: int) -> tuple[float, float]:
    """(median wall seconds, median CPU seconds) of ``runs`` calls of ``fn``."""
    walls, cpus = [], []
    for _ in range(runs):
        t, c = time.perf_counter(), cpu_seconds()
        fn()
        walls.append(time.perf_counter() - t)
        cpus.append(cpu_seconds() - c)
    return statistics.median(walls), statistics.median(cpus)


def _core_ticks() -> list[tuple[int, int]] | None:
    """(idle, total) clock ticks of each core so far (``/proc/stat``), None where unknown."""
    try:
        lines = Path("/proc/stat").read_text().splitlines()
    except OSError:
        return None
    out = []
    for line in lines:
        name, *fields = line.split()
        if name.startswith("cpu") and name != "cpu":
            ticks = [int(f) for f in fields]
            out.append((ticks[3] + (ticks[4] if len(ticks) > 4 else 0), sum(ticks[:8])))
    return out or None


def idle_shares(before, after) -> list[float] | None:
    """The idle share of each core between two :func:`_core_ticks` readings."""
    if not before or not after or len(before) != len(after):
        return None
    return [(i1 - i0) / (t1 - t0) if t1 > t0 else 1.0
            for (i0, t0), (i1, t1) in zip(before, after)]


def idle_during(fn) -> tuple[list[float] | None, float]:
    """Run ``fn`` once: (the idle share of each core meanwhile, None where unknown; the share
    of all cores its own CPU time filled)."""
    ticks, t, c = _core_ticks(), time.perf_counter(), cpu_seconds()
    fn()
    wall, used = time.perf_counter() - t, cpu_seconds() - c
    return idle_shares(ticks, _core_ticks()), used / (wall * (os.cpu_count() or 1))


def targets(cold: float | None, reissue: tuple[float, float] | None, check200: float,
            large) -> None:
    """The targets the project set itself, each said met or not (the re-issue by wall time;
    its CPU-time ratio beside it); a figure not measured (None) is left out."""
    rows = [("re-issue <= 0.25 x cold build", reissue[0] <= 0.25,
             f"{reissue[0]:.2f}; CPU time {reissue[1]:.2f}") if reissue else None,
            ("cold build <= 0.6 x sequential floor", cold <= 0.6, f"{cold:.2f}")
            if cold is not None else None,
            ("check, 200 mixes <= 1.5 s (cold)", check200 <= 1.5, f"{check200:.2f} s")]
    rows = [r for r in rows if r]
    if large:   # (wall s, peak MiB of the process tree, projected s on two idle cores)
        rows.append(("build, 200 mixes <= 200 s, peak < 1 GiB",
                     large[0] <= 200 and large[1] < 1024,
                     f"{large[0]:.0f} s, {large[1]:.0f} MiB; projected on two idle cores "
                     f"{large[2]:.0f} s"))
    for label, met, seen in rows:
        print(f"target: {label:42s} {'met' if met else 'NOT met'} ({seen})")
