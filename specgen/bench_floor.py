"""The benchmark's floor (``python3 -m specgen.bench``, figure (d)): the bare toolchain doing
the work of a cold build in sequence, without our pipeline (no artefact cache, no parts, no
workers), against which the cold build's wall time is read."""
from __future__ import annotations

import re
import subprocess
import sys
from pathlib import Path


def _cold() -> None:
    """Forget every in-process memo, so a build in this process starts cold."""
    from specgen.report.mathsvg import svg_bytes
    svg_bytes.cache_clear()


def _floor(project: Path, work: Path):
    """Bare toolchain doing the work a cold build publishes, in sequence: for each revision
    (the archived ones from ``issued/``, oldest first, then the current one) our render pass
    with every cache off (matplotlib figures, ziamath math), plain ``mkdocs build`` of its
    Markdown written to disk, and one plain WeasyPrint render of its print HTML with the
    build's PDF options (PDF/A-3a, metadata).  The benchmark's copy of the demo leaves out
    ``issued/``, so there both the build and the floor do the current revision alone."""
    from specgen.build import _load_archive, check, load
    from specgen.checks.builtin import evaluate, previous_of
    from specgen.publish import _print_context
    from specgen.publish.pdf import PDF_OPTIONS, to_html
    from specgen.publish.pdf_parts import _fetcher
    from specgen.publish.site import BASE_CONFIG, _site_assets
    from specgen.report.render import render
    current, results = check(project)
    archived = _load_archive(project, load(project))
    revisions = [(old, evaluate(old, previous=previous_of(before)))
                 for old, before in zip(archived, [None] + archived)]
    revisions.append((current, results))
    base = re.sub(r"custom_dir: (\S+)",
                  lambda m: f"custom_dir: {BASE_CONFIG.parent / m.group(1)}", BASE_CONFIG.read_text())
    jobs = []
    for proj, res in revisions:
        code = proj.revision.code
        pages = render(proj, res)
        docs = work / f"floor-docs-{code}"
        pages.write_to(docs)
        for path, data in _site_assets().items():
            (docs / path).parent.mkdir(parents=True, exist_ok=True)
            (docs / path).write_bytes(data)
        cfg = work / f"mkdocs-{code}.yml"
        nav = "\n".join(f"  - '{n.title}': {n.path}" for n in pages.nav)
        # the theme's custom_dir is relative to the config file: point it at the repository's
        cfg.write_text(base.replace("site_name: specgen dossier", "site_name: floor")
                       + f"docs_dir: {docs}\nsite_dir: {work / f'floor-site-{code}'}\nnav:\n{nav}\n")
        jobs.append((proj, res, cfg, to_html(pages, _print_context(proj)), pages, code))

    def run():
        import os
        from specgen.publish.weasyfix import weasyprint
        _cold()
        css = (BASE_CONFIG.parent / "content/print/print.css").read_text()
        for proj, res, cfg, html, pages, code in jobs:
            render(proj, res)   # figures (matplotlib) and math (ziamath), no cache
            subprocess.run([sys.executable, "-m", "mkdocs", "build", "-q", "-f", str(cfg)],
                           check=True, cwd=BASE_CONFIG.parent,
                           env=dict(os.environ, NO_MKDOCS_2_WARNING="1"))
            weasyprint.HTML(string=html, base_url="file:///specgen-pageset/",
                            url_fetcher=_fetcher(pages)).write_pdf(
                str(work / f"floor-{code}.pdf"), stylesheets=[weasyprint.CSS(string=css)],
                **PDF_OPTIONS)
    return run
