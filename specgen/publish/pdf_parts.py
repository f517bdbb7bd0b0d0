"""Printing in parts: each part of the dossier laid out and drawn by WeasyPrint on its own.

A long dossier is printed as independent WeasyPrint documents (the front matter, the
chapter pieces, the running-head stamps), in worker processes on every core, and put
together by :mod:`specgen.publish.pdf_assembly`.  Beside each part's PDF bytes we keep
what the assembly needs of its layout (:class:`Printed`): page sizes, anchors, links
and bookmarks, all in PDF points with the origin at the bottom left of the page.

A part's pages do not depend on where the part falls in the dossier (its running heads
and folios are stamped later), so a part whose HTML has not changed is taken from the
output folder's artefact cache on a re-issue, byte for byte as it was drawn.
Memory stays bounded: a worker holds the layout of one part at a time.
"""
from __future__ import annotations

import functools
import gc
import heapq
import itertools
import json
import os
from concurrent.futures import ProcessPoolExecutor
from dataclasses import dataclass, field

from specgen.errors import PublishError

# where the print HTML of the page set lives for the printer (its URL fetcher serves it)
BASE = "file:///specgen-pageset/"

PT_PER_PX = 0.75  # 72 PDF points per inch / 96 CSS pixels per inch


@dataclass
class Printed:
    """One rendered part: its PDF and the facts of its layout (coordinates in pt).

    ``pages``: (width, height) of each page; ``anchors``: id → (page, x, y);
    ``links``: (page, kind, target, (x1, y1, x2, y2)) with kind ``internal`` (target an
    anchor id) or ``external`` (a URL); ``bookmarks``: (page, level, label, x, y).
    Page numbers count from 0 within the part.  ``seconds``: the CPU time its printing
    took (0 when it came from the cache; not part of its bytes).
    """

    pdf: bytes
    pages: list = field(default_factory=list)
    anchors: dict = field(default_factory=dict)
    links: list = field(default_factory=list)
    bookmarks: list = field(default_factory=list)
    seconds: float = 0.0

    def to_bytes(self) -> bytes:
        facts = json.dumps({"pages": self.pages, "anchors": self.anchors, "links": self.links,
                            "bookmarks": self.bookmarks}, sort_keys=True,
                           separators=(",", ":")).encode("utf-8")
        return len(facts).to_bytes(8, "big") + facts + self.pdf

    @classmethod
    def from_bytes(cls, data: bytes) -> Printed:
        n = int.from_bytes(data[:8], "big")
        facts = json.loads(data[8:8 + n])
        return cls(pdf=data[8 + n:], pages=facts["pages"], anchors=facts["anchors"],
                   links=facts["links"], bookmarks=facts["bookmarks"])


def print_document(html: str, css: str, pageset, **options) -> Printed:
    """Lay out and draw one document; ``options`` go to WeasyPrint (as its ``write_pdf``)."""
    import time

    from specgen.publish.weasyfix import fonts, stylesheet, weasyprint
    started = time.process_time()

    if "attachments" in options:  # (name, bytes, datetime) triples: plain data for the workers
        options = dict(options, attachments=[
            weasyprint.Attachment(string=data, name=name, description=name, created=when,
                                  modified=when) for name, data, when in options["attachments"]])
    doc = weasyprint.HTML(string=html, base_url=BASE, url_fetcher=_fetcher(pageset)).render(
        stylesheets=[stylesheet(css)], font_config=fonts(), **options)
    out = Printed(pdf=b"")
    for number, page in enumerate(doc.pages):
        height = page.height

        def pt(x, y, height=height):
            return round(x * PT_PER_PX, 3), round((height - y) * PT_PER_PX, 3)
        out.pages.append([round(page.width * PT_PER_PX, 3), round(height * PT_PER_PX, 3)])
        for name, (x1, y1, _x2, _y2) in sorted(page.anchors.items()):
            out.anchors.setdefault(name, [number, *pt(x1, y1)])
        for kind, target, (x1, y1, x2, y2), _box in page.links:
            if kind in ("internal", "external"):
                out.links.append([number, kind, target, [*pt(x1, y2), *pt(x2, y1)]])
        for level, label, (x, y), _state in page.bookmarks:
            out.bookmarks.append([number, level, label, *pt(x, y)])
    out.pdf = _quietly(doc.write_pdf, **options)
    out.seconds = time.process_time() - started
    return out


def _quietly(write, **options) -> bytes:
    """Write the PDF without WeasyPrint's warnings about links to other parts' anchors
    (the assembly makes those links itself)."""
    import logging
    log = logging.getLogger("weasyprint")

    class _NoForeignAnchors(logging.Filter):
        def filter(self, record):
            return "No anchor #" not in record.getMessage()
    only = _NoForeignAnchors()
    log.addFilter(only)
    try:
        return write(**options)
    finally:
        log.removeFilter(only)


INLINE_TYPES = ("image/png", "image/jpeg")
INLINE_LIMIT = 16 * 2**20   # bytes of one inline image (a drawing sheet under its overlay)


def _inline_image(url: str):
    """(type, bytes) of a base64 ``data:`` URL of a PNG or JPEG image (matplotlib writes the
    raster under a drawing's overlay so), None for any other URL; an inline image of another
    type, too large or not decodable is refused like any other outside resource."""
    if not url.startswith("data:"):
        return None
    import base64
    import binascii
    head, _, body = url[5:].partition(",")
    kind, _, enc = head.partition(";")
    if kind not in INLINE_TYPES or enc != "base64" or len(body) > INLINE_LIMIT * 4 // 3 + 4:
        raise ValueError(f"the PDF may only use the dossier's own assets, not {url[:60]}…")
    try:
        return kind, base64.b64decode("".join(body.split()), validate=True)
    except (binascii.Error, ValueError):
        raise ValueError("an inline image of a figure is not valid base64") from None


def _fetcher(pageset):
    import mimetypes

    from weasyprint.urls import URLFetcher, URLFetcherResponse

    class PageSetFetcher(URLFetcher):
        """Serves the page set's assets; refuses every other URL (no network, no disk)."""

        def fetch(self, url, headers=None):
            inline = _inline_image(url)
            if inline is not None:     # a raster inside a figure of ours: no fetch at all
                return URLFetcherResponse(url[:40], inline[1], {"Content-Type": inline[0]})
            path = url[len(BASE):] if url.startswith(BASE) else None
            if path is None or path not in pageset.assets:
                raise ValueError(f"the PDF may only use the dossier's own assets, not {url}")
            mime = mimetypes.guess_type(path)[0] or "application/octet-stream"
            return URLFetcherResponse(url, pageset.assets[path], {"Content-Type": mime})

    return PageSetFetcher()


# --- worker processes ------------------------------------------------------------------

_PAGESET = None  # set before the workers fork: the assets they serve to WeasyPrint


def die_with_parent() -> None:
    """This process ends when the build process ends (even by SIGKILL), never lingering
    (Linux; elsewhere a no-op)."""
    try:
        import ctypes
        import signal
        ctypes.CDLL("libc.so.6", use_errno=True).prctl(1, signal.SIGKILL)  # PR_SET_PDEATHSIG
    except (OSError, AttributeError):
        pass


def _work(job: tuple[str, str, dict]) -> tuple[bytes, float]:
    html, css, options = job
    printed = print_document(html, css, _PAGESET, **options)
    return printed.to_bytes(), printed.seconds


class Printer:
    """Prints documents in worker processes (forked, so they share the page set).

    ``submit`` returns a handle whose ``result()`` is a :class:`Printed`; where fork is
    unavailable, or with one worker, documents are printed in this process when asked.
    Documents wait here, not in the pool's own first-come queue, and go to a worker as one
    frees, highest ``priority`` first: a document that becomes ready late (a volume's running
    heads, once its parts are laid out) starts at the next free worker rather than after
    every part queued before it.  The pool is fed whenever a handle is waited on
    (:meth:`wait_any`, ``result()``) or a document submitted.
    """

    def __init__(self, pageset, workers: int | None = None):
        global _PAGESET
        self.pageset = pageset
        self.workers = workers or min(2, os.cpu_count() or 1)
        self.pool = None
        self._waiting: list = []     # heap of (-priority, order, job, handle)
        self._running: set = set()   # futures handed to the pool
        self._order = itertools.count()
        self._frozen = False
        import multiprocessing
        if self.workers > 1 and "fork" in multiprocessing.get_all_start_methods():
            # imported once here, before the workers fork, rather than once in each worker
            # of each revision's print (about 0.7-0.9 CPU s a time on this machine)
            from specgen.publish.weasyfix import weasyprint  # noqa: F401
            _PAGESET = pageset
            # the heap so far (the page set, the results, the modules) moved out of the
            # collector's reach: a collection in a worker would otherwise write to every
            # inherited object's header and copy its page (copy-on-write), so each worker
            # came to hold a private copy of much of the build's heap
            gc.collect()
            gc.freeze()
            self._frozen = True
            self.pool = ProcessPoolExecutor(max_workers=self.workers,
                                            mp_context=multiprocessing.get_context("fork"),
                                            initializer=die_with_parent)

    def submit(self, html: str, css: str, priority: float = 0.0, **options):
        if self.pool is None:
            return _Handle(lambda: print_document(html, css, self.pageset, **options))
        waiting = _Waiting(self)
        heapq.heappush(self._waiting, (-priority, next(self._order), (html, css, options),
                                       waiting))
        self._feed()
        return _Handle(waiting.result, waiting.done)

    def _feed(self) -> None:
        """Hand waiting documents to the pool while a worker is free, highest priority first."""
        self._running = {f for f in self._running if not f.done()}
        while self._waiting and len(self._running) < self.workers:
            _p, _n, job, waiting = heapq.heappop(self._waiting)
            waiting.future = self.pool.submit(_work, job)
            self._running.add(waiting.future)

    def wait_any(self) -> None:
        """Wait until a document in the pool is done (none running: at once), then feed it."""
        from concurrent.futures import FIRST_COMPLETED, wait
        self._feed()
        if self._running:
            wait(self._running, return_when=FIRST_COMPLETED)
        self._feed()

    def close(self, cancel: bool = False) -> None:
        global _PAGESET
        if self.pool is not None:
            self._waiting.clear()
            self.pool.shutdown(wait=True, cancel_futures=cancel)
            self.pool = None
        if self._frozen:
            gc.unfreeze()
            self._frozen = False
        _PAGESET = None

    def __enter__(self):
        return self

    def __exit__(self, kind, exc, tb):
        self.close(cancel=kind is not None)


class _Waiting:
    """A document queued in a :class:`Printer`: its future once a worker has it."""

    def __init__(self, printer: Printer):
        self.printer, self.future = printer, None

    def done(self) -> bool:
        return self.future is not None and self.future.done()

    def result(self) -> Printed:
        while not self.done():
            self.printer.wait_any()
        return _unpack(self.future)


class _Handle:
    """A document being printed; ``result()`` gives its :class:`Printed` (worked out once);
    ``done()``: whether a worker has finished it (``done`` asked), or it is worked out."""

    def __init__(self, get, done=None):
        self._get, self._done, self._printed = get, done, None

    def done(self) -> bool:
        return self._printed is not None or (self._done is not None and self._done())

    def result(self) -> Printed:
        if self._printed is None:
            self._printed = self._get()
        return self._printed


def _unpack(future) -> Printed:
    from concurrent.futures.process import BrokenProcessPool
    try:
        data, seconds = future.result()
    except BrokenProcessPool as exc:
        raise PublishError("a PDF worker process ended unexpectedly (out of memory?); "
                           "nothing was changed in the output folder. Fix: build again, "
                           "or free memory.") from exc
    printed = Printed.from_bytes(data)
    printed.seconds = seconds
    return printed


def cached_or_submitted(printer: Printer, kind: str, html: str, css: str,
                        priority: float = 0.0, **options):
    """A handle for the part: from the artefact cache when drawn before, else submitted
    with ``priority`` (:meth:`Printer.submit`) and kept in the cache once printed.

    The key covers the HTML, the CSS, the options (attachments and identifier by their
    SHA-256), our code, WeasyPrint's version and the SHA-256 of every asset the HTML uses.
    """
    from specgen import cache
    inputs = [html, css, _option_key(options), _engine_version(),
              _asset_digests(html, printer.pageset)]
    found = cache.lookup(kind, inputs)
    if found is not None:
        printed = Printed.from_bytes(found)
        return _Handle(lambda: printed, lambda: True)
    handle = printer.submit(html, css, priority, **options)

    def printed_and_kept() -> Printed:
        printed = handle.result()
        cache.store(kind, inputs, printed.to_bytes())
        return printed
    return _Handle(printed_and_kept, handle.done)


def _option_key(options: dict) -> list:
    """The options as plain data for a cache key: bytes by their SHA-256."""
    import hashlib

    def plain(value):
        if isinstance(value, (bytes, bytearray)):
            return "sha256:" + hashlib.sha256(value).hexdigest()
        if isinstance(value, (list, tuple)):
            return [plain(v) for v in value]
        if hasattr(value, "isoformat"):
            return value.isoformat()
        return value
    return [[name, plain(value)] for name, value in sorted(options.items())]


def _asset_digests(html: str, pageset) -> list:
    """SHA-256 of every asset the HTML uses (figures keep their names when redrawn)."""
    import hashlib
    import re

    out = []
    for src in sorted(set(re.findall(r'src="([^"]+)"', html))):
        data = pageset.assets.get(src.removeprefix(BASE))
        out.append([src, hashlib.sha256(data).hexdigest() if data is not None else None])
    return out


@functools.lru_cache(maxsize=1)   # asked once per part: the package metadata read once
def _engine_version() -> str:
    from importlib.metadata import version
    try:
        return f"weasyprint={version('weasyprint')}"
    except Exception:  # noqa: BLE001 - an unknown version still keys consistently
        return "weasyprint=?"


#: a byte of SVG (a figure or formula the part draws) costs WeasyPrint about 1/32 of a
#: character of HTML: a least-squares fit of the 89 parts of a cold demo build (2026-12-05,
#: CPU s of each part against its HTML characters and the bytes of the SVG it uses) gave
#: 5.5e-5 s a character and 1.7e-6 s an SVG byte (R² 0.92; HTML size alone: R² 0.74)
SVG_BYTES_PER_CHAR = 32


def weight(html: str, pageset) -> int:
    """A part's expected cost before it was ever timed, in characters of HTML: its own
    characters plus the SVG it draws (:data:`SVG_BYTES_PER_CHAR`)."""
    import re
    svg = sum(len(pageset.assets.get(src.removeprefix(BASE)) or b"")
              for src in set(re.findall(r'src="([^"]+\.svg)"', html)))
    return len(html) + svg // SVG_BYTES_PER_CHAR


