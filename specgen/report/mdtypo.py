"""Markdown extension for the dossier's typography, used by the site and the PDF alike.

A unit written ``min^½`` (the square root of time of capillary absorption, as
:func:`specgen.report.fmt.unit_symbol` gives it) is set with a raised ½.  Listed in
mkdocs.yml, from which the print takes its extensions too.
"""
from __future__ import annotations

from markdown import Extension
from markdown.postprocessors import Postprocessor


class _Superscripts(Postprocessor):
    def run(self, text: str) -> str:
        return text.replace("^½", "<sup>½</sup>")


class TypographyExtension(Extension):
    def extendMarkdown(self, md):  # noqa: N802 - the Markdown API's name
        md.postprocessors.register(_Superscripts(md), "specgen-superscripts", 5)


def makeExtension(**kwargs):  # noqa: N802 - the Markdown API's name
    return TypographyExtension(**kwargs)
