"""The large build's watcher (specgen/bench_large.py): its projection on two idle cores and
its stage figures, on constructed samples whose answers are worked out by hand below."""
import os

import pytest

from specgen import bench_large as bl


def _s(t, own, ended=0.0, rss=0, pss=0):
    return (t, own, ended, rss, pss)


def test_projection_takes_the_busiest_process_or_the_work_over_two_cores():
    samples = [_s(0, {1: 0.0, 2: 0.0}),
               _s(1, {1: 1.0, 2: 1.0}),            # both busy: max(1.0, 2.0 / 2) = 1.0 s
               _s(2, {1: 3.0, 2: 1.0}),            # one busy 2 s: max(2.0, 2.0 / 2) = 2.0 s
               _s(3, {1: 3.5}, ended=1.5)]         # 2 ended (1.0 + 0.5 more) beside 0.5 of 1:
    # spent 0.5 + (1.5 - 0 - 1.0) = 1.0 -> max(0.5, 1.0 / 2) = 0.5 s; total 1.0 + 2.0 + 0.5
    assert bl._projected(samples) == pytest.approx(3.5, abs=1e-12)


def test_stages_take_the_tree_cpu_between_marks():
    samples = [_s(10, {1: 0.0}), _s(11, {1: 0.8, 2: 0.2}), _s(12, {1: 1.0}, ended=1.2)]
    stages = bl._stages([(10, "start"), (11, "render"), (12, "end")], samples)
    # start -> render: tree 1.0 - 0.0; render -> end: (1.0 + 1.2) - 1.0 = 1.2
    assert [(s, w) for s, w, _ in stages] == [("start", 1), ("render", 1)]
    assert [c for _, _, c in stages] == pytest.approx([1.0, 1.2], abs=1e-12)


@pytest.mark.skipif(not os.path.exists("/proc/self/task"), reason="Linux /proc only")
def test_the_tree_holds_this_process_and_its_memory_is_read():
    tree = bl._tree(os.getpid())
    rss, pss = bl._memory(os.getpid())
    assert tree[0] == os.getpid()
    assert rss > 0 and 0 < pss <= rss   # PSS is RSS with shared pages in shares (proc(5))
