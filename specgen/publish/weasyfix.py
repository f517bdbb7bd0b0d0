"""WeasyPrint as the print uses it, with one line-breaking mend.

WeasyPrint 70 splits a text run at the first word of its line when the run, laid out
whole, fits the line except for its trailing space and an inline element follows it
(``… is in the appendix <a>Options</a>``): Pango reports the run as one line, its width
with the trailing space is over the measure, and ``split_first_line`` then takes the "too
wide to split earlier" branch and keeps only the first word.  The dossier printed
"Each" alone on a line that way (R3, the specification's options appraisal).

CSS Text Module Level 3, §4.1.3 (white space processing, phase II): a collapsible space
at the end of a line *hangs* — it does not count towards fitting the line.  So when the
run without its trailing spaces fits whole, it is laid out whole; the following inline
element then starts the next line, as in a browser.  Only that case is changed; every
other result of ``split_first_line`` is WeasyPrint's own.

Importing this module also installs :mod:`specgen.publish.weasyfast` (the SVG drawing's
memos, byte for byte WeasyPrint's output).  Import ``weasyprint`` from here wherever the
print is laid out; :func:`stylesheet` and :func:`fonts` are the print CSS parsed and the
font configuration made once per process, shared by every part it prints.
"""
from __future__ import annotations

import os

import weasyprint

from specgen.publish import weasyfast as _weasyfast
from weasyprint.layout import inline as _inline
from weasyprint.text import line_break as _line_break

_original = _line_break.split_first_line


def split_first_line(text, style, context, max_width, justification_spacing,
                     is_line_start=True, minimum=False):
    """WeasyPrint's ``split_first_line``, with a trailing collapsible space hanging."""
    result = _original(text, style, context, max_width, justification_spacing,
                       is_line_start, minimum)
    resume_index = result[2]
    kept = text.rstrip(" ")
    if (resume_index is None or max_width is None or minimum or kept == text or not kept
            or style["white_space"] not in ("normal", "nowrap", "pre-line")
            or resume_index >= len(kept.encode())):
        return result
    whole = _original(kept, style, context, max_width, justification_spacing,
                      is_line_start, minimum)
    if whole[2] is None and whole[3] <= max_width:
        return whole
    return result


# the line layout's own reference only (``split_text_box``); the preferred widths of
# tables and floats keep WeasyPrint's function as it is
_inline.split_first_line = split_first_line
# the SVG drawing's memos (same bytes, drawn once per process): weasyfast.py
_weasyfast.install()


# --------------------------------------------------------------- kept per process
_SHEETS: dict = {}   # CSS text → its parsed WeasyPrint stylesheet, in this process
SHEETS_KEPT = 4      # the print's sheets: parts, stamps (a page size each)


def stylesheet(css: str):
    """The print CSS parsed once per process, not once per part (about 0.02 CPU s each).

    WeasyPrint only reads a stylesheet while it lays a document out (its selector matcher
    and page rules), as it does its own user-agent sheets, shared by every document."""
    sheet = _SHEETS.get(css)
    if sheet is None:
        if len(_SHEETS) >= SHEETS_KEPT:
            _SHEETS.clear()
        sheet = _SHEETS[css] = weasyprint.CSS(string=css)
    return sheet


_FONTS: list = []    # (process id, its WeasyPrint font configuration)


def fonts():
    """One font configuration per process, not one per part: WeasyPrint otherwise loads
    Fontconfig's configuration and font list, and Pango's font map, for every document.
    The print uses no web fonts (no ``@font-face``), so the configuration only ever holds
    the system's fonts, the same for every part.  Made again in a forked process (Fontconfig
    and Pango state is not shared across a fork)."""
    if not _FONTS or _FONTS[0][0] != os.getpid():
        from weasyprint.text.fonts import FontConfiguration
        _FONTS[:] = [(os.getpid(), FontConfiguration())]
    return _FONTS[0][1]


__all__ = ["weasyprint", "split_first_line", "stylesheet", "fonts"]
