"""Publishing for the live preview: the site first, the PDF afterwards, separately.

``site_only`` writes a revision folder without its PDF (staged, then renamed into place, with
a manifest of the inputs so an issued revision is refused as in a build); ``pdf_only`` prints
the PDF of the same page set later and moves it into that folder.  A full ``build`` is what
publishes a revision for readers; the preview folder is a scratch copy.
"""
from __future__ import annotations

import os
import shutil
from pathlib import Path

from specgen.errors import PublishError
from specgen.publish import _print_context, _stamp, appendix_pdf_name, pdf_name
from specgen.publish.output import (move_into_place, refuse_if_issued, staging_dir,
                                    update_versions, write_manifest)


def site_only(project, results, pages, out: Path) -> Path:
    """The revision's site, downloads and results.json in ``out/<revision>/`` (no PDF)."""
    from specgen.publish.site import build_site
    rev = project.revision
    target = Path(out) / rev.code
    refuse_if_issued(target, project.inputs)
    staging = staging_dir(Path(out), rev.code)
    try:
        build_site(pages, staging, f"{project.dossier.project.title} — {rev.code}")
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
        final = Path(target) / rel
        final.parent.mkdir(parents=True, exist_ok=True)
        tmp = final.with_name(f".{final.name}.part")
        tmp.write_bytes(pages.downloads[rel])
        os.replace(tmp, final)
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
