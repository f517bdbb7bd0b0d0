"""(g) of ``python3 -m specgen.bench``: ``specgen serve`` on the demo, run as a user runs it.

Each run is a fresh ``specgen serve`` process (nothing imported, no in-process memo) with its
own artefact cache: first empty (cold), then as the cold run left it (warm).  It is timed from
its start to the first answer, to the first page of the current revision (with the CPU
seconds of the serving process until then — a shared machine disturbs them less than the wall
clock — and of its main thread alone, which built that page: the process's figure also holds
whatever the background thread did before the page was fetched), to that page complete
(every figure and formula on it drawn) and to every figure and formula drawn; then the
process and its children (the PDF's workers) are stopped.

Cold means no artefact cache, not a first run of the installed program: as a user's
installed package, the checkout's modules are compiled to bytecode first (``compileall``:
where ``PYTHONDONTWRITEBYTECODE`` is set, as on the project's machine, every run would
otherwise compile the package's sources anew, about 0.4 CPU s), and pint's parsed unit
definitions and matplotlib's font list are kept where they are (``units._registry``).
"""
from __future__ import annotations

import os
import re
import shutil
import subprocess
import sys
import time
from pathlib import Path

from specgen.cache import SHARED_ENV


def _free_port() -> int:
    import socket
    with socket.socket() as sock:
        sock.bind(("127.0.0.1", 0))
        return sock.getsockname()[1]


def _cpu_of(pid: int, main_thread: bool = False) -> float:
    """CPU seconds (user + system) of the running process ``pid``, its threads and its children
    already ended (``/proc/<pid>/stat``; Linux); with ``main_thread``, of its main thread only
    (the one that builds the first site: the background work runs in another)."""
    stat = f"/proc/{pid}/task/{pid}/stat" if main_thread else f"/proc/{pid}/stat"
    fields = Path(stat).read_text().rsplit(")", 1)[1].split()
    return sum(int(v) for v in fields[11:15]) / os.sysconf("SC_CLK_TCK")


def _get(url: str) -> bytes | None:
    import urllib.request
    try:
        with urllib.request.urlopen(url, timeout=5) as r:
            return r.read()
    except OSError:
        return None


def _all_drawn(said: str) -> bool:
    """Whether the server's lines say every figure of its first site is drawn."""
    site = re.search(r"(first pages|site) of \S+ ready[^\n]*", said)
    return bool(site) and ("being drawn" not in site.group(0)
                           or re.search(r"formulas of \S+ drawn", said) is not None)


def _serve_once(project: Path, work: Path, log: Path) -> dict:
    """``specgen serve`` run as a user runs it — a fresh process (nothing imported, no memo),
    its artefact cache under ``work`` — and timed from its start: the first answer, the first
    page of the current revision (with the CPU seconds of the serving process until then), the
    figures that page shows still being drawn, when that page is complete (its last figure
    drawn) and when every figure is; then the process and its children are stopped."""
    import json
    import signal
    from specgen.preview_bar import STATUS_PATH
    port = _free_port()
    import matplotlib
    env = {k: v for k, v in os.environ.items() if k != SHARED_ENV}
    # cold means no artefact cache, not a first run of matplotlib on this machine: its font
    # list stays where it is (it would follow XDG_CACHE_HOME)
    env.setdefault("MPLCONFIGDIR", matplotlib.get_cachedir())
    env.update(XDG_CACHE_HOME=str(work / "serve-cache"),
               PYTHONPATH=str(Path(__file__).resolve().parent.parent))   # this checkout
    _installed(env)
    t = time.perf_counter()
    with open(log, "w") as said:
        proc = subprocess.Popen([sys.executable, "-m", "specgen", "serve", str(project), "--port",
                                 str(port)], stdout=said, stderr=said, env=env,
                                start_new_session=True)   # its own group: stopped as one
    base, out = f"http://127.0.0.1:{port}", {}
    try:
        while "page" not in out:
            body = _get(base + "/index.html")
            if body is not None:
                out.setdefault("first", time.perf_counter() - t)
                if b"Preview of revision" in body:
                    out["page"], out["page_cpu"] = time.perf_counter() - t, _cpu_of(proc.pid)
                    out["main_cpu"] = _cpu_of(proc.pid, main_thread=True)
                    status = json.loads(_get(f"{base}{STATUS_PATH}?page=index.html") or b"{}")
                    out["placeholders"] = len(status.get("drawing", ()))
            if proc.poll() is not None:
                raise RuntimeError(f"specgen serve stopped: {log.read_text()[-2000:]}")
            time.sleep(0.05)
        while json.loads(_get(f"{base}{STATUS_PATH}?page=index.html")
                         or b'{"drawing": [1]}')["drawing"]:
            time.sleep(0.1)
        out["complete"] = time.perf_counter() - t
        while not _all_drawn(log.read_text()):
            time.sleep(0.2)
        out["all"], out["all_cpu"] = time.perf_counter() - t, _cpu_of(proc.pid)
    finally:
        os.killpg(proc.pid, signal.SIGTERM)
        proc.wait()
    return out


def _installed(env: dict) -> None:
    """What an installed specgen has before its first preview (see the module docstring):
    its modules' bytecode, and pint's parsed definitions in the cache folder of ``env``."""
    import compileall
    compileall.compile_dir(Path(__file__).resolve().parent, quiet=2)
    subprocess.run([sys.executable, "-c", "import specgen.units"], env=env, check=True)


def bench_serve(demo: Path, work: Path) -> None:
    """(g) the preview's first answer and first page, cold (a fresh process, an empty artefact
    cache) then warm (a fresh process, the cache the cold run left)."""
    project = project_copy(demo, work)
    for label in ("cold cache", "warm cache"):
        g = _serve_once(project, work, work / f"serve-{label[:4]}.log")
        print(f"(g) serve, demo, {label} (load average {os.getloadavg()[0]:.1f}): first answer "
              f"{g['first']:6.2f} s, first page of the revision {g['page']:7.2f} s "
              f"({g['page_cpu']:6.2f} CPU s of the serving process, {g['main_cpu']:6.2f} of "
              f"its main thread, which built it; target 5 s) with "
              f"{g['placeholders']} figures and formulas shown as being drawn, complete at "
              f"{g['complete']:7.2f} s; every figure and formula drawn at {g['all']:7.2f} s "
              f"({g['all_cpu']:6.2f} CPU s)", flush=True)


def project_copy(demo: Path, where: Path) -> Path:
    """A copy of the demo in ``where`` without its issued revisions."""
    dst = where / "project"
    shutil.copytree(demo, dst, ignore=shutil.ignore_patterns("issued"))
    return dst
