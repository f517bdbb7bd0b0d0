"""Hostile strings and paths: escaped in the site and the PDF, never executed or followed."""
from __future__ import annotations

import os
import shutil

import pytest

from specgen.errors import InputErrors
from specgen.build import load as load_project  # as every command reads a project

pytestmark = pytest.mark.costly(30)   # CPU s (tests/conftest.py)

SCRIPT = "<script>window.__pwned=1;alert(1)</script>"
IMG = "<img src=x onerror=\"window.__pwned=2;alert(2)\">"


def edit(path, old, new):
    text = path.read_text(encoding="utf-8")
    assert old in text
    path.write_text(text.replace(old, new, 1), encoding="utf-8")


@pytest.fixture(scope="module")
def hostile_build(tmp_path_factory, request):
    """Hostile strings in the title, a zone's name and the narrative, built.  The default run
    builds them into the starter project (every kind of page, a small PDF); ``--full`` into
    the demo (every chapter the demo has, a second demo-sized build)."""
    from specgen.build import build
    from tests.conftest import full_run
    root = tmp_path_factory.mktemp("hostile") / "project"
    if full_run(request.config):
        shutil.copytree("demo_project", root, ignore=shutil.ignore_patterns("issued"))
        title = "title: Repair of the East Pier masonry, Wrenmouth Harbour"
        zone = "name: Inner face, repointing of brick courses"
    else:
        from specgen.starter import write_starter
        write_starter(root)
        title = "title: Title of the works"
        zone = "name: Main elevation, repointing"
    edit(root / "dossier.yaml", title, f"title: 'Pier {SCRIPT}'")
    edit(root / "dossier.yaml", zone, f"name: '{IMG}'")
    (root / "narrative" / "introduction.md").write_text(
        f"Raw HTML {SCRIPT} and {IMG}.\n\n[click me](javascript:window.__pwned=3)\n\n"
        "[also](JaVaScRiPt:alert(4)) <a href=\"javascript:alert(5)\">x</a>\n", encoding="utf-8")
    out = root.parent / "out"
    return build(root, out)


@pytest.mark.e2e
def test_hostile_text_is_escaped_in_html(hostile_build):
    for page in hostile_build.glob("*.html"):
        html = page.read_text()
        assert "<script>window.__pwned" not in html, page.name
        assert "<img src=x onerror" not in html, page.name
        assert 'href="javascript:' not in html.lower(), page.name
    assert "&lt;script&gt;window.__pwned=1" in (hostile_build / "index.html").read_text()


@pytest.mark.e2e
def test_hostile_text_never_runs_in_browser(hostile_build):
    playwright = pytest.importorskip("playwright.sync_api")
    if not shutil.which("chromium"):
        pytest.skip("Debian chromium is not installed")
    dialogs = []
    with playwright.sync_playwright() as pw:
        browser = pw.chromium.launch(executable_path=shutil.which("chromium"), args=[
            "--no-sandbox", "--disable-gpu", "--disable-background-networking"])
        page = browser.new_page()
        page.on("dialog", lambda d: (dialogs.append(d.message), d.dismiss()))
        for html in sorted(hostile_build.glob("*.html")):
            page.goto(html.as_uri())
            page.wait_for_load_state("load")
            assert page.evaluate("window.__pwned === undefined"), html.name
        page.goto((hostile_build / "index.html").as_uri())
        for link in page.locator("article a").all():
            if link.inner_text() in ("click me", "also", "x"):
                link.click()
                assert page.evaluate("window.__pwned === undefined")
        browser.close()
    assert dialogs == []


@pytest.mark.e2e
def test_hostile_text_is_literal_in_pdf(hostile_build):
    """The title's script is printed as the letters it is made of.  The pages of both
    volumes are read in order until the text read so far holds it (the same test as on the
    text of every page joined, without taking apart the pages after it: the appendix
    volume alone has over a hundred)."""
    from pypdf import PdfReader
    needle = "<script>window.__pwned=1;alert(1)</script>"
    text, read = "", 0
    for pdf in sorted(hostile_build.glob("*.pdf")):         # both volumes
        for page in PdfReader(str(pdf)).pages:
            text += ("\n" if read else "") + page.extract_text()
            read += 1
            if needle in text.replace("\n", ""):
                break
        else:
            continue
        break
    assert needle in text.replace("\n", ""), f"not in the text of {read} pages"


def test_symlink_out_of_project_refused(demo_copy, tmp_path):
    secret = tmp_path / "secret.md"
    secret.write_text("outside")
    os.symlink(secret, demo_copy / "narrative" / "scope.md")
    with pytest.raises(InputErrors) as err:
        load_project(demo_copy)
    assert ("narrative/scope.md: is a link to a file outside the project folder. Fix: copy the "
            "file into the project folder instead of linking it.") in str(err.value)


@pytest.mark.parametrize("rel, message", [
    ("../secret.csv", "the path '../secret.csv' leaves the project folder."),
    ("/etc/passwd", "the path '/etc/passwd' leaves the project folder."),
])
def test_paths_leaving_the_project_refused(demo_copy, rel, message):
    from specgen.errors import ProblemLog
    from specgen.project.load import inside
    log = ProblemLog()
    assert inside(demo_copy, rel, "materials.yaml", "binders[0].firing.record", log) is None
    assert message in str(log.problems[0])
