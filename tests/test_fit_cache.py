"""The strength fits kept between runs of ``check`` (``specgen/fit_cache.py``): a re-check
reads what did not change and gives the results a check without the cache gives, byte for
byte; any change to an input or to the code misses; a damaged entry is made again.  The fits
made in two processes (``checks/fits.py``, ``made_together``) are those one process makes.

The reference every comparison uses is computed in the test itself: the same project checked
with no fit cache (``results.json`` content, ``Results.to_json``)."""
from __future__ import annotations

import json
import subprocess
import sys
from collections import Counter
from pathlib import Path

import pytest
from click.testing import CliRunner

import os

from specgen import build, cache, fit_cache
from specgen.checks import fits
from specgen.cli import cli
from specgen.science import strength_inference as si
from specgen.science import strength_models as sm
from specgen.synthetic import write_project

MIXES = 3   # three series with results (and the starter's analyses, sands, colours ...)
FAMILIES = 1   # one binder family, so one prior (its gain term matched by least squares)
ALL = {"models": MIXES, "inference": MIXES, "prior": FAMILIES}   # made by a check afresh


@pytest.fixture
def made(monkeypatch) -> Counter:
    """Fits made, by kind: the model comparison per series, the inference per record, the
    prior per binder family."""
    counter: Counter = Counter()
    fit_all, fit_many, prior_from_table = sm.fit_all, si.fit_many, si.prior_from_table

    def counting_all(*a, **kw):
        counter["models"] += 1
        return fit_all(*a, **kw)

    def counting_many(records):
        counter["inference"] += len(records)
        return fit_many(records)

    def counting_prior(*a, **kw):
        counter["prior"] += 1
        return prior_from_table(*a, **kw)
    monkeypatch.setattr(sm, "fit_all", counting_all)
    monkeypatch.setattr(si, "fit_many", counting_many)
    monkeypatch.setattr(si, "prior_from_table", counting_prior)
    return counter


def _json(project, **kw) -> str:
    return build.check(project, **kw)[1].to_json()


def _entries(folder) -> list:
    return sorted(p for p in folder.rglob("*") if p.is_file())


def test_a_recheck_reads_every_fit_and_gives_the_same_results(tmp_path, made):
    project = write_project(tmp_path / "p", MIXES)
    plain = _json(project)
    assert made == ALL
    made.clear()
    first = _json(project, fit_cache=tmp_path / "fits")
    assert made == ALL    # an empty cache: every fit made
    assert len(_entries(tmp_path / "fits")) == 2 * MIXES + FAMILIES   # and kept, one entry each
    made.clear()
    again = _json(project, fit_cache=tmp_path / "fits")
    assert made == {}                                        # nothing fitted again
    assert first == plain and again == plain


def test_a_changed_value_refits_its_series_only(tmp_path, made):
    project = write_project(tmp_path / "p", MIXES)
    _json(project, fit_cache=tmp_path / "fits")
    csv = project / "lab" / "strength.csv"
    rows = csv.read_text(encoding="utf-8").splitlines()
    # the first result of mix M2 (the header, then M1's 8 ages x 3 prisms): 5 % stronger
    at = next(i for i, r in enumerate(rows) if r.startswith("M2-"))
    cells = rows[at].split(",")
    cells[4] = f"{float(cells[4]) * 1.05:.3f}"
    rows[at] = ",".join(cells)
    csv.write_text("\n".join(rows) + "\n", encoding="utf-8")
    made.clear()
    cached = _json(project, fit_cache=tmp_path / "fits")
    assert made == {"models": 1, "inference": 1}
    made.clear()
    assert cached == _json(project)        # the same as every series fitted afresh
    assert made == ALL


def test_a_code_change_misses_and_drops_the_old_entries(tmp_path, made, monkeypatch):
    project = write_project(tmp_path / "p", MIXES)
    plain = _json(project, fit_cache=tmp_path / "fits")
    old = {p.relative_to(tmp_path / "fits").parts[0] for p in _entries(tmp_path / "fits")}
    # another version of the package's sources (cache.code_version hashes every one of them)
    monkeypatch.setattr(cache, "code_version", lambda: "another version of the sources")
    fit_cache.version.cache_clear()
    try:
        made.clear()
        assert _json(project, fit_cache=tmp_path / "fits") == plain
        assert made == ALL
        now = {p.relative_to(tmp_path / "fits").parts[0] for p in _entries(tmp_path / "fits")}
        assert len(now) == 1 and now.isdisjoint(old)
    finally:
        fit_cache.version.cache_clear()


def test_a_damaged_entry_is_made_again(tmp_path, made):
    project = write_project(tmp_path / "p", MIXES)
    plain = _json(project, fit_cache=tmp_path / "fits")
    entry = _entries(tmp_path / "fits")[0]
    raw = bytearray(entry.read_bytes())
    raw[-20] ^= 0xFF                       # one byte of the pickled fit changed
    entry.write_bytes(bytes(raw))
    made.clear()
    assert _json(project, fit_cache=tmp_path / "fits") == plain
    assert sum(made.values()) == 1          # that one fit (or prior), nothing else


def test_the_command_keeps_fits_unless_told_not_to(tmp_path, monkeypatch):
    project = write_project(tmp_path / "p", MIXES)
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "xdg"))
    runner = CliRunner()
    off = runner.invoke(cli, ["check", "--format", "json", "--no-fit-cache", str(project)])
    assert off.exit_code in (0, 1), off.output
    assert not (tmp_path / "xdg").exists()
    on = runner.invoke(cli, ["check", "--format", "json", str(project)])
    assert on.exit_code == off.exit_code
    assert json.loads(on.output) == json.loads(off.output)
    assert len(_entries(tmp_path / "xdg" / "specgen" / "fits")) == 2 * MIXES + FAMILIES


def test_a_truncated_entry_is_made_again(tmp_path, made):
    project = write_project(tmp_path / "p", MIXES)
    plain = _json(project, fit_cache=tmp_path / "fits")
    entry = _entries(tmp_path / "fits")[-1]
    entry.write_bytes(entry.read_bytes()[:100])   # a write cut short (a full disc, a crash)
    made.clear()
    assert _json(project, fit_cache=tmp_path / "fits") == plain
    assert sum(made.values()) == 1


def test_fits_made_in_two_processes_are_those_of_one(tmp_path, made, monkeypatch):
    project = write_project(tmp_path / "p", MIXES)
    monkeypatch.setattr(fits, "_cores", lambda: 2)
    monkeypatch.setattr(fits, "BESIDE_MIN", 10 ** 9)
    plain = _json(project)
    assert made == ALL
    made.clear()
    monkeypatch.setattr(fits, "BESIDE_MIN", 2)
    first = _json(project, fit_cache=tmp_path / "fits")
    # this process made the front half of each kind (1 of 3), the other the back half; the
    # counting wrappers were forked with it, but what they count there is not seen here
    assert made == {"models": 1, "inference": 1, "prior": FAMILIES}
    assert first == plain
    assert len(_entries(tmp_path / "fits")) == 2 * MIXES + FAMILIES   # either process's
    made.clear()
    assert _json(project, fit_cache=tmp_path / "fits") == plain and made == {}


def test_one_core_or_few_fits_make_them_here(tmp_path, made, monkeypatch):
    project = write_project(tmp_path / "p", MIXES)
    monkeypatch.setattr(fits, "BESIDE_MIN", 2)
    monkeypatch.setattr(fits, "_cores", lambda: 1)
    _json(project)
    assert made == ALL
    made.clear()
    monkeypatch.setattr(fits, "_cores", lambda: 2)
    monkeypatch.setattr(fits, "BESIDE_MIN", 2 * MIXES + 1)      # one fit short of the minimum
    _json(project)
    assert made == ALL


def test_a_failed_second_process_leaves_its_fits_to_this_one(tmp_path, made, monkeypatch):
    project = write_project(tmp_path / "p", MIXES)
    plain = _json(project)
    here, fit_many = os.getpid(), si.fit_many

    def dies_elsewhere(records):
        if os.getpid() != here:
            os._exit(3)                    # the second process ends without an answer
        return fit_many(records)
    monkeypatch.setattr(si, "fit_many", dies_elsewhere)
    monkeypatch.setattr(fits, "_cores", lambda: 2)
    monkeypatch.setattr(fits, "BESIDE_MIN", 2)
    made.clear()
    assert _json(project) == plain
    assert made == ALL       # all made here in the end


def test_a_check_with_everything_kept_imports_no_optimiser(tmp_path):
    # scipy.optimize is imported only where a fit or a prior's gain term is made
    project = write_project(tmp_path / "p", MIXES)
    code = ("import sys; from specgen import build; "
            f"build.check({str(project)!r}, fit_cache={str(tmp_path / 'fits')!r}); "
            "print('scipy.optimize' in sys.modules)")
    env = dict(os.environ, PYTHONPATH=os.pathsep.join(filter(None, [
        str(Path(build.__file__).resolve().parent.parent), os.environ.get("PYTHONPATH")])))
    seen = [subprocess.run([sys.executable, "-c", code], env=env, capture_output=True,
                           text=True, check=True).stdout.split()[-1] for _ in range(2)]
    assert seen == ["True", "False"]      # an empty fit cache, then a full one
