"""Which tables print on a landscape page: decided by their width measured with the print
font, not by how many columns they have."""
from __future__ import annotations

import re
from pathlib import Path

import pytest

from specgen.publish import widths
from specgen.publish.pdf import _landscape_wide_tables

ROOT = Path(__file__).resolve().parent.parent
FONT_FILE = Path("/usr/share/fonts/truetype/dejavu/DejaVuSans.ttf")  # Debian fonts-dejavu-core


def _table(head: list[str], rows: list[list[str]]) -> str:
    cells = "".join(f"<th>{h}</th>" for h in head)
    body = "".join("<tr>" + "".join(f"<td>{c}</td>" for c in row) + "</tr>" for row in rows)
    return f"<table><thead><tr>{cells}</tr></thead><tbody>{body}</tbody></table>"


@pytest.mark.skipif(not FONT_FILE.exists(), reason="DejaVu Sans not installed")
@pytest.mark.parametrize("text", ["SiO2 21.3 %", "27 August 2026", "Regime suits the binder"])
def test_text_is_measured_by_the_fonts_own_advance_widths(text):
    """The width of a line equals the sum of its glyphs' advances in the font's own metrics
    table, read by fontTools (a reference library: the hmtx table, in font units per em;
    OpenType specification, 'hmtx' and 'head' tables), at the print's 8.5 pt (print.css)."""
    from fontTools.ttLib import TTFont
    font = TTFont(str(FONT_FILE))
    cmap, hmtx = font.getBestCmap(), font["hmtx"]
    units = sum(hmtx[cmap[ord(c)]][0] for c in text)
    expected_pt = units / font["head"].unitsPerEm * 8.5
    assert widths.text_mm(text) == pytest.approx(expected_pt * 25.4 / 72, rel=0.01)


def test_page_widths_are_the_print_styles():
    """ISO 216: A4 is 210 × 297 mm; the text width is that less the left and right margins
    the print style gives the page and the landscape page."""
    css = (ROOT / "content" / "print" / "print.css").read_text(encoding="utf-8")
    page = re.search(r"@page \{[^}]*?margin: ([\d.]+)mm ([\d.]+)mm ([\d.]+)mm ([\d.]+)mm", css)
    wide = re.search(r"@page wide \{[^}]*?margin: ([\d.]+)mm ([\d.]+)mm ([\d.]+)mm ([\d.]+)mm",
                     css)
    assert widths.PORTRAIT_MM == 210 - float(page.group(2)) - float(page.group(4))
    assert widths.LANDSCAPE_MM == 297 - float(wide.group(2)) - float(wide.group(4))
    assert re.search(r"table \{[^}]*font-size: 8\.5pt", css) and widths.FONT_PT == 8.5


@pytest.mark.skipif(not FONT_FILE.exists(), reason="DejaVu Sans not installed")
def test_many_short_columns_stay_portrait_few_long_ones_turn():
    """Fourteen columns of two-digit numbers fit across a portrait page; three columns of
    SHA-256 digests (64 hexadecimal characters that cannot break, FIPS 180-4) do not."""
    numbers = _table([f"c{i}" for i in range(14)], [[str(10 + i) for i in range(14)]] * 3)
    digest = "9f86d081884c7d659a2feaa0c55ad015a3bf4f1b2b0b822cd15d6c15b0f00a08"
    digests = _table(["File", "Copy", "Original"], [[digest, digest, digest]])
    assert widths.needed_mm(numbers) < widths.PORTRAIT_MM
    assert widths.needed_mm(digests) > widths.PORTRAIT_MM
    assert _landscape_wide_tables(numbers) == numbers
    assert _landscape_wide_tables(digests) == f'<div class="sg-wide">{digests}</div>'


@pytest.mark.skipif(not FONT_FILE.exists(), reason="DejaVu Sans not installed")
def test_a_register_of_dates_and_ids_is_not_set_cramped():
    """Ten columns of ids, dates, names and places (a sample register): the short ones on one
    line and the others wrapped to two words a line still need more than a portrait page, so
    it turns, although only ten columns (the count the page turned at before was thirteen)."""
    head = ["Sample", "Kind", "Zone", "Taken on", "Taken by", "Location", "Drawing",
            "Point", "Used for", "Laboratory"]
    row = ["S-014", "historic mortar", "Z2", "27 August 2026", "site engineer",
           "north pier, course 12", "D-03", "P7", "binder:aggregate", "Tollmere test house"]
    table = _table(head, [row] * 4)
    least_sum = sum(lo for lo, _ in widths.column_widths(table))
    assert least_sum < widths.PORTRAIT_MM < widths.needed_mm(table)
    assert widths.needs_landscape(table)


@pytest.mark.skipif(not FONT_FILE.exists(), reason="DejaVu Sans not installed")
def test_prose_columns_wrap_rather_than_turn_the_page():
    """Eight columns of verdicts with a sentence each (a compatibility matrix) are set
    upright, the sentences wrapped: turning would leave the page before it part empty."""
    head = ["Mix", "weaker than units", "not above historic", "moisture openness",
            "movement", "salts", "grading", "colour"]
    row = ["M1"] + ["pass (0.53, measured against the units of the pier)"] * 7
    table = _table(head, [row] * 3)
    assert widths.needed_mm(table) < widths.PORTRAIT_MM
    assert not widths.needs_landscape(table)


def test_a_spanning_cell_is_not_read_as_a_column():
    table = ("<table><tr><th colspan=\"3\">" + "x" * 300 + "</th></tr>"
             "<tr><td>a</td><td>b</td><td>c</td></tr></table>")
    assert len(widths.column_widths(table)) == 3
    assert not widths.needs_landscape(table)


@pytest.mark.skipif(not FONT_FILE.exists(), reason="DejaVu Sans not installed")
def test_a_turned_tables_caption_turns_with_it():
    digest = "9f86d081884c7d659a2feaa0c55ad015a3bf4f1b2b0b822cd15d6c15b0f00a08"
    caption = '<p class="sg-table-caption">Table 4. Digests</p>\n'
    wide = _table(["File", "Copy", "Original"], [[digest, digest, digest]])
    narrow = _table(["a", "b"], [["1", "2"]])
    other = '<p class="sg-table-caption">Table 5. Small</p>\n'
    html = f"<p>Before.</p>{caption}{wide}<p>Between.</p>{other}{narrow}"
    assert _landscape_wide_tables(html) == (
        f'<p>Before.</p><div class="sg-wide">{caption}{wide}</div><p>Between.</p>{other}{narrow}')
