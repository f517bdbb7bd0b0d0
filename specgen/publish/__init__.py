"""Stage 5, publish: PageSet → site, PDF, results.json and manifest in ``OUT/<revision>/``."""
from __future__ import annotations

import hashlib
import json
import os
import shutil
from pathlib import Path

from specgen.errors import PublishError
from specgen.killpoints import reached
from specgen.publish.output import (APPENDIX_SUFFIX, move_into_place, refuse_if_issued,
                                    staging_dir, update_versions, write_manifest)

STATE = {"draft": "draft", "issued": "issued"}
PURPOSE = {"preliminary": "preliminary", "for_approval": "for approval",
           "for_construction": "for construction"}


def pdf_name(project) -> str:
    """The main volume (the report; it carries the inputs as attachments)."""
    return f"{project.dossier.project.code}-{project.revision.code}.pdf"


def appendix_pdf_name(project) -> str:
    """The appendix volume (check register, calculation sheets, input listing, glossary)."""
    return f"{project.dossier.project.code}-{project.revision.code}{APPENDIX_SUFFIX}"


def publish(project, results, pages, out: Path, *, page_size: str = "a4",
            progress=lambda *a: None, changes: dict | None = None, parallel: bool = True,
            superseded: str | None = None, rebuilt: str | None = None) -> Path:
    """Write site + PDF + results.json into a staging folder, then move it into place.

    With ``parallel`` the site is built in a forked process while this one renders the
    PDF: the two engines share nothing, and the machine has two cores.
    """
    rev = project.revision
    target = out / rev.code
    rebuilds = refuse_if_issued(target, project.inputs, rebuilt)
    staging = staging_dir(out, rev.code)
    control = {"rebuilds": rebuilds, "superseded_by": superseded}
    try:
        _publish_into(staging, project, results, pages, page_size, progress, changes, parallel,
                      control)
        progress("publish: moving the revision into place")
        move_into_place(staging, target)
    except OSError as exc:
        shutil.rmtree(staging, ignore_errors=True)
        raise PublishError(f"{out}: the revision could not be written ({exc.strerror or exc}); "
                           "nothing was changed in the output folder. Fix: free disk space or "
                           "choose a writable folder with --out.") from exc
    except BaseException:
        shutil.rmtree(staging, ignore_errors=True)
        raise
    reached("versions")
    try:
        update_versions(out)
    except OSError as exc:
        raise PublishError(f"{out}: revision {rev.code} was written but the revision list could "
                           f"not be updated ({exc.strerror or exc}). Fix: free disk space and "
                           "build again.") from exc
    return target


def _publish_into(staging, project, results, pages, page_size, progress, changes, parallel,
                  control):
    from specgen.publish.pdf import write_pdf
    from specgen.publish.site import build_site
    rev = project.revision
    name = f"{project.dossier.project.title} — {rev.code}"
    progress("publish: site" + (" and PDF in parallel" if parallel else ""))
    extra = {"sg_report": _report_bar(project)}
    child = _fork(build_site, pages, staging, name, extra) if parallel else None
    if child is None:
        build_site(pages, staging, name, extra)
    progress("publish: PDF")
    results_json = results.to_json().encode("utf-8")
    attachments = {"results.json": results_json}
    attachments.update(pages.downloads)
    for f in project.inputs:
        attachments[f"input/{f.path}"] = (project.root / f.path).read_bytes()
    ident = hashlib.sha256(f"{project.dossier.project.code}/{rev.code}".encode()).digest()[:16]
    pdf_tmp = staging.with_name(staging.name + ".pdf")  # beside the site: MkDocs empties its folder
    app_tmp = staging.with_name(staging.name + APPENDIX_SUFFIX)
    try:
        reused, total = write_pdf(
            pages, _print_context(project, pages.marks), pdf_tmp, attachments=attachments,
            page_size=page_size, identifier=ident, stamp=_stamp(rev.date),
            on_part=lambda done, total: progress("publish: PDF parts", done, total),
            appendix=(app_tmp, appendix_pdf_name(project), pdf_name(project)))
        progress("publish: PDF parts taken unchanged from the cache", reused, total)
        if child is not None:
            _join(child)
            child = None
        reached("site")
        os.replace(pdf_tmp, staging / pdf_name(project))
        if app_tmp.exists():
            os.replace(app_tmp, staging / appendix_pdf_name(project))
    finally:
        if child is not None:  # the PDF failed: stop the site before the staging is removed
            _stop(child)
        for tmp in (pdf_tmp, app_tmp):
            if tmp.exists():
                tmp.unlink()
    (staging / "results.json").write_bytes(results_json)
    for rel, data in sorted(pages.downloads.items()):  # after the site: MkDocs empties its folder
        (staging / rel).parent.mkdir(parents=True, exist_ok=True)
        (staging / rel).write_bytes(data)
    if changes is not None:
        (staging / "changes.json").write_text(
            json.dumps(changes, indent=2, sort_keys=True, ensure_ascii=False) + "\n",
            encoding="utf-8")
    write_manifest(staging, project.inputs, {
        "project": project.dossier.project.code, "revision": rev.code,
        "status": rev.status, "date": rev.date.isoformat(), "format": "specgen-manifest/1",
        "description": rev.description, "purpose": rev.purpose, "facts": results.facts,
        "findings": len(results.findings), "sections": pages.sections,
        **{k: v for k, v in control.items() if v}})
    reached("staged")


def _child(fn, args, conn) -> None:
    from specgen.publish.pdf_parts import die_with_parent
    die_with_parent()
    try:
        fn(*args)
        conn.send(None)
    except BaseException as exc:  # reported to the parent, which raises it as ours
        conn.send(f"{type(exc).__name__}: {exc}")
    finally:
        conn.close()


def _fork(fn, *args):
    """Run ``fn(*args)`` in a forked process; ``None`` where fork is unavailable."""
    import multiprocessing
    if "fork" not in multiprocessing.get_all_start_methods():
        return None
    ctx = multiprocessing.get_context("fork")
    parent, child = ctx.Pipe(duplex=False)
    proc = ctx.Process(target=_child, args=(fn, args, child), daemon=True)
    proc.start()
    child.close()
    return proc, parent


def _join(handle) -> None:
    proc, conn = handle
    error = conn.recv() if conn.poll(None) else "the site process ended without a word"
    proc.join()
    if error or proc.exitcode:
        raise PublishError(f"the site could not be built: {error or proc.exitcode}")


def _stop(handle) -> None:
    """End the site process early (the build failed) and wait for it, so it cannot write
    into a staging folder that is being removed."""
    proc, conn = handle
    proc.terminate()
    proc.join()
    conn.close()


def _stamp(date):
    import datetime as dt
    return dt.datetime(date.year, date.month, date.day, tzinfo=dt.timezone.utc)


def _report_bar(project) -> dict:
    """What the site's report bar shows on every page (escaped by the page frame)."""
    from specgen.dates import date_text
    p, rev = project.dossier.project, project.revision
    return {"project": p.title, "code": p.code, "revision": rev.code, "status": rev.status,
            "state": STATE[rev.status], "purpose": PURPOSE[rev.purpose],
            "date": date_text(rev.date), "pdf": pdf_name(project),
            "pdf_appendices": appendix_pdf_name(project)}


def _print_context(project, marks: dict | None = None) -> dict:
    p, rev = project.dossier.project, project.revision
    specifier = next((x for x in project.dossier.parties if x.role == "specifier"), None)
    author = (specifier.organisation or specifier.name) if specifier else p.client
    return {"title": f"{p.title} — revision {rev.code}", "author": author,
            "subject": f"Binder specification dossier, {p.site}",
            "keywords": f"{p.code}, revision {rev.code}, repair mortar, binder specification",
            "date": rev.date.isoformat(), "project": p, "revision": rev,
            "state": STATE[rev.status], "purpose": PURPOSE[rev.purpose],
            "mark": (marks or {}).get("mark", ""), "sign_off": (marks or {}).get("sign_off", []),
            "distribution": (marks or {}).get("distribution", [])}
