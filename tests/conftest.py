"""Shared fixtures: copies of the demo project, the CLI runner, one shared demo build; the
``--full`` switch (or SPECGEN_FULL_TESTS=1) for the long sweeps.

The default suite runs a bounded form of every sweep (a sample of the kill points, the
accessibility check of every page at the desktop width and of the key pages at the phone
width); ``--full`` runs them whole, and the tests marked ``full`` (a second demo build for
determinism, the demo's issued revision rebuilt) that repeat what the bounded tests show at
several times the cost."""
from __future__ import annotations

import os
import shutil
import subprocess
import sys
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


def full_run(config) -> bool:
    return bool(config.getoption("--full") or os.environ.get("SPECGEN_FULL_TESTS"))


# Fixtures that check or build the demo (seconds each); the module-scoped ``demo`` of a test
# file is a checked copy of it.
DEMO_FIXTURES = {"demo", "demo_copy", "demo_checked", "demo_build", "starter_build"}


def pytest_collection_modifyitems(config, items):
    if os.environ.get("MUTANT_UNDER_TEST") not in (None, "", "stats"):
        # a mutation run (tools/mutation.py) stops at the first failing test: the tests that
        # check no copy of the demo go first, so a mutant one of them kills costs no demo
        # check.  The same tests run, only their order changes.
        items.sort(key=lambda item: bool(DEMO_FIXTURES & set(item.fixturenames)))
    if full_run(config):
        return
    skip = pytest.mark.skip(reason="long run: pytest --full (or SPECGEN_FULL_TESTS=1) runs it")
    for item in items:
        if "full" in item.keywords:
            item.add_marker(skip)


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
def shared_cache(tmp_path_factory):
    """One artefact cache shared by every build of the session (``SPECGEN_SHARED_CACHE``,
    inherited by the builds run as subprocesses): a figure, formula or PDF part drawn once
    is not drawn again for another output folder.  A test about a cold build removes it
    (``monkeypatch.delenv``)."""
    folder = tmp_path_factory.mktemp("shared-cache")
    before = os.environ.get("SPECGEN_SHARED_CACHE")
    os.environ["SPECGEN_SHARED_CACHE"] = str(folder)
    yield folder
    if before is None:
        os.environ.pop("SPECGEN_SHARED_CACHE", None)
    else:
        os.environ["SPECGEN_SHARED_CACHE"] = before


@pytest.fixture(scope="session")
def demo_build(tmp_path_factory) -> Path:
    """One build of demo_project shared by every end-to-end test (returns OUT)."""
    from specgen.build import build
    out = tmp_path_factory.mktemp("demo-out")
    build(DEMO, out)
    return out


@pytest.fixture(scope="session")
def starter_build(tmp_path_factory, shared_cache) -> tuple[Path, Path]:
    """One build of the starter project (``specgen new``), run as the command line runs it,
    shared by the tests that need a small built project: (PROJECT, OUT).  Read it only; a
    test that changes the project or the output takes a copy (``copy_build``)."""
    from specgen.starter import write_starter
    root = tmp_path_factory.mktemp("starter") / "project"
    write_starter(root)
    out = root.parent / "out"
    done = subprocess.run([sys.executable, "-m", "specgen", "build", str(root), "--out",
                           str(out), "--quiet"], capture_output=True, text=True,
                          env={**os.environ, "PYTHONPATH": str(REPO)})
    assert done.returncode == 0, done.stderr
    return root, out


def copy_build(build: tuple[Path, Path], dest: Path) -> tuple[Path, Path]:
    """A private copy of a built project and its output folder (cache included), as if built
    there: (PROJECT, OUT) under ``dest``."""
    root, out = build
    shutil.copytree(root, dest / "project", symlinks=True)
    shutil.copytree(out, dest / "out", symlinks=True)
    return dest / "project", dest / "out"
