"""A persistent store of the strength fits between runs of ``specgen check`` (content-keyed).

Re-checking a project after one new lab result refits the series that changed and reads the
others from here.  What is kept: the model comparison (``strength_models.fit_all``) and the
strength inference (``strength_inference.fit``, with the bands the checks read from it) of a
series, each under the SHA-256 of

* the code version (every source file of the ``specgen`` package, ``cache.code_version``) and
  the versions of Python, numpy and scipy, which compute the fits;
* the fit's kind and its exact inputs (ages and values as ``repr`` of each float, which gives
  the float back exactly; the prior by its ``repr``), as ``checks/fits.py`` keys them.

Each binder family's prior is kept here too (``strength_prior_common._prior``, keyed by the
family and its table row's ``repr``): its one-year gain term is matched by least squares, so
a check with every fit and prior kept neither matches it again nor imports
``scipy.optimize``.

So any change to an input, to the code or to those libraries misses, and a hit is the object
a fresh fit gives (the fits are deterministic: fixed random states), bands included.  Entries
are written at the end of a complete run (a temporary file, then a rename; each with the
SHA-256 of its data, checked on every read — ``cache.py``'s entry format); an entry that
cannot be read, fails its digest or does not unpickle is a miss (a damaged cache only costs
time).  Entries live under ``$XDG_CACHE_HOME/specgen/fits/<code version>/``; a run under a
new code version deletes the other versions' folders.  Delete the folder at will.

The entries are pickles: the folder is the user's own cache, written by this program only.
"""
from __future__ import annotations

import functools
import hashlib
import os
import pickle
import platform
import shutil
from pathlib import Path

from specgen import cache

KINDS = ("models", "inference", "prior")   # what is kept here (``checks/fits.py`` key kinds)


def default_folder() -> Path:
    """``$XDG_CACHE_HOME/specgen/fits`` (``~/.cache/specgen/fits`` without it)."""
    base = Path(os.environ.get("XDG_CACHE_HOME") or Path.home() / ".cache")
    return base / "specgen" / "fits"


@functools.lru_cache(maxsize=1)
def version() -> str:
    """What the fits' numbers depend on besides their inputs: our code and the libraries
    that compute them."""
    import numpy
    import scipy
    text = "|".join([cache.code_version(), platform.python_version(), numpy.__version__,
                     scipy.__version__])
    return hashlib.sha256(text.encode("utf-8")).hexdigest()[:32]


def store_for(asked: Path | str | bool | None) -> FitStore | None:
    """The store ``asked`` names: a folder, True for :func:`default_folder`, None or False
    for none."""
    if not asked:
        return None
    return FitStore(default_folder() if asked is True else asked)


class FitStore:
    """Fits kept under ``folder`` between runs (``get``/``put`` by a ``checks/fits.py`` key)."""

    def __init__(self, folder: Path | str):
        self.root = Path(folder)
        self.folder = self.root / version()
        self.read = self.written = 0

    def _path(self, key: tuple) -> Path:
        digest = hashlib.sha256(repr(key).encode("utf-8")).hexdigest()
        return self.folder / digest[:2] / digest

    def get(self, key: tuple):
        """The object kept for ``key``, or None (a miss, or an entry that cannot be used)."""
        if key[0] not in KINDS:
            return None
        data = cache._read_checked(self._path(key))
        if data is None:
            return None
        try:
            found = pickle.loads(data)
        except Exception:  # noqa: BLE001 - an entry from elsewhere or damaged: a miss
            return None
        self.read += 1
        return found

    def put(self, key: tuple, obj) -> None:
        """Keep ``obj`` for ``key`` (nothing when it cannot be pickled or written)."""
        if key[0] not in KINDS:
            return
        if not self.written:
            self._forget_other_versions()
        try:
            data = pickle.dumps(obj, protocol=pickle.HIGHEST_PROTOCOL)
        except Exception:  # noqa: BLE001 - not picklable: not kept, made again next time
            return
        cache._write(self._path(key), data)
        self.written += 1

    def _forget_other_versions(self) -> None:
        """Entries of another code or library version can never be read again: delete them."""
        try:
            others = [p for p in self.root.iterdir() if p.is_dir() and p != self.folder]
        except OSError:
            return
        for p in others:
            shutil.rmtree(p, ignore_errors=True)
