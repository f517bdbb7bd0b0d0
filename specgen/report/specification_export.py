"""A clean HTML fragment of a zone's specification, for pasting into a contract document.

The Markdown export is converted with Python-Markdown and then rebuilt tag by tag: only
plain structural tags survive (headings, paragraphs, lists, tables, emphasis), without any
attribute; everything else — scripts, styles, links, images, raw HTML a template might
carry — is dropped and all text is escaped again.  The result needs no stylesheet.
"""
from __future__ import annotations

from html import escape
from html.parser import HTMLParser

ALLOWED = {"h1", "h2", "h3", "h4", "p", "ol", "ul", "li", "strong", "em", "table", "thead",
           "tbody", "tr", "th", "td", "br", "hr", "sub", "sup", "blockquote"}
VOID = {"br", "hr"}
DROP_CONTENT = {"script", "style", "template", "iframe", "object", "noscript"}


class _Clean(HTMLParser):
    """Re-emit only allowed tags (no attributes) and escaped text."""

    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.out: list[str] = []
        self.skip = 0

    def handle_starttag(self, tag, attrs):
        if tag in DROP_CONTENT:
            self.skip += 1
        elif not self.skip and tag in ALLOWED:
            self.out.append(f"<{tag}>")

    def handle_endtag(self, tag):
        if tag in DROP_CONTENT:
            self.skip = max(0, self.skip - 1)
        elif not self.skip and tag in ALLOWED and tag not in VOID:
            self.out.append(f"</{tag}>")

    def handle_data(self, data):
        if not self.skip:
            self.out.append(escape(data, quote=False))


def clean_html(html: str) -> str:
    """``html`` reduced to the allowed tags, without attributes, text escaped."""
    parser = _Clean()
    parser.feed(html)
    parser.close()
    return "".join(parser.out)


def html_fragment(markdown_text: str) -> str:
    """The Markdown export as a clean HTML fragment (deterministic, ends with a newline)."""
    import markdown
    html = markdown.markdown(markdown_text, extensions=["tables"], output_format="html")
    return clean_html(html).strip() + "\n"
