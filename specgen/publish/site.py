"""The MkDocs adapter: a PageSet in, a static site out.  The only module that imports MkDocs.

MkDocs 1.6 and mkdocs-material 9 are frozen upstream; everything engine-specific
stays here.  Pages are fed in-process through an ``on_files`` hook that adds
``File.generated`` entries, so nothing is written to a docs folder first.
"""
from __future__ import annotations

import html
import logging
import re
import tempfile
from pathlib import Path

from specgen.refdata import CONTENT_DIR

BASE_CONFIG = CONTENT_DIR.parent / "mkdocs.yml"
SITE_ASSETS = CONTENT_DIR / "site" / "assets"


class _FeedPages:
    """Minimal MkDocs plugin object that injects the page set's files."""

    def __init__(self, pageset, extra_assets: dict[str, bytes]):
        self.pageset = pageset
        self.extra_assets = extra_assets

    def on_files(self, files, config):
        from mkdocs.structure.files import File
        for path, text in self.pageset.pages.items():
            files.append(File.generated(config, path, content=text))
        for path, data in {**self.extra_assets, **self.pageset.assets}.items():
            files.append(File.generated(config, path, content=data))
        return files

    def on_env(self, env, config, files):
        # the theme's templates compiled once per process (the live preview builds again and
        # again); Jinja recompiles a template whose source changed
        env.bytecode_cache = _THEME_CODE
        return env

    def on_page_content(self, html, page, config, files):
        from specgen.publish.safety import neutralise_links
        return figure_links(page_addresses(neutralise_links(html)))

    def on_post_template(self, output, template_name, config):
        return error_page_addresses(output) if template_name == "404.html" else output


#: a link written as raw HTML in a chapter (a status badge linking its calculation sheet, a
#: check named in a warning) to another page by its source name: ``calculations.md#calc-x``
_SOURCE_LINK = re.compile(r'href="([\w/-]+)\.md(#[^"]*)?"')


def page_addresses(text: str) -> str:
    """Links to pages by their source name (``x.md``, ``x.md#a``) pointed at the page the
    site writes (``x.html``, ``x.html#a``; ``use_directory_urls: false``).  MkDocs does
    this for Markdown links only; a raw HTML link would otherwise lead to a missing file.
    The PDF makes the same links internal on its own (``publish.pdf._relink``)."""
    return _SOURCE_LINK.sub(lambda m: f'href="{m.group(1)}.html{m.group(2) or ""}"', text)


#: a drawn figure of a page (a chart, a grading curve), not yet inside a link
_FIGURE_IMAGE = re.compile(r'(<figure class="sg-figure"[^>]*>\s*(?:<p>)?)'
                           r'(<img src="(figures/[^"]+)"[^>]*>)')


def figure_links(text: str) -> str:
    """Each drawn figure of the site opens full size when followed: on a phone a chart is
    set 390 px wide, too small to read its points, and the drawing itself scales to any
    width.  The print keeps the figures as they are (the PDF is laid out from the
    Markdown, not from these pages)."""
    return _FIGURE_IMAGE.sub(
        lambda m: f'{m.group(1)}<a class="sg-figure-full" href="{m.group(3)}">{m.group(2)}</a>',
        text)


#: an address the theme writes from the site's root on its "page not found" page: ``/x``,
#: ``//x`` (its base ``/`` joined to ``/x``) and the search's ``"base": "/"``
_ROOT_ADDRESS = re.compile(r'((?:href|src)="|"(?:base|search)": ")//?(?!/)')


def error_page_addresses(text: str) -> str:
    """The "page not found" page with the addresses of its revision, not of the server root.

    Without a ``site_url`` the theme writes that page's links from the root (``/assets/…``,
    and ``//WEP-….pdf`` for the PDF, which a browser reads as a host name), so opened in a
    revision folder it loses its style and every link.  Every page of a revision sits in
    the revision's own folder (``use_directory_urls: false``), so relative addresses are
    right for any address a reader mistypes there."""
    def relative(m: re.Match) -> str:
        return m.group(1) + ("." if text[m.end():m.end() + 1] == '"' else "")
    return _ROOT_ADDRESS.sub(relative, text)


def _theme_code():
    from specgen.templating import CompiledTemplates
    return CompiledTemplates()


_THEME_CODE = _theme_code()


def _site_assets() -> dict[str, bytes]:
    return {f"assets/{p.name}": p.read_bytes() for p in sorted(SITE_ASSETS.iterdir())
            if p.is_file() and p.suffix in {".css", ".js", ".svg", ".png"}}


def build_site(pageset, site_dir: Path, site_name: str, extra: dict | None = None) -> None:
    """Build the site for ``pageset`` into ``site_dir`` (which must not exist yet)."""
    from mkdocs.commands.build import build
    from mkdocs.config import load_config

    logging.getLogger("mkdocs").setLevel(logging.WARNING)
    nav = [{"Report": [{i.title: i.path} for i in pageset.nav if i.volume != "appendix"]}]
    appendix = [{i.title: i.path} for i in pageset.nav if i.volume == "appendix"]
    if appendix:
        nav.append({"Appendices": appendix})
    # The static list of every revision sits one level above each revision folder.
    nav.append({"All revisions": "../revisions.html"})
    with tempfile.TemporaryDirectory(prefix="specgen-docs-") as empty_docs:
        # The theme inserts site_name unescaped: escape it here (project text is never markup).
        config = load_config(str(BASE_CONFIG), site_name=html.escape(site_name), docs_dir=empty_docs,
                             site_dir=str(site_dir), nav=nav)
        config.extra.update(extra or {})
        config.plugins["specgen-pages"] = _FeedPages(pageset, _site_assets())
        config.plugins.run_event("startup", command="build", dirty=False)
        try:
            build(config)
        finally:
            config.plugins.run_event("shutdown")
