"""``specgen new``: a commented starter project copied from ``content/starter``."""
from __future__ import annotations

import shutil
from pathlib import Path

from specgen.errors import UsageError
from specgen.refdata import CONTENT_DIR

STARTER = CONTENT_DIR / "starter"


def write_starter(directory: Path) -> list[Path]:
    """Copy the starter files into ``directory``; refuse to write into a non-empty folder."""
    directory = Path(directory)
    if directory.exists() and any(directory.iterdir()):
        raise UsageError(f"{directory}: the folder is not empty. "
                         "Fix: name a new folder, so no existing file is overwritten.")
    written = []
    for src in sorted(STARTER.rglob("*")):
        if src.is_file():
            dst = directory / src.relative_to(STARTER)
            dst.parent.mkdir(parents=True, exist_ok=True)
            shutil.copyfile(src, dst)
            written.append(dst)
    return written
