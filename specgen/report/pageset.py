"""The engine-neutral page set: what render produces and publish consumes."""
from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field


@dataclass(frozen=True)
class NavItem:
    """One navigation entry: a page title and its path in the page set."""

    title: str
    path: str
    volume: str = "main"  # "main" (the report) or "appendix"
    sections: bool = False  # in print, each top-level section starts a page


@dataclass
class PageSet:
    """Pages (path → Markdown text) and assets (path → bytes) plus navigation order.

    Paths are POSIX, relative to the site root (``index.md``, ``figures/ci.svg``).
    ``print_order`` lists the pages that make up the PDF, in order.
    """

    pages: dict[str, str] = field(default_factory=dict)
    assets: dict[str, bytes] = field(default_factory=dict)
    nav: list[NavItem] = field(default_factory=list)
    titles: dict[str, str] = field(default_factory=dict)
    # files for the reader to take away (a quantities CSV, plain specification exports):
    # written into the revision folder beside the PDF after the site is built (outside the
    # site engine: a Markdown export fed to MkDocs would become a page), listed in the
    # manifest and attached to the PDF; path → bytes
    downloads: dict[str, bytes] = field(default_factory=dict)
    # downloads whose bytes are made only when asked for (the DOCX exports, slow to make): the
    # live preview shows its pages first and makes these afterwards; path → maker
    later: dict[str, Callable[[], bytes]] = field(default_factory=dict)
    # figures shown as a placeholder until drawn (the live preview's first pages, before the
    # figures the artefact cache does not hold are drawn): path → function drawing the figure.
    # ``assets`` holds the placeholder meanwhile; the PDF is never printed while any is left
    drawing: dict[str, Callable[[], bytes]] = field(default_factory=dict)
    # pages named (in the navigation, with their titles) but not laid out: their text is
    # empty (the live preview's first pages: ``render(first=...)``); never published so
    unrendered: set[str] = field(default_factory=set)
    # document-control marks for the print: the mark on every page ("DRAFT — not for
    # construction", "Superseded by R4") and the cover's sign-off rows
    marks: dict = field(default_factory=dict)
    # for each page, a digest of each section's text (review.page_sections): kept in the
    # manifest, so the next revision's change report can say which pages changed
    sections: dict = field(default_factory=dict)

    def add_page(self, path: str, title: str, text: str, volume: str = "main",
                 sections: bool = False) -> None:
        if path in self.pages:
            raise ValueError(f"page '{path}' is produced twice")
        self.pages[path] = text
        self.titles[path] = title
        self.nav.append(NavItem(title, path, volume, sections))

    def add_asset(self, path: str, data: bytes) -> str:
        """Store an asset once; returns its path (identical content may be added again)."""
        if path in self.assets and self.assets[path] != data:
            raise ValueError(f"asset '{path}' is produced twice with different content")
        self.assets[path] = data
        return path

    def add_placeholder(self, path: str, placeholder: bytes, draw: Callable[[], bytes]) -> str:
        """An asset shown as ``placeholder`` until :meth:`draw` replaces it with what
        ``draw()`` makes (see ``drawing``); returns its path."""
        if path in self.assets and (path not in self.drawing
                                    or self.assets[path] != placeholder):
            raise ValueError(f"asset '{path}' is produced twice with different content")
        self.assets[path] = placeholder
        self.drawing[path] = draw
        return path

    def draw(self, path: str) -> bytes:
        """Draw the figure left as a placeholder at ``path``, put it in its place and return
        it (an error of the drawing leaves the placeholder and is raised)."""
        data = self.drawing[path]()
        self.assets[path] = data
        del self.drawing[path]
        return data

    def add_download(self, path: str, data: bytes | Callable[[], bytes]) -> str:
        """A file for the reader beside the PDF (see ``downloads``), or a function that makes
        its bytes when :meth:`make_downloads` is called (see ``later``); returns its path."""
        if callable(data):
            if path in self.assets or path in self.downloads or path in self.later:
                raise ValueError(f"download '{path}' is produced twice")
            self.later[path] = data
            return path
        if path in self.assets or path in self.later or self.downloads.get(path, data) != data:
            raise ValueError(f"download '{path}' is produced twice with different content")
        self.downloads[path] = data
        return path

    def make_downloads(self) -> list[str]:
        """Make the downloads left for later into ``downloads``; returns their paths."""
        made = []
        for path, make in list(self.later.items()):
            self.downloads[path] = make()
            del self.later[path]
            made.append(path)
        return made

    def write_to(self, folder) -> None:
        """Debug aid: write the page set to disk as plain files."""
        from pathlib import Path
        root = Path(folder)
        for path, text in self.pages.items():
            (root / path).parent.mkdir(parents=True, exist_ok=True)
            (root / path).write_text(text, encoding="utf-8")
        for path, data in list(self.assets.items()) + list(self.downloads.items()):
            (root / path).parent.mkdir(parents=True, exist_ok=True)
            (root / path).write_bytes(data)
