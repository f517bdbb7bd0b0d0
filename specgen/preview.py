"""``specgen serve``: rebuild on change and serve the current revision on 127.0.0.1."""
from __future__ import annotations

import functools
import http.server
import tempfile
import threading
import time
from pathlib import Path

from specgen.errors import SpecgenError


def _snapshot(root: Path) -> dict:
    return {p: p.stat().st_mtime_ns for p in root.rglob("*") if p.is_file()}


def serve(directory: Path, port: int) -> None:
    """Build into a temporary folder, serve it, rebuild when a project file changes."""
    from specgen.build import build
    out = Path(tempfile.mkdtemp(prefix="specgen-preview-"))
    target = build(directory, out)
    handler = functools.partial(http.server.SimpleHTTPRequestHandler, directory=str(out))
    server = http.server.ThreadingHTTPServer(("127.0.0.1", port), handler)
    threading.Thread(target=server.serve_forever, daemon=True).start()
    print(f"Serving http://127.0.0.1:{port}/{target.name}/index.html — Ctrl+C to stop")
    seen = _snapshot(Path(directory))
    try:
        while True:
            time.sleep(1.0)
            now = _snapshot(Path(directory))
            if now != seen:
                seen = now
                try:
                    build(directory, out)
                    print("rebuilt")
                except SpecgenError as exc:
                    print(f"not rebuilt:\n{exc}")
    except KeyboardInterrupt:
        server.shutdown()
