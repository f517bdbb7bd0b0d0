"""The benchmark's large build (``specgen/bench.py``, (f)): one build of the 200-mix synthetic
project in a fresh process, watched from outside through ``/proc`` (Linux).

Every ``SAMPLE_S`` the watcher reads each process of the build's tree (the build, the site
process, the PDF workers, the math drawn beside the render): its CPU seconds (``stat``) and
its memory (``smaps_rollup``).  It reports

* the CPU seconds of the whole tree (user + system, from the build's own accounting once it
  has ended: ``RUSAGE_CHILDREN`` of the process that ran it);
* the peak of the tree's summed PSS (each page shared by forked processes counted once, in
  shares) — the memory the build takes — beside the peak of the summed RSS (shared pages
  counted in every process that maps them, an upper bound) and the largest single process;
* the CPU seconds and wall seconds of each stage, from the build's progress steps;
* a projection of the wall time on ``CORES`` otherwise idle cores: each interval between two
  samples takes the longer of its busiest process's CPU seconds and the tree's CPU seconds
  over ``CORES`` (work that one process does in sequence cannot be shared out).  On a shared
  machine the processes' relative progress differs from an idle one, so it is a projection,
  not a measurement.
"""
from __future__ import annotations

import json
import os
import subprocess
import sys
import time
from dataclasses import dataclass, field
from pathlib import Path

SAMPLE_S = 0.5
CORES = 2
TICK = os.sysconf("SC_CLK_TCK") if hasattr(os, "sysconf") else 100

# runs in the fresh process: the build, its progress steps printed with the wall clock
_RUN = """
import json, resource, sys, time
from specgen.build import build
marks = []
def heard(step, done=None, total=None):
    if done is None or done in (1, total):
        marks.append((time.time(), step if done is None else f"{step} {done}/{total}"))
marks.append((time.time(), "start"))
build(sys.argv[1], sys.argv[2], progress=heard)
marks.append((time.time(), "end"))
me, kids = resource.getrusage(resource.RUSAGE_SELF), resource.getrusage(resource.RUSAGE_CHILDREN)
print(json.dumps({"marks": marks, "cpu": me.ru_utime + me.ru_stime + kids.ru_utime + kids.ru_stime,
                  "largest_kib": max(me.ru_maxrss, kids.ru_maxrss)}))
"""


@dataclass
class LargeBuild:
    """What one watched build showed (seconds, CPU seconds, MiB)."""

    wall: float
    cpu: float
    pss_mib: float
    rss_mib: float
    largest_mib: float
    projected: float
    stages: list = field(default_factory=list)   # (step, wall s, CPU s)


def _tree(root: int) -> list[int]:
    """The pids of ``root`` and every process under it (``/proc/<pid>/task/*/children``)."""
    out, todo = [], [root]
    while todo:
        pid = todo.pop()
        out.append(pid)
        try:
            for task in os.listdir(f"/proc/{pid}/task"):
                with open(f"/proc/{pid}/task/{task}/children") as f:
                    todo.extend(int(c) for c in f.read().split())
        except OSError:
            pass
    return out


def _cpu(pid: int) -> tuple[float, float]:
    """(own CPU seconds, CPU seconds of its ended children) of a process, 0 when gone."""
    try:
        with open(f"/proc/{pid}/stat") as f:
            s = f.read()
    except OSError:
        return 0.0, 0.0
    fields = s[s.rindex(")") + 2:].split()
    return (int(fields[11]) + int(fields[12])) / TICK, (int(fields[13]) + int(fields[14])) / TICK


def _memory(pid: int) -> tuple[int, int]:
    """(RSS, PSS) bytes of a process, 0 when gone."""
    rss = pss = 0
    try:
        with open(f"/proc/{pid}/smaps_rollup") as f:
            for line in f:
                if line.startswith("Rss:"):
                    rss = int(line.split()[1]) * 1024
                elif line.startswith("Pss:"):
                    pss = int(line.split()[1]) * 1024
    except OSError:
        pass
    return rss, pss


def _sample(root: int) -> tuple[float, dict[int, float], float, int, int]:
    """(time, own CPU s per pid, ended children's CPU s summed, RSS sum, PSS sum)."""
    own, ended, rss, pss = {}, 0.0, 0, 0
    for pid in _tree(root):
        mine, kids = _cpu(pid)
        own[pid], ended = mine, ended + kids
        r, p = _memory(pid)
        rss, pss = rss + r, pss + p
    return time.time(), own, ended, rss, pss


def _projected(samples) -> float:
    """Wall seconds on ``CORES`` idle cores, interval by interval (module docstring)."""
    total = 0.0
    for (_, a, ea, *_r), (_, b, eb, *_s) in zip(samples, samples[1:]):
        steps = [b[p] - a.get(p, 0.0) for p in b]
        spent = sum(steps) + max(eb - ea - sum(a[p] for p in a if p not in b), 0.0)
        total += max(max(steps, default=0.0), spent / CORES)
    return total


def _stages(marks, samples) -> list:
    """(step, wall s, CPU s) between the progress marks, CPU from the nearest samples."""
    def tree_cpu_at(t):
        before = [s for s in samples if s[0] <= t] or samples[:1]
        return sum(before[-1][1].values()) + before[-1][2]
    out = []
    for (t0, step), (t1, _) in zip(marks, marks[1:]):
        out.append((step, t1 - t0, max(tree_cpu_at(t1) - tree_cpu_at(t0), 0.0)))
    return out


def large_build(project: Path, out: Path) -> LargeBuild:
    """Build ``project`` into ``out`` in a fresh process, watched (module docstring)."""
    started = time.perf_counter()
    proc = subprocess.Popen([sys.executable, "-c", _RUN, str(project), str(out)],
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    samples = []
    while proc.poll() is None:
        samples.append(_sample(proc.pid))
        time.sleep(SAMPLE_S)
    wall = time.perf_counter() - started
    stdout, stderr = proc.communicate()
    if proc.returncode:
        raise RuntimeError(f"the large build failed ({proc.returncode}): {stderr[-2000:]}")
    done = json.loads(stdout.strip().splitlines()[-1])
    return LargeBuild(wall=wall, cpu=done["cpu"],
                      pss_mib=max((s[4] for s in samples), default=0) / 2**20,
                      rss_mib=max((s[3] for s in samples), default=0) / 2**20,
                      largest_mib=done["largest_kib"] / 1024, projected=_projected(samples),
                      stages=_stages(done["marks"], samples))


def print_large(f: LargeBuild, label: str = "200 mixes") -> None:
    """The large build's lines of the benchmark's output: the whole, then the wall and CPU
    seconds from each progress step to the next."""
    print(f"(f) build, {label} (site + PDF)   {f.wall:7.1f} s   CPU {f.cpu:7.1f} s; peak memory "
          f"of the process tree {f.pss_mib:6.0f} MiB PSS ({f.rss_mib:.0f} MiB RSS summed, "
          f"largest process {f.largest_mib:.0f} MiB); projected on {CORES} idle cores "
          f"{f.projected:6.1f} s")
    for step, wall, cpu in f.stages:
        print(f"    {wall:7.1f} s  CPU {cpu:7.1f} s  {step}")


if __name__ == "__main__":   # python3 -m specgen.bench_large PROJECT OUT: the large build alone
    print_large(large_build(Path(sys.argv[1]), Path(sys.argv[2])), label=sys.argv[1])
