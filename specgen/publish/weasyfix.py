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
print is laid out.
"""
from __future__ import annotations

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

__all__ = ["weasyprint", "split_first_line"]
