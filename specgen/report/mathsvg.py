"""Math rendered to SVG on the server, so the site and the PDF show the same glyphs
and neither needs JavaScript.  Each distinct expression becomes one asset file,
named by the hash of its LaTeX source (so identical inputs give identical files)."""
from __future__ import annotations

import hashlib
import re
from functools import lru_cache, partial

from markupsafe import Markup, escape


def _draw(latex: str) -> bytes:
    import ziamath
    # glyphs as plain paths, not <symbol>/<use>: WeasyPrint draws such SVG about twice
    # as fast (measured on a formula repeated 60 times: 6.5 s against 14.4 s)
    ziamath.config.svg2 = False
    return re.sub(r"\s+$", "", ziamath.Latex(latex, size=18).svg()).encode("utf-8")


@lru_cache(maxsize=4096)
def svg_of(latex: str) -> str:
    """SVG text of a LaTeX expression (ziamath, STIX Two Math font shipped in the package);
    kept in the output folder's artefact cache (specgen/cache.py)."""
    from specgen.cache import cached
    return cached("math", latex, partial(_draw, latex)).decode("utf-8")


def _svg_or_later(latex: str):
    """The SVG bytes of ``latex``, or within ``cache.drawing_later`` a ``cache.Later`` when
    the cache does not hold them (the live preview's first pages)."""
    from specgen.cache import drawing_is_later, drawn_or_later
    if drawing_is_later():
        return drawn_or_later("math", latex, partial(_draw, latex))
    return svg_of(latex).encode("utf-8")


class MathAssets:
    """Turns LaTeX into ``<img>`` tags pointing at SVG assets of a page set."""

    def __init__(self, pageset, folder: str = "math"):
        self.pageset = pageset
        self.folder = folder

    def img(self, latex: str, depth: int = 0) -> Markup:
        """An ``<img>`` for ``latex``; ``depth`` is how deep the citing page is in the site."""
        name = hashlib.sha256(latex.encode("utf-8")).hexdigest()[:16]
        path = f"{self.folder}/{name}.svg"
        if path not in self.pageset.assets:
            data = _svg_or_later(latex)
            if isinstance(data, bytes):
                self.pageset.add_asset(path, data)
            else:   # not drawn yet: a placeholder until it is
                from specgen.report.figures import formula_placeholder
                self.pageset.add_placeholder(path, formula_placeholder(), data.draw)
        prefix = "../" * depth
        return Markup(f'<img class="sg-math" src="{prefix}{path}" alt="{escape(latex)}">')
