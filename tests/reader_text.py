"""What a reader sees of a built page, and the internal names that must not reach it.

The scan reads the page's main content (the article) with what a screen reader says
for it (images' alternative text, labels and titles), leaves out code, preformatted
text and the input listing (where file names are the subject), and reports every
snake_case token, file name and dotted rule key left in the running text.
"""
from __future__ import annotations

import re
from html.parser import HTMLParser

#: elements whose text is code or an address, not reader text
SKIP = {"code", "pre", "script", "style", "kbd", "samp", "svg"}
#: a container marked by its class as quoting input as it was given (file names, ids)
SKIP_CLASSES = {"sg-input-listing", "sg-hash", "sg-math"}  # a formula's alt is its TeX
#: elements that have no end (their end tag, ``<br />``, closes nothing)
VOID = {"br", "img", "hr", "input", "meta", "link", "wbr", "source", "col", "area", "embed"}
#: attributes whose text is read out or shown to a reader
SPOKEN = ("alt", "aria-label", "title")

SNAKE = re.compile(r"\b[a-z][a-z0-9]*(?:_[a-z0-9]+)+\b")
FILE_NAME = re.compile(r"\b[\w.-]+\.(?:ya?ml|csv|json|md|j2|py|txt)\b", re.I)
RULE_KEY = re.compile(r"\b(?:rule|key)\s+[a-z]+\.[a-z_]+\b|\b[a-z]+\.[a-z]+_[a-z_]+\b")


def _choice_keys():
    """The binder families as materials.yaml spells them (``nhl``, ``portland`` …), read from
    the schema: a key a reader should see by its trade name (NHL, Portland cement).  Those
    with an underscore are snake_case already; "pozzolan" is also the English word."""
    import typing

    from specgen.project.materials_schema import Binder
    keys = typing.get_args(Binder.model_fields["type"].annotation)
    return re.compile(r"\b(?:" + "|".join(k for k in keys if "_" not in k and k != "pozzolan")
                      + r")\b")


CHOICE = _choice_keys()
PATTERNS = {"snake_case": SNAKE, "file name": FILE_NAME, "rule key": RULE_KEY,
            "choice key": CHOICE}


class _Text(HTMLParser):
    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.stack: list[tuple[str, bool]] = []
        self.inside_article = 0
        self.chunks: list[str] = []

    def handle_starttag(self, tag, attrs):
        attrs = dict(attrs)
        classes = set((attrs.get("class") or "").split())
        if self.inside_article and not any(skip for _, skip in self.stack) and tag not in SKIP \
                and not classes & SKIP_CLASSES:
            self.chunks.extend(f" {attrs[a]} " for a in SPOKEN if attrs.get(a))
        if tag in VOID:
            return
        skip = tag in SKIP or bool(classes & SKIP_CLASSES)
        self.stack.append((tag, skip))
        if tag == "article":
            self.inside_article += 1

    def handle_endtag(self, tag):
        # a void element (``<br />``) has nothing open; an end tag with no start closes nothing
        if tag in VOID or all(name != tag for name, _ in self.stack):
            return
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


#: a web address (a reference's URL): an address, not a name of ours
URL = re.compile(r"\bhttps?://[^\s<>]+")


def internal_names(text: str) -> list[tuple[str, str]]:
    """(kind, token) of every internal name found in ``text`` (web addresses left out)."""
    text = URL.sub(" ", text)
    return [(kind, m.group(0)) for kind, pat in PATTERNS.items() for m in pat.finditer(text)]


def pdf_reader_pages(reader, listing_titles=("Input files",),
                     prose: list[str] | tuple[str, ...] | None = None) -> list[tuple[int, str]]:
    """(page number from 1, text) of every page of a PDF (pypdf ``reader``) a reader reads:
    all of them but the pages of the chapters whose outline title ends with one of
    ``listing_titles`` (the input listing, whose subject is the files as written); text
    set in a monospaced font (code: a file or key named as written) is left out, as the
    site's scan leaves out ``<code>``.  ``prose``: the pages' prose already taken apart
    (``tests/pdf_text.py``, as the ``demo_pdf_prose`` fixture holds it), else read here."""
    from tests.pdf_text import page_texts
    top = [(o.title, reader.get_destination_page_number(o)) for o in reader.outline
           if not isinstance(o, list)]
    skip = set()
    for i, (title, start) in enumerate(top):
        if title.endswith(tuple(listing_titles)):
            end = top[i + 1][1] if i + 1 < len(top) else len(reader.pages)
            skip.update(range(start, end))
    if prose is not None:
        assert len(prose) == len(reader.pages), (len(prose), len(reader.pages))
    return [(i + 1, prose[i] if prose is not None else page_texts(page)["prose"])
            for i, page in enumerate(reader.pages) if i not in skip]
