"""Shared fixtures: copies of the demo project, the CLI runner, one shared demo build."""
from __future__ import annotations

import shutil
from pathlib import Path

import pytest
from click.testing import CliRunner

REPO = Path(__file__).resolve().parent.parent
DEMO = REPO / "demo_project"


@pytest.fixture
def demo_copy(tmp_path) -> Path:
    """A private copy of demo_project that a test may edit."""
    dst = tmp_path / "project"
    shutil.copytree(DEMO, dst)
    return dst


@pytest.fixture
def cli():
    """Run the specgen CLI in-process; returns click's Result."""
    from specgen.cli import cli as group

    def run(*args: str):
        return CliRunner().invoke(group, [str(a) for a in args], catch_exceptions=True)
    return run


@pytest.fixture(scope="session")
def demo_build(tmp_path_factory) -> Path:
    """One build of demo_project shared by every end-to-end test (returns OUT)."""
    from specgen.build import build
    out = tmp_path_factory.mktemp("demo-out")
    build(DEMO, out)
    return out
