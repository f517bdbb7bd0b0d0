"""Every link between the pages of a published revision leads somewhere: the file exists in
the revision folder and, with a fragment, the page holds an element with that id (HTML
Living Standard, "navigate to a fragment": a fragment with no matching id scrolls nowhere).
A reviewer opening the site from a folder follows these links; a link to ``calculations.md``
(a page's source name) opened a missing file on every badge of the options appraisal.

The "page not found" page is held to the same rule: the theme wrote it with addresses from
the server's root (``/assets/…``, ``//WEP-….pdf``), so in a revision folder it had no style and
no working link (``publish.site.error_page_addresses``)."""
from __future__ import annotations

import re
from pathlib import Path
from urllib.parse import unquote

import pytest

from specgen.publish.site import error_page_addresses, page_addresses

pytestmark = pytest.mark.e2e


def _ids(page: Path, seen: dict) -> set[str]:
    if page not in seen:
        seen[page] = set(re.findall(r'\bid="([^"]+)"', page.read_text(encoding="utf-8")))
    return seen[page]


def test_every_link_between_pages_of_each_revision_resolves(demo_build):
    seen, broken, followed = {}, [], 0
    for rev in ("R1", "R2", "R3"):
        folder = demo_build / rev
        for page in sorted(folder.glob("*.html")):
            text = page.read_text(encoding="utf-8")
            for href in re.findall(r'(?:href|src)="([^"]+)"', text):
                if re.match(r"[a-z][a-z0-9+.-]*:", href) or href.startswith("//"):
                    continue                          # another site, mail: not ours to follow
                path, _, fragment = href.partition("#")
                target = (page.parent / unquote(path)).resolve() if path else page
                followed += 1
                if not target.exists():
                    broken.append(f"{rev}/{page.name}: {href} (no such file)")
                elif fragment and target.suffix == ".html" \
                        and unquote(fragment) not in _ids(target, seen):
                    broken.append(f"{rev}/{page.name}: {href} (no such id)")
    assert followed > 1000          # the demo's three revisions link thousands of times
    assert not broken, broken[:20]


def test_a_raw_link_to_a_page_source_points_at_the_page_written():
    """MkDocs maps ``x.md`` to ``x.html`` in Markdown links (``use_directory_urls: false``,
    mkdocs.yml); links written as HTML get the same mapping, and nothing else changes."""
    text = ('<a href="calculations.md#calc-dur-sound-nc1">a</a> <a href="before-issue.md">b</a>'
            ' <a href="https://example.org/notes.md">c</a> <a href="#calc-x">d</a>')
    assert page_addresses(text) == (
        '<a href="calculations.html#calc-dur-sound-nc1">a</a> <a href="before-issue.html">b</a>'
        ' <a href="https://example.org/notes.md">c</a> <a href="#calc-x">d</a>')


def test_the_page_not_found_links_from_its_revision_folder(demo_build):
    text = (demo_build / "R3" / "404.html").read_text(encoding="utf-8")
    rooted = re.findall(r'(?:href|src)="(/[^"]*)"', text)
    assert not rooted, rooted[:10]
    assert 'href="WEP-2026-R3.pdf"' in text and '"base": "."' in text


def test_root_addresses_of_the_page_not_found_made_relative():
    # what mkdocs-material 9 writes on 404.html without a site_url: its base "/" joined to
    # each address ("/x", and "//x" where the template itself adds a slash)
    text = ('<link href="/assets/specgen.css"><a href="/.">home</a> <a href="//R.pdf">pdf</a> '
            '<a href="/../revisions.html">all</a> <script src="/assets/x.js"></script> '
            '<a href="https://example.org/">out</a> {"base": "/", "search": "/assets/w.js"}')
    assert error_page_addresses(text) == (
        '<link href="assets/specgen.css"><a href=".">home</a> <a href="R.pdf">pdf</a> '
        '<a href="../revisions.html">all</a> <script src="assets/x.js"></script> '
        '<a href="https://example.org/">out</a> {"base": ".", "search": "assets/w.js"}')


def test_drawn_figures_open_full_size_and_nothing_else_is_wrapped():
    from specgen.publish.site import figure_links
    text = ('<figure class="sg-figure">\n<p><img src="figures/strength-M1.svg" alt="Chart"></p>'
            '<figcaption>Figure 4</figcaption></figure>'
            '<figure class="sg-figure sg-picture"><a class="sg-screen-only" href="images/a.jpg">'
            '<img src="images/a-thumb.jpg" alt="Photo"></a></figure>'
            '<p><img class="sg-math" src="math/f.svg" alt="x"></p>')
    assert figure_links(text) == (
        '<figure class="sg-figure">\n<p><a class="sg-figure-full" href="figures/strength-M1.svg">'
        '<img src="figures/strength-M1.svg" alt="Chart"></a></p>'
        '<figcaption>Figure 4</figcaption></figure>'
        '<figure class="sg-figure sg-picture"><a class="sg-screen-only" href="images/a.jpg">'
        '<img src="images/a-thumb.jpg" alt="Photo"></a></figure>'
        '<p><img class="sg-math" src="math/f.svg" alt="x"></p>')


def test_every_drawn_figure_of_the_demo_links_its_drawing(demo_build):
    page = (demo_build / "R3" / "strength.html").read_text(encoding="utf-8")
    figures = re.findall(r'<img src="(figures/[^"]+)"', page)
    linked = re.findall(r'<a class="sg-figure-full" href="(figures/[^"]+)"><img src="\1"', page)
    assert figures and linked == figures
