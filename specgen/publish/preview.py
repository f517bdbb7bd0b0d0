"""Publishing for the live preview: the site first, the PDF afterwards, separately.

``site_only`` writes a revision folder without its PDF (staged, then renamed into place, with
a manifest of the inputs so an issued revision is refused as in a build), with a placeholder
for each figure not drawn yet; ``put_asset`` puts each figure in its place as it is drawn;
``pdf_only`` prints the PDF of the same page set later (every figure drawn: never from a
placeholder) and moves it into that folder.  A full ``build`` is what
publishes a revision for readers; the preview folder is a scratch copy.
"""
from __future__ import annotations

import dataclasses
import html
import os
import shutil
from pathlib import Path

from specgen.errors import PublishError
from specgen.publish import _print_context, _report_bar, _stamp, appendix_pdf_name, pdf_name
from specgen.publish.output import (move_into_place, refuse_if_issued, staging_dir,
                                    update_versions, write_manifest)


#: what a page not laid out yet says (the first pages of a preview come before the rest)
BEING_BUILT = ("# {title}\n\n*This page is being built for the preview; it takes its place "
               "here in a moment.*\n")


def site_only(project, results, pages, out: Path, first: set[str] | None = None) -> Path:
    """The revision's site, downloads and results.json in ``out/<revision>/`` (no PDF).

    With ``first`` (page paths, ``index.md``), only those pages are laid out in full; every
    other page says it is being built (:data:`BEING_BUILT`), so the first page answers
    sooner: the whole site follows (the same call without ``first``), and with it
    results.json, which no page links (writing it took a twentieth of the first page)."""
    from specgen.publish.site import build_site
    bare = pages.unrendered & (set(first) if first else set(pages.pages))
    if bare:   # a page only named by a first render (render's ``first``) is never published
        raise ValueError(f"pages not rendered cannot be laid out: {', '.join(sorted(bare))}")
    if first:
        pages = dataclasses.replace(pages, pages={
            path: text if path in first else BEING_BUILT.format(
                title=html.escape(pages.titles.get(path, path)))
            for path, text in pages.pages.items()})
    rev = project.revision
    target = Path(out) / rev.code
    refuse_if_issued(target, project.inputs)
    staging = staging_dir(Path(out), rev.code)
    try:
        # the page frame of a build (report bar, closing line deferring to local codes)
        build_site(pages, staging, f"{project.dossier.project.title} — {rev.code}",
                   {"sg_report": _report_bar(project)})
        if not first:
            (staging / "results.json").write_text(results.to_json(), encoding="utf-8")
        for rel, data in sorted(pages.downloads.items()):
            (staging / rel).parent.mkdir(parents=True, exist_ok=True)
            (staging / rel).write_bytes(data)
        write_manifest(staging, project.inputs, {
            "project": project.dossier.project.code, "revision": rev.code,
            "status": rev.status, "date": rev.date.isoformat(),
            "format": "specgen-manifest/1", "description": rev.description})
        move_into_place(staging, target)
    except OSError as exc:
        raise PublishError(f"{out}: the preview could not be written ({exc.strerror or exc}). "
                           "Fix: free disk space.") from exc
    finally:
        shutil.rmtree(staging, ignore_errors=True)
    update_versions(Path(out))
    return target


def later_downloads(pages, target: Path) -> list[str]:
    """Make the downloads :func:`site_only` went without (``PageSet.later``) and write them
    into ``target``, each beside its final name and then renamed; returns their paths."""
    made = pages.make_downloads()
    for rel in made:
        put_asset(target, rel, pages.downloads[rel])
    return made


def pdf_only(project, results, pages, target: Path, *, page_size: str = "a4",
             on_part=None) -> list[Path]:
    """Print the PDF of ``pages`` into ``target`` (the folder :func:`site_only` wrote); the
    files written: the report, then the appendix volume when the dossier has one."""
    from specgen.publish.pdf import write_pdf
    attachments = {"results.json": results.to_json().encode("utf-8")}
    attachments.update(pages.downloads)
    tmp = target.with_name(f".{target.name}-preview.pdf")
    app_tmp = target.with_name(f".{target.name}-preview-appendices.pdf")
    try:
        write_pdf(pages, _print_context(project, pages.marks), tmp, attachments=attachments,
                  page_size=page_size, stamp=_stamp(project.revision.date), on_part=on_part,
                  appendix=(app_tmp, appendix_pdf_name(project), pdf_name(project)))
        written = [target / pdf_name(project)]
        os.replace(tmp, written[0])
        if app_tmp.exists():
            written.append(target / appendix_pdf_name(project))
            os.replace(app_tmp, written[1])
        return written
    finally:
        for t in (tmp, app_tmp):
            if t.exists():
                t.unlink()


def figures_by_page(pages) -> dict[str, list[str]]:
    """The figures still to draw (``PageSet.drawing``) that each page shows: the page's
    address in the site (``strength.html``) → figure paths in the order the page shows them;
    the pages in the order of the dossier, its summary first."""
    out = {}
    for item in pages.nav:
        text = pages.pages[item.path]
        shown = sorted((text.find(f'{path}"'), path) for path in pages.drawing
                       if f'{path}"' in text)
        if shown:
            out[item.path.rsplit(".", 1)[0] + ".html"] = [path for _, path in shown]
    return out


def put_asset(target: Path, rel: str, data: bytes) -> None:
    """Replace the file ``rel`` of the published folder ``target`` (written beside it, then
    renamed: a reader never gets half a figure)."""
    final = Path(target) / rel
    final.parent.mkdir(parents=True, exist_ok=True)
    tmp = final.with_name(f".{final.name}.part")
    tmp.write_bytes(data)
    os.replace(tmp, final)
