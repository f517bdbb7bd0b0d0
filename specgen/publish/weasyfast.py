"""Two memos around WeasyPrint's SVG drawing, each giving the very bytes WeasyPrint writes.

Most of a calculation sheet's print time went into drawing its formulas: each is an SVG of
glyph outlines (``<path d="…">``, absolute coordinates), and WeasyPrint (70) parses a path's
``d`` again every time it is drawn — in pure Python, a regular expression and a ``float``
per coordinate, then a ``%f`` per coordinate to write it — while the same formula is drawn
many times over (a sheet's formula for every mix, the same symbols in many parts).  In a
20-mix synthetic project's appendix volume, 56,813 paths were drawn of 7,513 different ones.

* :func:`path`: WeasyPrint's own ``path`` run once per path (its ``d``, the font size and
  the viewport it resolves lengths against), the PDF operators it appended to the stream and
  the vertices it gave the node (for markers) kept, and put back the next time the same path
  is drawn in this process.  The path operators (``m``, ``l``, ``c``, ``h``) depend on
  nothing else: they are plain appends to the content stream (``pydyf.Stream``), no
  graphics state, no resources.  The memo holds at most :data:`PATH_MEMO_BYTES`, oldest
  dropped first, so a worker's memory stays bounded however large the project.
* ``size``: WeasyPrint's length parser, which imports a module and opens a context manager
  on every call (``'1em'``, the font size of every SVG node, through three regular
  expressions each time), kept by its arguments (:data:`SIZE_MEMO` of them): a pure
  function of them.

Both are exact: the PDF is byte for byte the one WeasyPrint writes without them
(``tests/test_weasyfast.py``).  Installed by :mod:`specgen.publish.weasyfix`.
"""
from __future__ import annotations

import contextlib
import functools
import itertools
from collections import OrderedDict

PATH_MEMO_BYTES = 24 * 2**20  # bytes of path data and operators kept per process (about ten
#                             # calculation-sheet parts of paths; measured 7.7 MiB for 2 large parts)
PATH_LARGEST = 2**20          # bytes: a larger path is not kept
SIZE_MEMO = 4096              # lengths kept (the memo starts again when full)

_memo: OrderedDict = OrderedDict()   # key → (stream chunks, vertices, bytes)
_held = [0]                          # bytes held in _memo
_original_path = None
_replaced: list = []                 # (module, name, WeasyPrint's function, ours)
_stats = {"drawn": 0, "reused": 0}


def path(svg, node, font_size):
    """WeasyPrint's ``svg.path.path``, from the memo when the same path was drawn before."""
    d = node.get("d", "")
    # repr: 1 and 1.0, 0.0 and -0.0 are one dict key but may write different numbers
    key = (d, repr(font_size), repr(svg.inner_width), repr(svg.inner_height))
    chunks = svg.stream.stream
    found = _memo.get(key)
    if found is not None:
        _memo.move_to_end(key)
        chunks.extend(found[0])
        node.vertices.extend(found[1])
        _stats["reused"] += 1
        return
    start, before = len(chunks), len(node.vertices)
    _original_path(svg, node, font_size)   # raising: nothing kept, as WeasyPrint left it
    _stats["drawn"] += 1
    ops = tuple(chunks[start:])
    vertices = tuple(itertools.islice(node.vertices, before, None))
    cost = len(d) + sum(len(op) for op in ops) + 64 * (len(ops) + len(vertices))
    if cost > PATH_LARGEST:
        return   # a path this large would push many others out: drawn each time
    _memo[key] = (ops, vertices, cost)
    _held[0] += cost
    while _held[0] > PATH_MEMO_BYTES:
        _old, (_o, _v, dropped) = _memo.popitem(last=False)
        _held[0] -= dropped


def reset() -> None:
    """Forget every kept path (tests; a process that prints no more)."""
    _memo.clear()
    _held[0] = 0
    _stats.update(drawn=0, reused=0)


def stats() -> dict:
    """Paths drawn by WeasyPrint and paths put back from the memo in this process, and the
    bytes the memo holds."""
    return dict(_stats, held=_held[0], kept=len(_memo))


@contextlib.contextmanager
def bypassed():
    """WeasyPrint's own functions in place for the ``with`` block (to compare against)."""
    for module, name, theirs, _ours in _replaced:
        setattr(module, name, theirs)
    try:
        yield
    finally:
        for module, name, _theirs, ours in _replaced:
            setattr(module, name, ours)


def install() -> None:
    """Put the two memos in WeasyPrint's SVG drawing (once per process)."""
    global _original_path
    if _original_path is not None:
        return
    import weasyprint.svg as svg
    import weasyprint.svg.defs
    import weasyprint.svg.text
    import weasyprint.svg.utils as utils
    _original_path = svg.TAGS["path"]
    original_size = utils.size
    sizes: dict = {}

    @functools.wraps(original_size)
    def size(string, font_size=None, percentage_reference=None):
        if type(string) is not str:
            return original_size(string, font_size, percentage_reference)
        key = (string, repr(font_size), repr(percentage_reference))
        found = sizes.get(key)
        if found is None:
            found = original_size(string, font_size, percentage_reference)
            if len(sizes) >= SIZE_MEMO:
                sizes.clear()
            sizes[key] = found
        return found
    for module in (svg, utils, weasyprint.svg.defs, weasyprint.svg.text):
        if getattr(module, "size", None) is original_size:
            _replaced.append((module, "size", original_size, size))
    _replaced.append((_Tags(svg.TAGS), "path", _original_path, path))
    for module, name, _theirs, ours in _replaced:
        setattr(module, name, ours)


class _Tags:
    """WeasyPrint's table of SVG element drawers, seen as attributes (for :func:`bypassed`)."""

    def __init__(self, tags: dict):
        self.__dict__["tags"] = tags

    def __setattr__(self, name, value):
        self.tags[name] = value
