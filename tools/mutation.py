"""Mutation testing of the science and the checks, by hand (never in CI).

Usage (from the repository root; mutmut is in the ``test`` extra)::

    python3 tools/mutation.py science                    # every module of specgen/science/
    python3 tools/mutation.py science --modules grading oxides
    python3 tools/mutation.py checks --modules works_checks works_common
    python3 tools/mutation.py report science             # the figures of the last run
    python3 tools/mutation.py recheck checks --workdir W  # survivors against today's tests
    python3 tools/mutation.py sample checks --modules A B --sample 60 --rng-state 27 --workdir D
    python3 tools/mutation.py estimate checks --workdir D --exact M=KILLED/MUTANTS ...

Each scope runs in its own scratch copy of the repository (``--workdir``, default
``/tmp/specgen-mutation/<scope>``) so that mutmut's ``mutants/`` folder never lands in the
working tree, and with its own tests: the science mutants against ``tests/science/``
(unit tests of pure functions: fast), the check mutants against the scenario tests of the
checks (each evaluates a copy of the demo project: slow, so scope them by module).
``--jobs`` is mutmut's ``--max-children`` (default 1: the machine is shared).
The report prints, per module and per package, the mutants killed (a test failed, or the
mutant timed out), survived, and not covered by any selected test, and the share killed.

``sample`` runs a stratified random sample instead of every mutant (a module is a stratum:
``--sample N`` of its mutants, or a fraction ``--sample 0.1``, drawn with ``--rng-state K``),
and ``estimate`` gives each sampled module's share killed with its Wilson interval and the
package's share as the stratified estimate (modules run whole given by ``--exact``).
"""
from __future__ import annotations

import argparse
import json
import os
import shutil
import subprocess
import sys
from collections import Counter
from math import ceil, sqrt
from statistics import NormalDist
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
# every check module's whole-result file (``tests/test_whole_<module>.py``), found, not listed
CHECK_TESTS += sorted(str(f.relative_to(REPO)) for f in (REPO / "tests").glob("test_whole_*.py"))
# Each check module against the scenario tests that read its checks (found by the check codes
# each module registers), so that a check mutant runs a few files instead of all of them:
# every check is reached by every `check()` of the demo, so mutmut's per-function selection
# alone would pick nearly the whole list above for each mutant.
T = "tests/test_"
CHECK_TESTS_BY_MODULE = {
    "aggregate_checks": [T + "compatibility_checks.py"],
    "audit_checks": [T + "audit.py"],
    "audit_record_checks": [T + "audit.py"],
    "binder_class_checks": [T + "binder_classes.py"],
    "calcination_checks": [T + "firing_phases_hydration_checks.py"],
    "chemistry_checks": [T + "chemistry_checks.py", T + "check_values.py",
                         T + "cementation_index_check.py"],
    "chemistry_common": [T + "chemistry_checks.py", T + "check_values.py",
                         T + "cementation_index_check.py"],
    "colour_checks": [T + "compatibility_checks.py"],
    "compatibility_checks": [T + "compatibility_checks.py"],
    "compatibility_common": [T + "compatibility_checks.py"],
    "composition_checks": [T + "cementation_index_check.py", T + "chemistry_checks.py",
                           T + "revisions.py"],
    "durability_common": [T + "durability_checks.py"],
    "durability_tests_checks": [T + "durability_checks.py"],
    "evidence_checks": [T + "evidence.py"],
    "exposure_checks": [T + "durability_checks.py"],
    "hydration_checks": [T + "firing_phases_hydration_checks.py", T + "check_values.py"],
    "method_checks": [T + "method.py"],
    "phases_checks": [T + "firing_phases_hydration_checks.py", T + "binder_estimates.py"],
    "salt_checks": [T + "compatibility_checks.py", T + "durability_checks.py"],
    "setting_checks": [T + "durability_checks.py"],
    "soundness_checks": [T + "durability_checks.py"],
    "specification_checks": [T + "specification.py", T + "check_values.py"],
    "specification_record_checks": [T + "specification.py", T + "check_values.py"],
    "strength_acceptance_checks": [T + "strength_checks.py", T + "strength_inference_checks.py"],
    "strength_checks": [T + "strength_checks.py",
                        T + "whole_strength_acceptance_checks.py",
                        T + "whole_strength_inference_checks.py"],
    "strength_class_checks": [T + "strength_checks.py"],
    "strength_common": [T + "strength_checks.py", T + "strength_inference_checks.py",
                        T + "whole_strength_checks.py", T + "whole_strength_acceptance_checks.py",
                        T + "whole_strength_inference_checks.py"],
    "strength_inference_checks": [T + "strength_inference_checks.py"],
    "strength_prior_common": [T + "strength_inference_checks.py",
                              T + "whole_strength_inference_checks.py",
                              T + "whole_strength_acceptance_checks.py"],
    "substrate_checks": [T + "durability_checks.py"],
    "sulfate_checks": [T + "durability_checks.py", T + "compatibility_checks.py"],
    "works_checks": [T + "works_checks.py", T + "check_values.py"],
    "works_common": [T + "works_checks.py", T + "check_values.py", T + "whole_works_checks.py"],
    "works_gauging_checks": [T + "works_checks.py"],
}
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


def names_read(module: str, root: Path = REPO) -> set[str]:
    """What a test must name to read the results of check module ``module``: the check codes
    it registers (``register("CODE"``, ``audit_rule("CODE"``) and the quantity names it
    declares (``declare("name"``), plus its top-level functions called or imported by name
    (for a test that calls a helper directly), as regular expressions; with them the codes of
    the check modules that import it (a ``*_common`` module registers nothing: those stand
    for it)."""
    import ast
    import re
    src = (root / "specgen" / "checks" / f"{module}.py").read_text("utf-8")
    pattern = r'(?:register|audit_rule|declare)\(\s*"([A-Za-z0-9_-]+)"'
    names = {re.escape(n) for n in re.findall(pattern, src)}
    # codes made per test kind in an f-string (``code = f"STR-INF-{CODE_OF[test]}"``): the
    # prefix and any last letter (a test names "STR-INF-C")
    made = r'\bcode(?:, title)? = f"([A-Z][A-Z0-9]*(?:-[A-Z0-9]+)*-)\{'
    names |= {re.escape(n) + "[A-Z]" for n in re.findall(made, src)}
    # a function is read when a test calls it (``name(``) or imports it, not when a word of
    # the same spelling ("table") stands in a comment
    names |= {rf"\b{n.name}\s*\(|import[^\n]*\b{n.name}\b" for n in ast.parse(src).body
              if isinstance(n, ast.FunctionDef) and not n.name.startswith("_")}
    for other in sorted((root / "specgen" / "checks").glob("*_checks.py")):
        text = other.read_text("utf-8")
        if f"specgen.checks.{module} import" in text or f"import {module}" in text:
            names |= {re.escape(n) for n in re.findall(pattern, text)}
            names |= {re.escape(n) + "[A-Z]" for n in re.findall(made, text)}
    return names


def tests_naming(files: list[str], names: set[str], root: Path = REPO) -> list[str]:
    """The test functions of ``files`` (node ids ``file::test``) whose text, decorators
    included, names one of ``names``: the tests that read a module's checks.  A file where
    none does is kept whole (its tests may read the checks through a helper).  ``names``
    are regular expressions (``names_read``)."""
    import ast
    import re
    out = []
    for f in files:
        text = (root / f).read_text("utf-8")
        lines = text.split("\n")
        defs = [n for n in ast.parse(text).body if isinstance(n, ast.FunctionDef)]

        def body(node):
            first = min([node.lineno] + [d.lineno for d in node.decorator_list])
            return "\n".join(lines[first - 1:node.end_lineno])
        # a helper of the file that names them (``_curing_of`` calling the check) counts for
        # the tests that call it, and so does a helper calling such a helper (``_lime_portland``
        # calling ``_setting_of``): repeated until no helper is added
        wanted = list(names)
        helpers = [n for n in defs if not n.name.startswith("test_")]
        while True:
            more = [rf"\b{n.name}\s*\(" for n in helpers
                    if rf"\b{n.name}\s*\(" not in wanted
                    and any(re.search(x, body(n)) for x in wanted)]
            if not more:
                break
            wanted += more
        picked = [f"{f}::{n.name}" for n in defs if n.name.startswith("test_")
                  and any(re.search(x, body(n)) for x in wanted)]
        out += picked or [f]
    return out


def module_test_files(module: str) -> list[str]:
    """The test files a check module's mutants run against: its entry in
    CHECK_TESTS_BY_MODULE and, when there is one, its own whole-result file
    (``tests/test_whole_<module>.py``), which need not be listed."""
    own = f"tests/test_whole_{module}.py"
    files = list(CHECK_TESTS_BY_MODULE[module])
    return files + [own] if (REPO / own).exists() and own not in files else files


def tests_for(scope: str, modules: list[str] = (), tests: list[str] = (),
              narrow: bool = True) -> list[str]:
    """The tests a run selects: ``tests`` when given; for check modules that are all mapped,
    the tests of their files in CHECK_TESTS_BY_MODULE that name one of the modules' check
    codes, quantities or functions (``narrow``; the whole files without it); otherwise the
    scope's whole list."""
    if tests:
        return list(tests)
    if scope == "checks" and modules and all(m in CHECK_TESTS_BY_MODULE for m in modules):
        files = sorted({t for m in modules for t in module_test_files(m)})
        if not narrow:
            return files
        names = set().union(*(names_read(m) for m in modules))
        return tests_naming(files, names)
    return list(SCOPES[scope]["tests"])


def undecorate(path: Path) -> int:
    """Rewrite the decorated top-level functions of ``path`` so that the decorators are applied
    after the definition (``f = register(...)(f)``), with the same effect at import: mutmut
    (3.8) never mutates a decorated function, which would leave every registered check body
    out of the run.  Returns how many functions were rewritten."""
    import ast
    src = path.read_text("utf-8")
    lines = src.split("\n")      # ast numbers lines by "\n" only (not str.splitlines)
    found = [n for n in ast.parse(src).body
             if isinstance(n, ast.FunctionDef) and n.decorator_list]
    for node in sorted(found, key=lambda n: n.lineno, reverse=True):
        expr = node.name
        for deco in reversed(node.decorator_list):
            expr = f"({ast.get_source_segment(src, deco)})({expr})"
        first = min(d.lineno for d in node.decorator_list) - 1    # the first '@' line, 0-based
        lines.insert(node.end_lineno, f"{node.name} = {expr}")
        del lines[first:node.lineno - 1]                          # up to the 'def' line
    path.write_text("\n".join(lines), "utf-8")
    return len(found)


def prepare(scope: str, workdir: Path, modules: list[str] = (), tests: list[str] = ()) -> None:
    """Fresh scratch copy of the repository with a mutmut section for ``scope`` (mutants
    made only of ``modules`` when some are named: the others are not generated at all)."""
    spec = SCOPES[scope]
    selection = tests_for(scope, modules, tests)
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
    if scope == "checks":
        for pattern in only:
            for path in sorted(workdir.glob(pattern)):
                undecorate(path)
    args = ["-m", "not e2e", "-p", "no:cacheprovider", "-n", "0"]
    for d in spec["deselect"]:
        args += ["--deselect", d]
    section = (
        "\n[tool.mutmut]\n"
        'source_paths = ["specgen/"]\n'
        f"only_mutate = {_toml_list(only)}\n"
        f'also_copy = ["content/", "demo_project/", "README.md", "DEVELOPERS.md"]\n'
        f"pytest_add_cli_args = {_toml_list(args)}\n"
        f"pytest_add_cli_args_test_selection = {_toml_list(selection)}\n"
    )
    text = (REPO / "pyproject.toml").read_text("utf-8")
    (workdir / "pyproject.toml").write_text(text + section, "utf-8")


def run(scope: str, modules: list[str], workdir: Path, jobs: int,
        tests: list[str] = ()) -> int:
    """Prepare the scratch copy and run mutmut on the named modules (all when none)."""
    prepare(scope, workdir, modules, tests)
    print("tests:", " ".join(tests_for(scope, modules, tests)), flush=True)
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


def _forked(mutants: Path, selection: list[str], names: list[str]):
    """Exit codes of the selection against each mutant of ``names``, each run in a child
    forked from this process after one run without a mutant has imported the package, the
    tests and their libraries (what mutmut does): a survivor then costs its tests, not a
    fresh interpreter's imports.  Yields one pytest exit code per name."""
    import pytest
    import resource
    os.chdir(mutants)
    sys.path.insert(0, str(mutants))
    os.environ.pop("PYTHONPATH", None)
    args = ["-x", "-q", "-p", "no:cacheprovider", "-n", "0", "-m", "not e2e", *selection]
    os.environ["MUTANT_UNDER_TEST"] = ""
    before = resource.getrusage(resource.RUSAGE_SELF)
    with open(os.devnull, "w") as sink:
        saved = os.dup(1), os.dup(2)
        os.dup2(sink.fileno(), 1), os.dup2(sink.fileno(), 2)
        try:
            warm = pytest.main(args)
        finally:
            os.dup2(saved[0], 1), os.dup2(saved[1], 2)
    if warm != 0:
        raise SystemExit(f"the selected tests fail without a mutant (exit {int(warm)}); "
                         "nothing rechecked")
    after = resource.getrusage(resource.RUSAGE_SELF)
    # a mutant that loops is stopped by the kernel (SIGXCPU, exit -24: a timeout, counted as
    # killed as mutmut counts it) after ten times the CPU of the run without a mutant (CPU,
    # not wall time: the machine is shared), and 30 s more for the imports that run warmed
    warm_cpu = (after.ru_utime + after.ru_stime) - (before.ru_utime + before.ru_stime)
    limit = int(10 * warm_cpu) + 30
    for name in names:
        pid = os.fork()
        if pid == 0:      # the child: the mutant's run, its output discarded
            resource.setrlimit(resource.RLIMIT_CPU, (limit, limit + 5))
            with open(os.devnull, "w") as sink:
                os.dup2(sink.fileno(), 1), os.dup2(sink.fileno(), 2)
                os.environ["MUTANT_UNDER_TEST"] = name
                try:
                    code = int(pytest.main(args))
                except BaseException:
                    code = 1
            os._exit(code)
        yield os.waitstatus_to_exitcode(os.waitpid(pid, 0)[1])


def _function_of(mutant: str) -> str:
    """The function a mutant name belongs to: ``pkg.mod.x_name__mutmut_3`` -> ``name``,
    ``pkg.mod.xǁClassǁname__mutmut_3`` -> ``name``."""
    last = mutant.rsplit(".", 1)[-1].rsplit("__mutmut_", 1)[0]
    return last.split("ǁ")[-1] if "ǁ" in last else last[2:]


def recheck(scope: str, workdir: Path, tests: list[str] = (), fork: bool = False,
            unrun: bool = False, functions: list[str] = ()) -> int:
    """Run each surviving mutant of a finished run (and each no test reached then) again
    against the tests as they are now
    (the working tree's ``tests/`` copied into the scratch copy first): a mutant that a test
    added since the run kills is recorded as killed (exit code 1) in mutmut's meta file.
    ``tests`` narrows what runs (default: the run's selection); returns how many were killed.
    ``fork``: each mutant in a child forked from one warm process (:func:`_forked`) instead
    of a fresh interpreter per mutant (a science survivor: about 1 CPU s instead of 6).
    ``unrun``: also the mutants a stopped run never reached (a survivor there means only that
    the narrowed selection does not kill it: a lower bound of the killed share).
    ``functions``: only the mutants of these functions (names as in the module, methods by
    their own name), the others left as they are.
    """
    mutants = workdir / "mutants"
    for dst in (workdir / "tests", mutants / "tests"):
        shutil.rmtree(dst, ignore_errors=True)
        shutil.copytree(REPO / "tests", dst, ignore=shutil.ignore_patterns("__pycache__", "*.pyc"))
    root = mutants / SCOPES[scope]["package"]
    env = {k: v for k, v in os.environ.items() if k != "PYTHONPATH"}
    killed = 0
    for meta in sorted(root.glob("*.py.meta")):
        data = json.loads(meta.read_text("utf-8"))
        module = meta.name[:-len(".py.meta")]
        selection = tests_for(scope, [module], tests)
        clean = None if fork else subprocess.run(   # the control: without a mutant the
            [sys.executable, "-m", "pytest", "-x", "-q", "-p", "no:cacheprovider", "-n", "0",
             "-m", "not e2e", *selection], cwd=mutants,       # selection must pass (forked:
            env={**env, "MUTANT_UNDER_TEST": ""},              # the warm run is the control)
            stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
        if clean is not None and clean.returncode != 0:
            raise SystemExit(f"{module}: the selected tests fail without a mutant "
                             f"(exit {clean.returncode}); nothing rechecked")
        # survivors, and mutants no selected test reached at the run (a test added since may)
        again = (0, 33, None) if unrun else (0, 33)
        names = [n for n, code in sorted(data["exit_code_by_key"].items()) if code in again
                 and (not functions or _function_of(n) in functions)]
        codes = (_forked(mutants, selection, names) if fork else
                 (subprocess.run(
                     [sys.executable, "-m", "pytest", "-x", "-q", "-p", "no:cacheprovider",
                      "-n", "0", "-m", "not e2e", *selection],
                     cwd=mutants, env={**env, "MUTANT_UNDER_TEST": name},
                     stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL).returncode
                  for name in names))
        for name, code in zip(names, codes):
            print(f"{name}: {'killed' if code == 1 else 'survived'}", flush=True)
            if code == 1 or data["exit_code_by_key"][name] is None:
                # the run's own code is kept beside (``estimate --as-run``): a test written
                # from a sampled survivor makes the sample no longer independent of the tests
                data.setdefault("exit_code_at_run", {}).setdefault(
                    name, data["exit_code_by_key"][name])
                data["exit_code_by_key"][name] = 1 if code == 1 else 0
                killed += code == 1
                meta.write_text(json.dumps(data), "utf-8")
    return killed


def sample_names(names_by_module: dict[str, list[str]], size: float,
                 rng_state: int) -> dict[str, list[str]]:
    """A stratified random sample of mutant names: each module (stratum) gets a simple random
    sample without replacement of ``size`` of its mutants (an integer count, or a fraction of
    the module when ``0 < size < 1``, rounded up; the whole module when it has no more),
    drawn by ``random.Random`` from the random state ``rng_state`` and the module's name, so
    the draw of one module does not depend on which others are drawn with it.  Names are
    sorted before the draw (the meta files' order does not matter); the result keeps the
    order of the draw, so that every prefix of it is itself a simple random sample (what
    ``random.sample`` promises of its sub-slices): a run may go through the draw in passes
    (``--upto``) and stop between them."""
    import random
    out = {}
    for module in sorted(names_by_module):
        names = sorted(set(names_by_module[module]))
        n = ceil(size * len(names)) if 0 < size < 1 else int(size)
        rng = random.Random(f"{rng_state}:{module}")
        out[module] = rng.sample(names, min(n, len(names)))
    return out


Z95 = NormalDist().inv_cdf(0.975)      # 1.959964: the two-sided 95 % normal quantile


def wilson(killed: int, n: int, z: float = Z95) -> tuple[float, float]:
    """Wilson's score interval for a binomial share ``killed / n`` (Wilson, J. Amer. Statist.
    Assoc. 22, 1927): the shares p whose score |k/n − p| / sqrt(p(1 − p)/n) is at most z."""
    p = killed / n
    d = 1 + z * z / n
    mid = (p + z * z / (2 * n)) / d
    half = z * sqrt(p * (1 - p) / n + z * z / (4 * n * n)) / d
    return max(0.0, mid - half), min(1.0, mid + half)


def stratified(strata: list[tuple[int, int, int]], z: float = Z95) -> dict:
    """The stratified estimate of a proportion from ``(N_h, n_h, k_h)`` per stratum (mutants
    in the module, mutants run, killed) — Cochran, *Sampling Techniques* (3rd ed., 1977),
    ch. 5, stratified random sampling for proportions:
    p_st = Σ W_h p_h with W_h = N_h / N, and its estimated variance
    v(p_st) = Σ W_h² (1 − f_h) p_h q_h / (n_h − 1), f_h = n_h / N_h (a stratum run whole
    adds none); the interval is p_st ± z·sqrt(v), the normal approximation."""
    big_n = sum(s[0] for s in strata)
    p = sum(nh_all / big_n * k / n for nh_all, n, k in strata)
    var = sum((nh_all / big_n) ** 2 * (1 - n / nh_all) * (k / n) * (1 - k / n) / (n - 1)
              for nh_all, n, k in strata if n < nh_all)
    se = sqrt(var)
    return {"mutants": big_n, "share": p, "se": se,
            "low": max(0.0, p - z * se), "high": min(1.0, p + z * se)}


def generate(workdir: Path) -> dict[str, list[str]]:
    """Make the mutants of a prepared scratch copy with mutmut's own generation (nothing
    run): the names of each mutated module, from mutmut's meta files."""
    env = {k: v for k, v in os.environ.items() if k != "PYTHONPATH"}
    code = ("from mutmut.__main__ import *\n"
            "set_mutant_under_test('mutant_generation')\n"
            "copy_src_dir(); copy_also_copy_files(); setup_source_paths(); create_mutants(1)\n")
    subprocess.run([sys.executable, "-c", code], cwd=workdir, env=env, check=True,
                   stdout=subprocess.DEVNULL)
    out = {}
    for meta in sorted(workdir.glob("mutants/**/*.py.meta")):
        out[meta.name[:-len(".py.meta")]] = sorted(
            json.loads(meta.read_text("utf-8"))["exit_code_by_key"])
    return out


def _record(code: int) -> int:
    """A pytest exit code of a mutant's run as mutmut records it: 0 survived, 5 (no test
    collected) as mutmut's 33 (no tests), anything else as it came (1 killed, -24 the CPU
    limit: a timeout)."""
    return 33 if code == 5 else code


def sample(scope: str, modules: list[str], workdir: Path, size: float, rng_state: int,
           tests: list[str] = (), upto: int | None = None) -> None:
    """Per module, in ``workdir/MODULE``: a fresh scratch copy, its mutants made and a sample
    drawn (``sample.json``), then the first ``upto`` of the draw run (all when None;
    :func:`sample_run`, in a fresh interpreter).  A module whose draw of the same size and
    random state is already there is not made again: the run goes on where it stopped."""
    for module in modules:
        wd = workdir / module
        drawn = wd / "sample.json"
        old = json.loads(drawn.read_text("utf-8")) if drawn.exists() else {}
        if (old.get("size"), old.get("rng_state")) != (size, rng_state):
            prepare(scope, wd, [module], tests)
            names = generate(wd).get(module, [])
            picked = sample_names({module: names}, size, rng_state)[module]
            drawn.write_text(json.dumps(
                {"module": module, "size": size, "rng_state": rng_state,
                 "mutants": len(names), "names": picked,
                 "tests": tests_for(scope, [module], tests)}, indent=1), "utf-8")
            print(f"{module}: {len(picked)} of {len(names)} mutants drawn", flush=True)
        env = {k: v for k, v in os.environ.items() if k != "PYTHONPATH"}
        subprocess.run([sys.executable, str(Path(__file__).resolve()), "sample-run", scope,
                        "--workdir", str(wd)] + ([] if upto is None else ["--upto", str(upto)]),
                       env=env, check=True)


def sample_run(scope: str, workdir: Path, upto: int | None = None) -> None:
    """Run the mutants drawn in ``workdir/sample.json`` (the first ``upto`` of the draw, those
    not run yet) against the module's selection, each in a child forked from one warm
    process (:func:`_forked`): a mutant survives only if every selected test passes; its
    exit code goes into mutmut's meta file (the mutants not drawn stay "not run")."""
    drawn = json.loads((workdir / "sample.json").read_text("utf-8"))
    meta = workdir / "mutants" / SCOPES[scope]["package"] / f"{drawn['module']}.py.meta"
    data = json.loads(meta.read_text("utf-8"))
    todo = [n for n in drawn["names"][:upto] if data["exit_code_by_key"][n] is None]
    if not todo:
        return
    for name, code in zip(todo, _forked(workdir / "mutants", drawn["tests"], todo)):
        data["exit_code_by_key"][name] = _record(code)
        meta.write_text(json.dumps(data), "utf-8")
        print(f"{name}: {'killed' if _record(code) in KILLED else 'survived'} ({code})",
              flush=True)


def estimate(scope: str, workdir: Path, exact: list[str] = (), as_run: bool = False) -> dict:
    """The package's share killed from the sampled modules under ``workdir`` (one folder per
    module) and the modules run whole (``exact``: ``MODULE=KILLED/MUTANTS``): per module the
    share with its Wilson interval, and the stratified estimate with its interval.
    ``as_run``: each mutant's code at the run, before any recheck (the unbiased figure for
    the tests of the run's commit)."""
    strata, rows = [], []
    for item in exact:
        module, figures = item.split("=")
        k, big_n = (int(x) for x in figures.split("/"))
        strata.append((big_n, big_n, k))
        rows.append((module, big_n, big_n, k))
    for meta in sorted(workdir.glob(f"*/mutants/{SCOPES[scope]['package']}/*.py.meta")):
        data = json.loads(meta.read_text("utf-8"))
        codes = {**data["exit_code_by_key"],
                 **(data.get("exit_code_at_run", {}) if as_run else {})}
        ran = [c for c in codes.values() if c is not None]
        k, module = sum(c in KILLED for c in ran), meta.name[:-len(".py.meta")]
        if len(ran) >= 2:            # a stratum's variance needs two mutants run
            strata.append((len(codes), len(ran), k))
            rows.append((module, len(codes), len(ran), k))
        else:
            print(f"{module}: {len(ran)} mutant run, left out (two are needed)")
    print(f"{'module':28} {'mutants':>8} {'run':>5} {'killed':>7} {'killed %':>9} "
          f"{'95 % (Wilson)':>15}")
    for module, big_n, n, k in rows:
        lo, hi = wilson(k, n)
        print(f"{module:28} {big_n:8} {n:5} {k:7} {100 * k / n:9.1f} "
              f"{100 * lo:7.1f}–{100 * hi:5.1f}")
    est = stratified(strata)
    print(f"package (stratified, {len(rows)} modules, {est['mutants']} mutants): "
          f"{100 * est['share']:.1f} % killed, 95 % interval {100 * est['low']:.1f}–"
          f"{100 * est['high']:.1f} % (standard error {100 * est['se']:.2f} points)")
    return est


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    steps = ("report", "survivors", "recheck", "sample", "sample-run", "estimate")
    ap.add_argument("scope", choices=[*SCOPES, *steps])
    ap.add_argument("target", nargs="?", choices=list(SCOPES),
                    help="for " + "/".join(steps) + ": which scope")
    ap.add_argument("--modules", nargs="*", default=[],
                    help="module names (e.g. grading works_checks); default all")
    ap.add_argument("--tests", nargs="*", default=[],
                    help="test files or node ids instead of the scope's selection (checks: "
                         "by default those mapped to the named modules)")
    ap.add_argument("--jobs", type=int, default=1)
    ap.add_argument("--fork", action="store_true",
                    help="recheck: run each mutant in a child forked from one warm process")
    ap.add_argument("--unrun", action="store_true",
                    help="recheck: also run the mutants a stopped run did not reach")
    ap.add_argument("--functions", nargs="*", default=[],
                    help="recheck: only the mutants of these functions")
    ap.add_argument("--sample", type=float, default=60,
                    help="sample: mutants drawn per module (a count, or a fraction below 1)")
    ap.add_argument("--rng-state", type=int, default=27,
                    help="sample: the random state of the draw (the same state, the same draw)")
    ap.add_argument("--upto", type=int, default=None,
                    help="sample: run only the first UPTO of each module's draw (a pass)")
    ap.add_argument("--as-run", action="store_true",
                    help="estimate: the codes of the run, before any recheck")
    ap.add_argument("--exact", nargs="*", default=[],
                    help="estimate: modules run whole, as MODULE=KILLED/MUTANTS")
    ap.add_argument("--workdir", type=Path, default=None)
    a = ap.parse_args(argv)
    scope = a.target if a.scope in steps else a.scope
    if scope is None:
        ap.error("say which scope: science or checks")
    workdir = a.workdir or Path("/tmp/specgen-mutation") / scope
    if a.scope == "report":
        report(scope, workdir)
        return 0
    if a.scope == "recheck":
        killed = recheck(scope, workdir, a.tests, a.fork, a.unrun, a.functions)
        print(f"killed on recheck: {killed}")
        report(scope, workdir)
        return 0
    if a.scope == "sample":
        if not a.modules:
            ap.error("sample: name the modules (--modules)")
        sample(scope, a.modules, workdir, a.sample, a.rng_state, a.tests, a.upto)
        estimate(scope, workdir)
        return 0
    if a.scope == "sample-run":
        sample_run(scope, workdir, a.upto)
        report(scope, workdir)
        return 0
    if a.scope == "estimate":
        estimate(scope, workdir, a.exact, a.as_run)
        return 0
    if a.scope == "survivors":
        print("\n".join(survivors(scope, workdir)))
        return 0
    code = run(scope, a.modules, workdir, a.jobs, a.tests)
    report(scope, workdir)
    return code


if __name__ == "__main__":
    raise SystemExit(main())
