"""Every link between the pages of a published revision leads somewhere: the file exists in
the revision folder and, with a fragment, the page holds an element with that id (HTML
Living Standard, "navigate to a fragment": a fragment with no matching id scrolls nowhere).
A reviewer opening the site from a folder follows these links; a link to ``calculations.md``
(a page's source name) opened a missing file on every badge of the options appraisal.

The 404 page is left out: MkDocs writes it with addresses from the site's root, for a web
server, and it is never reached from a folder."""
from __future__ import annotations

import re
from pathlib import Path
from urllib.parse import unquote

import pytest

from specgen.publish.site import page_addresses

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
            if page.name == "404.html":
                continue
            for href in re.findall(r'href="([^"]+)"', page.read_text(encoding="utf-8")):
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
