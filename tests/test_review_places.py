"""Where a review comment can be anchored, and what the next revision says about it.

Figures and table rows carry ids a comment can anchor to (the Markdown extension
``specgen.report.mdanchors``, read back with the standard library's HTML parser); the comments
page names a place in words, never by its id; each page's sections are digested so the next
revision's change report lists the pages that changed and checks every page or check a
response says it changed.  Pages are made with Python-Markdown and the site's own extensions
(:data:`specgen.report.review.EXTENSIONS`), as the site makes them.
"""
from __future__ import annotations

import json
import re
from types import SimpleNamespace

import markdown
import pytest

from specgen.pagetext import anchor_label, page_facts, section_text
from specgen.report.review import EXTENSIONS, compare_sections, page_sections
from tests.browser import axe_violations, browser_or_skip, open_browser

PAGE = """# 4 Strength development

## Mix M1 {#mix-m1}

<figure class="sg-figure" markdown>
![A rising curve of strength against age](figures/strength-M1-compressive.svg)
<figcaption>Figure 4. M1: compressive strength against age</figcaption>
</figure>

| Property | Age | Mean |
|---|---|---|
| compressive | 28 d | 4.74 MPa |
| compressive | 90 d | 6.10 MPa |
| flexural | 28 d | 1.20 MPa |

## Mix M2 {#mix-m2}

| Property | Age | Mean |
|---|---|---|
| flexural | 28 d | 0.90 MPa |
"""


def _html(text: str) -> str:
    return markdown.markdown(text, extensions=EXTENSIONS)


def _row_ids(html: str) -> list[str]:
    return re.findall(r'<tr id="([^"]+)"', html)


# ------------------------------------------------------------------ ids of figures and rows
def test_figures_take_their_image_name_and_rows_as_many_cells_as_tell_them_apart():
    html = _html(PAGE)
    assert re.search(r'<figure class="sg-figure" id="fig-strength-m1-compressive">', html)
    # "compressive" twice in M1's table: the age tells the rows apart; "flexural" alone does
    rows = _row_ids(html)
    assert rows[:3] == ["row-compressive-28-d", "row-compressive-90-d", "row-flexural"]
    # the same row name under another heading takes that heading's id, not a running number
    assert rows[3] == "row-mix-m2-flexural"
    ids, _ = page_facts(html)
    assert len(ids) == len(set(ids))


def test_a_row_keeps_its_id_when_another_row_is_inserted_above_it():
    before = _row_ids(_html(PAGE))
    added = PAGE.replace("| compressive | 28 d | 4.74 MPa |",
                         "| compressive | 7 d | 2.90 MPa |\n| compressive | 28 d | 4.74 MPa |")
    after = _row_ids(_html(added))
    assert "row-compressive-7-d" in after
    assert set(before) <= set(after)


def test_a_place_is_named_in_words():
    html = _html(PAGE)
    assert anchor_label(html, "mix-m1") == "Mix M1"
    assert anchor_label(html, "fig-strength-m1-compressive") == (
        "Figure: Figure 4. M1: compressive strength against age")
    assert anchor_label(html, "row-compressive-90-d") == "Table row: compressive · 90 d"
    assert section_text(html, "row-compressive-90-d") == "compressive 90 d 6.10 MPa"
    assert anchor_label(html, "no-such-id") is None


def test_the_print_leaves_the_row_and_figure_ids_out():
    # thousands of named destinations in the PDF would serve nobody: nobody comments there
    from specgen.publish.pdf import _extensions
    names, _ = _extensions()
    assert "specgen.report.mdanchors" not in names and "toc" in names


def test_where_a_comment_was_made_never_shows_an_id():
    from specgen.project.schema import Comment
    from specgen.report.review import where_words
    pages = {"strength.md": PAGE}
    titles = {"strength.md": "4 Strength development"}
    base = {"id": "C9", "raised_in": "R2", "reviewer_role": "reviewer", "text": "Why?"}
    row = Comment(about="strength", anchor="row-compressive-90-d", quote="6.10 MPa", **base)
    assert where_words(row, pages, titles) == (
        "4 Strength development › Table row: compressive · 90 d")
    gone = Comment(about="strength", anchor="row-compressive-180-d", quote="x", **base)
    assert where_words(gone, pages, titles) == (
        "4 Strength development › a passage no longer in this revision")
    assert where_words(Comment(about="strength", **base), pages, titles) == (
        "4 Strength development")
    assert where_words(Comment(about="STR-MIN/M1", **base), pages, titles) == "check STR-MIN/M1"


# ---------------------------------------------------------- pages compared between revisions
def test_only_the_section_whose_text_changed_is_reported():
    old = page_sections({"strength.md": PAGE, "works.md": "# 7 Works\n\nText.\n"})
    edited = PAGE.replace("| flexural | 28 d | 1.20 MPa |", "| flexural | 28 d | 1.25 MPa |")
    new = page_sections({"strength.md": edited, "works.md": "# 7 Works\n\nText.\n"})
    assert compare_sections(old, new) == [{"page": "strength", "new_page": False, "gone": False,
                                           "changed": ["Mix M1"], "added": [], "removed": []}]


def test_moved_numbers_are_not_changes():
    # another chapter gained a table and the chapters were renumbered: nothing here changed
    old = page_sections({"strength.md": PAGE})
    moved = (PAGE.replace("Figure 4.", "Figure 5.").replace("# 4 Strength", "# 5 Strength")
             + "\n<!--sg-later-3-->\n")
    assert compare_sections(old, page_sections({"strength.md": moved})) == []
    clause = "# 8 Specification\n\n### 8.1.1 Materials\n\nNatural cement.\n"
    renumbered = clause.replace("8.1.1", "8.2.1").replace("# 8", "# 9")
    assert page_sections({"s.md": clause}) == page_sections({"s.md": renumbered})


def test_sections_and_pages_added_and_removed():
    old = page_sections({"strength.md": PAGE, "fabric.md": "# Fabric\n\nx\n"})
    grown = PAGE + "\n## Mix M3 {#mix-m3}\n\nNo results yet.\n"
    new = page_sections({"strength.md": grown.replace("## Mix M2 {#mix-m2}\n", ""),
                         "works.md": "# Works\n\ny\n"})
    found = {d["page"]: d for d in compare_sections(old, new)}
    assert found["strength"]["added"] == ["Mix M3"] and found["strength"]["removed"] == ["Mix M2"]
    assert found["works"]["new_page"] and found["fabric"]["gone"]


def test_a_section_named_twice_on_a_page_is_named_with_its_parent():
    from specgen.report.revision_chapters import _section_words
    two = "# 4 Strength\n\n## M1\n\n### Findings\n\nx\n\n## M2\n\n### Findings\n\ny\n"
    old, new = page_sections({"s.md": two}), page_sections({"s.md": two.replace("y", "z")
                                                                        .replace("x", "w")})
    [d] = compare_sections(old, new)
    assert _section_words(d) == "2 sections changed (M1 › Findings; M2 › Findings)"
    only = compare_sections(old, page_sections({"s.md": two.replace("x", "w")}))[0]
    assert _section_words(only) == "1 section changed (Findings)"


def _env(checks: list[dict]):
    return SimpleNamespace(
        pageset=SimpleNamespace(titles={"works.md": "7 Works", "fabric.md": "2 Fabric"}),
        results=SimpleNamespace(previous="R2", changes={"checks": checks}))


def test_a_response_is_checked_against_what_really_changed():
    from specgen.report.revision_chapters import _changed_words
    old = page_sections({"works.md": "# 7 Works\n\n## Weather and curing\n\nNo record.\n",
                         "fabric.md": "# 2 Fabric\n\nBrick.\n"})
    now = page_sections({"works.md": "# 7 Works\n\n## Weather and curing\n\n29 days cold.\n",
                         "fabric.md": "# 2 Fabric\n\nBrick.\n"})
    diff = {d["page"]: d for d in compare_sections(old, now)}
    moved = {"key": "SITE-WEATHER/WEP-2026", "code": "SITE-WEATHER", "subject": "WEP-2026",
             "old_status": "info", "new_status": "attention", "old_value": None,
             "new_value": 29, "unit": "count"}
    env = _env([moved])
    assert _changed_words(env, "works", diff) == (
        "[7 Works](works.md): 1 section changed (Weather and curing)")
    assert _changed_words(env, "fabric", diff) == (
        "[2 Fabric](fabric.md) reads the same as in R2 (**the response says it changed**)")
    assert _changed_words(env, "SITE-WEATHER", diff).startswith(
        "check SITE\\-WEATHER/WEP\\-2026: for information → attention, now 29")
    assert _changed_words(env, "STR-MIN/M1", diff) == (
        "check STR\\-MIN/M1: no status or value changed since R2 "
        "(**the response says it changed**)")
    # an earlier revision whose pages were not kept: said, not guessed
    assert "not compared" in _changed_words(_env([]), "works", None)


def test_a_response_naming_an_unknown_page_is_refused_where_it_is(demo_copy, cli):
    path = demo_copy / "comments.yaml"
    text = path.read_text()
    assert "changed: [works, SITE-WEATHER]" in text
    path.write_text(text.replace("changed: [works, SITE-WEATHER]", "changed: [works, wroks]"))
    line = next(i for i, x in enumerate(path.read_text().splitlines(), 1) if "wroks" in x)
    result = cli("check", demo_copy)
    assert result.exit_code == 2, result.output
    assert (f"comments.yaml, line {line}: comments[3].changed[1]: comment 'C4' names as changed "
            "'wroks', which is neither a check code nor a page of the dossier. Fix: did you "
            "mean 'works'?") in result.output
    assert "Traceback" not in result.output


# ------------------------------------------------------------------- the demo, as published
@pytest.mark.e2e
def test_the_demo_change_report_shows_the_answer_and_the_pages_it_changed(demo_build):
    out = demo_build
    manifest = json.loads((out / "R2" / "manifest.json").read_text())
    assert "works" in manifest["sections"]          # each revision keeps its pages' digests
    html = (out / "R3" / "changes.html").read_text("utf-8")
    _, text = page_facts(html)
    text = " ".join(text.split())
    # C4 was made in R2's site on Weather and curing and answered in R3
    works = re.search(r'<a href="works.html">([^<]+)</a>', html).group(1)   # its title
    assert (f"C4 (required change) about {works} › Weather and curing; the quoted passage has "
            f"changed. Changed in answer: {works} :") in text, text[:3000]
    assert re.search(r"Changed in answer: [^:]+: \d+ sections? changed \(Weather and curing;",
                     text)
    assert "check SITE-WEATHER/WEP-2026: for information → attention, now 29 d." in text
    assert "the response says it changed" not in text
    assert re.search(r"Pages whose text changed since R2", text)
    comments = " ".join(page_facts((out / "R3" / "comments.html").read_text("utf-8"))[1].split())
    assert "weather-and-curing" not in comments      # the place in words, not its id
    assert "The passage has changed since R2." in comments
    assert "Open by category: 1 required change, 1 question." in comments


@pytest.mark.e2e
def test_comment_on_a_figure_and_a_table_row_in_the_browser(demo_build, demo_copy, cli,
                                                            tmp_path):
    """Select a figure's caption, then a row of the check register: each comment is anchored to
    the figure or the row, the file they export is taken in, and each names its place."""
    browser_or_skip()
    with open_browser(downloads=True) as page:
        page.goto((demo_build / "R3" / "strength.html").as_uri())
        # a figure opens its full-size image when clicked: its caption is what one selects
        fig = page.evaluate("""() => {
            const f = document.querySelector("article figure[id]");
            const r = document.createRange(); r.selectNodeContents(f.querySelector("figcaption"));
            const s = window.getSelection(); s.removeAllRanges(); s.addRange(r);
            return f.id; }""")
        page.wait_for_timeout(100)
        page.click(".sg-review-toggle")
        assert page.input_value("#sg-review-anchor") == fig
        caption = page.inner_text(f"#{fig} figcaption")
        assert page.input_value("#sg-review-quote") == " ".join(caption.split())
        # the figure is in the list of places too, for a reader without a mouse
        label = page.evaluate(f"document.querySelector('#sg-review-anchor option[value=\"{fig}\"]')"
                              ".textContent")
        assert label.startswith("Figure: ")
        page.fill("#sg-review-text", "Show the 90-day results on this figure.")
        page.fill("#sg-review-author", "Historic environment officer")
        page.click("text=Save comment")
        with page.expect_download() as strength_file:
            page.click(".sg-review-export")
        strength_json = tmp_path / "strength.json"
        strength_file.value.save_as(strength_json)

        page.goto((demo_build / "R3" / "checks.html").as_uri())
        row = page.evaluate("""() => {
            const tr = document.querySelector("article tbody tr[id]");
            const r = document.createRange(); r.selectNodeContents(tr.cells[0]);
            const s = window.getSelection(); s.removeAllRanges(); s.addRange(r);
            return tr.id; }""")
        page.wait_for_timeout(100)
        page.click(".sg-review-toggle")
        assert page.input_value("#sg-review-anchor") == row
        chosen = page.evaluate("document.querySelector('#sg-review-anchor').selectedOptions[0]"
                               ".textContent")
        assert chosen.startswith("Table row: ")
    doc = json.loads(strength_json.read_text())
    assert [c["anchor"] for c in doc["comments"]] == [fig]
    result = cli("import-comments", demo_copy, strength_json, "--out", demo_build)
    assert result.exit_code == 0, result.output
    assert "C5" in result.output


@pytest.mark.e2e
def test_a_figure_commented_on_with_the_keyboard_alone(demo_build, tmp_path):
    """No mouse: Tab to the skip link that opens the panel, choose a figure from the list of places with the
    arrow keys, type, save and export with Enter; axe-core finds no WCAG 2.1 A/AA violation
    in the open panel of a page with figures."""
    browser_or_skip()
    with open_browser(downloads=True) as page:
        page.goto((demo_build / "R3" / "compatibility.html").as_uri())
        # the button comes after every link of the chapter; a skip link near the start of
        # the page, after "Skip to content", opens the panel
        for presses in range(1, 4):
            page.keyboard.press("Tab")
            if page.evaluate("document.activeElement.classList.contains('sg-review-skip')"):
                break
        else:
            pytest.fail("no 'Skip to review comments' link within three Tab presses")
        assert page.evaluate("document.activeElement.textContent") == "Skip to review comments"
        page.keyboard.press("Enter")
        assert page.evaluate("document.activeElement.id") == "sg-review-title"
        page.keyboard.press("Tab")                # the list of places
        assert page.evaluate("document.activeElement.id") == "sg-review-anchor"
        options = page.evaluate("[...document.querySelectorAll('#sg-review-anchor option')]"
                                ".map(o => [o.value, o.textContent])")
        first_figure = next(i for i, (value, _) in enumerate(options) if value.startswith("fig-"))
        for _ in range(first_figure):
            page.keyboard.press("ArrowDown")
        chosen = page.input_value("#sg-review-anchor")
        assert chosen == options[first_figure][0]
        for _ in range(3):                        # quote, category, comment
            page.keyboard.press("Tab")
        page.keyboard.type("The grading envelope should be named on this figure.")
        page.keyboard.press("Tab")
        page.keyboard.type("Historic environment officer")
        found = [f"{v['id']}: {len(v['nodes'])}"
                 for v in axe_violations(page, within="sg-review-panel")]
        assert page.evaluate("document.activeElement.id") == "sg-review-author"
        for _ in range(3):                        # organisation, role, Save comment
            page.keyboard.press("Tab")
        page.keyboard.press("Enter")
        assert "Comment saved" in page.inner_text(".sg-review-status")
        for _ in range(2):                        # past the saved comment's delete button
            page.keyboard.press("Tab")
        assert page.evaluate("document.activeElement.classList.contains('sg-review-export')")
        with page.expect_download() as download:
            page.keyboard.press("Enter")
        saved = tmp_path / "keyboard.json"
        download.value.save_as(saved)
    assert found == []
    [comment] = json.loads(saved.read_text())["comments"]
    assert comment["anchor"] == chosen and comment["page"] == "compatibility"
    assert comment["text"] == "The grading envelope should be named on this figure."
