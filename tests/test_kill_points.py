"""Publishing atomic end to end: a build killed (SIGKILL) at every point it passes leaves
every revision that existed reachable and verified, and the root index pointing at a
revision that exists; a read-only or full output folder is found before rendering.

The kill points are learnt from a traced build (``SPECGEN_KILL_TRACE``), so the table has
one row per point the build really passes: load, check, render, the site, each PDF part,
the contents, the assembled PDF, the staged revision, the move (before and after the
folders are exchanged), the revision list and the root index.  The test prints the table.
"""
from __future__ import annotations

import errno
import os
import shutil
import signal
import subprocess
import sys
from pathlib import Path

import pytest

from specgen.build import verify
from tests.conftest import copy_build
from tests.helpers import edit

pytestmark = pytest.mark.costly(60)   # CPU s (tests/conftest.py)

REPO = Path(__file__).resolve().parent.parent


def run_build(root, out, **env):
    return subprocess.run([sys.executable, "-m", "specgen", "build", str(root), "--out", str(out),
                           "--quiet"], capture_output=True, text=True,
                          env={**os.environ, "PYTHONPATH": str(REPO), **env})


@pytest.fixture(scope="module")
def built(starter_build, tmp_path_factory):
    """A copy of the built starter project (the kill tests change it and build again)."""
    return copy_build(starter_build, tmp_path_factory.mktemp("kill"))


def state(out: Path) -> dict:
    """What a reader finds: the revisions, where the root index points, what verify says."""
    index = (out / "index.html").read_text(encoding="utf-8")
    target = index.split("url=", 1)[1].split("/", 1)[0]
    return {"revisions": sorted(d.name for d in out.iterdir()
                                if d.is_dir() and not d.name.startswith(".")),
            "index": target, "differences": verify(out)["differences"]}


#: the kill points of the default run, one per stage and both sides of the exchange of the
#: folders (--full: every point the traced build passes)
SAMPLE = ("check", "render", "pdf-part-1", "pdf-assembled", "move", "moved", "index")


@pytest.mark.e2e
def test_kill_at_every_point_leaves_every_revision_reachable(built, tmp_path, full):
    root, out = built
    before = state(out)
    assert before["differences"] == [] and before["revisions"] == ["R1"]
    # new inputs: the killed builds would change R1
    edit(root / "lab" / "strength.csv", "M1-07d-C1,M1,7,compressive,1.9",
         "M1-07d-C1,M1,7,compressive,1.93")
    trace = tmp_path / "trace"
    shutil.copytree(out, tmp_path / "traced-out")  # the same rebuild as the killed ones
    traced = run_build(root, tmp_path / "traced-out", SPECGEN_KILL_TRACE=str(trace))
    assert traced.returncode == 0, traced.stderr
    points = trace.read_text().split()
    assert {"load", "check", "render", "site", "pdf-part-1", "pdf-front", "pdf-assembled",
            "staged", "move", "moved", "versions", "index"} <= set(points), points
    rows = []
    for point in (points if full else [p for p in points if p in SAMPLE]):
        done = run_build(root, out, SPECGEN_KILL_AT=point)
        after = state(out)
        rows.append((point, done.returncode, after))
        assert done.returncode == -signal.SIGKILL, (point, done.stderr)
        assert "R1" in after["revisions"], point
        assert after["index"] in after["revisions"], point
        assert after["differences"] == [], (point, after["differences"])
    print("\nkill point       exit  revisions  index → verify")
    for point, code, after in rows:
        print(f"{point:16s} {code:4d}  {','.join(after['revisions']):9s}  {after['index']:5s}   "
              f"{'clean' if not after['differences'] else after['differences']}")
    again = run_build(root, out)
    assert again.returncode == 0, again.stderr
    assert verify(out)["differences"] == []
    assert [p.name for p in out.iterdir() if p.name.startswith(".")] == [".cache"]


@pytest.mark.e2e
def test_kill_between_the_two_renames_is_repaired(built):
    """Where folders cannot be exchanged (forced here), a build killed between its two
    renames leaves the old copy aside; the next build puts it back first, then replaces it."""
    root, out = built
    done = run_build(root, out, SPECGEN_KILL_AT="between-renames", SPECGEN_NO_EXCHANGE="1")
    assert done.returncode == -signal.SIGKILL
    assert [p.name for p in out.glob(".old-*")], "the old copy waits beside the folder"
    from specgen.publish.output import recover
    recover(out)
    assert state(out)["differences"] == []
    assert run_build(root, out).returncode == 0 and verify(out)["differences"] == []


def _no_render(*args, **kwargs):
    raise AssertionError("the render stage was reached")


def test_read_only_output_found_before_rendering(built, cli, monkeypatch):
    """Run as root here, where chmod cannot make a folder read-only: the file system's answer
    (EROFS) is simulated where the output folder is first written."""
    import specgen.publish.output as output
    import specgen.report.render as render
    root, out = built

    def read_only(*args, **kwargs):
        raise OSError(errno.EROFS, "Read-only file system")
    monkeypatch.setattr(output.tempfile, "mkdtemp", read_only)
    monkeypatch.setattr(render, "render", _no_render)
    result = cli("build", root, "--out", out, "--quiet")
    assert result.exit_code == 2, result.output
    assert result.output.strip() == (f"{out}: cannot write the output folder (Read-only file "
                                     "system). Fix: choose a writable folder with --out, or "
                                     "free disk space.")


@pytest.mark.skipif(os.geteuid() == 0, reason="root writes into read-only folders")
def test_read_only_output_found_before_rendering_for_real(built, tmp_path, cli, monkeypatch):
    import specgen.report.render as render
    root, _ = built
    ro = tmp_path / "ro"
    ro.mkdir()
    ro.chmod(0o500)
    monkeypatch.setattr(render, "render", _no_render)
    result = cli("build", root, "--out", ro / "out", "--quiet")
    assert result.exit_code == 2 and "cannot write the output folder" in result.output


def test_full_output_disk_found_before_rendering(built, cli, monkeypatch):
    import specgen.publish.output as output
    import specgen.report.render as render
    root, out = built
    real = os.statvfs

    class Full:
        def __init__(self, path):
            s = real(path)
            self.f_frsize, self.f_bavail = s.f_frsize, 10  # ten blocks left

    monkeypatch.setattr(output.os, "statvfs", Full)
    monkeypatch.setattr(render, "render", _no_render)
    result = cli("build", root, "--out", out, "--quiet")
    assert result.exit_code == 2, result.output
    assert f"{out}: the disk has 0 MiB free; a revision needs about " in result.output
    assert "Nothing was written." in result.output
