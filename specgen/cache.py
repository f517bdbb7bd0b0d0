"""Content-hash cache of rendered artefacts (math SVG, figures, printed PDF parts), so a
re-issue after one new lab result redraws only what changed.

The key of an entry is the SHA-256 of the code version (every source file of the
``specgen`` package and the versions of matplotlib and ziamath), the artefact kind and
its inputs; any change to any of them misses.  Rendering is deterministic, so a hit
returns exactly the bytes a fresh render would give.  Each entry carries the SHA-256 of
its data and is checked on every use: an entry edited after it was written is discarded
and drawn again, never published.  The cache lives in
``OUT/.cache/`` (one per output folder, set by :func:`using`); without it nothing is
cached.  Entries are written to a temporary file and renamed, so a killed build never
leaves a half-written entry.

A *shared* cache (``specgen build --shared-cache DIR``, or ``SPECGEN_SHARED_CACHE``) is a
second level behind the output folder's: a miss there is looked up in the shared folder
(and copied into the output folder's cache when found), and every new entry is kept in
both.  One shared folder serves every output folder and checkout of a machine (a review
copy, a letter-paper copy, a CI cache); it is never pruned by a build (delete it at will),
and its entries are checked on use like the others.

Inside :func:`drawing_later` (the live preview's first pages) a figure or formula that misses
the cache is not drawn: :func:`drawn_or_later` returns a :class:`Later` that draws it on
demand, in the cache folders in use where it was asked for.  The render stage shows a
placeholder for it and the preview draws it in the background.
"""
from __future__ import annotations

import contextlib
import contextvars
import functools
import hashlib
import json
import os
import threading
from pathlib import Path

_DIR: contextvars.ContextVar[Path | None] = contextvars.ContextVar("specgen_cache", default=None)
_USED: contextvars.ContextVar[set | None] = contextvars.ContextVar("specgen_cache_used", default=None)
_SHARED: contextvars.ContextVar[Path | None] = contextvars.ContextVar("specgen_cache_shared",
                                                                     default=None)
_LATER: contextvars.ContextVar[bool] = contextvars.ContextVar("specgen_cache_later",
                                                              default=False)
CACHE_DIR = ".cache"
SHARED_ENV = "SPECGEN_SHARED_CACHE"


def shared_folder(asked: Path | str | None = None) -> Path | None:
    """The shared cache folder: ``asked``, else ``$SPECGEN_SHARED_CACHE``, else none."""
    chosen = asked or os.environ.get(SHARED_ENV)
    return Path(chosen) if chosen else None


@functools.lru_cache(maxsize=1)
def code_version() -> str:
    """Hash of the package's source files and of the drawing libraries' versions."""
    h = hashlib.sha256()
    root = Path(__file__).resolve().parent  # the specgen package
    for path in sorted(root.rglob("*.py")):
        h.update(str(path.relative_to(root)).encode())
        h.update(path.read_bytes())
    for name in ("matplotlib", "ziamath"):
        try:
            from importlib.metadata import version
            h.update(f"{name}={version(name)}".encode())
        except Exception:  # noqa: BLE001 - an unknown version still keys consistently
            h.update(f"{name}=?".encode())
    return h.hexdigest()


@contextlib.contextmanager
def using(folder: Path | str | None, shared: Path | str | None = None):
    """Cache artefacts under ``folder`` for the duration of the block (None: no cache), with
    ``shared`` as the second level behind it (None: none).

    Yields the set of entry paths of ``folder`` read or written in the block (for
    :func:`prune`).
    """
    used: set[Path] = set()
    token = _DIR.set(Path(folder) if folder is not None else None)
    token_used = _USED.set(used)
    token_shared = _SHARED.set(Path(shared) if shared is not None and folder is not None
                               else None)
    try:
        yield used
    finally:
        _DIR.reset(token)
        _USED.reset(token_used)
        _SHARED.reset(token_shared)


def folders() -> tuple[Path | None, Path | None]:
    """(the cache folder in use, its shared second level): None where there is none."""
    return _DIR.get(), _SHARED.get()


def prune(folder: Path | str, used: set[Path]) -> int:
    """Delete every entry of ``folder`` not in ``used`` (and stray temporary files), so the
    cache holds what the last complete build needed and no more.  Returns the count."""
    gone = 0
    for path in sorted(Path(folder).rglob("*")):
        if path.is_file() and path not in used:
            try:
                path.unlink()
                gone += 1
            except OSError:
                pass
    return gone


def _plain(value):
    """JSON form of figure inputs: numpy arrays and tuples as lists, the rest by repr."""
    if hasattr(value, "tolist"):
        return value.tolist()
    if isinstance(value, (set, frozenset)):
        return sorted(value, key=repr)
    return repr(value)


def key_of(kind: str, inputs) -> str:
    text = json.dumps([code_version(), kind, inputs], sort_keys=True, default=_plain)
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


def _entry(kind: str, inputs) -> Path | None:
    folder = _DIR.get()
    if folder is None:
        return None
    path = folder / _relative(kind, inputs)
    used = _USED.get()
    if used is not None:
        used.add(path)
    return path


def _relative(kind: str, inputs) -> Path:
    key = key_of(kind, inputs)
    return Path(kind) / key[:2] / key


HEADER = b"specgen-cache/1 sha256="  # each entry: this, the hex digest of the data, "\n", data


def lookup(kind: str, inputs) -> bytes | None:
    """The cached bytes for ``inputs``, or None (a miss, or no cache in use).

    An entry is checked on use: its data must hash to the digest stored with it.  An entry
    that does not (edited, truncated, poisoned) is deleted and counts as a miss, so the
    artefact is drawn again rather than published.
    """
    path = _entry(kind, inputs)
    if path is None:
        return None
    data = _read_checked(path)
    shared = _SHARED.get()
    if data is None and shared is not None:
        data = _read_checked(shared / path.relative_to(_DIR.get()))
        if data is not None:
            _write(path, data)  # the output folder's cache holds what its build used
    return data


def _read_checked(path: Path) -> bytes | None:
    """The data of the entry at ``path`` if it matches its digest; a bad entry is deleted."""
    try:
        raw = path.read_bytes()
    except OSError:
        return None
    head, sep, data = raw.partition(b"\n")
    if sep and head.startswith(HEADER) and \
            head[len(HEADER):] == hashlib.sha256(data).hexdigest().encode("ascii"):
        return data
    try:
        path.unlink()
    except OSError:
        pass
    return None


def store(kind: str, inputs, data: bytes) -> None:
    """Keep ``data`` for ``inputs`` with its digest (written to a temporary file and renamed)."""
    path = _entry(kind, inputs)
    if path is None:
        return
    _write(path, data)
    shared = _SHARED.get()
    if shared is not None:
        _write(shared / path.relative_to(_DIR.get()), data)


def _write(path: Path, data: bytes) -> None:
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
        tmp = path.with_name(f".{path.name}.{os.getpid()}.{threading.get_ident()}.tmp")
        tmp.write_bytes(HEADER + hashlib.sha256(data).hexdigest().encode("ascii") + b"\n" + data)
        os.replace(tmp, path)
    except OSError:
        pass  # a cache that cannot be written only costs time


def cached(kind: str, inputs, produce) -> bytes:
    """The bytes ``produce()`` gives for ``inputs``, from the cache when present."""
    found = lookup(kind, inputs)
    if found is not None:
        return found
    data = produce()
    store(kind, inputs, data)
    return data


@contextlib.contextmanager
def drawing_later():
    """Within the block, figure functions draw nothing the cache does not hold: they return a
    :class:`Later` instead (the live preview shows its pages before the figures are drawn)."""
    token = _LATER.set(True)
    try:
        yield
    finally:
        _LATER.reset(token)


class Later:
    """A figure or formula not yet drawn: :meth:`draw` draws it (and keeps it in the cache folders that
    were in use when it was asked for, whatever thread draws it)."""

    def __init__(self, kind: str, inputs, produce):
        self.kind, self.inputs, self._produce = kind, inputs, produce
        self._context = contextvars.copy_context()   # the cache folders in use now

    def draw(self) -> bytes:
        """The artefact's bytes, drawn now (or found in the cache, if drawn since)."""
        # a copy per call: one context cannot be entered by two threads at once
        return self._context.copy().run(cached, self.kind, self.inputs, self._produce)


def drawn_or_later(kind: str, inputs, produce) -> bytes | Later:
    """:func:`cached`, except within :func:`drawing_later`: there an artefact the cache does
    not hold is a :class:`Later`, not drawn now."""
    if not _LATER.get():
        return cached(kind, inputs, produce)
    found = lookup(kind, inputs)
    return found if found is not None else Later(kind, inputs, produce)


def drawing_is_later() -> bool:
    """Whether this is inside :func:`drawing_later`."""
    return _LATER.get()


def figure(fn):
    """Decorator for figure functions returning SVG bytes: cached by their arguments; within
    :func:`drawing_later`, a :class:`Later` instead of a figure the cache does not hold."""
    @functools.wraps(fn)
    def wrapper(*args, **kwargs):
        return drawn_or_later(f"figure-{fn.__module__}.{fn.__qualname__}", [args, kwargs],
                              lambda: fn(*args, **kwargs))
    return wrapper
