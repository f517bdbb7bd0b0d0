"""The pipeline in one place: load → compute/check → render → publish.

``build()`` is what ``specgen build`` runs; ``check()`` stops after the checks.  Only
``build()`` imports the rendering and publishing stages (matplotlib, MkDocs, WeasyPrint).

A project keeps the inputs of its issued revisions under ``issued/<revision>/`` (each a
complete project folder as issued); a build first builds any of those missing from the
output folder, oldest first, so the whole history can be published from the project alone.
"""
from __future__ import annotations

import datetime as dt
import os
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

from specgen.checks import fits
from specgen.checks.builtin import Results, evaluate, previous_of as _previous
from specgen.checks.builtin import names_text  # noqa: F401  (the face's `names`)
from specgen.errors import UsageError
from specgen.guards import blocks, frozen_inputs, refuse_if_findings, refuse_unconfirmed
from specgen.killpoints import reached
from specgen.project import Project, load_project
from specgen.project.load import ARCHIVE_DIR
from specgen.project.reference import markdown as format_reference  # noqa: F401  (`format`)
# what the face prints, beside the functions that produce it (the face imports only this module)
from specgen.completeness import as_text as missing_text  # noqa: F401  (`missing`)
from specgen.starter import write_starter as new  # noqa: F401  (`new`)
from specgen.textreport import status_text, table as check_table  # noqa: F401  (`status`, `check`)


def reference_names() -> tuple[set[str], set[str]]:
    """What a review comment may be about: every check code and every page of the dossier
    (the check and chapter registries; loading knows neither)."""
    from specgen.checks.builtin import checks
    from specgen.report.chapters import chapters
    return ({s.code for s in checks()},
            {c.path.rsplit(".", 1)[0] for c in chapters()} | {"summary"})


def load(project_dir) -> Project:
    """The project as every command reads it: validated, with what the check stage derives
    before any check runs (``checks/intake.py``); every input problem in one raise."""
    from specgen.checks.intake import derive
    return load_project(project_dir, names=reference_names(), derive=derive)


def check(project_dir: Path | str, *, fit_cache=None) -> tuple[Project, Results]:
    """Load the project (and its archived issued revisions, validated as a build would) and run
    every check and the audit, writing nothing; ``fit_cache``: see ``fit_cache.store_for``."""
    from specgen import collector, fit_cache as kept_between_runs
    with collector.paused(), fits.kept(persist=kept_between_runs.store_for(fit_cache)):
        project = load(project_dir)
        archived = _load_archive(Path(project_dir), project)
        return project, evaluate(project, previous=_previous(archived[-1] if archived else None))


def import_comments(project_dir: Path | str, review_file: Path | str,
                    out_dir: Path | str) -> list[str]:
    """Take a reviewer's exported comment file into the project's ``comments.yaml``, checked
    against the revision they were made on, as published in ``out_dir``; those already taken
    in are skipped.  Returns the ids given to new comments."""
    from specgen.project.review_file import take_in
    project = load(project_dir)
    return take_in(project, Path(review_file), Path(out_dir))


def missing(project_dir: Path | str):
    """What the dossier still lacks to be complete for issue (``completeness.Missing`` items,
    in the order a specifier works), with the project and results it was read from."""
    from specgen.completeness import missing as lacking
    project, results = check(project_dir)
    return lacking(project, results), project


def lab_workbook(project_dir: Path | str, path: Path | str | None = None, *,
                 overwrite: bool = False) -> tuple[Path, dict[str, int]]:
    """Write the laboratory workbook of the project (planned tests without results yet);
    returns where and the rows per sheet.  Default file: ``<code>-<revision>-lab.xlsx``."""
    from specgen.labbook import write_workbook
    project = load(project_dir)
    code = project.dossier.project.code
    target = Path(path or f"{code}-{project.revision.code}-lab.xlsx")
    if target.exists() and not overwrite:
        raise UsageError(f"{target}: already exists. Fix: name another file with --out, or "
                         "add --force to replace it.")
    return target, write_workbook(project, target)


def _quiet(step: str, done: int | None = None, total: int | None = None) -> None:
    pass


@fits.kept()  # each strength fit once per call (checks/fits.py)
def build(project_dir: Path | str, out_dir: Path | str, *, page_size: str | None = None,
          progress: Callable[..., None] = _quiet, rebuild: dict[str, str] | None = None,
          shared_cache: Path | str | None = None) -> Path:
    """Build the project's revision (and missing archived ones) into ``out_dir/<revision>/``.

    ``rebuild`` maps an issued revision's code to the reason for rebuilding it from inputs
    that changed after it was issued (recorded in its manifest); without it such a change
    stops the build before anything is written.  ``page_size`` (``a4`` or ``letter``)
    overrides the paper of the practice each revision states (A4 when it states none).
    ``progress(step, done=None, total=None)`` hears each stage as it starts and, where the
    work is counted (the PDF's parts), how much of it is done.  ``shared_cache``: cache.py."""
    progress("load: reading and validating the project folder")
    project = load(project_dir)
    archived = _load_archive(Path(project_dir), project)
    out = Path(out_dir)
    reached("load")
    stale = frozen_inputs(out, archived, rebuild or {})
    previous = [None] + archived
    progress("check: running the checks and the consistency audit")
    results = evaluate(project, previous=_previous(previous[-1]))
    refuse_if_findings(project, results)
    refuse_unconfirmed(project, results)
    from specgen.publish.output import preflight
    # a read-only or full output folder is found before anything is drawn; after the
    # refusals, so a refused revision leaves no output folder behind
    preflight(out)
    reached("check")
    from specgen import cache
    # unchanged figures and math are reused from the output folder's artefact cache;
    # after a complete build it keeps only what this build used
    with cache.using(out / cache.CACHE_DIR, cache.shared_folder(shared_cache)) as used:
        for old, before in zip(archived, previous):
            if old.revision.code in stale:
                progress(f"revision {old.revision.code} (issued, from {ARCHIVE_DIR}/)")
                old_results = evaluate(old, previous=_previous(before))
                _build_one(old, old_results, out, page_size, progress,
                           superseded=_next_issued(archived, old),
                           rebuilt=(rebuild or {}).get(old.revision.code))
        built = _build_one(project, results, out, page_size, progress)
    cache.prune(out / cache.CACHE_DIR, used)
    return built


def _paper(project: Project, page_size: str | None) -> str:
    """The paper of the PDF: asked for, else the stated practice's, else A4."""
    from specgen import practice
    if page_size:
        return page_size
    p = practice.resolve(project.dossier)
    return p.paper.lower() if p.stated else "a4"


def _next_issued(archived: list[Project], old: Project) -> str | None:
    later = [p.revision.code for p in archived if (p.revision.date, p.revision.code)
             > (old.revision.date, old.revision.code)]
    return later[0] if later else None


def _build_one(project: Project, results: Results, out: Path, page_size: str | None, progress,
               superseded: str | None = None, rebuilt: str | None = None) -> Path:
    from specgen.publish import publish
    page_size = _paper(project, page_size)
    from specgen.publish.history import history_for
    from specgen.report.render import render
    history = history_for(out, project, results)
    progress("render: pages, figures and calculation sheets")
    pages = render(project, results, history, superseded=superseded)
    reached("render")
    _fix_dates(project.revision.date)
    return publish(project, results, pages, out, page_size=page_size, progress=progress,
                   changes=results.changes, superseded=superseded, rebuilt=rebuilt)


# --------------------------------------------------------------------- live preview
TEXT_ONLY = ("narrative/", "templates/")  # inputs whose change leaves the check results as they are


@dataclass
class Prepared:
    """A revision loaded, checked and rendered, ready to publish (the preview's unit of work)."""

    project: Project
    results: Results
    pages: object
    data_key: tuple   # hashes of the inputs the checks read (all but narrative and templates)
    history: object = None     # the earlier revisions the pages were rendered against
    cache_dir: Path | None = None   # the artefact cache the figures and math come from
    first: set[str] | None = None   # the pages laid out first (``prepare``'s ``first``)


def _data_key(project: Project) -> tuple:
    return tuple((f.path, f.sha256) for f in project.inputs if not f.path.startswith(TEXT_ONLY))


@fits.kept()  # each strength fit once per call (checks/fits.py)
def prepare(project_dir: Path | str, out_dir: Path | str, *, reuse: Prepared | None = None,
            cache_dir: Path | str | None = None, progress: Callable[..., None] = _quiet,
            first: set[str] | Callable[[str], set[str]] | None = None) -> Prepared:
    """Load, check and render; the checks are reused from ``reuse`` when only narrative or
    templates changed, and figures and math come from the artefact cache.  With ``first``
    (page paths), only the pages up to them are laid out (``render``'s ``first``; the rest
    by :func:`complete`); given as a function of the revision's code, it is asked when the
    render starts, so a page asked for while the project loads and is checked is among them
    (the set used is ``Prepared.first``)."""
    from specgen.publish.history import history_for
    progress("load: reading and validating the project folder")
    project = load(project_dir)
    key = _data_key(project)
    if reuse is not None and reuse.data_key == key:
        results = reuse.results
    else:
        archived = _load_archive(Path(project_dir), project)
        progress("check: running the checks and the consistency audit")
        results = evaluate(project, previous=_previous(archived[-1] if archived else None))
    progress("render: pages, figures and calculation sheets")
    from specgen import cache
    if callable(first):
        first = first(project.revision.code)
    prepared = Prepared(project, results, None, key,
                        history_for(Path(out_dir), project, results),
                        Path(cache_dir or Path(out_dir) / cache.CACHE_DIR), first)
    prepared.pages = _preview_pages(prepared, first)
    _fix_dates(project.revision.date)
    return prepared


def _preview_pages(prepared: Prepared, first: set[str] | None):
    """The prepared revision's pages as the live preview renders them: the DOCX exports made
    with the PDF, after the site (preview_pdf); a figure the cache does not hold a
    placeholder, drawn after the site (preview_figure)."""
    from specgen import cache
    from specgen.report.render import render
    with cache.using(prepared.cache_dir, cache.shared_folder()), cache.drawing_later():
        return render(prepared.project, prepared.results, prepared.history,
                      later_downloads=True, first=first)


def complete(prepared: Prepared) -> Prepared:
    """The prepared revision with every page laid out (``prepare``'s ``first`` left the
    rest unrendered): the same project, results and history, rendered whole."""
    if not prepared.pages.unrendered:
        return prepared
    return Prepared(prepared.project, prepared.results, _preview_pages(prepared, None),
                    prepared.data_key, prepared.history, prepared.cache_dir)


def preview_site(prepared: Prepared, out_dir: Path | str, first: set[str] | None = None
                 ) -> Path:
    """Publish the prepared revision's site (no PDF) into ``out_dir/<revision>/``; with
    ``first`` (page paths), only those pages in full, the others saying they are being built."""
    from specgen.publish.preview import site_only
    return site_only(prepared.project, prepared.results, prepared.pages, Path(out_dir), first)


def preview_figures(prepared: Prepared) -> dict[str, list[str]]:
    """The figures the prepared site shows as placeholders, by page: the page's address
    (``strength.html``) → figure paths in the order it shows them (the summary first)."""
    from specgen.publish.preview import figures_by_page
    return figures_by_page(prepared.pages)


def preview_figure(prepared: Prepared, target: Path, path: str) -> None:
    """Draw the figure shown as a placeholder at ``path`` and put it in its place in the
    published preview ``target``; an error of the drawing is raised once the placeholder
    there says the figure could not be drawn."""
    from specgen.publish.preview import put_asset
    try:
        data = prepared.pages.draw(path)
    except Exception:
        from specgen.report.figures import not_drawn
        put_asset(target, path, not_drawn(prepared.pages.assets[path]))
        raise
    put_asset(target, path, data)


def preview_pdf(prepared: Prepared, target: Path, *, cache_dir: Path | str | None = None,
                progress: Callable[..., None] = _quiet) -> list[Path]:
    """Draw the figures still shown as placeholders, make the downloads left for later (the
    DOCX exports) and print the prepared revision's PDF into ``target`` (parts from the artefact cache): the PDF files written, the report
    first, then its appendix volume when it has one."""
    from specgen.publish.preview import later_downloads, pdf_only, put_asset
    from specgen import cache
    for path in list(prepared.pages.drawing):   # never a PDF with a placeholder
        put_asset(target, path, prepared.pages.draw(path))
    later_downloads(prepared.pages, target)
    with cache.using(cache_dir or target.parent / cache.CACHE_DIR, cache.shared_folder()):
        return pdf_only(prepared.project, prepared.results, prepared.pages, target,
                        on_part=lambda done, total: progress("PDF parts", done, total))


def _load_archive(root: Path, current: Project) -> list[Project]:
    """The archived issued revisions, validated, oldest first (project/archive.py)."""
    from specgen.project.archive import load_archive
    return load_archive(root, current, load)


def verify(path: Path | str, project_dir: Path | str | None = None,
           trust: list[Path] = ()) -> dict:
    """Built output against what it vouches for (publish/verify.py, ``verify_output``); with
    ``project_dir``, the inputs the project keeps for each revision too."""
    from functools import partial

    from specgen.publish.verify import verify_output
    kept = None if project_dir is None else partial(_kept_inputs, Path(project_dir))
    return verify_output(path, kept, trust)


def _kept_inputs(project: Path, code: str) -> tuple[str, dict[str, str] | None]:
    """Where ``project`` keeps the inputs of revision ``code`` (``issued/<code>/``, or the
    folder itself for its current revision) and their hashes; None when it keeps none."""
    from specgen.errors import ProblemLog
    from specgen.project.files import read_yaml
    from specgen.project.load import input_files
    kept = project / ARCHIVE_DIR / code
    if not kept.is_dir():
        located = read_yaml(project / "dossier.yaml", "dossier.yaml", ProblemLog())
        data = located.data if located else None
        rev = data.get("revision") if isinstance(data, dict) else None
        current = str(rev.get("code")) if isinstance(rev, dict) else None
        kept = project if current == code else None
    if kept is None:
        return f"{ARCHIVE_DIR}/{code}/", None
    return f"{ARCHIVE_DIR}/{code}/", {f.path: f.sha256 for f in input_files(kept)}


def _fix_dates(date: dt.date) -> None:
    """Reproducible output: every date stamped by the toolchain is the revision date."""
    epoch = int(dt.datetime(date.year, date.month, date.day, tzinfo=dt.timezone.utc).timestamp())
    os.environ["SOURCE_DATE_EPOCH"] = str(epoch)


# ---------------------------------------------------------------- the life of a revision
def issue(project_dir: Path | str, out_dir: Path | str, *, date: dt.date | None = None,
          purpose: str | None = None, next_code: str | None = None, page_size: str = "a4",
          progress: Callable[[str], None] = _quiet, shared_cache: Path | None = None) -> dict:
    """Issue the current draft: freeze its inputs into ``issued/<code>/`` with the date and
    purpose, build it (manifest stamped ``issued``), then open the next draft revision.

    Refused (nothing changed) when the revision is already issued or, for construction, while
    the audit has blocking findings.  What the draft's build drew comes from the cache."""
    from specgen import cache
    from specgen.publish import archive
    root = Path(project_dir)
    project = load(root)
    rev = project.revision
    if rev.status == "issued":
        raise UsageError(f"{root / 'dossier.yaml'}: revision {rev.code} is already issued. Fix: "
                         "raise a new draft revision (revision.code, status: draft) first.")
    archived = _load_archive(root, project)
    new_code = next_code or archive.next_code(rev.code)
    when = date or dt.datetime.now(dt.timezone.utc).date()
    progress(f"issue: freezing the inputs of {rev.code} into {ARCHIVE_DIR}/{rev.code}/")
    staging = archive.freeze(project, ARCHIVE_DIR, {
        "status": "issued", "date": when.isoformat(), "purpose": purpose or rev.purpose})
    try:
        issued = load(staging)
        results = evaluate(issued, previous=_previous(archived[-1] if archived else None))
        refuse_if_findings(issued, results)
        with cache.using(Path(out_dir) / cache.CACHE_DIR, cache.shared_folder(shared_cache)):
            built = _build_one(issued, results, Path(out_dir), page_size, progress)
        archive.commit(staging, rev.code)
    finally:
        if staging.exists():
            import shutil
            shutil.rmtree(staging, ignore_errors=True)
    archive.open_next(root, new_code, when, rev.code)
    return {"issued": rev.code, "folder": built, "next": new_code,
            "findings": len(results.findings)}


def status(project_dir: Path | str) -> dict:
    """Where the project stands: revision, last issue, open findings, hold points, comments,
    and what changed since the last issue."""
    project, results = check(project_dir)
    rev, code = project.revision, project.dossier.project.code
    holds = results.value(code, "hold_points") or {}
    return {"project": code, "revision": rev.code, "status": rev.status,
            "purpose": rev.purpose.replace("_", " "), "date": rev.date.isoformat(),
            "last_issued": results.previous, "blocks": blocks(project),
            "findings": [f.to_dict() for f in results.findings],
            "hold_points": sorted(k for k, v in holds.items() if v["state"] == "open"),
            "comments": sorted(c.id for c in project.comments if c.status == "open"),
            "facts": results.facts, "counts": results.counts()}


def diff(out_dir: Path | str, old: str, new: str) -> dict:
    """The change report between two revisions built into ``out_dir``."""
    from specgen.checks.revision_delta import compare
    from specgen.publish.history import find
    a, b = find(Path(out_dir), old), find(Path(out_dir), new)
    return compare(a.results, a.manifest.get("inputs", {}), b.results,
                   b.manifest.get("inputs", {}))


def diff_text(changes: dict) -> str:
    """The change report as text (what ``specgen diff`` prints)."""
    from specgen.checks.revision_delta import as_text
    return as_text(changes)


def sign(revision_dir: Path | str, key: Path, cert: Path, *, passphrase: bytes | None = None,
         chain: list[Path] = ()) -> dict:
    """Sign an issued revision's PDF (PAdES) and its manifest with the specifier's key."""
    from specgen.publish.signing import sign_revision
    return sign_revision(Path(revision_dir), key, cert, passphrase=passphrase, chain=list(chain))
