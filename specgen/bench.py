"""``python3 -m specgen.bench`` (developers): one run on this machine, ratios against the bare toolchain.

Measures (a) ``check`` on the demo, (b) a full cold build of the demo's current
revision (no artefact cache, in-process memos cleared), (c) a re-issue after one new
lab result into the same output folder (its artefact cache warm), (d) the floor: for
each revision the cold build publishes (the archived ones too), the same figures drawn with
matplotlib and the same math drawn with ziamath (our render pass with every cache off), then
plain ``mkdocs build`` of the same Markdown (written to disk) and a plain WeasyPrint render of
the same print HTML with the build's PDF options, in sequence, and
(e) ``check`` on synthetic projects of 10, 50 and 200 mixes (the growth exponent is the
log–log slope of time against results) — and the 200-mix ``check`` keeping its strength fits
between runs (``fit_cache.py``), with an empty fit cache (cold: the figure the target is
judged on), a full one (warm) and after one result changed (``specgen/bench_check.py``;
``--only check`` runs (e) alone) — with the share of the 200-mix ``check`` spent in the
strength inference (the prior-informed fit, its bands and posterior summaries: CPU seconds
inside ``specgen.science.strength_inference``) and the ratio of ``check`` to ``check`` without
it (the target: within 2×), and the CPU seconds in the least-squares model comparison
(``strength_models.fit_all``), the other fit made once per series, and (f) once, the full
build (site and PDF) of the 200-mix project in a fresh process, with its time, its CPU time
(user + system of every process of the build), the peak memory of its whole process tree,
each stage's CPU seconds and a projection of its time on two idle cores
(``specgen/bench_large.py``).  Medians of ``runs`` repetitions.

Beside the wall-clock times it prints the CPU time (user + system, this process and its
children: the PDF workers and the site process) of (b) and (c), so the re-issue ratio can be
read on a shared machine too; the re-issue's breakdown (PDF parts reused unchanged / laid out
again); the idle share of each core during one cold build (from ``/proc/stat``: the whole
machine's, so it means the build's own only on an otherwise idle machine) beside the build's
own use of the cores (its CPU time over wall time × cores).  The last lines compare the
figures with the targets.

Two more, which ``--only serve`` / ``--only xlsx`` run alone: (g) ``serve`` on the demo, run
as a user runs it (a fresh ``specgen serve`` process each time) — the time to the first answer
and to the first page of the current revision (with the CPU seconds of the serving process),
how many figures that page shows still being drawn, and when the page and every figure are
complete, with a cold (empty) and then a warm artefact cache; (h) reading the demo's strength results from a workbook against the
same rows as CSV (the table alone, and the whole project load).
"""
from __future__ import annotations

import os
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

from specgen.bench_check import check_figures, check_judged, print_check
from specgen.bench_cores import cpu_seconds, idle_during, measured, median as _median, targets
from specgen.bench_floor import _cold, _floor
from specgen.bench_large import large_build, print_large
from specgen.bench_serve import bench_serve, project_copy as _project_copy
from specgen.cache import SHARED_ENV


def _cpu_median(fn, runs: int) -> float:
    """Median CPU seconds of this process per call (``time.process_time``): other jobs on a
    shared machine slow the wall clock, much less the CPU time a call takes."""
    fn()   # imports and first-call set-up are not what is compared
    times = []
    for _ in range(runs):
        t = time.process_time()
        fn()
        times.append(time.process_time() - t)
    return statistics.median(times)


def _cpu_pair(first, second, runs: int) -> tuple[float, float, tuple[float, float]]:
    """Median CPU seconds per call of two functions, called in turn (so a change in the load of
    a shared machine falls on both alike), and the spread of the ratio: the ratio of the
    medians of each tenth of the calls, lowest and highest (a tenth, since one call is a few
    milliseconds, below the resolution of ``time.process_time`` on some systems)."""
    first(), second()
    a, b = [], []
    for _ in range(runs):
        t = time.process_time()
        first()
        a.append(time.process_time() - t)
        t = time.process_time()
        second()
        b.append(time.process_time() - t)
    step = max(1, runs // 10)
    parts = [statistics.median(b[i:i + step]) / statistics.median(a[i:i + step])
             for i in range(0, runs - step + 1, step)]
    return statistics.median(a), statistics.median(b), (min(parts), max(parts))


def _workbooks_of(csv: Path, project: Path, work: Path) -> dict[str, tuple[Path, Path]]:
    """The CSV's rows as (CSV, workbook) pairs holding the same data: the CSV itself beside a
    bare workbook, and the workbook ``lab-workbook`` writes (its instructions, styles and
    validations kept, its planned rows replaced by the CSV's) beside a CSV of its nine
    columns."""
    import openpyxl
    from specgen.build import load as load_project
    from specgen.labbook import HEADERS, write_workbook
    rows = [line.split(",") for line in csv.read_text().splitlines()]
    typed = [rows[0]] + [[r[0], r[1], float(r[2]), r[3], float(r[4]), float(r[5])]
                         for r in rows[1:]]
    wb = openpyxl.Workbook()
    wb.active.title = "strength"
    for row in typed:
        wb.active.append(row)
    bare = work / "bare.xlsx"
    wb.save(bare)
    written = work / "written.xlsx"
    write_workbook(load_project(project), written)
    wb = openpyxl.load_workbook(written)
    for ws in wb.worksheets[1:]:
        ws.delete_rows(2, ws.max_row)
    for row in typed[1:]:
        wb["strength"].append(row)
    wb.save(written)
    wide = work / "strength-wide.csv"
    width = len(HEADERS["strength"])
    wide.write_text("\n".join(",".join(r + [""] * (width - len(r)))
                              for r in [HEADERS["strength"]] + rows[1:]) + "\n")
    return {"bare workbook": (csv, bare), "lab-workbook's nine columns": (wide, written)}


def bench_xlsx(demo: Path, work: Path, runs: int) -> None:
    """(h) the same strength rows read from CSV and from a workbook sheet, in CPU time."""
    from specgen.build import load as load_project  # as every command reads a project
    from specgen.errors import ProblemLog
    from specgen.project.files import read_csv
    from specgen.project.tables import strength_results
    from specgen.project.workbook import read_sheet, read_workbook
    project = _project_copy(demo, work)
    csv = project / "lab" / "strength.csv"
    pairs = _workbooks_of(csv, project, work)
    n = len(csv.read_text().splitlines()) - 1
    for label, (table, book) in pairs.items():
        def via_csv(table=table):
            log = ProblemLog()
            strength_results(read_csv(table, "lab/strength.csv", log), "lab/strength.csv", log)
            assert not log.problems, log.problems[:3]

        def via_xlsx(book=book):
            log = ProblemLog()
            for sheet in read_workbook(book, "lab/strength.xlsx", log):
                read_sheet(sheet, strength_results, "lab/strength.xlsx", log)
            assert not log.problems, log.problems[:3]
        a, b, (low, high) = _cpu_pair(via_csv, via_xlsx, runs * 40)
        print(f"(h) {n} strength rows, {label}: from CSV {a * 1000:5.2f} ms, from xlsx "
              f"{b * 1000:5.2f} ms (ratio {b / a:.2f}, {low:.2f}-{high:.2f} over each tenth "
              "of the calls; target within 2)")
    with_csv = _cpu_median(lambda: load_project(project), runs)
    csv.unlink()
    shutil.copyfile(pairs["bare workbook"][1], project / "lab" / "strength.xlsx")
    with_xlsx = _cpu_median(lambda: load_project(project), runs)
    print(f"(h) whole project load with the CSV {with_csv:6.3f} s, with the workbook "
          f"{with_xlsx:6.3f} s (ratio {with_xlsx / with_csv:.2f}); (h) is CPU time of this "
          "process (time.process_time), medians, so other jobs on the machine count less")


def _reuse_heard():
    """(what was heard, a progress function that hears how many PDF parts were reused)."""
    reuse = {}

    def heard(step, done=None, total=None):
        if step.endswith("from the cache"):
            reuse["parts"] = (done, total)
    return reuse, heard


def main(runs: int = 3, large: bool = True, only: str = "all") -> None:
    from specgen.build import build, check
    os.environ.pop(SHARED_ENV, None)  # cold means cold: no cache shared with other builds
    demo = Path(__file__).resolve().parent.parent / "demo_project"
    if only != "all":
        with tempfile.TemporaryDirectory(prefix="specgen-bench-") as tmp:
            if only == "serve":
                bench_serve(demo, Path(tmp))
            elif only == "check":
                e = check_figures(Path(tmp), runs)
                print_check(e)
                targets(None, None, check_judged(e), None)
            else:
                bench_xlsx(demo, Path(tmp), runs)
        return
    with tempfile.TemporaryDirectory(prefix="specgen-bench-") as tmp:
        work = Path(tmp)
        project = _project_copy(demo, work)
        a = _median(lambda: check(project), runs)
        outs = iter(range(1000))
        b, b_cpu = measured(lambda: (_cold(), build(project, work / f"out{next(outs)}")), runs)
        _cold()
        idle = idle_during(lambda: build(project, work / "out-idle"))  # once more, for the cores
        csv = project / "lab" / "strength.csv"
        base = csv.read_text()

        def reissue():
            out = work / f"re{next(outs)}"
            _cold()
            build(project, out)
            _cold()  # only the output folder's artefact cache may help
            csv.write_text(base + "M1-90d-C9,M1,90,compressive,7.9,20\n")
            t, c = time.perf_counter(), cpu_seconds()
            build(project, out, progress=heard)
            csv.write_text(base)
            return time.perf_counter() - t, cpu_seconds() - c
        reuse, heard = _reuse_heard()
        again = [reissue() for _ in range(runs)]
        c_wall = statistics.median(w for w, _ in again)
        c_cpu = statistics.median(u for _, u in again)
        d = _median(_floor(project, work), runs)
        e = check_figures(work, runs)
        f = large_build(e["syn"], work / "syn-out") if large else None
        (work / "g").mkdir()
        (work / "h").mkdir()
        bench_xlsx(demo, work / "h", runs)
        bench_serve(demo, work / "g")
    _print_figures(locals())


def _print_figures(fig: dict) -> None:
    """The figures of one run, then the targets, each said met or not."""
    a, b, b_cpu, c_wall, c_cpu, reuse, d, idle, e, f = (
        fig[k] for k in ("a", "b", "b_cpu", "c_wall", "c_cpu", "reuse", "d", "idle", "e", "f"))
    print(f"(a) check, demo                      {a:7.3f} s")
    print(f"(b) full cold build, demo            {b:7.3f} s   CPU {b_cpu:7.1f} s")
    print(f"(c) re-issue after one new result    {c_wall:7.3f} s   CPU {c_cpu:7.1f} s"
          + (" (PDF parts: {0} of {1} reused unchanged, the rest laid out again)".format(
              *reuse["parts"]) if "parts" in reuse else ""))
    print(f"(d) bare toolchain floor (figures + math, mkdocs, WeasyPrint; sequential) {d:7.3f} s")
    if idle[0]:
        print("    idle share of each core during a cold build (whole machine): "
              + ", ".join(f"core {i} {s:.0%}" for i, s in enumerate(idle[0]))
              + f"; the build's own use of the cores {idle[1]:.0%}")
    print_check(e)
    if f:
        print_large(f)
    print(f"ratio (b)/(d) = {b / d:.2f}   ratio (c)/(b) = {c_wall / b:.2f} "
          f"(CPU {c_cpu / b_cpu:.2f})   growth exponent of (e) = {e['slope']:.2f}")
    targets(b / d, (c_wall / b, c_cpu / b_cpu), check_judged(e),
            (f.wall, f.pss_mib, f.projected) if f else None)


if __name__ == "__main__":
    import click

    @click.command()
    @click.option("--runs", default=3, show_default=True, help="repetitions per measurement")
    @click.option("--large/--no-large", default=True, show_default=True,
                  help="also build the 200-mix project once (time and peak memory; slow)")
    @click.option("--only", type=click.Choice(["all", "serve", "xlsx", "check"]), default="all",
                  show_default=True,
                  help="run only the preview, the workbook or the synthetic check measurement")
    def _bench(runs: int, large: bool, only: str) -> None:
        """Time check, build, re-issue and the bare toolchain (ratios in one run)."""
        main(runs, large=large, only=only)

    _bench()
