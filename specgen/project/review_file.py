"""A reviewer's comment file (format ``specgen-review/1``) taken into ``comments.yaml``.

The file is exported by the comment panel of the published site and arrives by mail: it
is untrusted input.  It is read with the same located YAML reader as the project (JSON is
YAML), validated by the models below, checked against the revision it was made on as
published in the output folder (page, element id, quoted text), and the new comments are
appended to ``comments.yaml`` in one atomic replace, so the specifier's file keeps its
layout and comments and is never left half-written.  A comment's ``key`` makes a second
import of the same file add nothing.
"""
from __future__ import annotations

import datetime as dt
import json
import os
import re
import tempfile
from pathlib import Path
from typing import Annotated, Literal

import yaml
from pydantic import Field

from specgen.errors import InputErrors, ProblemLog, did_you_mean, quote
from specgen.pagetext import page_facts, squeeze
from specgen.project.files import compose, read_yaml
from specgen.project.schema import ANCHOR_PATTERN, CommentsFile, Model, RevisionCode

FORMAT = "specgen-review/1"
COMMENTS_FILE = "comments.yaml"
MAX_BYTES = 2 * 2**20            # a few hundred comments are far below this
MAX_COMMENTS = 500

Short = Annotated[str, Field(max_length=200)]


class ReviewComment(Model):
    """One comment as the site's comment panel exports it."""

    key: Annotated[str, Field(pattern=r"^[A-Za-z0-9_-]{8,64}$")] = Field(
        description="random identity given by the panel")
    page: Annotated[str, Field(pattern=r"^[A-Za-z0-9][A-Za-z0-9_-]{0,79}$")] = Field(
        description="page of the published site, without .html")
    anchor: Annotated[str, Field(pattern=ANCHOR_PATTERN)] | None = Field(
        None, description="id of the element the comment is about: a heading, a figure "
        "(fig-…) or a table row (row-…); none: the whole page")
    quote: Annotated[str, Field(max_length=2000)] = Field("", description="selected text")
    text: Annotated[str, Field(min_length=1, max_length=4000)] = Field(description="the comment")
    author: Annotated[str, Field(min_length=1, max_length=200)] = Field(description="name")
    organisation: Short = Field("", description="the author's organisation")
    role: Short = Field("", description="the author's role, e.g. heritage officer")
    category: Literal["question", "required change", "advisory"] = Field(
        description="question, required change or advisory")
    date: dt.date = Field(description="date written")


class ReviewFile(Model):
    """The whole exported file."""

    format: Literal["specgen-review/1"] = Field(description="always specgen-review/1")
    project: Short = Field(description="project code of the dossier commented on")
    revision: RevisionCode = Field(description="revision commented on")
    exported: Short = Field("", description="when the file was exported (ISO 8601)")
    comments: list[ReviewComment] = Field(max_length=MAX_COMMENTS, description="the comments")


def take_in(project, path: Path, out: Path) -> list[str]:
    """Append the file's new comments to the project's comments.yaml; their new ids."""
    rel = str(path)
    review, located = _read(path, rel)
    log = ProblemLog()
    code = project.dossier.project.code
    if review.project != code:
        log.add(rel, f"is about project '{quote(review.project)}', not '{code}'.",
                line=located.line_of(("project",)), field="project",
                fix="take the file into the project it was written on.")
    rev_dir = out / review.revision
    if not (rev_dir / "manifest.json").is_file():
        log.add(rel, f"was written on revision {review.revision}, which is not published in {out}.",
                line=located.line_of(("revision",)), field="revision",
                fix="build the project into that folder first, or name the output folder with --out.")
    elif json.loads((rev_dir / "manifest.json").read_text("utf-8")).get("project") != code:
        log.add(rel, f"{out / review.revision} holds another project's dossier.",
                line=located.line_of(("revision",)), field="revision", fix="pass the right --out.")
    log.raise_if_any()
    seen: dict[str, int] = {}
    for i, c in enumerate(review.comments):
        if c.key in seen:
            log.add(rel, f"comment key '{c.key}' appears twice (comments[{seen[c.key]}] and "
                    f"comments[{i}]).", line=located.line_of(("comments", i, "key")),
                    field=f"comments[{i}].key", fix="export the file again from the site.")
        seen[c.key] = i
        _check_place(c, i, rev_dir, rel, located, log)
    log.raise_if_any()
    known = {c.key for c in project.comments if c.key}
    fresh = [c for c in review.comments if c.key not in known]
    ids = _next_ids([c.id for c in project.comments], len(fresh))
    entries = [_entry(new_id, review.revision, c) for new_id, c in zip(ids, fresh)]
    if entries:
        _append(project.root / COMMENTS_FILE, entries, len(project.comments))
    return ids


def _read(path: Path, rel: str):
    log = ProblemLog()
    try:
        size = path.stat().st_size
    except OSError as exc:
        log.add(rel, f"cannot be read ({exc.strerror}).", fix="check the file name.")
        log.raise_if_any()
    if size > MAX_BYTES:
        log.add(rel, f"is {size / 2**20:.1f} MiB; a comment file is at most {MAX_BYTES // 2**20} MiB.",
                fix="export the comments again from the site.")
        log.raise_if_any()
    located = read_yaml(path, rel, log)
    log.raise_if_any()
    from specgen.project.layout import validate
    review = validate(located, ReviewFile, rel, log)
    log.raise_if_any()
    return review, located


def _check_place(c: ReviewComment, i: int, rev_dir: Path, rel: str, located, log) -> None:
    """The page, element and quoted text must exist in the revision commented on."""
    page = rev_dir / f"{c.page}.html"
    if not page.is_file():
        pages = sorted(p.stem for p in rev_dir.glob("*.html"))
        log.add(rel, f"names page '{c.page}', which revision {rev_dir.name} does not have.",
                line=located.line_of(("comments", i, "page")), field=f"comments[{i}].page",
                fix=did_you_mean(c.page, pages) or "export the file again from the site.")
        return
    ids, text = page_facts(page.read_text("utf-8"))
    if c.anchor and c.anchor not in ids:
        log.add(rel, f"is anchored to '{c.anchor}', which page '{c.page}' of revision "
                f"{rev_dir.name} does not have.", line=located.line_of(("comments", i, "anchor")),
                field=f"comments[{i}].anchor",
                fix=did_you_mean(c.anchor, ids) or "remove 'anchor' to comment on the whole page.")
    if c.quote and squeeze(c.quote) not in squeeze(text):
        log.add(rel, f"quotes text that page '{c.page}' of revision {rev_dir.name} does not "
                f"contain: '{quote(c.quote)}'.", line=located.line_of(("comments", i, "quote")),
                field=f"comments[{i}].quote",
                fix="quote the page's words exactly, or leave the quote empty.")


def _next_ids(existing: list[str], n: int) -> list[str]:
    numbers = [int(m.group(1)) for i in existing if (m := re.fullmatch(r"C(\d+)", i))]
    start = max(numbers, default=0) + 1
    taken = set(existing)
    ids, k = [], start
    while len(ids) < n:
        if f"C{k}" not in taken:
            ids.append(f"C{k}")
        k += 1
    return ids


def _entry(new_id: str, revision: str, c: ReviewComment) -> dict:
    entry = {"id": new_id, "raised_in": revision, "about": c.page,
             "reviewer_role": c.role or "reviewer", "author": c.author,
             "organisation": c.organisation, "category": c.category, "date": c.date,
             "anchor": c.anchor, "quote": c.quote, "text": c.text, "status": "open", "key": c.key}
    return {k: v for k, v in entry.items() if v not in (None, "")}


def _append(path: Path, entries: list[dict], had: int) -> None:
    """Add ``entries`` to the list under ``comments:`` and replace the file atomically."""
    text = path.read_text("utf-8") if path.is_file() else ""
    indent = _list_indent(text)
    if indent is None and had:
        raise InputErrors([_layout_problem()])
    if indent is None:   # no comment yet: a fresh list, keeping the file's leading notes
        head = "".join(line for line in text.splitlines(keepends=True) if line.startswith("#"))
        text, indent = (head or "# Review comments and responses.\n") + "comments:\n", 2
    block = yaml.safe_dump(entries, allow_unicode=True, sort_keys=False, width=96,
                           default_flow_style=False)
    block = "".join(" " * indent + line if line.strip() else line
                    for line in block.splitlines(keepends=True))
    new_text = text + ("" if text.endswith("\n") else "\n") + block
    _confirm(new_text, had + len(entries))
    fd, tmp = tempfile.mkstemp(prefix=".comments-", suffix=".yaml", dir=path.parent)
    try:
        with os.fdopen(fd, "w", encoding="utf-8") as f:
            f.write(new_text)
            f.flush()
            os.fsync(f.fileno())
        os.replace(tmp, path)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise


def _list_indent(text: str) -> int | None:
    """Column of the '-' of the comments list when it is the file's last key, in block
    style with at least one item; ``None`` otherwise."""
    try:
        root = compose(text) if text.strip() else None
    except yaml.YAMLError:
        return None
    if not isinstance(root, yaml.MappingNode) or not root.value:
        return None
    key, value = root.value[-1]
    if key.value != "comments" or not isinstance(value, yaml.SequenceNode) or value.flow_style:
        return None
    first = value.value[0] if value.value else None
    # a block mapping item starts at its first key, two columns after its '- '
    return first.start_mark.column - 2 if isinstance(first, yaml.MappingNode) else None


def _confirm(text: str, expected: int) -> None:
    """The new file must read back as a valid comments file with every comment in it."""
    with tempfile.TemporaryDirectory() as tmp:
        probe = Path(tmp) / COMMENTS_FILE
        probe.write_text(text, encoding="utf-8")
        log = ProblemLog()
        located = read_yaml(probe, COMMENTS_FILE, log)
        from specgen.project.layout import validate
        doc = validate(located, CommentsFile, COMMENTS_FILE, log) if located else None
    if doc is None or len(doc.comments) != expected:
        raise InputErrors([_layout_problem()])


def _layout_problem():
    from specgen.errors import Problem
    return Problem(COMMENTS_FILE, "specgen could not add the new comments without changing the "
                   "layout of this file (the list under 'comments:' must be the file's last key, "
                   "one comment per '- id:' item); nothing was changed.",
                   fix="move the 'comments:' list to the end of the file and import again.")
