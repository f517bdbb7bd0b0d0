"""Faults: a build killed (SIGKILL) at any stage leaves earlier output intact; the next
build succeeds; an unwritable output folder gives a clear message and writes nothing."""
from __future__ import annotations

import hashlib
import json
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from tests.conftest import copy_build

pytestmark = [pytest.mark.e2e, pytest.mark.costly(25)]


def tree(root):
    return {p.relative_to(root).as_posix(): hashlib.sha256(p.read_bytes()).hexdigest()
            for p in sorted(root.rglob("*")) if p.is_file()}


def start_build(project, out):
    return subprocess.Popen([sys.executable, "-m", "specgen", "build", str(project), "--out",
                             str(out)], stderr=subprocess.PIPE, stdout=subprocess.DEVNULL,
                            text=True)


def kill_at(proc, marker: str, delay: float) -> str:
    """SIGKILL the build once its progress shows ``marker`` (plus ``delay`` seconds)."""
    seen = ""
    for line in proc.stderr:
        seen += line
        if marker in line:
            time.sleep(delay)
            break
    kids = _children(proc.pid)
    if marker == "publish: PDF":  # the PDF workers (and the site process) are running now
        assert kids, "no worker process seen while the PDF was printed"
    proc.send_signal(signal.SIGKILL)
    proc.wait(timeout=60)
    # the site and PDF worker processes end with the build, never left running
    deadline = time.time() + 10
    while time.time() < deadline and [k for k in kids if _running(k)]:
        time.sleep(0.1)
    assert not [k for k in kids if _running(k)], "child processes outlived the build"
    return seen


def _children(pid: int) -> list[str]:
    """Process ids whose parent is ``pid`` (from /proc)."""
    out = []
    for stat in Path("/proc").glob("[0-9]*/stat"):
        try:
            fields = stat.read_text().rsplit(")", 1)[1].split()
        except (OSError, IndexError):
            continue
        if fields[1] == str(pid):
            out.append(stat.parent.name)
    return out


def _running(pid: str) -> bool:
    try:
        status = Path(f"/proc/{pid}/status").read_text()
    except OSError:
        return False
    return "State:\tZ" not in status


@pytest.fixture(scope="module")
def single_revision(starter_build, tmp_path_factory):
    """A copy of the built starter project (one revision): the faults are the same as on the
    demo, and its small PDF keeps the repeated builds cheap."""
    return copy_build(starter_build, tmp_path_factory.mktemp("faults"))


# render and the final move are killed in the default run by the kill-point test
# (test_kill_points: "render", "move", "moved"); here with --full
@pytest.mark.parametrize("marker, delay", [
    pytest.param("render:", 0.3, marks=pytest.mark.full),   # while figures and math are drawn
    ("publish: site", 0.5),       # while MkDocs writes the site
    ("publish: PDF", 1.0),        # while WeasyPrint renders (and no worker outlives the build)
    pytest.param("publish: moving", 0.0, marks=pytest.mark.full),   # at the final move
])
def test_kill_leaves_previous_output_intact(single_revision, marker, delay):
    root, out = single_revision
    before = tree(out)
    csv = root / "lab" / "strength.csv"
    csv.write_text(csv.read_text().replace("M1-07-1,M1,7,compressive,1.1",
                                           f"M1-07-1,M1,7,compressive,1.1{int(time.time()*1000) % 90 + 10}"))
    proc = start_build(root, out)
    seen = kill_at(proc, marker, delay)
    assert marker in seen
    after = {k: v for k, v in tree(out).items() if not k.startswith(".")}
    rev = out / "R1"
    if after == before:
        pass  # killed before the move: the old revision is exactly as it was
    else:      # killed after the move: the new revision is complete and self-consistent
        verify = subprocess.run([sys.executable, "-m", "specgen", "verify", str(rev)],
                                capture_output=True, text=True)
        assert verify.returncode == 0, verify.stdout
    json.loads((out / "versions.json").read_text())
    again = subprocess.run([sys.executable, "-m", "specgen", "build", str(root), "--out",
                            str(out), "--quiet"], capture_output=True, text=True)
    assert again.returncode == 0, again.stderr
    # no staging leftovers; the artefact cache (.cache/) stays on purpose
    assert not [p for p in out.iterdir() if p.name.startswith(".") and p.name != ".cache"], \
        "leftovers not tidied"
    assert subprocess.run([sys.executable, "-m", "specgen", "verify", str(rev)]).returncode == 0


@pytest.mark.skipif(os.geteuid() == 0, reason="root can write into read-only folders")
def test_read_only_output_folder(single_revision, tmp_path, cli):
    root, _ = single_revision
    ro = tmp_path / "ro"
    ro.mkdir()
    ro.chmod(0o500)
    result = cli("build", root, "--out", ro / "out", "--quiet")
    assert result.exit_code == 2 and "cannot write the output folder" in result.output


def test_unwritable_output_gives_clear_message(single_revision, tmp_path, cli):
    root, _ = single_revision
    blocker = tmp_path / "afile"
    blocker.write_text("a file where the output folder should be")
    result = cli("build", root, "--out", blocker / "out", "--quiet")
    assert result.exit_code == 2, result.output
    assert f"{blocker / 'out'}: cannot write the output folder (Not a directory)." in result.output
    assert "Traceback" not in result.output
    assert blocker.read_text().startswith("a file where")


def _disk_full(*args, **kwargs):
    import errno
    raise OSError(errno.ENOSPC, "No space left on device")


def test_full_disk_during_the_pdf_leaves_nothing_half_written(single_revision, cli, monkeypatch):
    root, out = single_revision
    before = {k: v for k, v in tree(out).items() if not k.startswith(".cache/")}
    csv = root / "lab" / "strength.csv"
    csv.write_text(csv.read_text().replace("M1-07-1,M1,7,compressive,1.1",
                                           "M1-07-1,M1,7,compressive,1.105"))
    import specgen.publish.pdf
    monkeypatch.setattr(specgen.publish.pdf, "write_pdf", _disk_full)
    result = cli("build", root, "--out", out, "--quiet")
    assert result.exit_code == 2, result.output
    assert (f"{out}: the revision could not be written (No space left on device); nothing was "
            "changed in the output folder. Fix: free disk space or choose a writable folder "
            "with --out.") in result.output
    assert "Traceback" not in result.output
    time.sleep(0.5)  # the site process is stopped, not left writing into a removed folder
    after = {k: v for k, v in tree(out).items() if not k.startswith(".cache/")}
    assert after == before


def test_read_only_output_simulated_for_root(single_revision, cli, monkeypatch):
    import errno
    import specgen.publish.output as output
    root, out = single_revision

    def read_only(*args, **kwargs):
        raise OSError(errno.EROFS, "Read-only file system")
    monkeypatch.setattr(output.tempfile, "mkdtemp", read_only)
    before = tree(out)
    result = cli("build", root, "--out", out, "--quiet")
    assert result.exit_code == 2, result.output
    assert (f"{out}: cannot write the output folder (Read-only file system). Fix: choose a "
            "writable folder with --out, or free disk space.") in result.output
    assert {k: v for k, v in tree(out).items() if not k.startswith(".cache/")} == \
        {k: v for k, v in before.items() if not k.startswith(".cache/")}
