"""Links in rendered pages may only go where a dossier link should.

Project text is HTML-escaped before it reaches Markdown, so it can never add tags
or attributes; but Markdown link syntax written by a specifier (``[x](javascript:…)``)
still becomes an ``href``.  Every ``href``/``src`` whose scheme is not http, https or
mailto (relative links and anchors are fine) is replaced by an inert ``#``.
"""
from __future__ import annotations

import html
import re

_ATTR = re.compile(r'\b(href|src)\s*=\s*"([^"]*)"', re.IGNORECASE)
_SCHEME = re.compile(r"^\s*([a-zA-Z][a-zA-Z0-9+.\-]*)\s*:")
ALLOWED = {"http", "https", "mailto"}


def _safe(match: re.Match) -> str:
    attr, value = match.group(1), match.group(2)
    decoded = html.unescape(value).replace("\x00", "")
    decoded = re.sub(r"[\s\x01-\x1f]", "", decoded)
    m = _SCHEME.match(decoded)
    if m and m.group(1).lower() not in ALLOWED:
        return f'{attr}="#" data-sg-removed-link="unsafe scheme"'
    return match.group(0)


def neutralise_links(text: str) -> str:
    """Return ``text`` (HTML) with every unsafe ``href``/``src`` made inert."""
    return _ATTR.sub(_safe, text)
