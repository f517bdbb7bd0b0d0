"""ziamath's layout without the work whose result nothing reads: the same SVG, drawn once.

ziamath (0.13) lays out each row of a formula twice: once more, on a copy of every child,
to measure the row's height *without* its stretchy operators (``Mrow._get_height_nostretch``),
because a stretchy operator (a ``\\left(`` fence, a big sum) is sized to that height.  The
copy is laid out in full, its own rows measured the same way, so a formula nested ``d`` rows
deep is laid out about ``2**d`` times.  The height is handed to the children only as the
``rowymin``/``rowymax`` arguments, and only a stretchy operator reads them
(``Moperator._setup``).  The measuring works on copies of the elements, so it changes nothing
the real layout sees.  So a row none of whose descendants can be a stretchy operator skips
the measuring: every node, glyph and number of its layout is what it was.

A second cost with no effect on the drawing: every node's style is parsed against its
parent's through ``dataclasses.asdict`` (a deep copy of the parent's style) only to read five
plain fields from it; a shallow view of the same fields gives the same values.  And a size
such as ``thinmathspace`` is converted to pixels afresh on every use (``Mnode.size_px``, a
pure function of the size and the font size): it is kept by those two.

:func:`install` applies the three to the ziamath this was checked against (``CHECKED``); with
another version the library is left as it is (slower, same drawing).
``tests/test_math_layout.py`` compares the SVG bytes of every formula of the demo and of
constructed hard cases with and without them.
"""
from __future__ import annotations

import contextlib
import functools
import threading

CHECKED = "0.13"   # the ziamath version whose layout code the shortcuts were read against

_ORIGINAL: dict = {}
_PLAIN: list[bool] = []   # non-empty within plain(): install() leaves ziamath as it ships
# the live preview draws in a background thread: installing twice at once would keep the
# shortcut itself as the "original" it calls
_LOCK = threading.RLock()


def _stretchy_names() -> frozenset[str]:
    """Every operator text that the operator table makes stretchy in any of its forms."""
    from ziamath import operators
    return frozenset(name for (name, _form), params in operators.operators.items()
                     if params.get("stretchy", "false") != "false")


def _may_stretch(elements, stretchy: frozenset[str]) -> bool:
    """Whether any element in or under ``elements`` may be laid out as a stretchy operator.

    Conservative: any element (whatever its tag, since ziamath turns some identifiers into
    operators) whose text, or a character of it, is a stretchy operator, unless it says
    ``stretchy="false"``; any element that says ``stretchy`` otherwise; any fenced group."""
    for top in elements:
        for el in top.iter():
            if el.tag == "mfenced":
                return True
            said = el.get("stretchy")
            if said is not None:
                if said != "false":
                    return True
                continue
            text = (el.text or "").strip()
            if text and (text in stretchy or any(ch in stretchy for ch in text)):
                return True
    return False


def _shallow_fields(style) -> dict:
    # parse_style reads mathcolor, mathbackground, mathsize, scriptlevel and displaystyle from
    # the parent's fields (never mathvariant, which it takes from the parent object itself):
    # the fields' own values, as asdict gives them, without its deep copy
    return dict(vars(style))


class _SizeOnly:
    """Stands for a node in ``Mnode.size_px``, which reads nothing of the node but
    ``glyphsize`` when no font size is given (here it always is)."""


def _install() -> bool:
    import ziamath
    from ziamath import styles
    from ziamath.nodes.mnode import Mnode
    from ziamath.nodes.mrow import Mrow
    if getattr(ziamath, "__version__", None) != CHECKED:
        return False
    if _ORIGINAL:
        return True
    stretchy = _stretchy_names()

    def height_nostretch(self, line, **kwargs):
        if _may_stretch(line, stretchy):
            return _ORIGINAL["measure"](self, line, **kwargs)
        # nothing below reads the height: ziamath's own "no height found" values
        return 9999, -9999

    size_px = functools.lru_cache(maxsize=1024)(Mnode.size_px.__get__(_SizeOnly()))

    def sized(self, size, fontsize=None):
        return size_px(size, self.glyphsize if fontsize is None else fontsize)

    _ORIGINAL["measure"] = Mrow._get_height_nostretch
    _ORIGINAL["asdict"] = styles.asdict
    _ORIGINAL["size_px"] = Mnode.size_px
    Mrow._get_height_nostretch = height_nostretch
    styles.asdict = _shallow_fields
    Mnode.size_px = sized
    return True


def _uninstall() -> None:
    from ziamath import styles
    from ziamath.nodes.mnode import Mnode
    from ziamath.nodes.mrow import Mrow
    if _ORIGINAL:
        Mrow._get_height_nostretch = _ORIGINAL.pop("measure")
        styles.asdict = _ORIGINAL.pop("asdict")
        Mnode.size_px = _ORIGINAL.pop("size_px")


def install() -> bool:
    """Apply the shortcuts for good (idempotent); False when ziamath is not ``CHECKED``
    (or within :func:`plain`)."""
    with _LOCK:
        return not _PLAIN and _install()


@contextlib.contextmanager
def plain():
    """Within the block, ziamath lays out as it ships (the reference the tests compare with)."""
    with _LOCK:
        was = bool(_ORIGINAL)
        _uninstall()
        _PLAIN.append(True)
    try:
        yield
    finally:
        with _LOCK:
            _PLAIN.pop()
            if was and not _PLAIN:
                _install()
