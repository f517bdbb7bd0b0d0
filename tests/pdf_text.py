"""The text of the demo build's PDFs, taken apart once per run (a test aid, not the product).

pypdf's text extraction is the costliest reading the end-to-end tests do (the appendix
volume of the demo alone takes over a minute of CPU), and two kinds of text are read from
the same pages: the plain text (``page.extract_text()``) and the prose a reader reads, with
the text set in a monospaced font (code) left out (``tests/reader_text.py``).  One pass over
each page gives both: the visitor sees every text run while ``extract_text`` returns the
plain text, the same string it returns without a visitor.

``python3 -m tests.pdf_text OUT REV TARGET`` writes TARGET (JSON): for each PDF directly in
``OUT/REV/``, by its path relative to OUT, the list of its pages as ``{"text", "prose"}``.
The conftest runs it once per run, in the background after the demo build."""
from __future__ import annotations

import json
import os
import sys
from pathlib import Path


def page_texts(page) -> dict[str, str]:
    """The plain text of one pypdf page and its prose (monospaced runs as one space)."""
    chunks: list[str] = []

    def visit(text, _cm, _tm, font, _size):
        mono = font is not None and "Mono" in str(font.get("/BaseFont", ""))
        chunks.append(" " if mono else text)
    text = page.extract_text(visitor_text=visit)
    return {"text": text, "prose": "".join(chunks)}


def pdf_texts(path: Path) -> list[dict[str, str]]:
    from pypdf import PdfReader
    return [page_texts(page) for page in PdfReader(str(path)).pages]


def write(out: Path, rev: str, target: Path) -> None:
    """Every PDF of ``out/rev/`` taken apart into ``target`` (written whole, then renamed)."""
    found = {p.relative_to(out).as_posix(): pdf_texts(p) for p in sorted((out / rev).glob("*.pdf"))}
    if not found:
        raise SystemExit(f"{out / rev}: no PDF to read")
    part = target.with_name(target.name + ".part")
    part.write_text(json.dumps(found), encoding="utf-8")
    os.replace(part, target)


if __name__ == "__main__":
    write(Path(sys.argv[1]), sys.argv[2], Path(sys.argv[3]))
