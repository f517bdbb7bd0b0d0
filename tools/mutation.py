"""Mutation testing of the science and the checks, by hand (never in CI).

Usage (from the repository root; mutmut is in the ``test`` extra)::

    python3 tools/mutation.py science                    # every module of specgen/science/
    python3 tools/mutation.py science --modules grading oxides
    python3 tools/mutation.py checks --modules works_checks works_common
    python3 tools/mutation.py report science             # the figures of the last run

Each scope runs in its own scratch copy of the repository (``--workdir``, default
``/tmp/specgen-mutation/<scope>``) so that mutmut's ``mutants/`` folder never lands in the
working tree, and with its own tests: the science mutants against ``tests/science/``
(unit tests of pure functions: fast), the check mutants against the scenario tests of the
checks (each evaluates a copy of the demo project: slow, so scope them by module).
``--jobs`` is mutmut's ``--max-children`` (default 1: the machine is shared).
The report prints, per module and per package, the mutants killed (a test failed, or the
mutant timed out), survived, and not covered by any selected test, and the share killed.
"""
from __future__ import annotations

import argparse
import json
import os
import shutil
import subprocess
import sys
from collections import Counter
from pathlib import Path

REPO = Path(__file__).resolve().parent.parent

# Tests that only read files, the browser or the PDF, and the slow whole-folder cases, are
# left out of the checks' selection: they exercise no check arithmetic.
CHECK_TESTS = [
    "tests/test_cementation_index_check.py", "tests/test_chemistry_checks.py",
    "tests/test_compatibility_checks.py", "tests/test_firing_phases_hydration_checks.py",
    "tests/test_strength_checks.py", "tests/test_works_checks.py",
    "tests/test_specification.py", "tests/test_check_values.py", "tests/test_revisions.py",
]
SCOPES = {
    "science": {"package": "specgen/science", "tests": ["tests/science"], "deselect": []},
    "checks": {"package": "specgen/checks", "tests": CHECK_TESTS,
               "deselect": ["tests/test_specification.py::"
                            "test_malformed_specification_ends_in_located_messages"]},
}
# mutmut's exit codes: 1 = a test failed (killed), 0 = all passed (survived),
# 33 = no test covers it, 24/36/-24 = timeout (counted as killed), 152 = killed by the OS.
KILLED = {1, 3, -24, 24, 36, 152, 255, -9, -11}


def _toml_list(items):
    return "[" + ", ".join(json.dumps(i) for i in items) + "]"


def prepare(scope: str, workdir: Path, modules: list[str] = ()) -> None:
    """Fresh scratch copy of the repository with a mutmut section for ``scope`` (mutants
    made only of ``modules`` when some are named: the others are not generated at all)."""
    spec = SCOPES[scope]
    if workdir.exists():
        shutil.rmtree(workdir)
    workdir.mkdir(parents=True)
    for name in ("specgen", "content", "demo_project", "tests", "README.md", "DEVELOPERS.md"):
        src = REPO / name
        if src.is_dir():
            shutil.copytree(src, workdir / name,
                            ignore=shutil.ignore_patterns("__pycache__", "*.pyc"))
        else:
            shutil.copy2(src, workdir / name)
    if modules:
        only = [f"{spec['package']}/{m}.py" for m in modules]
    elif scope == "checks":
        only = [f"{spec['package']}/*_checks.py", f"{spec['package']}/*_common.py"]
    else:
        only = [f"{spec['package']}/*"]
    args = ["-m", "not e2e", "-p", "no:cacheprovider"]
    for d in spec["deselect"]:
        args += ["--deselect", d]
    section = (
        "\n[tool.mutmut]\n"
        'source_paths = ["specgen/"]\n'
        f"only_mutate = {_toml_list(only)}\n"
        f'also_copy = ["content/", "demo_project/", "README.md", "DEVELOPERS.md"]\n'
        f"pytest_add_cli_args = {_toml_list(args)}\n"
        f"pytest_add_cli_args_test_selection = {_toml_list(spec['tests'])}\n"
    )
    text = (REPO / "pyproject.toml").read_text("utf-8")
    (workdir / "pyproject.toml").write_text(text + section, "utf-8")


def run(scope: str, modules: list[str], workdir: Path, jobs: int) -> int:
    """Prepare the scratch copy and run mutmut on the named modules (all when none)."""
    prepare(scope, workdir, modules)
    pkg = SCOPES[scope]["package"].replace("/", ".")
    names = [f"{pkg}.{m}.*" for m in modules]
    env = {k: v for k, v in os.environ.items() if k != "PYTHONPATH"}
    cmd = [sys.executable, "-c", "from mutmut.__main__ import cli; cli()", "run",
           "--max-children", str(jobs), *names]
    return subprocess.call(cmd, cwd=workdir, env=env)


def report(scope: str, workdir: Path) -> dict:
    """Counts per module from mutmut's meta files; prints a table and returns it."""
    root = workdir / "mutants" / SCOPES[scope]["package"]
    table: dict[str, Counter] = {}
    for meta in sorted(root.glob("*.py.meta")):
        codes = json.loads(meta.read_text("utf-8"))["exit_code_by_key"]
        c = Counter()
        for name, code in codes.items():
            if code is None:
                c["not run"] += 1
            elif code in KILLED:
                c["killed"] += 1
            elif code == 0:
                c["survived"] += 1
            elif code == 33:
                c["no tests"] += 1
            else:
                c[f"exit {code}"] += 1
        table[meta.name[:-len(".py.meta")]] = c
    total = Counter()
    print(f"{'module':28} {'mutants':>8} {'killed':>7} {'survived':>9} {'no tests':>9} "
          f"{'not run':>8} {'killed %':>9}")
    for mod, c in table.items():
        run_ = c["killed"] + c["survived"] + c["no tests"]
        total.update(c)
        share = f"{100 * c['killed'] / run_:.1f}" if run_ else "—"
        print(f"{mod:28} {sum(c.values()):8} {c['killed']:7} {c['survived']:9} "
              f"{c['no tests']:9} {c['not run']:8} {share:>9}")
    run_ = total["killed"] + total["survived"] + total["no tests"]
    share = f"{100 * total['killed'] / run_:.1f}" if run_ else "—"
    print(f"{'TOTAL':28} {sum(total.values()):8} {total['killed']:7} {total['survived']:9} "
          f"{total['no tests']:9} {total['not run']:8} {share:>9}")
    return table


def survivors(scope: str, workdir: Path) -> list[str]:
    """Names of the surviving mutants (``mutmut show NAME`` in the workdir shows each)."""
    root = workdir / "mutants" / SCOPES[scope]["package"]
    out = []
    for meta in sorted(root.glob("*.py.meta")):
        codes = json.loads(meta.read_text("utf-8"))["exit_code_by_key"]
        out += [n for n, code in codes.items() if code in (0, 33)]
    return out


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("scope", choices=[*SCOPES, "report", "survivors"])
    ap.add_argument("target", nargs="?", choices=list(SCOPES),
                    help="for report/survivors: which scope")
    ap.add_argument("--modules", nargs="*", default=[],
                    help="module names (e.g. grading works_checks); default all")
    ap.add_argument("--jobs", type=int, default=1)
    ap.add_argument("--workdir", type=Path, default=None)
    a = ap.parse_args(argv)
    scope = a.target if a.scope in ("report", "survivors") else a.scope
    if scope is None:
        ap.error("say which scope: science or checks")
    workdir = a.workdir or Path("/tmp/specgen-mutation") / scope
    if a.scope == "report":
        report(scope, workdir)
        return 0
    if a.scope == "survivors":
        print("\n".join(survivors(scope, workdir)))
        return 0
    code = run(scope, a.modules, workdir, a.jobs)
    report(scope, workdir)
    return code


if __name__ == "__main__":
    raise SystemExit(main())
