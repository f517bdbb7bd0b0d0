"""Shared fixtures: copies of the demo project, the CLI runner, one shared demo build; the
``--full`` switch (or SPECGEN_FULL_TESTS=1) for the long sweeps.

The default suite runs a bounded form of every sweep (a sample of the kill points, the
accessibility check of every page at the desktop width and of the key pages at the phone
width); ``--full`` runs them whole, and the tests marked ``full`` (a second demo build for
determinism, the demo's issued revision rebuilt) that repeat what the bounded tests show at
several times the cost."""
from __future__ import annotations

import contextlib
import fcntl
import os
import shutil
import subprocess
import sys
import time
from pathlib import Path

import pytest
from click.testing import CliRunner

import specgen.checks.builtin  # noqa: F401  (registers every built-in check, as the pipeline does)

REPO = Path(__file__).resolve().parent.parent
DEMO = REPO / "demo_project"


def pytest_addoption(parser):
    parser.addoption("--full", action="store_true", default=False,
                     help="run the long sweeps whole and the tests marked 'full'")


def pytest_configure(config):
    config.addinivalue_line("markers", "full: long test run only with --full "
                            "(or SPECGEN_FULL_TESTS=1)")
    config.addinivalue_line("markers", "costly(seconds): a test file whose tests take about "
                            "that many CPU seconds (its browser's included): the workers "
                            "start the costliest files first")


def full_run(config) -> bool:
    return bool(config.getoption("--full") or os.environ.get("SPECGEN_FULL_TESTS"))


# Fixtures that check or build the demo (seconds each); the module-scoped ``demo`` of a test
# file is a checked copy of it.
DEMO_FIXTURES = {"demo", "demo_copy", "demo_checked", "demo_build", "starter_build"}


@pytest.hookimpl(trylast=True)   # after -m and -k have deselected
def pytest_collection_modifyitems(config, items):
    """Skip the tests marked ``full`` unless asked; put the files that read the demo build
    last and start that build in the background, so the tests that need no demo build run
    beside it (on both workers) rather than wait for it."""
    if os.environ.get("MUTANT_UNDER_TEST") not in (None, "", "stats"):
        # a mutation run (tools/mutation.py) stops at the first failing test: the tests that
        # check no copy of the demo go first, so a mutant one of them kills costs no demo
        # check.  The same tests run, only their order changes.
        items.sort(key=lambda item: bool(DEMO_FIXTURES & set(item.fixturenames)))
    if not full_run(config):
        skip = pytest.mark.skip(reason="long run: pytest --full (or SPECGEN_FULL_TESTS=1) "
                                "runs it")
        for item in items:
            if "full" in item.keywords:
                item.add_marker(skip)
    late = {item.path for item in items if "demo_build" in item.fixturenames}
    cost = _file_costs(items) if hasattr(config, "workerinput") else {}
    # stable: the order within a file stays.  The declared costly files first, those that
    # need no demo build before those that read it; then the rest, the demo's readers last
    items.sort(key=lambda item: (not cost.get(item.path), item.path in late,
                                 -cost.get(item.path, 0.0)))
    if not config.option.collectonly and any(
            "demo_build" in item.fixturenames and not item.get_closest_marker("skip")
            for item in items):
        _start_demo_build(config, text=any(
            PDF_TEXT_FIXTURES & set(item.fixturenames) and not item.get_closest_marker("skip")
            for item in items))


def _file_costs(items) -> dict:
    """The CPU seconds each test file declares (``pytest.mark.costly(seconds)``).

    pytest-xdist hands a worker a whole file (``--dist loadfile``), in the order the workers
    collected them (``--no-loadscope-reorder``; its default sends the files with the most
    tests first, which left the costliest, one-test files to the end on one worker while
    the other had nothing left to do).  The costliest go first, so the last files handed
    out are short ones and both workers end together.  A costly reader of the demo build
    goes after the costly files that need none (the build is done by then) and before the
    cheap files, which fill the end beside it (the browser pass, over a minute, was the
    last file handed out, with the other worker idle)."""
    cost: dict = {}
    for item in items:
        mark = item.get_closest_marker("costly")
        cost[item.path] = max(cost.get(item.path, 0.0), float(mark.args[0]) if mark else 0.0)
    return cost


def pytest_unconfigure(config):
    """The worker that started the background demo build waits for it before it ends
    (another worker's tests may still need it; an interrupt reaches it with the run)."""
    proc = getattr(config, "_specgen_demo_build", None)
    if proc is not None:
        proc.wait()


# -- one run, several workers ------------------------------------------------------------
# The suite runs on pytest-xdist's workers (``-n 2`` in pyproject's addopts).  A session
# fixture is made once per worker, so the costly ones (the demo build, the starter build,
# the artefact cache) are made once per *run* in a folder every worker shares, under a file
# lock, as pytest-xdist's documentation shows ("Making session-scoped fixtures execute
# only once").  In one process (``-n 0``) the same code runs there alone.

def _run_folder(config) -> Path:
    """A folder shared by every worker of this run (the one process's own without xdist)."""
    base = config._tmp_path_factory.getbasetemp()
    return base.parent if hasattr(config, "workerinput") else base


@contextlib.contextmanager
def _locked(path: Path):
    with open(path, "a") as handle:
        fcntl.flock(handle, fcntl.LOCK_EX)
        try:
            yield
        finally:
            fcntl.flock(handle, fcntl.LOCK_UN)


def once_per_run(config, name: str, make) -> Path:
    """``make(folder)`` run once for the whole run (whichever worker asks first; the others
    wait for it), returning the shared ``folder``.  A failed ``make`` is tried again by the
    next worker that asks, and fails there too, so every test that needs it reports it."""
    shared = _run_folder(config)
    folder, done = shared / name, shared / f"{name}.done"
    with _locked(shared / f"{name}.lock"):
        if not done.exists():
            if folder.exists():
                shutil.rmtree(folder)
            make(folder)
            done.touch()
    return folder


def _cache_folder(config) -> Path:
    folder = _run_folder(config) / "shared-cache"
    folder.mkdir(exist_ok=True)
    return folder


#: the fixtures that read the demo build's PDF text (taken apart once per run: pdf_text.py)
PDF_TEXT_FIXTURES = {"demo_pdf_text", "demo_pdf_prose"}


def _demo_revision() -> str:
    """The demo's current revision (its dossier.yaml, read with PyYAML)."""
    import yaml
    return yaml.safe_load((DEMO / "dossier.yaml").read_text(encoding="utf-8"))["revision"]["code"]


def _start_demo_build(config, text: bool = False) -> None:
    """Start the demo build for the whole run as a command-line build in the background
    (whichever worker collects first); ``demo_build`` waits for it.  With ``text`` (a test
    of the run reads the PDFs' text), the same background job then takes the current
    revision's PDFs apart once (``tests/pdf_text.py``), beside the tests that need no text."""
    shared = _run_folder(config)
    with _locked(shared / "demo-out.lock"):
        if (shared / "demo-out.started").exists():
            return
        (shared / "demo-out.started").touch()
        target = ""
        if text:
            (shared / "demo-text.wanted").touch()
            target = str(shared / "demo-text.json")
        log = open(shared / "demo-out.log", "w")
        config._specgen_demo_build = subprocess.Popen(
            ["sh", "-c", '"$0" -m specgen build "$1" --out "$2" --quiet; echo $? > "$3"; '
             '[ -z "$4" ] || { [ "$(cat "$3")" = 0 ] && "$0" -m tests.pdf_text "$2" "$5" "$4"; '
             'echo $? > "$4.rc"; }',
             sys.executable, str(DEMO), str(shared / "demo-out"), str(shared / "demo-out.rc"),
             target, _demo_revision()],
            stdout=log, stderr=subprocess.STDOUT,
            env={**os.environ, "PYTHONPATH": str(REPO),
                 "SPECGEN_SHARED_CACHE": str(_cache_folder(config))})


@pytest.fixture
def full(request) -> bool:
    """True when the long sweeps run whole (``--full``)."""
    return full_run(request.config)


@pytest.fixture
def demo_copy(tmp_path) -> Path:
    """A private copy of demo_project that a test may edit."""
    dst = tmp_path / "project"
    shutil.copytree(DEMO, dst)
    return dst


def shared_scope(scope: str):
    """``scope`` for a fixture shared between tests, except in the coverage pass of a mutation
    run (tools/mutation.py), where each test computes it afresh: that pass records which
    tests reach each function, and a test that reads a value computed for an earlier test
    would not be counted as reaching the functions it depends on."""
    def choose(fixture_name, config):
        return "function" if os.environ.get("MUTANT_UNDER_TEST") == "stats" else scope
    return choose


@pytest.fixture(scope=shared_scope("session"))
def demo_checked():
    """The demo project checked once per session, (project, results), for the tests that only
    read the results (a test that edits the demo takes ``demo_copy`` and checks that)."""
    from specgen.build import check
    return check(DEMO)


@pytest.fixture
def cli():
    """Run the specgen CLI in-process; returns click's Result."""
    from specgen.cli import cli as group

    def run(*args: str):
        return CliRunner().invoke(group, [str(a) for a in args], catch_exceptions=True)
    return run


@pytest.fixture(scope="session", autouse=True)
def shared_cache(request):
    """One artefact cache shared by every build of the run, on every worker
    (``SPECGEN_SHARED_CACHE``, inherited by the builds run as subprocesses): a figure,
    formula or PDF part drawn once is not drawn again for another output folder.  A test
    about a cold build removes it (``monkeypatch.delenv``)."""
    yield from _environ("SPECGEN_SHARED_CACHE", _cache_folder(request.config))


@pytest.fixture(scope="session", autouse=True)
def user_cache_home(tmp_path_factory):
    """The user's cache folder of the run's commands (``XDG_CACHE_HOME``: the fit cache of
    ``specgen check``, fit_cache.py) in a folder of the run, so the suite never writes to
    the real ``~/.cache``."""
    yield from _environ("XDG_CACHE_HOME", tmp_path_factory.mktemp("user-cache"))


def _environ(name: str, folder: Path):
    """Set ``name`` to ``folder`` for the run (builds run as subprocesses inherit it), yield
    the folder, then put back what was there."""
    before = os.environ.get(name)
    os.environ[name] = str(folder)
    yield folder
    if before is None:
        os.environ.pop(name, None)
    else:
        os.environ[name] = before


@pytest.fixture(scope="session")
def demo_build(request, shared_cache) -> Path:
    """One build of demo_project shared by every end-to-end test of the run, on every worker
    (returns OUT; read it only, or copy it).  Started in the background when the tests are
    collected (``_start_demo_build``); this waits for it."""
    shared = _run_folder(request.config)
    _start_demo_build(request.config)          # (when collection did not, e.g. under -k)
    rc = _wait_for(shared / "demo-out.rc", "the demo build", shared / "demo-out.log")
    if rc != "0":
        pytest.fail("the demo build failed:\n" + (shared / "demo-out.log").read_text())
    return shared / "demo-out"


def _wait_for(path: Path, what: str, log: Path) -> str:
    """The content of ``path`` (a return code a background job writes when it ends)."""
    deadline = time.monotonic() + 3600
    while not path.exists() or not path.read_text().strip():
        if time.monotonic() > deadline:
            pytest.fail(f"{what} did not end within an hour:\n" + log.read_text())
        time.sleep(0.5)
    return path.read_text().strip()


@pytest.fixture(scope="session")
def demo_pdf_pages(request, demo_build) -> dict[str, list[dict[str, str]]]:
    """Every page of the current revision's PDFs of the demo build, taken apart once per
    *run* (``tests/pdf_text.py``: plain text and prose in one pass): by the PDF's path
    relative to the build, a list of ``{"text", "prose"}``.  The background demo build
    does it when the collected tests read PDF text; else (a fixture asked for outside
    them) the first worker that asks does it under the run's lock."""
    import json

    from tests.pdf_text import write
    shared = _run_folder(request.config)
    target = shared / "demo-text.json"
    if (shared / "demo-text.wanted").exists():
        rc = _wait_for(shared / "demo-text.json.rc", "taking the demo PDFs apart",
                       shared / "demo-out.log")
        if rc != "0":
            pytest.fail("taking the demo PDFs apart failed:\n"
                        + (shared / "demo-out.log").read_text())
    else:
        folder = once_per_run(request.config, "demo-text",
                              lambda f: (f.mkdir(), write(demo_build, _demo_revision(),
                                                          f / "text.json")))
        target = folder / "text.json"
    return json.loads(target.read_text(encoding="utf-8"))


@pytest.fixture(scope="session")
def demo_pdf_text(demo_pdf_pages):
    """The text of every page of a PDF of the demo build's current revision (pypdf
    ``extract_text``), taken apart once per run (``demo_pdf_pages``):
    ``demo_pdf_text("R3/WEP-2026-R3.pdf")`` → a tuple of page texts."""
    def pages(relative: str) -> tuple[str, ...]:
        return tuple(page["text"] for page in demo_pdf_pages[relative])
    return pages


@pytest.fixture(scope="session")
def demo_pdf_prose(demo_pdf_pages):
    """What a reader reads of every page of a PDF of the demo build's current revision:
    the text with the monospaced runs (code) left out (``tests/pdf_text.py``), as a tuple
    of page texts: ``demo_pdf_prose("R3/WEP-2026-R3.pdf")``."""
    def pages(relative: str) -> tuple[str, ...]:
        return tuple(page["prose"] for page in demo_pdf_pages[relative])
    return pages


@pytest.fixture(scope="session")
def starter_build(request, shared_cache) -> tuple[Path, Path]:
    """One build of the starter project (``specgen new``), run as the command line runs it,
    shared by the tests of the run that need a small built project: (PROJECT, OUT).  Read
    it only; a test that changes the project or the output takes a copy (``copy_build``)."""
    from specgen.starter import write_starter

    def make(folder: Path) -> None:
        write_starter(folder / "project")
        done = subprocess.run([sys.executable, "-m", "specgen", "build", str(folder / "project"),
                               "--out", str(folder / "out"), "--quiet"], capture_output=True,
                              text=True, env={**os.environ, "PYTHONPATH": str(REPO)})
        assert done.returncode == 0, done.stderr
    folder = once_per_run(request.config, "starter", make)
    return folder / "project", folder / "out"


def copy_build(build: tuple[Path, Path], dest: Path) -> tuple[Path, Path]:
    """A private copy of a built project and its output folder (cache included), as if built
    there: (PROJECT, OUT) under ``dest``."""
    root, out = build
    shutil.copytree(root, dest / "project", symlinks=True)
    shutil.copytree(out, dest / "out", symlinks=True)
    return dest / "project", dest / "out"
