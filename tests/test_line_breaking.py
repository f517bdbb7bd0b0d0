"""Line breaking of the print: a run of text that fits its line once its trailing space
hangs is laid out whole (CSS Text Module Level 3, §4.1.3: a collapsible space at the end of a
line hangs), never cut after its first word (``specgen.publish.weasyfix``)."""
from __future__ import annotations

import pypdf
import pytest

from specgen.publish.weasyfix import weasyprint

CSS = ('@page { size: A4; margin: 22mm 18mm 20mm 18mm; } '
       'html { font-family: "DejaVu Sans", sans-serif; font-size: 9.5pt; line-height: 1.4; }')
# the sentence that printed "Each" alone on a line (R3, options appraisal): at this measure
# the run before the link fits the first line without its trailing space
SENTENCE = ('Each candidate against every check that applies to it, with the cost per m² of '
            'wall, is in the appendix <a href="#x">Options</a> and follows.')


def _lines(tmp_path, html: str) -> list[str]:
    out = tmp_path / "p.pdf"
    weasyprint.HTML(string=html).write_pdf(str(out), stylesheets=[weasyprint.CSS(string=CSS)])
    text = pypdf.PdfReader(str(out)).pages[0].extract_text()
    return [line.strip() for line in text.splitlines() if line.strip()]


def test_a_run_that_fits_but_for_its_trailing_space_stays_whole(tmp_path):
    lines = _lines(tmp_path, f"<p>{SENTENCE}</p>")
    # a browser's break: the whole run on the first line, the link starting the second
    assert lines[0].endswith("is in the appendix")
    assert lines[0].startswith("Each candidate against every check")
    assert lines[1].startswith("Options and follows.")


@pytest.mark.parametrize("n", range(80, 94, 2))
def test_no_first_word_left_alone_before_an_inline_element(tmp_path, n):
    # the run before the link grows a character at a time, so at one of these lengths it fits
    # the first line but for its trailing space (n = 86 at this measure)
    filler = ("abc " * 40)[:n]
    lines = _lines(tmp_path, f'<p>Each {filler} and <a href="#x">Options</a> follows here '
                             'and more words to wrap the line.</p>')
    assert lines[0] != "Each"
    assert len(lines[0]) > 60          # a full first line, not one word


def test_text_that_does_not_fit_still_breaks_at_its_last_opportunity(tmp_path):
    lines = _lines(tmp_path, "<p>" + "word " * 60 + "end.</p>")
    assert len(lines) >= 2 and all(len(line) > 60 for line in lines[:-1])
