"""What the command line shows: progress (rich on a terminal, plain lines elsewhere), the
check table (findings wrapped, never cut) and the status words the site uses."""
from __future__ import annotations

import io

from specgen.checks.result import STATUS_WORDS, Basis, CheckResult
from specgen.checks.run import Results
from specgen.console import Progress
from specgen.textreport import table

LONG = ("not assessed: historic mortar HM2 names no aggregate_sample (its aggregate recovered "
        "by acid digestion, in lab/sieves.csv), so the grading of the repair sand cannot be "
        "compared with it; add the sieve analysis of the recovered aggregate")


def _results() -> Results:
    def res(code, status, message):
        return CheckResult(code, "Title", "Z2/M1", "zone", status, None, "",
                           (Basis("common practice"),), message=message)
    checks = [res("COMP-GRAD", "not_assessed", LONG), res("MIX-YIELD", "info", "short"),
              res("STR-MIN", "pass", "28 d: pass")]
    return Results("P-1", "R1", checks, {}, {})


def test_plain_progress_lines_with_stage_numbers_and_part_counts():
    out = io.StringIO()
    with Progress(out) as progress:
        progress("load: reading")
        progress("publish: PDF parts", 1, 3)
        progress("publish: PDF parts", 3, 3)
        progress("publish: moving")
    lines = out.getvalue().splitlines()
    assert lines[0].startswith("[1] load: reading (")
    assert lines[1].startswith("[2] publish: PDF parts (")
    assert lines[2:4] == ["    publish: PDF parts: 1/3", "    publish: PDF parts: 3/3"]
    assert lines[4].startswith("[3] publish: moving (")


def test_terminal_progress_is_drawn_by_rich_with_done_of_total():
    out = io.StringIO()
    with Progress(out, terminal=True) as progress:
        progress("publish: PDF parts", 2, 7)
    text = out.getvalue()
    assert "\x1b[" in text                        # drawn with terminal control codes
    assert "[1] publish: PDF parts" in text and "2/7" in text


def test_quiet_progress_prints_nothing():
    out = io.StringIO()
    with Progress(out, quiet=True) as progress:
        progress("load")
    assert out.getvalue() == ""


def test_check_table_wraps_findings_and_never_cuts_them():
    text = table(_results(), width=100)
    assert "…" not in text
    assert all(len(line) <= 100 for line in text.splitlines())
    # the whole finding is there, word for word, over its wrapped lines
    assert " ".join(text.split()).count(" ".join(LONG.split())) == 1
    first = next(line for line in text.splitlines() if line.startswith("COMP-GRAD"))
    column = first.index("not assessed: historic")
    continuation = text.splitlines()[text.splitlines().index(first) + 1]
    assert continuation[:column].strip() == "" and continuation[column] != " "


def test_check_table_wide_keeps_one_line_per_check():
    lines = table(_results(), width=60, wide=True).splitlines()
    assert sum(line.startswith(("COMP-", "MIX-", "STR-")) for line in lines) == 3
    assert any(line.endswith(LONG) for line in lines)


def test_command_line_uses_the_site_status_words():
    text = table(_results(), width=200)
    assert "not assessed" in text and "for information" in text
    assert "not_assessed" not in text.replace(LONG, "") and " info " not in text
    assert STATUS_WORDS["not_assessed"] == "not assessed"


def test_change_report_text_uses_status_words():
    from specgen.checks.revision_delta import as_text, compare
    old = {"revision": "R1", "checks": [{"code": "COMP-GRAD", "subject": "Z1/M1", "title": "t",
                                         "status": "not_assessed", "status_word": "not assessed",
                                         "value": None, "unit": ""}]}
    new = {"revision": "R2", "checks": [{"code": "COMP-GRAD", "subject": "Z1/M1", "title": "t",
                                         "status": "info", "status_word": "for information",
                                         "value": 2.0, "unit": "%"}]}
    text = as_text(compare(old, {}, new, {}))
    assert "COMP-GRAD/Z1/M1: not assessed → for information; — → 2 %" in text


def test_pdf_reports_its_parts_as_they_are_printed(tmp_path):
    from types import SimpleNamespace

    from specgen.publish.pdf import parts, pieces, write_pdf
    from specgen.report.pageset import PageSet
    pages = PageSet()
    pages.add_page("index.md", "Summary", "# Summary\n\nText.\n")
    pages.add_page("two.md", "Two", "# Two\n\nMore text.\n")
    project = SimpleNamespace(title="Test pier", site="Nowhere", client="Nobody", code="T-1")
    context = {"title": "Test pier — revision A", "author": "specgen tests", "subject": "s",
               "keywords": "k", "date": "2026-01-01", "project": project,
               "revision": SimpleNamespace(code="A"), "state": "draft", "purpose": "preliminary"}
    seen = []
    write_pdf(pages, context, tmp_path / "t.pdf", attachments={}, workers=1,
              on_part=lambda done, total: seen.append((done, total)))
    n = len(parts(pieces(pages)))
    assert seen == [(i, n) for i in range(1, n + 1)] and n >= 1


def test_pdf_parts_are_counted_over_both_volumes(tmp_path):
    """With an appendix volume the count runs once over the report's parts and then the
    appendices' (1/n … n/n), not once per volume (which read as the PDF done twice)."""
    from types import SimpleNamespace

    from specgen.publish.pdf import pieces, volumes, write_pdf
    from specgen.report.pageset import PageSet
    pages = PageSet()
    pages.add_page("index.md", "Summary", "# Summary\n\nText.\n")
    pages.add_page("two.md", "Two", "# Two\n\nMore text.\n")
    pages.add_page("sheets.md", "Sheets", "# Sheets\n\nA sheet.\n", volume="appendix")
    project = SimpleNamespace(title="Test pier", site="Nowhere", client="Nobody", code="T-1")
    context = {"title": "Test pier — revision A", "author": "specgen tests", "subject": "s",
               "keywords": "k", "date": "2026-01-01", "project": project,
               "revision": SimpleNamespace(code="A"), "state": "draft", "purpose": "preliminary"}
    appendix = (tmp_path / "t-appendices.pdf", "t-appendices.pdf", "t.pdf")
    vols = volumes(pieces(pages), tmp_path / "t.pdf", appendix)
    assert [v.key for v in vols] == ["main", "appendix"]
    seen = []
    write_pdf(pages, context, tmp_path / "t.pdf", attachments={}, workers=1,
              appendix=appendix, on_part=lambda done, total: seen.append((done, total)))
    n = len(seen)
    assert n >= 2 and seen == [(i, n) for i in range(1, n + 1)]
    assert (tmp_path / "t-appendices.pdf").exists()
