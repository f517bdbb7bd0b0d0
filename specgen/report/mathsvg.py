"""Math rendered to SVG on the server, so the site and the PDF show the same glyphs
and neither needs JavaScript.  Each distinct expression becomes one asset file,
named by the hash of its LaTeX source (so identical inputs give identical files)."""
from __future__ import annotations

import contextlib
import hashlib
import re
from functools import lru_cache, partial

from markupsafe import Markup, escape


def _draw(latex: str) -> bytes:
    import ziamath

    from specgen.report.mathlayout import install
    install()   # the same drawing without the layout work nothing reads (mathlayout.py)
    # glyphs as plain paths, not <symbol>/<use>: WeasyPrint draws such SVG about twice
    # as fast (measured on a formula repeated 60 times: 6.5 s against 14.4 s)
    ziamath.config.svg2 = False
    return re.sub(r"\s+$", "", ziamath.Latex(latex, size=18).svg()).encode("utf-8")


@lru_cache(maxsize=4096)
def svg_bytes(latex: str) -> bytes:
    """SVG of a LaTeX expression (ziamath, STIX Two Math font shipped in the package); kept in
    the output folder's artefact cache (specgen/cache.py).  The page set's asset is this very
    object, so an expression's SVG is held once in memory however often it is asked for."""
    from specgen.cache import cached
    return cached("math", latex, partial(_draw, latex))


def svg_of(latex: str) -> str:
    """SVG text of a LaTeX expression (:func:`svg_bytes` decoded)."""
    return svg_bytes(latex).decode("utf-8")


def _svg_or_later(latex: str):
    """The SVG bytes of ``latex``, or within ``cache.drawing_later`` a ``cache.Later`` when
    the cache does not hold them (the live preview's first pages)."""
    from specgen.cache import drawing_is_later, drawn_or_later
    if drawing_is_later():
        return drawn_or_later("math", latex, partial(_draw, latex))
    return svg_bytes(latex)


BESIDE_MIN = 8   # expressions to draw before a second process is worth its start


@contextlib.contextmanager
def drawn_beside(latexes):
    """While the block runs, a forked process draws into the artefact cache the expressions of
    ``latexes`` (in the order the block asks for them) that the cache lacks, last first.

    Drawing the math is most of a cold render, which is otherwise one process on a two-core
    machine: the block draws from the front (:func:`svg_bytes`, which takes what the other
    process has already kept), the other process from the back, so they meet in the middle
    and each expression is drawn about once.  The bytes are :func:`_draw`'s either way.  Only
    with a cache folder, where fork exists and when the drawing is not left for later (the
    live preview's first pages; else the block draws everything itself); the forked
    process touches nothing but the cache and the math engine (no output, no logging), as
    the printing workers of the PDF, so a lock held by another thread at the fork is never
    waited for."""
    import multiprocessing

    from specgen import cache
    folder, shared = cache.folders()
    todo = [] if folder is None or cache.drawing_is_later() else [
        x for x in dict.fromkeys(latexes) if cache.lookup("math", x) is None]
    if len(todo) < BESIDE_MIN or "fork" not in multiprocessing.get_all_start_methods():
        yield
        return
    ctx = multiprocessing.get_context("fork")
    stop = ctx.Event()
    proc = ctx.Process(target=_draw_all, args=(todo[::-1], folder, shared, stop), daemon=True)
    proc.start()
    try:
        yield
    finally:
        stop.set()      # what it has not drawn yet the block drew itself
        proc.join()


def _draw_all(latexes: list[str], folder, shared, stop) -> None:
    from specgen import cache
    _die_with_parent()
    with cache.using(folder, shared):
        for latex in latexes:
            if stop.is_set():
                return
            if cache.lookup("math", latex) is None:
                cache.store("math", latex, _draw(latex))


def _die_with_parent() -> None:
    # Linux: this process ends when the one that forked it ends, even by SIGKILL (prctl
    # PR_SET_PDEATHSIG); elsewhere it ends with its list
    try:
        import ctypes
        import signal
        ctypes.CDLL("libc.so.6", use_errno=True).prctl(1, signal.SIGKILL)
    except (OSError, AttributeError):
        pass


class MathAssets:
    """Turns LaTeX into ``<img>`` tags pointing at SVG assets of a page set."""

    def __init__(self, pageset, folder: str = "math"):
        self.pageset = pageset
        self.folder = folder

    def img(self, latex: str, depth: int = 0) -> Markup:
        """An ``<img>`` for ``latex``; ``depth`` is how deep the citing page is in the site."""
        name = hashlib.sha256(latex.encode("utf-8")).hexdigest()[:16]
        path = f"{self.folder}/{name}.svg"
        if path not in self.pageset.assets:
            data = _svg_or_later(latex)
            if isinstance(data, bytes):
                self.pageset.add_asset(path, data)
            else:   # not drawn yet: a placeholder until it is
                from specgen.report.figures import formula_placeholder
                self.pageset.add_placeholder(path, formula_placeholder(), data.draw)
        prefix = "../" * depth
        return Markup(f'<img class="sg-math" src="{prefix}{path}" alt="{escape(latex)}">')
