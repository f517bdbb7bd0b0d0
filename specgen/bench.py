"""``specgen bench``: one run on this machine, ratios against the bare toolchain.

Measures (a) ``check`` on the demo, (b) a full cold build of the demo's current
revision (no artefact cache, in-process memos cleared), (c) a re-issue after one new
lab result into the same output folder (its artefact cache warm), (d) the floor: the
same figures drawn with matplotlib and the same math drawn with ziamath (our render
pass with every cache off), then plain ``mkdocs build`` of the same Markdown (written
to disk) and a plain WeasyPrint render of the same print HTML, in sequence, and
(e) ``check`` on synthetic projects of 10, 50 and 200 mixes (the growth exponent is the
log–log slope of time against results), and (f) once, the full build (site and PDF) of
the 200-mix project in a fresh process, with its time and the peak resident memory of
its largest process.  Medians of ``runs`` repetitions.
"""
from __future__ import annotations

import math
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path


def _median(fn, runs: int) -> float:
    times = []
    for _ in range(runs):
        t = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t)
    return statistics.median(times)


def _cold() -> None:
    """Forget every in-process memo, so a build in this process starts cold."""
    from specgen.report.mathsvg import svg_of
    svg_of.cache_clear()


def _project_copy(demo: Path, where: Path) -> Path:
    dst = where / "project"
    shutil.copytree(demo, dst, ignore=shutil.ignore_patterns("issued"))
    return dst


def _floor(project: Path, work: Path):
    """Bare toolchain on the same pages: mkdocs build from disk + WeasyPrint of the print HTML."""
    from specgen.build import check
    from specgen.publish import _print_context
    from specgen.publish.pdf import to_html
    from specgen.publish.pdf_parts import _fetcher
    from specgen.publish.site import BASE_CONFIG, _site_assets
    from specgen.report.render import render
    proj, results = check(project)
    pages = render(proj, results)
    docs = work / "floor-docs"
    pages.write_to(docs)
    for path, data in _site_assets().items():
        (docs / path).parent.mkdir(parents=True, exist_ok=True)
        (docs / path).write_bytes(data)
    cfg = work / "mkdocs.yml"
    nav = "\n".join(f"  - '{n.title}': {n.path}" for n in pages.nav)
    cfg.write_text(BASE_CONFIG.read_text().replace("site_name: specgen dossier", "site_name: floor")
                   + f"docs_dir: {docs}\nsite_dir: {work / 'floor-site'}\nnav:\n{nav}\n")
    html = to_html(pages, _print_context(proj))

    def run():
        import os
        _cold()
        render(proj, results)   # figures (matplotlib) and math (ziamath), no cache
        subprocess.run([sys.executable, "-m", "mkdocs", "build", "-q", "-f", str(cfg)], check=True,
                       cwd=BASE_CONFIG.parent, env=dict(os.environ, NO_MKDOCS_2_WARNING="1"))
        import weasyprint
        css = (BASE_CONFIG.parent / "content/print/print.css").read_text()
        weasyprint.HTML(string=html, base_url="file:///specgen-pageset/",
                        url_fetcher=_fetcher(pages)).write_pdf(
            str(work / "floor.pdf"), stylesheets=[weasyprint.CSS(string=css)])
    return run


_PEAK = """
import resource, subprocess, sys, time
t = time.perf_counter()
subprocess.run([sys.executable, "-m", "specgen", "build", sys.argv[1], "--out", sys.argv[2],
                "--quiet"], check=True, stdout=subprocess.DEVNULL)
print(time.perf_counter() - t, resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss)
"""


def _peak_build(project: Path, out: Path) -> tuple[float, float]:
    """(seconds, peak RSS in MiB of the largest process) of one build in a fresh process."""
    done = subprocess.run([sys.executable, "-c", _PEAK, str(project), str(out)], check=True,
                          capture_output=True, text=True)
    seconds, kib = done.stdout.split()
    return float(seconds), int(kib) / 1024


def main(runs: int = 3, large: bool = True) -> None:
    from specgen.build import build, check
    from specgen.synthetic import write_project
    demo = Path(__file__).resolve().parent.parent / "demo_project"
    with tempfile.TemporaryDirectory(prefix="specgen-bench-") as tmp:
        work = Path(tmp)
        project = _project_copy(demo, work)
        a = _median(lambda: check(project), runs)
        outs = iter(range(1000))
        b = _median(lambda: (_cold(), build(project, work / f"out{next(outs)}")), runs)
        csv = project / "lab" / "strength.csv"
        base = csv.read_text()

        def reissue():
            out = work / f"re{next(outs)}"
            _cold()
            build(project, out)
            _cold()  # only the output folder's artefact cache may help
            csv.write_text(base + "M1-90d-C9,M1,90,compressive,7.9,20\n")
            t = time.perf_counter()
            build(project, out)
            csv.write_text(base)
            return time.perf_counter() - t
        c = statistics.median(reissue() for _ in range(runs))
        d = _median(_floor(project, work), runs)
        sizes, times = [], []
        for n in (10, 50, 200):
            syn = write_project(work / f"syn{n}", n)
            times.append(_median(lambda: check(syn), runs))
            sizes.append(n * 8 * 3)
        slope = (math.log(times[-1]) - math.log(times[0])) / (math.log(sizes[-1]) - math.log(sizes[0]))
        f = _peak_build(syn, work / "syn-out") if large else None
    print(f"(a) check, demo                      {a:7.3f} s")
    print(f"(b) full cold build, demo            {b:7.3f} s")
    print(f"(c) re-issue after one new result    {c:7.3f} s")
    print(f"(d) bare toolchain floor (figures + math, mkdocs, WeasyPrint; sequential) {d:7.3f} s")
    for n, s, t in zip((10, 50, 200), sizes, times):
        print(f"(e) check, {n:3d} mixes / {s:5d} results  {t:7.3f} s")
    if f:
        print(f"(f) build, 200 mixes (site + PDF)   {f[0]:7.1f} s, peak memory {f[1]:6.0f} MiB")
    print(f"ratio (b)/(d) = {b / d:.2f}   ratio (c)/(b) = {c / b:.2f}   "
          f"growth exponent of (e) = {slope:.2f}")
