"""Review comments made on the published site: the panel in a real browser, the comment file
taken in with `specgen import-comments`, hostile files refused with located messages, and the
comments page telling whether each commented passage still reads the same."""
from __future__ import annotations

import json

import markdown
import pytest

from specgen.pagetext import page_facts, section_text, squeeze
from tests.browser import axe_violations, browser_or_skip, open_browser

pytestmark = pytest.mark.costly(15)   # CPU s (tests/conftest.py)

REV = "R3"


# ----------------------------------------------------------------- plain functions
def test_section_text_runs_to_the_next_heading_of_the_same_level():
    page = ("<h1 id='t'>Title</h1><p>intro</p><h2 id='a'>A</h2><p>one <b>two</b></p>"
            "<h3 id='a1'>A.1</h3><p>three</p><h2 id='b'>B</h2><p>four</p>"
            "<table id='tab'><tr><td>5</td><td>6</td></tr></table>")
    assert section_text(page, "a") == "A one two A.1 three"        # h3 belongs to the h2
    assert section_text(page, "a1") == "A.1 three"
    assert section_text(page, "tab") == "5 6"                        # an element: to its end
    assert section_text(page, "nowhere") is None
    ids, text = page_facts(page + "<script>var x = 'hidden';</script>")
    assert ids == {"t", "a", "a1", "b", "tab"} and "hidden" not in text


def test_quotes_compare_without_case_or_white_space():
    # a browser's selection across table cells gives tabs and line breaks
    assert squeeze("Joint\twidth \n 10 mm") == squeeze("joint width 10 MM")
    assert squeeze("joint width 12 mm") != squeeze("joint width 10 mm")


def test_comment_text_is_shown_as_text_never_as_markup():
    from specgen.report.render import inert
    hostile = "<img src=x onerror=alert(1)> *bold* [link](javascript:alert(1)) # heading | cell"
    html = markdown.markdown(str(inert(hostile)), extensions=["tables", "attr_list"])
    assert "<img" not in html and "<em>" not in html and "<a " not in html and "<h1" not in html
    assert "&lt;img src=x onerror=alert(1)&gt;" in html and "*bold*" in html


def test_place_of_a_comment_in_the_current_pages():
    from specgen.project.schema import Comment
    from specgen.report.review import place_of
    pages = {"works.md": "# Works\n\n## Gauging {#gauging}\n\nGauge 0.5 L at a time.\n\n## Next\n\nx\n"}

    def comment(**kw):
        base = {"id": "C9", "raised_in": "R2", "about": "works", "reviewer_role": "reviewer",
                "text": "Why so small?", "anchor": "gauging"}
        return Comment(**{**base, **kw})
    assert place_of(comment(quote="gauge 0.5 L at a time"), pages).state == "unchanged"
    changed = place_of(comment(quote="Gauge 1 L at a time."), pages)
    assert changed.state == "changed" and changed.now == "Gauging Gauge 0.5 L at a time."
    assert place_of(comment(anchor="mixing", quote="x"), pages).state == "gone"
    assert place_of(comment(about="strength", quote="x"), pages).state == "gone"


def test_open_comments_counted_by_category():
    from specgen.project.schema import Comment
    from specgen.report.review import open_by_category
    base = {"raised_in": "R2", "about": "works", "reviewer_role": "r", "text": "t"}
    cs = [Comment(id="C1", category="question", **base),
          Comment(id="C2", category="required change", **base),
          Comment(id="C3", category="required change", **base),
          Comment(id="C4", **base),
          Comment(id="C5", category="advisory", status="closed", closed_in="R3", **base)]
    assert open_by_category(cs) == "2 required changes, 1 question, 1 not categorised"


def test_a_comment_about_the_fabric_page_is_accepted(demo_copy, cli):
    # the pages a comment may name come from the chapter registry, not a list kept by hand
    path = demo_copy / "comments.yaml"
    path.write_text(path.read_text().replace("about: composition", "about: fabric"))
    result = cli("check", demo_copy)
    assert result.exit_code in (0, 1), result.output
    assert "comments.yaml" not in result.output


def test_a_comment_about_an_unknown_page_is_refused(demo_copy, cli):
    path = demo_copy / "comments.yaml"
    path.write_text(path.read_text().replace("about: composition", "about: fabrik"))
    result = cli("check", demo_copy)
    assert result.exit_code == 2
    assert ("comments.yaml, line 28: comments[2].about: comment 'C3' is about 'fabrik', which is "
            "neither a check code nor a page of the dossier. Fix: did you mean 'fabric'?"
            ) in result.output


# ----------------------------------------------------------- the import, on the demo build
def _anchor_and_quote(demo_build, page="specification"):
    """A heading of a published page and a sentence under it (what a reviewer would select)."""
    html = (demo_build / REV / f"{page}.html").read_text("utf-8")
    import re
    heads = re.findall(r'<h3 id="([^"]+)"[^>]*>(.*?)</h3>', html)
    assert heads, "the page has sub-headings to anchor to"
    anchor = heads[0][0]
    words = section_text(html, anchor).split()
    return anchor, " ".join(words[1:9])


def _review(demo_build, **changes) -> dict:
    anchor, quote = _anchor_and_quote(demo_build)
    comment = {"key": "r0123456789abcdef", "page": "specification", "anchor": anchor,
               "quote": quote, "text": "Please state the curing period in days.",
               "author": "A. Reviewer", "organisation": "Vale Heritage Office",
               "role": "heritage officer", "category": "required change", "date": "2026-12-01"}
    comment.update(changes.pop("comment", {}))
    doc = {"format": "specgen-review/1", "project": "HPR-01", "revision": REV,
           "exported": "2026-12-01T10:00:00Z", "comments": [comment]}
    doc.update(changes)
    return doc


def _write(tmp_path, doc, name="review.json") -> str:
    path = tmp_path / name
    path.write_text(json.dumps(doc, indent=2) + "\n", encoding="utf-8")
    return str(path)


@pytest.mark.e2e
def test_import_appends_once_and_keeps_the_file_layout(demo_build, demo_copy, cli, tmp_path):
    code = json.loads((demo_build / REV / "manifest.json").read_text())["project"]
    doc = _review(demo_build, project=code)
    before = (demo_copy / "comments.yaml").read_text()
    first = cli("import-comments", demo_copy, _write(tmp_path, doc), "--out", demo_build)
    assert first.exit_code == 0, first.output
    assert "1 new comment added to" in first.output and first.output.rstrip().endswith(": C5")
    after = (demo_copy / "comments.yaml").read_text()
    assert after.startswith(before)            # the specifier's file and its notes untouched
    again = cli("import-comments", demo_copy, _write(tmp_path, doc), "--out", demo_build)
    assert again.exit_code == 0 and "No new comment" in again.output
    assert (demo_copy / "comments.yaml").read_text() == after
    from specgen.build import check
    project, _ = check(demo_copy)
    c = {c.id: c for c in project.comments}["C5"]
    assert (c.about, c.anchor, c.category, c.author, c.raised_in, c.status) == (
        "specification", doc["comments"][0]["anchor"], "required change", "A. Reviewer", REV, "open")


@pytest.mark.e2e
@pytest.mark.parametrize("change, line, message", [
    ({"revision": "R9"}, 4,
     "revision: was written on revision R9, which is not published in {out}. Fix: build the "
     "project into that folder first, or name the output folder with --out."),
    ({"comment": {"anchor": "no-such-part"}}, 10,
     "comments[0].anchor: is anchored to 'no-such-part', which page 'specification' of revision "
     "R3 does not have. Fix: remove 'anchor' to comment on the whole page."),
    ({"comment": {"page": "../../etc/passwd"}}, 9,
     "comments[0].page: String should match pattern '^[A-Za-z0-9][A-Za-z0-9_-]{{0,79}}$' "
     "(found '../../etc/passwd')."),
    ({"comment": {"quote": "this sentence is nowhere in the dossier"}}, 11,
     "comments[0].quote: quotes text that page 'specification' of revision R3 does not contain: "
     "'this sentence is nowhere in the dossier'. Fix: quote the page's words exactly, or leave "
     "the quote empty."),
    # a huge value is quoted, not echoed: 80 characters of its repr at most
    ({"comment": {"text": "x" * 5000}}, 12,
     "comments[0].text: String should have at most 4000 characters (found '" + "x" * 80 + "… (5000 characters)').\n"),
    ({"comment": {"category": "demand"}}, 16,
     "comments[0].category: Input should be 'question', 'required change' or 'advisory' "
     "(found 'demand')."),
    ({"format": "other/2"}, 2, "format: Input should be 'specgen-review/1' (found 'other/2')."),
])
def test_hostile_or_wrong_files_are_refused_where_they_are_wrong(demo_build, demo_copy, cli,
                                                                  tmp_path, change, line, message):
    code = json.loads((demo_build / REV / "manifest.json").read_text())["project"]
    doc = _review(demo_build, project=code, **change)
    path = _write(tmp_path, doc)
    before = (demo_copy / "comments.yaml").read_bytes()
    result = cli("import-comments", demo_copy, path, "--out", demo_build)
    assert result.exit_code == 2, result.output
    assert f"{path}, line {line}: " + message.format(out=demo_build) in result.output
    assert "Traceback" not in result.output
    assert (demo_copy / "comments.yaml").read_bytes() == before


def test_a_file_that_is_not_json_is_refused_at_its_line(demo_copy, cli, tmp_path):
    path = tmp_path / "review.json"
    path.write_text('{\n  "format": "specgen-review/1",\n  "comments": [\n    {"key": \n')
    result = cli("import-comments", demo_copy, path, "--out", tmp_path)
    assert result.exit_code == 2
    assert f"{path}, line 5: is not valid YAML" in result.output


# ------------------------------------------------------------- the panel in a browser
@pytest.mark.e2e
def test_comment_in_the_browser_export_import_and_see_it_anchored(demo_build, demo_copy, cli,
                                                                   tmp_path, shared_cache):
    """Select a clause, comment, export, take the file in, render again: the comments page
    shows the comment anchored to that clause, its passage unchanged.  The render draws its
    figures and formulas from the run's artefact cache, which the demo build filled (a hit
    is the bytes a fresh drawing gives: test_render_cache.py)."""
    browser_or_skip()
    with open_browser(downloads=True) as page:
        outside = []
        page.on("request", lambda r: outside.append(r.url)
                if not r.url.startswith(("file:", "data:", "blob:")) else None)
        page.goto((demo_build / REV / "specification.html").as_uri())
        # select the paragraph that opens a clause, as a reader would with a mouse
        anchor, selected = page.evaluate("""() => {
            for (const h of document.querySelectorAll("article h3[id]")) {
                const p = h.nextElementSibling;
                if (!p || p.tagName !== "P" || !p.textContent.trim()) continue;
                const r = document.createRange(); r.selectNodeContents(p);
                const s = window.getSelection(); s.removeAllRanges(); s.addRange(r);
                return [h.id, s.toString()];
            }
            return [null, ""]; }""")
        assert anchor, "a clause heading followed by a paragraph"
        page.wait_for_timeout(100)
        page.click(".sg-review-toggle")
        assert page.is_visible("#sg-review-panel")
        assert page.input_value("#sg-review-anchor") == anchor
        assert " ".join(page.input_value("#sg-review-quote").split()) == " ".join(selected.split())
        page.select_option("#sg-review-category", "question")
        page.fill("#sg-review-text", "<b>Is</b> the curing period long enough in winter?")
        page.fill("#sg-review-author", "A. Reviewer")
        page.fill("#sg-review-organisation", "Vale Heritage Office")
        page.click("text=Save comment")
        assert "Comment saved" in page.inner_text(".sg-review-status")
        # the saved comment is listed as text, not markup
        assert page.inner_text(".sg-review-list li").count("<b>Is</b>") == 1
        with page.expect_download() as download:
            page.click(".sg-review-export")
        exported = tmp_path / "from-browser.json"
        download.value.save_as(exported)
    assert not outside, outside
    doc = json.loads(exported.read_text())
    assert doc["format"] == "specgen-review/1" and doc["revision"] == REV
    assert [c["anchor"] for c in doc["comments"]] == [anchor]
    result = cli("import-comments", demo_copy, exported, "--out", demo_build)
    assert result.exit_code == 0, result.output
    from specgen import cache
    from specgen.build import check
    from specgen.report.render import render
    project, results = check(demo_copy)
    with cache.using(tmp_path / "cache", shared_cache):
        pages = render(project, results).pages
    text = pages["comments.md"]
    assert f"(specification.md#{anchor})" in text
    assert "The quoted passage reads the same in this revision." in text
    assert "&lt;b&gt;Is&lt;/b&gt; the curing period" in text


@pytest.mark.e2e
def test_the_panel_is_keyboard_operable_and_passes_axe(demo_build):
    browser_or_skip()
    with open_browser() as page:
        page.goto((demo_build / REV / "comments.html").as_uri())
        page.focus(".sg-review-toggle")
        page.keyboard.press("Enter")
        assert page.evaluate("document.activeElement.id") == "sg-review-title"
        for _ in range(2):
            page.keyboard.press("Tab")
        assert page.evaluate("document.activeElement.id") == "sg-review-quote"
        found = [f"{v['id']}: {len(v['nodes'])}"
                 for v in axe_violations(page, within="sg-review-panel")]
        page.keyboard.press("Escape")
        closed = page.is_hidden("#sg-review-panel")
        focus_back = page.evaluate("document.activeElement.classList.contains('sg-review-toggle')")
    assert found == []
    assert closed and focus_back
