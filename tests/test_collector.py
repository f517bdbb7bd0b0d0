"""The cyclic garbage collector paused for a pipeline call (``specgen/collector.py``) is left
as it was found: on after the last of overlapping calls ends, off if it was off before
(``gc.isenabled``, Python's standard library)."""
from __future__ import annotations

import gc

import pytest

from specgen import build, collector
from specgen.synthetic import write_project


@pytest.fixture
def enabled():
    was = gc.isenabled()
    gc.enable()
    yield
    (gc.enable if was else gc.disable)()


def test_off_inside_on_after(enabled):
    with collector.paused():
        assert not gc.isenabled()
    assert gc.isenabled()


def test_overlapping_calls_turn_it_on_at_the_last_end(enabled):
    first, second = collector.paused(), collector.paused()
    first.__enter__()
    second.__enter__()          # as a second thread of the preview would
    first.__exit__(None, None, None)
    assert not gc.isenabled()   # the second call still runs
    second.__exit__(None, None, None)
    assert gc.isenabled()


def test_off_before_stays_off(enabled):
    gc.disable()
    with collector.paused():
        pass
    assert not gc.isenabled()


def test_a_failing_call_turns_it_on_again(enabled):
    with pytest.raises(ZeroDivisionError), collector.paused():
        1 / 0
    assert gc.isenabled()


def test_check_leaves_it_on(tmp_path, enabled):
    _, results = build.check(write_project(tmp_path / "p", 2))
    assert results.checks and gc.isenabled()
