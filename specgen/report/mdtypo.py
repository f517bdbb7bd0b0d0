"""Markdown extension for the dossier's typography, used by the site and the PDF alike.

A unit written ``min^½`` (the square root of time of capillary absorption, as
:func:`specgen.report.fmt.unit_symbol` gives it) is set with a raised ½; a chemical formula
(``SiO2``, ``CaCO3``, ``C2S``) with its counts as subscripts (:func:`wording.formulas`) in
the running text of every page — code, formulas' images and the input listing keep the
forms as written.  Listed in mkdocs.yml, from which the print takes its extensions too.
"""
from __future__ import annotations

import re

from markdown import Extension
from markdown.postprocessors import Postprocessor

from specgen.report import fmt

#: elements whose text is code, markup of its own or an address: never retouched
KEEP_TAGS = {"code", "pre", "kbd", "samp", "script", "style", "svg", "math", "textarea"}
#: a container quoting input as it was given (file names, hashes), or a formula's image
KEEP_CLASSES = {"sg-input-listing", "sg-hash", "sg-math"}
#: elements with no end tag (written ``<img …>`` or ``<img … />``): they keep nothing
VOID = {"area", "br", "col", "embed", "hr", "img", "input", "link", "meta", "source", "wbr"}

_TAG = re.compile(r"<(/?)([a-zA-Z][\w-]*)([^>]*)>")
#: a number, a plain space and a unit symbol the formatter knows (:data:`fmt.PRECISION`,
#: :data:`fmt.UNIT_SYMBOLS`) or %: the space becomes the narrow no-break space
#: :data:`fmt.UNIT_SPACE`, as :func:`fmt.qty` writes it, so a value the checks wrote with a
#: plain space ("95 %", "28 d") never wraps away from its unit (longest symbol tried first)
_NUMBER_UNIT = re.compile(r"(?<=\d) (?=(?:" + "|".join(
    re.escape(u) for u in sorted({*fmt.PRECISION, *fmt.UNIT_SYMBOLS.values()} - {"", "count"},
                                 key=len, reverse=True)) + r")(?![\w²³/]))")
_CLASS = re.compile(r"""\bclass\s*=\s*(?:"([^"]*)"|'([^']*)')""")


def _kept(tag: str, attrs: str) -> bool:
    m = _CLASS.search(attrs)
    classes = set((m.group(1) or m.group(2) or "").split()) if m else set()
    return tag in KEEP_TAGS or bool(classes & KEEP_CLASSES)


def text_nodes(html: str, change) -> str:
    """``html`` with ``change`` applied to the text between its tags, except inside the
    elements :data:`KEEP_TAGS` and :data:`KEEP_CLASSES` name (and inside no attribute)."""
    out, last, keep = [], 0, None      # keep: (tag, depth) of the element being kept
    for m in _TAG.finditer(html):
        text = html[last:m.start()]
        out.append(text if keep else change(text))
        out.append(m.group(0))
        last = m.end()
        closing, tag, attrs = m.group(1), m.group(2).lower(), m.group(3)
        if attrs.rstrip().endswith("/") or tag in VOID:
            continue
        if keep:
            if tag == keep[0]:
                depth = keep[1] + (-1 if closing else 1)
                keep = (tag, depth) if depth else None
        elif not closing and _kept(tag, attrs):
            keep = (tag, 1)
    tail = html[last:]
    out.append(tail if keep else change(tail))
    return "".join(out)


class _Typography(Postprocessor):
    def run(self, text: str) -> str:
        from specgen.report.wording import formulas
        return text_nodes(text.replace("^½", "<sup>½</sup>"), lambda t: bind_units(formulas(t)))


def bind_units(text: str) -> str:
    """``text`` with the plain space between a number and its unit made the narrow no-break
    space (``95 %`` → ``95\u202f%``); other spaces are left as they are."""
    return _NUMBER_UNIT.sub(fmt.UNIT_SPACE, text)


class TypographyExtension(Extension):
    def extendMarkdown(self, md):  # noqa: N802 - the Markdown API's name
        md.postprocessors.register(_Typography(md), "specgen-typography", 5)


def makeExtension(**kwargs):  # noqa: N802 - the Markdown API's name
    return TypographyExtension(**kwargs)
