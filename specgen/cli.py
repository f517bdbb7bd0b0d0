"""The command line: parses arguments, calls build()/check(), maps errors to exit codes.

Exit codes: 0 all clear; 1 a check failed (``check``) or verification failed;
2 invalid input or usage.  No traceback reaches the user for an error of ours.
Heavy libraries are imported only by the commands that need them.
"""
from __future__ import annotations

import json
import sys
from pathlib import Path

import click

from specgen import __version__
from specgen.errors import InputErrors, SpecgenError, UsageError


def _fail(exc: SpecgenError) -> None:
    text = exc.report() if isinstance(exc, InputErrors) else str(exc)
    click.echo(text, err=True)
    sys.exit(exc.exit_code)


@click.group(context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(__version__, prog_name="specgen")
def cli() -> None:
    """specgen: binder specification dossiers for historic masonry repair.

    A project folder of data files goes in; a checked, versioned site and a PDF come out.
    """


@cli.command()
@click.argument("directory", type=click.Path(file_okay=False, path_type=Path))
def new(directory: Path) -> None:
    """Write a commented starter project into DIRECTORY."""
    from specgen.build import new as write_starter
    try:
        written = write_starter(directory)
    except SpecgenError as exc:
        _fail(exc)
    click.echo(f"Starter project written to {directory} ({len(written)} files). "
               f"Next: specgen check {directory}")


@cli.command("check")
@click.argument("directory", type=click.Path(path_type=Path))
@click.option("--format", "fmt", type=click.Choice(["table", "json"]), default="table",
              show_default=True, help="table for people, json for tools (results.json content)")
@click.option("--wide", is_flag=True, help="one line per check, however long (the table "
              "otherwise wraps findings to the terminal's width)")
@click.option("--fit-cache/--no-fit-cache", default=True, show_default=True,
              help="keep the strength fits between runs in the user's cache folder, keyed by "
              "their inputs and the program's version (a series that did not change is not "
              "fitted again)")
def check_cmd(directory: Path, fmt: str, wide: bool, fit_cache: bool) -> None:
    """Run every check on the project in DIRECTORY and print the results."""
    from specgen.build import check
    try:
        _, results = check(directory, fit_cache=fit_cache)
    except SpecgenError as exc:
        _fail(exc)
    if fmt == "json":
        click.echo(results.to_json(), nl=False)
    else:
        from specgen.build import check_table
        click.echo(check_table(results, wide=wide))
    sys.exit(1 if results.counts().get("fail") else 0)


@cli.command("missing")
@click.argument("directory", type=click.Path(path_type=Path))
def missing_cmd(directory: Path) -> None:
    """List what the dossier still lacks to be complete for issue, in working order.

    Exit status 0 when nothing is missing, 1 otherwise, 2 on invalid input.
    """
    from specgen.build import missing, missing_text as as_text
    try:
        items, project = missing(directory)
    except SpecgenError as exc:
        _fail(exc)
    click.echo(as_text(items, project.dossier.project.code, project.revision.code))
    sys.exit(1 if items else 0)


@cli.command("lab-workbook")
@click.argument("directory", type=click.Path(path_type=Path))
@click.option("--out", "out", type=click.Path(dir_okay=False, path_type=Path), default=None,
              help="workbook to write (default: <code>-<revision>-lab.xlsx here)")
@click.option("--force", is_flag=True, help="replace the file if it exists")
def lab_workbook(directory: Path, out: Path | None, force: bool) -> None:
    """Write the laboratory's workbook: the planned tests, ready to fill in.

    Put the filled-in workbook in DIRECTORY/lab/; it is read as the CSV files are.
    """
    from specgen.build import lab_workbook as write
    try:
        target, counts = write(directory, out, overwrite=force)
    except SpecgenError as exc:
        _fail(exc)
    listed = ", ".join(f"{n} {sheet}" for sheet, n in counts.items())
    click.echo(f"Wrote {target}: planned rows {listed}. "
               f"Filled in, it goes in {directory}/lab/.")


def _default_out(directory: Path) -> Path:
    return directory.resolve().parent / f"{directory.resolve().name}-site"


def _progress(quiet: bool):
    """The progress display (specgen/console.py): rich on a terminal inside ``with``, plain
    lines otherwise."""
    from specgen.console import Progress
    return Progress(sys.stderr, quiet=quiet)


@cli.command()
@click.argument("directory", type=click.Path(path_type=Path))
@click.option("--out", "out", type=click.Path(file_okay=False, path_type=Path), default=None,
              help="output folder (default: DIRECTORY/../<folder name>-site)")
@click.option("--page-size", type=click.Choice(["a4", "letter"]), default=None,
              help="paper of the PDF (default: the paper of the practice the project states "
              "in dossier.yaml, A4 when it states none)")
@click.option("--quiet", is_flag=True, help="no progress display")
@click.option("--rebuild-issued", "rebuild", multiple=True, metavar="REV",
              help="rebuild issued revision REV although its inputs changed (needs --reason)")
@click.option("--reason", default=None, help="why the issued revision is rebuilt (recorded in "
              "its manifest)")
@click.option("--shared-cache", "shared_cache", type=click.Path(file_okay=False, path_type=Path),
              default=None, envvar="SPECGEN_SHARED_CACHE",
              help="an artefact cache shared by every output folder (figures, math, PDF parts), "
              "behind OUT/.cache (default: $SPECGEN_SHARED_CACHE)")
def build(directory: Path, out: Path | None, page_size: str | None, quiet: bool, rebuild: tuple,
          reason: str | None, shared_cache: Path | None) -> None:
    """Build the site and PDF of the project's revision into OUT/<revision>/."""
    from specgen.build import build as run_build
    if rebuild and not (reason or "").strip():
        _fail(UsageError("--rebuild-issued needs --reason \"why\" (it is recorded in the "
                         "revision's manifest)."))
    try:
        with _progress(quiet) as progress:
            target = run_build(directory, out or _default_out(directory), page_size=page_size,
                               progress=progress, rebuild={r: reason for r in rebuild},
                               shared_cache=shared_cache)
    except SpecgenError as exc:
        _fail(exc)
    click.echo(f"Built {target} (open {target / 'index.html'})")


@cli.command("issue")
@click.argument("directory", type=click.Path(path_type=Path))
@click.option("--out", "out", type=click.Path(file_okay=False, path_type=Path), default=None,
              help="output folder (default: DIRECTORY/../<folder name>-site)")
@click.option("--date", "date", type=click.DateTime(["%Y-%m-%d"]), default=None,
              help="issue date (default: today, UTC)")
@click.option("--purpose", type=click.Choice(["preliminary", "for_approval", "for_construction"]),
              default=None, help="what it is issued for (default: revision.purpose)")
@click.option("--next", "next_code", default=None, help="code of the next draft (default: the "
              "number raised by one)")
@click.option("--page-size", type=click.Choice(["a4", "letter"]), default="a4", show_default=True)
@click.option("--quiet", is_flag=True, help="no progress display")
@click.option("--shared-cache", "shared_cache", type=click.Path(file_okay=False, path_type=Path),
              default=None, envvar="SPECGEN_SHARED_CACHE",
              help="an artefact cache shared by every output folder (figures, math, PDF parts), "
              "behind OUT/.cache (default: $SPECGEN_SHARED_CACHE)")
def issue_cmd(directory: Path, out, date, purpose, next_code, page_size: str, quiet: bool,
              shared_cache: Path | None) -> None:
    """Issue the current draft: freeze its inputs under issued/, build it, open the next draft."""
    from specgen.build import issue
    try:
        done = issue(directory, out or _default_out(directory), date=date.date() if date else None,
                     purpose=purpose, next_code=next_code, page_size=page_size,
                     progress=_progress(quiet), shared_cache=shared_cache)
    except SpecgenError as exc:
        _fail(exc)
    click.echo(f"Issued {done['issued']} into {done['folder']}; inputs frozen in "
               f"{directory / 'issued' / done['issued']}; the project is now draft {done['next']}."
               + (f" The audit lists {done['findings']} finding(s) on its Open findings page."
                  if done["findings"] else ""))


@cli.command("status")
@click.argument("directory", type=click.Path(path_type=Path))
@click.option("--format", "fmt", type=click.Choice(["text", "json"]), default="text",
              show_default=True)
def status_cmd(directory: Path, fmt: str) -> None:
    """Where the project stands: revision, findings, hold points, comments, changes."""
    from specgen.build import status, status_text
    try:
        report = status(directory)
    except SpecgenError as exc:
        _fail(exc)
    click.echo(json.dumps(report, indent=2, sort_keys=True) if fmt == "json"
               else status_text(report))


@cli.command()
@click.argument("directory", type=click.Path(path_type=Path))
@click.option("--port", default=8000, show_default=True, help="port on 127.0.0.1")
def serve(directory: Path, port: int) -> None:
    """Live preview on 127.0.0.1: the site first, the PDF in the background; rebuilt on change.

    A bare page address (/strength.html) shows that page of the current revision; a page not
    rebuilt after an edit (an input error, an issued revision) says so with the error.
    """
    from specgen.console import Progress
    from specgen.preview import serve as run_serve
    try:
        # plain lines: the server's own messages interleave with the stages
        run_serve(directory, port, say=lambda text: click.echo(text, err=True),
                  progress=Progress(sys.stderr, terminal=False))
    except SpecgenError as exc:
        _fail(exc)


@cli.command("import-comments")
@click.argument("directory", type=click.Path(path_type=Path))
@click.argument("review_file", type=click.Path(dir_okay=False, path_type=Path))
@click.option("--out", "out", type=click.Path(file_okay=False, path_type=Path), default=None,
              help="output folder holding the revision commented on "
                   "(default: DIRECTORY/../<folder name>-site)")
def import_comments(directory: Path, review_file: Path, out: Path | None) -> None:
    """Take a reviewer's comment file (exported from the site) into comments.yaml."""
    from specgen.build import import_comments as run_import
    out = out or directory.resolve().parent / f"{directory.resolve().name}-site"
    try:
        ids = run_import(directory, review_file, out)
    except SpecgenError as exc:
        _fail(exc)
    if ids:
        click.echo(f"{len(ids)} new comment{'s' if len(ids) != 1 else ''} added to "
                   f"{directory / 'comments.yaml'}: {', '.join(ids)}")
    else:
        click.echo(f"No new comment: every comment in {review_file} was taken in before.")


@cli.command()
@click.argument("out", type=click.Path(file_okay=False, path_type=Path))
@click.option("--from", "old", required=True, help="earlier revision code")
@click.option("--to", "new", required=True, help="later revision code")
@click.option("--format", "fmt", type=click.Choice(["text", "json"]), default="text",
              show_default=True)
def diff(out: Path, old: str, new: str, fmt: str) -> None:
    """Print what changed between two revisions built into OUT (the decision first)."""
    from specgen.build import diff as run_diff, diff_text
    try:
        changes = run_diff(out, old, new)
    except SpecgenError as exc:
        _fail(exc)
    click.echo(json.dumps(changes, indent=2, sort_keys=True) if fmt == "json" else diff_text(changes))


@cli.command()
@click.argument("path", type=click.Path(file_okay=False, path_type=Path))
@click.option("--project", "project", type=click.Path(file_okay=False, path_type=Path),
              default=None, help="project folder: also check the inputs it keeps for each "
              "revision (issued/<revision>/) against the manifest")
@click.option("--trust", multiple=True, type=click.Path(dir_okay=False, path_type=Path),
              help="certificate (PEM) to trust as a root when checking signatures")
def verify(path: Path, project: Path | None, trust: tuple) -> None:
    """Check built output against its manifests and signatures (exit 1 on any difference).

    PATH is a revision folder (OUT/R1) or an output folder (OUT: every revision, and
    versions.json and the root index against the revisions present).
    """
    from specgen.build import verify as run_verify
    try:
        report = run_verify(path, project, list(trust))
    except SpecgenError as exc:
        _fail(exc)
    differences = report["differences"]
    for line in differences:
        click.echo(line)
    broken = [s for s in report["signatures"] if not s["intact"]]
    for s in report["signatures"]:
        click.echo(f"signature of {s['file']}: {s['summary']}")
    bad = bool(differences or broken)
    click.echo(f"{path}: " + (f"does NOT match its manifest ({len(differences)} "
                              f"difference{'s' if len(differences) != 1 else ''}"
                              f"{f', {len(broken)} broken signature' if broken else ''})"
                              if bad else "every file matches its manifest"
                              + (" and every signature is intact" if report["signatures"]
                                 else "")))
    sys.exit(1 if bad else 0)


@cli.command()
@click.argument("revision_dir", type=click.Path(file_okay=False, path_type=Path))
@click.option("--key", required=True, type=click.Path(dir_okay=False, path_type=Path),
              help="the specifier's private key (PEM); read, never copied")
@click.option("--cert", required=True, type=click.Path(dir_okay=False, path_type=Path),
              help="the specifier's certificate (PEM)")
@click.option("--chain", multiple=True, type=click.Path(dir_okay=False, path_type=Path),
              help="intermediate certificates (PEM)")
@click.option("--passphrase-env", default=None, metavar="VAR",
              help="environment variable holding the key's passphrase")
def sign(revision_dir: Path, key: Path, cert: Path, chain: tuple, passphrase_env) -> None:
    """Sign an issued revision's PDF (PAdES) and its manifest with the specifier's certificate."""
    import os
    from specgen.build import sign as run_sign
    phrase = os.environ.get(passphrase_env, "").encode() if passphrase_env else None
    try:
        done = run_sign(revision_dir, key, cert, passphrase=phrase, chain=list(chain))
    except SpecgenError as exc:
        _fail(exc)
    click.echo(f"Signed {done['pdf']} and {done['manifest_signature']} as {done['signer']}.")


@cli.command()
@click.option("--format", "fmt", type=click.Choice(["table", "markdown"]), default="table",
              show_default=True)
def names(fmt: str) -> None:
    """List every results.json quantity name with its unit and meaning."""
    from specgen.build import names_text
    click.echo(names_text(markdown=fmt == "markdown"))


@cli.command("format")
def format_reference() -> None:
    """Print the project folder format reference (every key, type, unit, default, meaning)."""
    from specgen.build import format_reference as reference
    click.echo(reference(), nl=False)


def main() -> None:
    """Console entry point."""
    cli(prog_name="specgen")
