"""CPU seconds of a command and of every process under it, a measuring aid for a shared
machine (not part of the suite): ``python3 -m tests.treecpu python3 -m pytest ...``.

``/usr/bin/time`` and ``tests/cputime.py`` count what a process has reaped (its children it
waited for).  Chromium, started by Playwright's driver, is not counted there: its processes
end outside the command's tree of waits, so a browser test's CPU would read a fraction of
what it costs (axe over the demo's pages: about 10 CPU s seen, 140 spent).  This samples
``/proc`` every half second, keeps the last CPU seen of every process under the command, and
prints, when the command ends, the reaped figure, the sampled CPU of each kind of process
(Chromium's is the part the reaped figure misses) and their sum."""
from __future__ import annotations

import os
import resource
import subprocess
import sys
import time

HZ = os.sysconf("SC_CLK_TCK")


def processes() -> dict[int, tuple[int, str, float]]:
    """pid → (parent pid, name, own CPU seconds: user + system) of every process now."""
    found = {}
    for entry in os.listdir("/proc"):
        if not entry.isdigit():
            continue
        try:
            with open(f"/proc/{entry}/stat", encoding="utf-8", errors="replace") as handle:
                stat = handle.read()
        except OSError:
            continue
        name = stat[stat.index("(") + 1:stat.rindex(")")]
        fields = stat[stat.rindex(")") + 2:].split()
        # fields from the third of proc(5): state, ppid, ..., utime (14th), stime (15th)
        found[int(entry)] = (int(fields[1]), name, (int(fields[11]) + int(fields[12])) / HZ)
    return found


def under(root: int, procs: dict) -> set[int]:
    tree, grown = {root}, True
    while grown:
        grown = False
        for pid, (parent, _, _) in procs.items():
            if parent in tree and pid not in tree:
                tree.add(pid)
                grown = True
    return tree - {root}


def main(argv: list[str]) -> int:
    if not argv:
        print("usage: python3 -m tests.treecpu COMMAND [ARG...]", file=sys.stderr)
        return 2
    try:
        command = subprocess.Popen(argv)
    except OSError as exc:
        print(f"treecpu: cannot run {argv[0]!r}: {exc.strerror}", file=sys.stderr)
        return 127
    last: dict[tuple[int, str], float] = {}
    while command.poll() is None:
        procs = processes()
        for pid in under(command.pid, procs):
            last[(pid, procs[pid][1])] = procs[pid][2]
        time.sleep(0.5)
    reaped = resource.getrusage(resource.RUSAGE_CHILDREN)
    by_name: dict[str, float] = {}
    for (_, name), cpu in last.items():
        by_name[name] = by_name.get(name, 0.0) + cpu
    reaped_s = reaped.ru_utime + reaped.ru_stime
    chromium = sum(cpu for name, cpu in by_name.items() if name.startswith("chrom"))
    print(f"treecpu: reaped {reaped_s:.1f} CPU s; sampled under it by name: "
          + ", ".join(f"{n} {c:.1f}" for n, c in sorted(by_name.items(), key=lambda x: -x[1])[:6])
          + f"; reaped + Chromium {reaped_s + chromium:.1f} CPU s", file=sys.stderr)
    return command.returncode


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
