"""How the PDF's documents are handed to the workers (issue 25: both cores busy to the end).

Documents wait in the printer, not in the process pool's first-come queue, and go to a
worker as one frees, highest priority first, so a volume's running heads (ready only once
all its parts are laid out) start at the next free worker rather than after every part
queued before them.  Before this, the appendix volume's running heads of a cold demo build
(6.35 CPU s, one document, when every stamp page was laid out) ran alone at the end while
the other core waited.  The
mechanism is tested here with a stand-in pool whose documents finish when the test says;
the whole print is in ``test_print_parts.py`` and the byte-for-byte re-issue in
``test_reissue.py``.
"""
from __future__ import annotations

from concurrent.futures import Future

import pytest

from specgen import cache
from specgen.publish import pdf_parts
from specgen.publish.pdf_parts import BASE, SVG_BYTES_PER_CHAR, Printer, weight
from specgen.publish.pdf_schedule import Timings
from specgen.report.pageset import PageSet


class _Pool:
    """Stands in for the process pool: records what it was given, finishes on request."""

    def __init__(self):
        self.given: list[str] = []
        self.futures: dict[str, Future] = {}

    def submit(self, _fn, job):
        html = job[0]
        self.given.append(html)
        self.futures[html] = Future()
        return self.futures[html]

    def finish(self, html: str) -> None:
        printed = pdf_parts.Printed(pdf=b"%PDF " + html.encode(), pages=[[1.0, 2.0]])
        self.futures[html].set_result((printed.to_bytes(), 0.5))

    def shutdown(self, **_kw):
        pass


def later(pool: _Pool, html: str, after: float = 0.1) -> None:
    """Finish ``html`` from another thread shortly (the printer is then waiting on it)."""
    import threading

    def finish():
        while html not in pool.futures:    # handed over by the printer meanwhile
            threading.Event().wait(0.01)
        pool.finish(html)
    threading.Timer(after, finish).start()


@pytest.fixture
def printer():
    p = Printer(PageSet(), workers=1)      # one worker: no real pool is started
    p.workers, p.pool = 2, _Pool()          # then two stand-in workers
    yield p
    p.pool = None


def test_a_document_ready_late_goes_before_the_parts_still_waiting(printer):
    pool = printer.pool
    a = printer.submit("A", "", priority=1.0)
    printer.submit("B", "", priority=5.0)
    printer.submit("C", "", priority=3.0)
    assert pool.given == ["A", "B"]            # two workers busy; C waits in the printer
    heads = printer.submit("HEADS", "", priority=1e9)
    assert pool.given == ["A", "B"]
    later(pool, "A")
    printer.wait_any()                         # returns once A is done, and feeds
    assert a.done() and a.result().pdf == b"%PDF A"
    assert pool.given == ["A", "B", "HEADS"]   # the late one first, C still waiting
    later(pool, "B")
    printer.wait_any()
    assert pool.given == ["A", "B", "HEADS", "C"]
    assert not heads.done()
    later(pool, "HEADS")
    assert heads.result().pages == [[1.0, 2.0]] and heads.result().seconds == 0.5


def test_waiting_on_a_queued_document_feeds_the_workers(printer):
    """``result()`` of a document not yet given to a worker waits for a free one and hands
    it over (nothing stays queued while the caller waits)."""
    pool = printer.pool
    printer.submit("A", "", priority=2.0)
    printer.submit("B", "", priority=2.0)
    c = printer.submit("C", "", priority=1.0)
    later(pool, "A")
    later(pool, "B", 0.3)
    assert not c.done()
    later(pool, "C", 0.6)
    assert c.result().pdf == b"%PDF C" and pool.given == ["A", "B", "C"]


def test_without_a_pool_documents_print_here_when_asked(monkeypatch):
    printed = []
    monkeypatch.setattr(pdf_parts, "print_document",
                        lambda html, css, pageset, **o: printed.append(html) or
                        pdf_parts.Printed(pdf=b"x"))
    p = Printer(PageSet(), workers=1)
    h = p.submit("A", "", priority=3.0)
    assert not h.done() and printed == []      # nothing printed until asked
    assert h.result().pdf == b"x" and h.done() and printed == ["A"]


def test_an_untimed_part_is_costed_by_its_html_and_the_svg_it_draws():
    """Cold cache: no part has a time yet.  A part's cost is its HTML characters plus the
    bytes of the SVG it draws over SVG_BYTES_PER_CHAR (a fit to the demo's 89 parts,
    2026-12-05, pdf_parts.py): a short calculation sheet full of formulas goes before a
    longer page of plain text."""
    pages = PageSet()
    pages.add_asset("math/a.svg", b"<svg>" + b" " * 256_000 + b"</svg>")
    pages.add_asset("figures/b.png", b"\x89PNG" + b"0" * 50_000)
    sheet = f'<p><img src="{BASE}math/a.svg"> <img src="{BASE}math/a.svg"></p>'
    text = "<p>" + "word " * 1000 + "</p>"
    photo = f'<p><img src="{BASE}figures/b.png"></p>'
    assert weight(sheet, pages) == len(sheet) + 256_011 // SVG_BYTES_PER_CHAR  # counted once
    assert weight(text, pages) == len(text)
    assert weight(photo, pages) == len(photo)      # a raster is not SVG the engine draws
    t = Timings(["sheet#0", "text#0"], {}, ["part seconds", "x"])
    assert t.order([weight(sheet, pages), weight(text, pages)]) == [0, 1]


def test_the_tail_time_is_kept_beside_the_parts(tmp_path):
    """A volume's contents and running heads wait for all its parts; their time last build
    (never timed: 0) is added to its parts' priority, so the volume with the longer tail is
    laid out first."""
    with cache.using(tmp_path / "c"):
        first = Timings.load(["p#0", "p#1"], "P-1")
        assert first.tail() == 0.0
        first.keep([1.0, 2.0], tail=6.5)
        again = Timings.load(["p#0", "p#1"], "P-1")
        assert again.known == {"p#0": 1.0, "p#1": 2.0, Timings.TAIL: 6.5}
        assert again.tail() == 6.5
        again.keep([0.0, 0.0], tail=0.0)          # all from the cache: the times stay
        assert Timings.load(["p#0", "p#1"], "P-1").known == again.known
