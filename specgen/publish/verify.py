"""What ``specgen verify`` vouches for, each difference named.

- a revision folder against its manifest: every output file (modified, missing, extra),
  and the inputs the PDF carries as attachments (``input/<path>``) against the input
  hashes the manifest records;
- the inputs kept for a revision (``issued/<revision>/`` of the project folder, or the
  project folder itself for its current revision) against the same hashes — whoever
  wrote them into the manifest (the pipeline finds and hashes them; publishing reads no
  project);
- an output folder: every revision in it, ``versions.json`` against the revisions
  present (listed but absent, present but unlisted, the current one), and the root
  ``index.html`` pointing at a revision that exists.
"""
from __future__ import annotations

import hashlib
import json
import re
from pathlib import Path

from collections.abc import Callable

from specgen.errors import PublishError
from specgen.publish.output import APPENDIX_SUFFIX, MANIFEST, VERSIONS, verify as outputs_of

INPUT_PREFIX = "input/"


def manifest_of(folder: Path) -> dict:
    mf = folder / MANIFEST
    try:
        return json.loads(mf.read_text(encoding="utf-8"))
    except (OSError, ValueError) as exc:
        raise PublishError(f"{mf}: no readable manifest ({exc}). Fix: name a revision folder "
                           "written by specgen build, e.g. OUT/R1, or an output folder.") from exc


def compare(expected: dict[str, str], present: dict[str, str], kind: str) -> list[str]:
    """Differences between two {path: sha256} maps, each a line '<kind> modified: path'."""
    out = [f"{kind} modified: {p}" for p in sorted(expected) if p in present
           and present[p] != expected[p]]
    out += [f"{kind} missing: {p}" for p in sorted(expected) if p not in present]
    out += [f"{kind} extra: {p}" for p in sorted(present) if p not in expected]
    return out


def revision_differences(folder: Path) -> list[str]:
    """Every difference between a revision folder and its manifest (outputs and the inputs
    its PDF carries)."""
    report = outputs_of(folder)
    lines = [f"{kind}: {p}" for kind in ("modified", "missing", "extra") for p in report[kind]]
    manifest = manifest_of(folder)
    inputs = manifest.get("inputs")
    # the main volume carries the inputs; the appendix volume (…-appendices.pdf) is checked
    # with every other output against its hash in the manifest
    pdfs = sorted(p for p in manifest.get("outputs", {}) if p.endswith(".pdf") and "/" not in p
                  and not p.endswith(APPENDIX_SUFFIX))
    if inputs is not None and pdfs and (folder / pdfs[0]).is_file():
        lines += compare(inputs, _pdf_inputs(folder / pdfs[0]), "input in the PDF")
    return lines


def _pdf_inputs(pdf: Path) -> dict[str, str]:
    from pypdf import PdfReader
    try:
        attachments = PdfReader(str(pdf)).attachments
    except Exception as exc:  # noqa: BLE001 - a damaged PDF is a difference, not a crash
        return {f"(the PDF cannot be read: {type(exc).__name__})": ""}
    return {name[len(INPUT_PREFIX):]: hashlib.sha256(data[0]).hexdigest()
            for name, data in attachments.items() if name.startswith(INPUT_PREFIX) and data}


def input_differences(folder: Path, files: dict[str, str]) -> list[str]:
    """The inputs kept for the revision in ``folder`` ({path: sha256}) against its manifest."""
    inputs = manifest_of(folder).get("inputs")
    if inputs is None:
        return [f"{folder.name}: the manifest records no inputs"]
    return compare(inputs, files, f"{folder.name} input")


def revisions_in(out: Path) -> list[Path]:
    return sorted(d for d in out.iterdir() if d.is_dir() and not d.name.startswith(".")
                  and (d / MANIFEST).is_file())


def folder_differences(out: Path) -> list[str]:
    """versions.json and the root index against the revisions present."""
    present = {d.name for d in revisions_in(out)}
    lines = []
    try:
        listed = json.loads((out / VERSIONS).read_text(encoding="utf-8"))
        names = [v["version"] for v in listed]
    except (OSError, ValueError, KeyError, TypeError) as exc:
        return [f"{VERSIONS}: cannot be read ({type(exc).__name__})"]
    lines += [f"{VERSIONS} lists {v}, which is not in the folder" for v in names
              if v not in present]
    lines += [f"{VERSIONS} does not list {v}" for v in sorted(present - set(names))]
    current = [v["version"] for v in listed if "current" in v.get("aliases", [])]
    opens = _opens(out, present)
    if current != [opens] and opens is not None:
        lines.append(f"{VERSIONS} marks {', '.join(current) or 'no revision'} as current; "
                     f"the latest issued revision present (else the newest) is {opens}")
    target = _index_target(out)
    if target is None or not (out / target / "index.html").is_file():
        lines.append(f"index.html points at {target or 'nothing'}, which is not a revision "
                     "in the folder")
    return lines


def _opens(out: Path, present: set[str]) -> str | None:
    """The revision the root should open: the latest issued, else the newest."""
    dated = [(m.get("status") == "issued", m.get("date", ""), name)
             for name in present for m in [manifest_of(out / name)]]
    issued = [d for d in dated if d[0]]
    pool = issued or dated
    return max(pool, key=lambda d: (d[1], d[2]))[2] if pool else None


def _index_target(out: Path) -> str | None:
    try:
        text = (out / "index.html").read_text(encoding="utf-8")
    except OSError:
        return None
    m = re.search(r'url=([^"/]+)/index\.html', text)
    return m.group(1) if m else None


# ---------------------------------------------------------------- `specgen verify`
# a revision code -> where the project keeps that revision's inputs (as a reader names it)
# and their {path: sha256}, or None for the hashes when it keeps none
KeptInputs = Callable[[str], tuple[str, "dict[str, str] | None"]]


def verify_output(path: Path | str, kept_inputs: KeptInputs | None = None,
                  trust: list[Path] = ()) -> dict:
    """Built output against what it vouches for: ``{"differences": [...], "signatures":
    [...]}``; no differences and every signature intact when all match.

    ``path`` is a revision folder or an output folder (then every revision in it, and
    versions.json and the root index against the revisions present).  With
    ``project_dir``, the inputs kept for each revision (``issued/<revision>/``, or the
    project folder for its current revision) are checked against the manifest too: with
    ``kept_inputs``, which finds them for a revision code.
    Signed revisions' signatures are checked against the ``trust`` roots.
    """
    from specgen.publish.signing import verify_signatures
    path = Path(path)
    if (path / "manifest.json").is_file():
        folders, lines = [path], []
    else:
        folders = revisions_in(path) if path.is_dir() else []
        if not folders:
            raise PublishError(f"{path}: neither a revision folder nor an output folder written "
                               "by specgen build. Fix: name OUT or OUT/<revision>.")
        lines = folder_differences(path)
    signatures = []
    for folder in folders:
        lines += [f"{folder.name}: {d}" for d in revision_differences(folder)]
        if kept_inputs is not None:
            lines += _kept_inputs(kept_inputs, folder)
        signatures += verify_signatures(folder, list(trust))
    return {"differences": lines, "signatures": signatures}


def _kept_inputs(kept_inputs: KeptInputs, folder: Path) -> list[str]:
    code = folder.name
    where, hashes = kept_inputs(code)
    if hashes is None:
        if manifest_of(folder).get("status") == "issued":
            return [f"{code}: the project keeps no inputs of this issued revision ({where})"]
        return []
    return input_differences(folder, hashes)
