"""The artefact cache: a hit is byte-identical to a fresh render, and a re-issue after one
new lab result redraws only what that result changes.

The re-issue test renders its project cold three times (fresh, into a cold cache, fresh after
the new result): on the starter project (two mixes, 16 CPU s a cold render) in the default
run, on the demo (more kinds of figure and sheet, 35 CPU s a cold render) with ``--full``."""
from __future__ import annotations

import shutil

import pytest

from specgen.build import check
from specgen import cache
from specgen.report.mathsvg import svg_bytes, svg_of
from specgen.report.render import render
from tests.conftest import DEMO

pytestmark = pytest.mark.costly(15)   # CPU s (tests/conftest.py)


def _render(project_dir, folder=None):
    svg_bytes.cache_clear()  # no in-process memo: only the folder cache may help
    project, results = check(project_dir)
    with cache.using(folder):
        pages = render(project, results)
    return pages.pages, pages.assets


def _entries(folder):
    return {p.relative_to(folder).as_posix() for p in folder.rglob("*") if p.is_file()}


@pytest.fixture
def single(tmp_path, full):
    """(project with no issued revision, (a mix that gets a new 90 d result, the result in
    MPa), a mix that does not):
    the starter (``specgen new``), or with ``--full`` the demo without its archive."""
    if full:
        project = tmp_path / "project"
        shutil.copytree(DEMO, project)
        shutil.rmtree(project / "issued")
        return project, ("M1", 7.9), "M3"
    from specgen.starter import write_starter
    write_starter(tmp_path / "project")
    # 4.0 MPa at 90 d: M1 stays weaker than the starter's historic mortar (as test_lifecycle)
    return tmp_path / "project", ("M1", 4.0), "M2"


def test_cache_hit_equals_fresh_render_and_reissue_redraws_little(single, tmp_path, monkeypatch):
    single, (changed, mpa), other = single
    folder = tmp_path / "cache"
    fresh = _render(single)
    first = _render(single, folder)
    assert first == fresh                      # a cold cache changes nothing
    before = _entries(folder)
    assert any(e.startswith("math/") for e in before)
    assert any(e.startswith("figure-") for e in before)
    assert _render(single, folder) == fresh    # every artefact from the cache: same bytes
    assert _entries(folder) == before          # and nothing new drawn

    csv = single / "lab" / "strength.csv"
    csv.write_text(csv.read_text() + f"{changed}-90d-C9,{changed},90,compressive,{mpa},20\n")
    drawn = []                                  # (kind, inputs) of every artefact drawn anew
    real = cache.cached

    def spy(kind, inputs, produce):
        return real(kind, inputs, lambda: (drawn.append((kind, repr(inputs))), produce())[1])
    monkeypatch.setattr(cache, "cached", spy)
    # every drawing counted here: none by a second process (test_math_drawn_beside_...)
    from specgen.report import mathsvg
    monkeypatch.setattr(mathsvg, "BESIDE_MIN", 10**9)
    reissued = _render(single, folder)
    monkeypatch.undo()
    new = _entries(folder) - before
    # one new M1 result: M1's figures and the sheets whose numbers move are redrawn; the rest
    # (other mixes, chemistry, the unchanged formulas) come from the cache
    assert new and len(new) < 0.5 * len(before) and len(drawn) == len(new)
    redrawn = [inputs for kind, inputs in drawn if kind.endswith("strength_age")]
    assert redrawn and all(f"'{changed} " in i for i in redrawn)   # M1's figures only
    assert not any(f"'{other} " in i for i in redrawn)              # the other mix untouched
    assert reissued == _render(single)         # the re-issue equals a fresh render, byte for byte


def test_code_change_misses(monkeypatch, tmp_path):
    folder = tmp_path / "c"
    calls = []

    def draw():
        calls.append(1)
        return b"<svg/>"
    with cache.using(folder):
        assert cache.cached("figure-x", [1, 2], draw) == b"<svg/>"
        assert cache.cached("figure-x", [1, 2], draw) == b"<svg/>"
        assert len(calls) == 1
        monkeypatch.setattr(cache, "code_version", lambda: "another version")
        cache.cached("figure-x", [1, 2], draw)
        assert len(calls) == 2


def test_prune_keeps_only_what_a_build_used(tmp_path):
    folder = tmp_path / "c"
    with cache.using(folder):
        cache.cached("figure-a", [1], lambda: b"a")
        cache.cached("figure-b", [2], lambda: b"b")
    (folder / "figure-a" / ".stray.123.tmp").write_bytes(b"half")  # left by a killed build
    with cache.using(folder) as used:
        assert cache.cached("figure-a", [1], lambda: b"never drawn") == b"a"
    assert cache.prune(folder, used) == 2          # figure-b's entry and the stray file
    with cache.using(folder):
        assert cache.cached("figure-a", [1], lambda: b"never drawn") == b"a"
    assert sorted(p.parent.parent.name for p in folder.rglob("*") if p.is_file()) == ["figure-a"]


def test_shared_cache_serves_every_output_folder(tmp_path):
    """Behind each output folder's cache: a miss there is served from the shared folder (and
    copied in, so the folder's cache holds what its build used); new entries go to both."""
    shared, a, b = tmp_path / "shared", tmp_path / "a", tmp_path / "b"
    calls = []

    def draw():
        calls.append(1)
        return b"<svg>drawn once</svg>"
    with cache.using(a, shared):
        assert cache.cached("figure-x", [1], draw) == b"<svg>drawn once</svg>"
    with cache.using(b, shared) as used:
        assert cache.cached("figure-x", [1], draw) == b"<svg>drawn once</svg>"
    assert len(calls) == 1                                   # drawn for a, served to b
    assert _entries(a) == _entries(b) == _entries(shared) == {p.relative_to(b).as_posix()
                                                             for p in used}
    # an altered shared entry is discarded and drawn again, never served
    (entry,) = [p for p in shared.rglob("*") if p.is_file()]
    entry.write_bytes(entry.read_bytes().replace(b"once", b"twice"))
    with cache.using(tmp_path / "c", shared):
        assert cache.cached("figure-x", [1], draw) == b"<svg>drawn once</svg>"
    assert len(calls) == 2
    with cache.using(None, shared):                          # no folder: nothing cached
        assert cache.lookup("figure-x", [1]) is None


def test_parts_start_costliest_first_from_the_last_timings(tmp_path):
    from specgen.publish.pdf_schedule import Timings
    names = ["page-a#0", "page-b#0", "page-b#1", "page-c#0"]
    sizes = [1000, 4000, 2000, 3000]
    with cache.using(tmp_path / "c"):
        first = Timings.load(names, "P-1")
        assert first.order(sizes) == [1, 3, 2, 0]            # nothing timed: by HTML size
        first.keep([9.0, 1.0, 2.0, 0.0])                     # page-c came from the cache
        again = Timings.load(names, "P-1")
        # a took longest though smallest; c, untimed, is costed at the median seconds per
        # character of the others (2 s / 2000): 3000 × 0.001 = 3 s, after a and before b
        assert again.known == {"page-a#0": 9.0, "page-b#0": 1.0, "page-b#1": 2.0}
        assert again.order(sizes) == [0, 3, 2, 1]
        assert Timings.load(names, "P-2").known == {}         # another project's parts


def test_math_drawn_beside_is_the_same_math(tmp_path):
    """The calculation sheets' math drawn by a second process while the chapters render
    (mathsvg.drawn_beside) is byte for byte what one process draws, every expression is kept
    in the cache, and the second process has ended when the block ends."""
    import multiprocessing

    from specgen.report import mathsvg
    latexes = [rf"x_{{{i}}} = \frac{{{i}}}{{{i + 1}}}" for i in range(12)]
    alone = {x: mathsvg._draw(x).decode("utf-8") for x in latexes}   # one process, no cache
    svg_bytes.cache_clear()
    with cache.using(tmp_path / "cache"):
        with mathsvg.drawn_beside(latexes):
            assert len(multiprocessing.active_children()) == 1
            got = {x: svg_of(x) for x in latexes}
        assert multiprocessing.active_children() == []
        assert all(cache.lookup("math", x) == alone[x].encode("utf-8") for x in latexes)
    assert got == alone
    # without a cache folder nothing is drawn beside: the block draws everything itself
    svg_bytes.cache_clear()
    with mathsvg.drawn_beside(latexes):
        assert multiprocessing.active_children() == []
        assert {x: svg_of(x) for x in latexes} == alone
    svg_bytes.cache_clear()
