"""How wide a table sets in print, measured with the print font, and so which page it needs.

A table goes on a landscape page when its columns cannot all be set legibly across a
portrait page, whatever their number: ten short columns fit, four with long unbreakable
words may not.  Each column is measured with the font the print style sets tables in
(``content/print/print.css``: DejaVu Sans 8.5 pt, header cells bold; Pillow reads the
glyphs' advance widths from the font file): its *least* width is its widest word, its
*whole* width its widest cell on one line.  A short column (whole width up to
:data:`ONE_LINE_MM`: numbers, dates, ids, a verdict) keeps each cell on one line; a column
of prose wraps, but not narrower than :data:`WRAP_MIN_MM` nor than its widest word.  A table
whose columns so need more than the portrait text width is printed on a landscape page;
any other stays upright (a landscape page breaks the flow: a turn it does not need leaves a
part-empty page before it).
"""
from __future__ import annotations

import html as htmllib
import re
from functools import lru_cache

PT_PER_MM = 72 / 25.4
FONT_PT = 8.5            # print.css: table { font-size: 8.5pt }
PADDING_MM = 3.0         # print.css: th, td { padding: 1.2mm 1.5mm } — left and right
ONE_LINE_MM = 20.0       # a column this wide on one line (about 12 characters) never wraps
WRAP_MIN_MM = 15.0       # a column of prose is cramped below this (two short words a line)
#: the text width of a portrait page (A4 210 mm less print.css's 18 mm margins; the US
#: letter page is 6 mm wider, so a table that fits A4 fits it)
PORTRAIT_MM = 210 - 2 * 18
#: the text width of a landscape page (@page wide: A4 297 mm less 18 mm margins)
LANDSCAPE_MM = 297 - 2 * 18
FONTS = {False: "DejaVuSans.ttf", True: "DejaVuSans-Bold.ttf"}
AVERAGE_EM = 0.58        # DejaVu Sans's mean advance, for a machine without the font file

_ROW = re.compile(r"<tr\b[^>]*>(.*?)</tr>", re.S)
_CELL = re.compile(r"<(th|td)\b([^>]*)>(.*?)</\1>", re.S)
_BREAK = re.compile(r"<br\s*/?>", re.I)
_TAG = re.compile(r"<[^>]+>")


@lru_cache(maxsize=None)
def _font(bold: bool):
    try:
        from PIL import ImageFont
        return ImageFont.truetype(FONTS[bold], 100)
    except OSError:                     # the font file is not where Pillow looks
        return None


@lru_cache(maxsize=4096)
def text_mm(text: str, bold: bool = False) -> float:
    """Width of ``text`` on one line in the print's table font (mm)."""
    font = _font(bold)
    units = font.getlength(text) if font is not None else AVERAGE_EM * 100 * len(text)
    return units / 100 * FONT_PT / PT_PER_MM


def _lines(cell_html: str) -> list[str]:
    text = _TAG.sub("", _BREAK.sub("\n", cell_html))
    return [" ".join(line.split()) for line in htmllib.unescape(text).split("\n")]


def column_widths(table_html: str) -> list[tuple[float, float]]:
    """(least, whole) width in mm of each column of ``table_html``, padding included; a cell
    spanning columns is left out (its columns are measured by the others)."""
    least: dict[int, float] = {}
    whole: dict[int, float] = {}
    for row in _ROW.findall(table_html):
        for i, (tag, attrs, body) in enumerate(_CELL.findall(row)):
            if "colspan" in attrs:
                continue
            bold = tag == "th"
            lines = _lines(body)
            words = [w for line in lines for w in re.split(r"(?<=[-/])|\s", line) if w]
            least[i] = max(least.get(i, 0.0), max((text_mm(w, bold) for w in words), default=0))
            whole[i] = max(whole.get(i, 0.0), max((text_mm(x, bold) for x in lines), default=0))
    return [(least[i] + PADDING_MM, whole[i] + PADDING_MM) for i in sorted(least)]


def needed_mm(table_html: str) -> float:
    """The width a table needs to be set legibly (mm): a short column its cells on one line,
    a column of prose at least :data:`WRAP_MIN_MM` and its widest word (padding included)."""
    short, least = ONE_LINE_MM + PADDING_MM, WRAP_MIN_MM + PADDING_MM
    return sum(whole if whole <= short else max(lo, least)
               for lo, whole in column_widths(table_html))


def needs_landscape(table_html: str) -> bool:
    """Whether the table cannot be set legibly across a portrait page."""
    return needed_mm(table_html) > PORTRAIT_MM
