"""Debian's Chromium driven by Playwright for the end-to-end tests, and axe-core in it.

axe-core is the copy shipped inside the ``axe-playwright-python`` package from the
package index (the test extra of pyproject.toml); only its JavaScript file is used, run
with the WCAG 2.0 / 2.1 level A and AA rule sets.
"""
from __future__ import annotations

import contextlib
import shutil
from pathlib import Path

CHROMIUM = shutil.which("chromium") or "/usr/bin/chromium"
ARGS = ["--no-sandbox", "--disable-gpu", "--disable-background-networking",
        "--disable-component-update", "--disable-sync", "--no-first-run"]
#: the rule sets run: every WCAG 2.0 and 2.1 success criterion at level A and AA
AXE_TAGS = ["wcag2a", "wcag2aa", "wcag21a", "wcag21aa"]


def browser_or_skip() -> None:
    """Skip the test where Playwright, axe-core's package or Debian's Chromium is missing."""
    import pytest
    pytest.importorskip("playwright.sync_api")
    pytest.importorskip("axe_playwright_python")
    if not shutil.which("chromium"):
        pytest.skip("Debian chromium is not installed")


def axe_script() -> str:
    from axe_playwright_python.base import AXE_FILE_PATH
    return Path(AXE_FILE_PATH).read_text(encoding="utf-8")


@contextlib.contextmanager
def open_browser(width: int = 1400, height: int = 900, downloads: bool = False):
    """A Playwright page in Debian's Chromium (never a downloaded browser); with
    ``downloads`` the page may download files (a reviewer's exported comments)."""
    from playwright.sync_api import sync_playwright
    with sync_playwright() as pw:
        browser = pw.chromium.launch(executable_path=CHROMIUM, args=ARGS)
        try:
            page = browser.new_page(viewport={"width": width, "height": height},
                                    accept_downloads=downloads)
            # the calculation sheets are one long page (about 290 000 px at 1400 px wide): on
            # a shared 2-core machine its load outlasts Playwright's default 30 s
            page.set_default_timeout(180_000)
            yield page
        finally:
            browser.close()


def axe_violations(page, script: str | None = None, within: str | None = None) -> list[dict]:
    """axe-core's violations (WCAG 2.1 A and AA) on the document the page has loaded, or
    only inside the element whose id is ``within`` (the comment panel)."""
    page.add_script_tag(content=script or axe_script())
    return page.evaluate(
        "async ([tags, id]) => (await axe.run(id ? document.getElementById(id) : document,"
        " {runOnly: {type: 'tag', values: tags}, resultTypes: ['violations']})).violations",
        [AXE_TAGS, within])
