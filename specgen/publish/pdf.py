"""The PDF: the same rendered pages, assembled with our print template and print CSS.

Markdown is converted with the same extensions as the site; links between pages
become links inside the one document; images are served from the page set in
memory (the fetcher refuses every other URL, so the PDF never reaches the network).
WeasyPrint is imported inside the functions so ``specgen check`` never loads it.
"""
from __future__ import annotations

import mimetypes
import re

import jinja2
import yaml

from specgen.refdata import CONTENT_DIR

PRINT_DIR = CONTENT_DIR / "print"
BASE = "file:///specgen-pageset/"
PAGE_SIZES = {"a4": "A4", "letter": "letter"}


def _extensions() -> tuple[list, dict]:
    """The Markdown extensions of the site configuration (one list for both media)."""
    class _Loader(yaml.SafeLoader):
        pass
    _Loader.add_multi_constructor("tag:yaml.org,2002:python/", lambda *a: None)
    _Loader.add_multi_constructor("!", lambda *a: None)
    cfg = yaml.load((CONTENT_DIR.parent / "mkdocs.yml").read_text(encoding="utf-8"), _Loader)
    names, configs = [], {}
    for item in cfg.get("markdown_extensions", []):
        if isinstance(item, dict):
            (name, conf), = item.items()
            names.append(name)
            configs[name] = conf or {}
        else:
            names.append(item)
    return names, configs


def _page_id(path: str) -> str:
    return "page-" + _stem(path)


def _stem(path: str) -> str:
    return path.rsplit(".", 1)[0].replace("/", "-")


def _relink(html: str, stem: str) -> str:
    """One document now: namespace every id by its page and point links at the new ids.

    ``x.md#a`` → ``#p-x-a``; ``#a`` → ``#p-<this page>-a``; ``x.md`` → ``#page-x``.
    """
    html = re.sub(r'id="([^"]+)"', lambda m: f'id="p-{stem}-{m.group(1)}"', html)
    html = re.sub(r'href="([\w/-]+)\.md#([^"]+)"',
                  lambda m: f'href="#p-{_stem(m.group(1))}-{m.group(2)}"', html)
    html = re.sub(r'href="#(?!p-|page-)([^"]+)"', lambda m: f'href="#p-{stem}-{m.group(1)}"', html)
    return re.sub(r'href="([\w/-]+)\.md"', lambda m: f'href="#{_page_id(m.group(1) + ".md")}"', html)


WIDE_COLUMNS = 12  # tables with more columns than this go on a landscape page


def _landscape_wide_tables(html: str) -> str:
    """Wrap wide tables in a block printed on a landscape page (``@page wide``)."""
    def wrap(m: re.Match) -> str:
        header = re.search(r"<tr>(.*?)</tr>", m.group(0), flags=re.S)
        cols = len(re.findall(r"<th\b", header.group(1))) if header else 0
        return f'<div class="sg-wide">{m.group(0)}</div>' if cols > WIDE_COLUMNS else m.group(0)
    return re.sub(r"<table>.*?</table>", wrap, html, flags=re.S)


def to_html(pageset, context: dict) -> str:
    """The print HTML: cover, contents, then every page in navigation order."""
    import markdown
    names, configs = _extensions()
    sections = []
    for item in pageset.nav:
        md = markdown.Markdown(extensions=names, extension_configs=configs)
        from specgen.report.safety import neutralise_links
        body = _relink(neutralise_links(md.convert(pageset.pages[item.path])), _stem(item.path))
        body = _landscape_wide_tables(body)
        sections.append({"id": _page_id(item.path), "title": item.title, "html": body})
    env = jinja2.Environment(loader=jinja2.FileSystemLoader(str(PRINT_DIR)), autoescape=True)
    env.filters["safe_html"] = jinja2.utils.markupsafe.Markup
    tpl = env.get_template("print.html.j2")
    return tpl.render(sections=[dict(s, html=jinja2.utils.markupsafe.Markup(s["html"]))
                                for s in sections], **context)


def _fetcher(pageset):
    from weasyprint.urls import URLFetcher, URLFetcherResponse

    class PageSetFetcher(URLFetcher):
        """Serves the page set's assets; refuses every other URL (no network, no disk)."""

        def fetch(self, url, headers=None):
            path = url[len(BASE):] if url.startswith(BASE) else None
            if path is None or path not in pageset.assets:
                raise ValueError(f"the PDF may only use the dossier's own assets, not {url}")
            mime = mimetypes.guess_type(path)[0] or "application/octet-stream"
            return URLFetcherResponse(url, pageset.assets[path], {"Content-Type": mime})

    return PageSetFetcher()


def write_pdf(pageset, html: str, target, *, attachments: dict[str, bytes], page_size: str = "a4",
              identifier: bytes | None = None, stamp=None) -> None:
    """Render ``html`` to a PDF/A-3b at ``target`` with ``attachments`` embedded.

    ``stamp`` (a datetime, the revision date) dates the attachments, so identical
    inputs give a byte-identical PDF.
    """
    import weasyprint
    css = (PRINT_DIR / "print.css").read_text(encoding="utf-8")
    css = css.replace("size: A4;", f"size: {PAGE_SIZES[page_size]};", 1)
    css = css.replace("size: A4 landscape;", f"size: {PAGE_SIZES[page_size]} landscape;")
    doc = weasyprint.HTML(string=html, base_url=BASE, url_fetcher=_fetcher(pageset))
    files = [weasyprint.Attachment(string=data, name=name, description=name,
                                   created=stamp, modified=stamp)
             for name, data in sorted(attachments.items())]
    doc.write_pdf(target, stylesheets=[weasyprint.CSS(string=css)], attachments=files,
                  pdf_variant="pdf/a-3b", pdf_identifier=identifier, custom_metadata=True)
