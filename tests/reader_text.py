"""What a reader sees of a built page, and the internal names that must not reach it.

The scan reads the page's main content (the article), leaves out code, preformatted
text and the input listing (where file names are the subject), and reports every
snake_case token, file name and dotted rule key left in the running text.
"""
from __future__ import annotations

import re
from html.parser import HTMLParser

#: elements whose text is code or an address, not reader text
SKIP = {"code", "pre", "script", "style", "kbd", "samp", "svg"}
#: a container marked by its class as quoting input as it was given (file names, ids)
SKIP_CLASSES = {"sg-input-listing", "sg-hash"}

SNAKE = re.compile(r"\b[a-z][a-z0-9]*(?:_[a-z0-9]+)+\b")
FILE_NAME = re.compile(r"\b[\w.-]+\.(?:ya?ml|csv|json|md|j2|py|txt)\b", re.I)
RULE_KEY = re.compile(r"\b(?:rule|key)\s+[a-z]+\.[a-z_]+\b|\b[a-z]+\.[a-z]+_[a-z_]+\b")
PATTERNS = {"snake_case": SNAKE, "file name": FILE_NAME, "rule key": RULE_KEY}


class _Text(HTMLParser):
    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.stack: list[tuple[str, bool]] = []
        self.inside_article = 0
        self.chunks: list[str] = []

    def handle_starttag(self, tag, attrs):
        if tag in ("br", "img", "hr", "input", "meta", "link", "wbr", "source", "col"):
            return
        classes = set((dict(attrs).get("class") or "").split())
        skip = tag in SKIP or bool(classes & SKIP_CLASSES)
        self.stack.append((tag, skip))
        if tag == "article":
            self.inside_article += 1

    def handle_endtag(self, tag):
        while self.stack:
            name, _ = self.stack.pop()
            if name == "article":
                self.inside_article -= 1
            if name == tag:
                break
        self.chunks.append(" ")

    def handle_data(self, data):
        if self.inside_article and not any(skip for _, skip in self.stack):
            self.chunks.append(data)


def reader_text(html: str) -> str:
    """The running text of a page's article, without code and quoted input."""
    parser = _Text()
    parser.feed(html)
    return "".join(parser.chunks)


def internal_names(text: str) -> list[tuple[str, str]]:
    """(kind, token) of every internal name found in ``text``."""
    return [(kind, m.group(0)) for kind, pat in PATTERNS.items() for m in pat.finditer(text)]
