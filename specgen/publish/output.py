"""Writing a revision: atomic, append-only, with a manifest and the versions list.

A revision is assembled in a staging folder inside the output folder, then
renamed into place, so a reader (or a killed build) never sees half a revision.
An issued revision is never overwritten by different inputs.
"""
from __future__ import annotations

import hashlib
import json
import os
import shutil
import tempfile
from pathlib import Path

from specgen.errors import PublishError, RevisionRefused

MANIFEST = "manifest.json"
APPENDIX_SUFFIX = "-appendices.pdf"  # the PDF's appendix volume: <code>-<revision>-appendices.pdf
VERSIONS = "versions.json"


def sha256_file(path: Path) -> str:
    h = hashlib.sha256()
    with open(path, "rb") as f:
        for chunk in iter(lambda: f.read(1 << 16), b""):
            h.update(chunk)
    return h.hexdigest()


def _alive(pid: int) -> bool:
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except PermissionError:
        return True
    return True


def recover(out: Path) -> None:
    """Tidy what a killed build left: restore a revision caught between its two renames,
    remove abandoned staging folders.  Folders of a build still running are left alone."""
    if not out.is_dir():
        return
    for d in sorted(out.glob(".old-*")) + sorted(out.glob(".staging-*")):
        parts = d.name.split("-")  # .old-<pid>-<revision> / .staging-<pid>-<revision>-<random>
        pid = int(parts[1]) if len(parts) > 2 and parts[1].isdigit() else None
        if pid is not None and _alive(pid):
            continue  # a build still running (this process included) owns it
        if d.is_file():  # a PDF rendered beside its staging folder
            d.unlink(missing_ok=True)
            continue
        if d.name.startswith(".old-"):
            target = out / "-".join(parts[2:])
            if not target.exists():
                os.replace(d, target)  # the new copy never arrived: the old one is current
                continue
        shutil.rmtree(d, ignore_errors=True)


def staging_dir(out: Path, revision: str) -> Path:
    """A fresh staging folder next to where the revision will live (same filesystem)."""
    try:
        out.mkdir(parents=True, exist_ok=True)
        recover(out)
        return Path(tempfile.mkdtemp(prefix=f".staging-{os.getpid()}-{revision}-", dir=out))
    except OSError as exc:
        raise PublishError(f"{out}: cannot write the output folder ({exc.strerror}). "
                           "Fix: choose a writable folder with --out, or free disk space.") from exc


def write_manifest(folder: Path, inputs, meta: dict) -> dict:
    """SHA-256 of every output file and every input file, written as manifest.json."""
    outputs = {p.relative_to(folder).as_posix(): sha256_file(p)
               for p in sorted(folder.rglob("*")) if p.is_file()}
    manifest = dict(meta, outputs=outputs,
                    inputs={f.path: f.sha256 for f in inputs})
    (folder / MANIFEST).write_text(json.dumps(manifest, indent=2, sort_keys=True) + "\n",
                                   encoding="utf-8")
    return manifest


def issued_manifest(folder: Path) -> dict | None:
    """The manifest of the revision in ``folder`` if it was built as issued, else None."""
    try:
        m = json.loads((folder / MANIFEST).read_text(encoding="utf-8"))
    except (OSError, ValueError):
        return None
    return m if isinstance(m, dict) and m.get("status") == "issued" else None


def refuse_if_issued(target: Path, inputs, rebuilt: str | None = None) -> list[dict]:
    """An issued revision may only be rebuilt from identical inputs, or when told why
    (``rebuilt``); returns the record of rebuilds to carry into the new manifest."""
    old = issued_manifest(target)
    if old is None:
        return []
    now = {f.path: f.sha256 for f in inputs}
    then = old.get("inputs", {})
    record = list(old.get("rebuilds", []))
    if then == now:
        return record
    if rebuilt:
        changed = sorted(k for k in set(then) | set(now) if then.get(k) != now.get(k))
        return record + [{"reason": rebuilt, "changed": changed}]
    raise RevisionRefused(
        f"revision {target.name} was issued and its inputs have changed since. "
        "Fix: raise a new revision (revision.code in dossier.yaml) and describe what changed.")


def move_into_place(staging: Path, target: Path) -> None:
    """Put ``staging`` where ``target`` is, so that ``target`` never stops existing.

    A new revision is one rename.  A revision rebuilt over an existing folder is swapped in
    with one atomic exchange of the two folders (Linux ``renameat2(RENAME_EXCHANGE)``), after
    which the old copy sits under the staging name and is removed; a build killed at any
    moment leaves either the old or the new revision complete at ``target``.  Where the
    filesystem cannot exchange, two renames are used and :func:`recover` puts the old copy
    back if a build dies between them.
    """
    from specgen.killpoints import reached
    reached("move")
    if not target.exists():
        os.replace(staging, target)
        return
    if _exchange(staging, target):  # target: the new revision; staging: the old one
        reached("moved")
        shutil.rmtree(staging, ignore_errors=True)
        return
    old = target.with_name(f".old-{os.getpid()}-{target.name}")
    os.replace(target, old)
    reached("between-renames")
    os.replace(staging, target)
    shutil.rmtree(old, ignore_errors=True)


RENAME_EXCHANGE = 2
AT_FDCWD = -100


def _exchange(a: Path, b: Path) -> bool:
    """Swap two paths atomically; False where the system or filesystem cannot."""
    import ctypes
    import errno
    if os.environ.get("SPECGEN_NO_EXCHANGE"):  # the two-rename path, for its own test
        return False
    try:
        libc = ctypes.CDLL(None, use_errno=True)
        fn = libc.renameat2
    except (OSError, AttributeError):
        return False
    fn.argtypes = [ctypes.c_int, ctypes.c_char_p, ctypes.c_int, ctypes.c_char_p, ctypes.c_uint]
    fn.restype = ctypes.c_int
    if fn(AT_FDCWD, os.fsencode(a), AT_FDCWD, os.fsencode(b), RENAME_EXCHANGE) == 0:
        return True
    err = ctypes.get_errno()
    if err in (errno.EINVAL, errno.ENOSYS, errno.EOPNOTSUPP, errno.EXDEV):
        return False
    raise OSError(err, os.strerror(err), str(b))


def preflight(out: Path, *, floor: int = 50 * 2**20) -> None:
    """Before anything is rendered: the output folder can be written and its disk has room
    for a revision (the largest one already there, half again, or ``floor`` bytes)."""
    try:
        out.mkdir(parents=True, exist_ok=True)
        probe = Path(tempfile.mkdtemp(prefix=f".probe-{os.getpid()}-", dir=out))
        try:
            (probe / "probe").write_bytes(b"specgen can write here\n")
        finally:
            shutil.rmtree(probe, ignore_errors=True)
        stat = os.statvfs(out)
    except OSError as exc:
        raise PublishError(f"{out}: cannot write the output folder ({exc.strerror}). "
                           "Fix: choose a writable folder with --out, or free disk space.") from exc
    need = max(floor, int(1.5 * max((_size(d) for d in out.iterdir()
                                     if d.is_dir() and (d / MANIFEST).is_file()), default=0)))
    free = stat.f_bavail * stat.f_frsize
    if free < need:
        raise PublishError(f"{out}: the disk has {free / 2**20:.0f} MiB free; a revision needs "
                           f"about {need / 2**20:.0f} MiB. Nothing was written. Fix: free disk "
                           "space or choose another folder with --out.")


def _size(folder: Path) -> int:
    return sum(p.stat().st_size for p in folder.rglob("*") if p.is_file())


def write_atomic(path: Path, text: str) -> None:
    """Write a small file by writing a sibling and renaming it over the old one."""
    tmp = path.with_name(f".{path.name}.tmp-{os.getpid()}")
    tmp.write_text(text, encoding="utf-8")
    os.replace(tmp, path)


def update_versions(out: Path) -> list[dict]:
    """versions.json (read by the site's revision selector), the root page, the revision list
    and ``revisions.js`` (the marks every revision's pages show: superseded, draft beside).

    The root opens the latest issued revision (a draft only while nothing is issued)."""
    from specgen.killpoints import reached
    revs = []
    for mf in sorted(out.glob(f"*/{MANIFEST}")):
        if mf.parent.name.startswith("."):
            continue
        m = json.loads(mf.read_text(encoding="utf-8"))
        revs.append({"version": mf.parent.name, "title": f"{mf.parent.name} ({m.get('status')}, "
                     f"{m.get('date')})", "aliases": [], "date": m.get("date", ""),
                     "status": m.get("status", ""), "purpose": m.get("purpose", "")})
    revs.sort(key=lambda r: (r["date"], r["version"]), reverse=True)
    if not revs:
        return revs
    issued = [r for r in revs if r["status"] == "issued"]
    opens = issued[0] if issued else revs[0]
    opens["aliases"] = ["current"]
    for r in revs:
        r["superseded_by"] = _superseded_by(r, issued)
        if r["status"] != "issued" and r is not opens:
            r["aliases"] = ["draft"] if r is revs[0] else []
    write_atomic(out / VERSIONS, json.dumps(revs, indent=2) + "\n")
    reached("index")
    draft = revs[0] if revs[0]["status"] != "issued" and revs[0] is not opens else None
    write_atomic(out / "index.html", REDIRECT.format(rev=opens["version"], draft=(
        f' A draft, <a href="{draft["version"]}/index.html">{draft["version"]}</a>, is in '
        "preparation beside it (not for construction)." if draft else "")))
    write_atomic(out / "revisions.html", _revisions_page(revs))
    write_atomic(out / "revisions.js", "window.specgenRevisions = "
                 + json.dumps([{k: r[k] for k in ("version", "status", "date", "superseded_by",
                                                  "aliases")} for r in revs]) + ";\n")
    return revs


def _superseded_by(rev: dict, issued: list[dict]) -> str | None:
    """The issued revision that followed ``rev`` (issued ones newest first), if any."""
    later = [r for r in issued if (r["date"], r["version"]) > (rev["date"], rev["version"])]
    return later[-1]["version"] if later else None


def _revisions_page(revs: list[dict]) -> str:
    """A static list of every revision: works from a folder, without a web server."""
    from html import escape

    def mark(r):
        if "current" in r["aliases"]:
            return " — latest issued" if r["status"] == "issued" else " — current"
        if r["status"] != "issued":
            return " — draft, not for construction"
        return f" — superseded by {r['superseded_by']}" if r["superseded_by"] else ""
    rows = "\n".join(
        f'<li><a href="{escape(r["version"])}/index.html">{escape(r["title"])}</a>'
        + escape(mark(r)) + "</li>" for r in revs)
    return ("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
            "<title>Revisions</title><style>body{font-family:sans-serif;margin:2em auto;"
            "max-width:40em;color:#2a332b}a{color:#1f3a5f}</style></head><body>"
            f"<h1>Revisions of the dossier</h1><ul>\n{rows}\n</ul></body></html>\n")


REDIRECT = """<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8"><title>Latest issued revision</title>
<meta http-equiv="refresh" content="0; url={rev}/index.html"></head>
<body><p>The latest issued revision is <a href="{rev}/index.html">{rev}</a>.{draft}
<a href="revisions.html">All revisions</a>.</p></body></html>
"""


def verify(folder: Path) -> dict[str, list[str]]:
    """Compare a revision folder with its manifest: modified, missing and extra files."""
    mf = folder / MANIFEST
    try:
        manifest = json.loads(mf.read_text(encoding="utf-8"))
        expected = manifest["outputs"]
    except (OSError, ValueError, KeyError) as exc:
        raise PublishError(f"{mf}: no readable manifest ({exc}). Fix: name a revision folder "
                           "written by specgen build, e.g. OUT/R1.") from exc
    # the manifest's own detached signature (specgen sign) is checked with the signatures
    present = {p.relative_to(folder).as_posix() for p in folder.rglob("*")
               if p.is_file() and p.relative_to(folder).as_posix() not in (MANIFEST,
                                                                           MANIFEST + ".p7s")}
    return {
        "modified": sorted(p for p in expected if p in present
                           and sha256_file(folder / p) != expected[p]),
        "missing": sorted(p for p in expected if p not in present),
        "extra": sorted(p for p in present if p not in expected),
    }
