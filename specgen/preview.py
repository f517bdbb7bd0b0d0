"""``specgen serve``: a live preview that answers at once.

- The server starts before anything is built: until the first site is ready every page says
  so and reloads itself.  The site comes first (load, check, render, site), each figure the
  artefact cache does not hold shown as a placeholder (its alternative text kept); then, in
  the background, the figures are drawn — those of the page last asked for first, the summary's
  before any — each put in its place as it lands, and after them the PDF is printed (never
  from a placeholder).  The preview bar on every page says which of its figures are still
  being drawn (a small script swaps each in when it lands) and shows the PDF as building
  until it is there.
- The project folder is watched with watchdog (native file events, no polling).  A change
  rebuilds only what it touches: narrative or templates re-render with the check results
  kept; figures, math and PDF parts come from the artefact cache (kept between sessions).
- ``/strength.html`` (any page without its revision folder) answers with that page of the
  current revision.
- A page that could not be rebuilt (input error, an issued revision edited) still shows the
  last good build, under a notice that carries the error text; a figure that could not be
  drawn is named, with the error, in the same notice on the pages that show it.
"""
from __future__ import annotations

import hashlib
import http.server
import os
import re
import shutil
import tempfile
import threading
import time
from pathlib import Path
from urllib.parse import unquote, urlsplit

from specgen.errors import InputErrors, SpecgenError, UsageError
from specgen.preview_background import Afterwards
from specgen.preview_bar import State, own_answer, with_bar

IGNORED = re.compile(r"(^|/)(\.[^/]*|[^/]*~|#[^/]*#|[^/]*\.sw[px]|__pycache__)(/|$)")
DEBOUNCE_S = 0.4


def cache_dir(project: Path) -> Path:
    """Artefact cache kept between preview sessions of one project folder."""
    base = Path(os.environ.get("XDG_CACHE_HOME") or Path.home() / ".cache")
    key = hashlib.sha256(str(project.resolve()).encode()).hexdigest()[:16]
    return base / "specgen" / f"preview-{key}"


def handler_for(out: Path, state: State):
    """A request handler serving ``out``; bare page names go to the current revision."""

    class Handler(http.server.SimpleHTTPRequestHandler):
        def __init__(self, *args, **kwargs):
            super().__init__(*args, directory=str(out), **kwargs)

        def log_message(self, fmt, *args):  # quiet: the terminal shows the builds
            pass

        def handle(self):
            try:
                super().handle()
            except (BrokenPipeError, ConnectionResetError):
                pass   # the browser left (a reload, a closed tab) before the answer was sent

        def do_GET(self):
            url = urlsplit(self.path)
            path = unquote(url.path)
            own = own_answer(state, path, url.query)   # before the first site; the script's
            if own is not None:
                return self._send(*own)
            file = self._resolve(path)
            if file is None:
                return super().do_GET()
            if file.suffix == ".pdf" and state.pdf != "ready":
                return self._send(b"The PDF is still being printed; try again in a moment.",
                                  "text/plain; charset=utf-8", status=503)
            if file.suffix == ".html":
                text = with_bar(state, _page_of(out / state.revision, file),
                                file.read_text(encoding="utf-8"))
                return self._send(text.encode("utf-8"), "text/html; charset=utf-8")
            # served from the resolved file: a bare address's assets live in the revision
            return self._send(*_asset(file, self.guess_type))

        def _resolve(self, path: str) -> Path | None:
            rel = path.lstrip("/")
            direct = (out / rel).resolve()
            if not direct.is_relative_to(out.resolve()):
                return None
            if rel in ("", "index.html"):
                return out / state.revision / "index.html"
            if direct.is_file():
                return direct
            if direct.is_dir() and (direct / "index.html").is_file():
                return direct / "index.html"
            current = (out / state.revision / rel).resolve()
            if current.is_relative_to(out.resolve()) and current.is_file():
                return current
            return None

        def _send(self, body: bytes, kind: str, status: int = 200):
            self.send_response(status)
            self.send_header("Content-Type", kind)
            self.send_header("Content-Length", str(len(body)))
            self.send_header("Cache-Control", "no-store")
            self.end_headers()
            self.wfile.write(body)

    return Handler


def _asset(file: Path, guess_type) -> tuple[bytes, str]:
    """A file's bytes and type; a photograph not made yet is its placeholder, an SVG under
    the image's name, and is sent as SVG (the browser shows its box, not a broken image)."""
    data = file.read_bytes()
    return data, "image/svg+xml" if data.startswith(b"<svg") else guess_type(str(file))


def _page_of(current: Path, file: Path) -> str:
    """The page's address in the current revision's folder ("" for a page of another)."""
    current, here = current.resolve(), file.resolve()
    return here.relative_to(current).as_posix() if here.is_relative_to(current) else ""


def _address(page: str) -> str:
    """A page's address in the site (``strength.md`` → ``strength.html``)."""
    return page.rsplit(".", 1)[0] + ".html"


def _first_pages(wanted: str, revision: str) -> set[str]:
    """The pages laid out first: the summary, and the page a reader asked for already, by its
    bare address or in the folder of the revision being built (``strength.html`` and
    ``R3/strength.html`` → ``strength.md``; an address of no page lays out the whole site)."""
    page = wanted.removeprefix(revision + "/")
    return {"index.md"} | ({page.removesuffix(".html") + ".md"} if page.endswith(".html")
                           else set())


def _snapshot(folder: Path) -> dict[str, str]:
    """Every file under ``folder`` (the issued revisions' inputs): path from the project → hash."""
    if not folder.is_dir():
        return {}
    return {f"{folder.name}/{p.relative_to(folder).as_posix()}":
            hashlib.sha256(p.read_bytes()).hexdigest()
            for p in sorted(folder.rglob("*")) if p.is_file()}


def _frozen_text(paths: list[str], archive: str) -> str:
    revs = sorted({p.split("/")[1] for p in paths if p.count("/") >= 2})
    return (f"{', '.join(paths[:3])}{' …' if len(paths) > 3 else ''}: the inputs of issued "
            f"revision{'s' if len(revs) > 1 else ''} {', '.join(revs)} are frozen, so the pages "
            f"were not rebuilt. Fix: restore the file as issued (each issued PDF carries its "
            f"inputs as attachments); a change belongs in the current draft, outside {archive}/.")


class Previewer(Afterwards):
    """Builds the site, then (:class:`Afterwards`, in the background) the rest of its pages,
    its figures and its PDF; rebuilds on change."""

    def __init__(self, project: Path, out: Path, state: State, say=print, progress=None):
        self.project, self.out, self.state, self.say = project, out, state, say
        self.progress = progress or (lambda *a, **k: None)
        self.prepared = None
        self._issued: dict[str, str] = {}   # issued inputs as last built: path → sha-256
        self.cache = cache_dir(project)
        Afterwards.__init__(self)

    def rebuild(self, changed: set[str] | None = None) -> bool:
        """One cycle: the site now, the PDF queued.  False (and a notice) on failure."""
        from specgen.build import ARCHIVE_DIR, prepare, preview_figures, preview_site
        if changed:
            self.say("changed: " + ", ".join(sorted(changed)[:8])
                     + (f" and {len(changed) - 8} more" if len(changed) > 8 else ""))
        started = time.monotonic()
        try:
            frozen = self._frozen_edits(changed or (), ARCHIVE_DIR)
            if frozen:   # the inputs of an issued revision: never previewed as edited
                raise UsageError(_frozen_text(frozen, ARCHIVE_DIR))
            # the first site: the summary (and a page asked for until the render starts)
            # first, the rest after
            first = None if self.state.revision is not None else (
                lambda revision: _first_pages(self.state.wanted, revision))
            prepared = prepare(self.project, self.out, reuse=self.prepared, cache_dir=self.cache,
                               progress=self.progress, first=first)
            first = prepared.first
            rev = prepared.project.revision
            if changed and rev.status == "issued":
                raise UsageError(
                    f"{', '.join(sorted(changed)[:3])}: revision {rev.code} is issued, so its "
                    "pages are not rebuilt from edited inputs. Fix: undo the edit, or open the "
                    f"next draft (specgen issue, or set revision.code and status: draft in "
                    "dossier.yaml) and make the change there.")
            first = first and first & set(prepared.pages.pages)
            with self._site_lock:
                target = preview_site(prepared, self.out, first)
                self._published(prepared, target, preview_figures(prepared), first)
        except SpecgenError as exc:
            text = exc.report() if isinstance(exc, InputErrors) else str(exc)
            with self.state.lock:
                self.state.notice = text
            self.say(f"not rebuilt (the pages keep their notice until it is fixed):\n{text}")
            return False
        kept = self.prepared is not None and prepared.results is self.prepared.results
        self.prepared = prepared
        self._issued = _snapshot(self.project / ARCHIVE_DIR)
        drawing = len(prepared.pages.drawing)
        self.say(f"{'first pages' if first else 'site'} of {target.name} ready in "
                 f"{time.monotonic() - started:.1f} s"
                 + (" (check results kept: only narrative or templates changed)" if kept else "")
                 + (f"; {drawing} figures and formulas being drawn" if drawing else ""))
        self.afterwards(prepared, target, self.state.generation)
        return True

    def _published(self, prepared, target: Path, figures: dict[str, list[str]],
                   first: set[str] | None) -> None:
        """The state of a site just put in place: a new build, its placeholders to draw, the
        pages still to lay out (all but ``first``, when given)."""
        with self.state.lock:
            self.state.generation += 1
            self.state.revision, self.state.notice = target.name, ""
            self.state.pdf, self.state.pdf_names = "building", ()
            self.state.figures, self.state.failed = figures, {}
            self.state.drawing = set(prepared.pages.drawing)
            self.state.building = {_address(p) for p in prepared.pages.pages
                                   if first and p not in first}

    def _frozen_edits(self, changed, archive: str) -> list[str]:
        """Changed paths inside an issued revision already built here (a revision issued since,
        by ``specgen issue``, is new, not edited)."""
        inside = [p for p in changed if p.startswith(archive + "/")]
        if not inside:
            return []
        built = {p.split("/")[1] for p in self._issued}
        now = _snapshot(self.project / archive)
        return sorted(p for p in inside if p.count("/") >= 2 and p.split("/")[1] in built
                      and now.get(p) != self._issued.get(p))


def watch(project: Path, on_change, stop: threading.Event,
          started: threading.Event | None = None, first=None) -> None:
    """Call ``on_change(paths)`` after file events in ``project`` settle (watchdog);
    ``started`` is set once the folder is being watched.  ``first`` (the first build) is
    called once the folder is watched, so an edit made while it runs is not lost: it is
    handled as soon as ``first`` returns."""
    from watchdog.events import FileSystemEventHandler
    from watchdog.observers import Observer
    pending: set[str] = set()
    event = threading.Event()
    root = project.resolve()

    class Collect(FileSystemEventHandler):
        def on_any_event(self, ev):
            if ev.is_directory or ev.event_type in ("opened", "closed_no_write"):
                return
            for raw in (ev.src_path, getattr(ev, "dest_path", "")):
                if not raw:
                    continue
                try:
                    rel = Path(raw).resolve().relative_to(root).as_posix()
                except ValueError:
                    continue
                if rel != "." and not IGNORED.search(rel):
                    pending.add(rel)
                    event.set()

    observer = Observer()
    observer.schedule(Collect(), str(root), recursive=True)
    observer.start()
    if started is not None:
        started.set()
    try:
        if first is not None:
            first()
        while not stop.is_set():
            if not event.wait(0.2):
                continue
            time.sleep(DEBOUNCE_S)   # let an editor finish writing
            event.clear()
            changed = set(pending)
            pending.clear()
            if changed:
                on_change(changed)
    finally:
        observer.stop()
        observer.join()


def serve(directory: Path, port: int, *, say=print, progress=None, ready=None,
          stop: threading.Event | None = None) -> None:
    """Serve at once, build the site, then the PDF; rebuild on change until stopped."""
    directory = Path(directory)
    if not directory.is_dir():
        raise UsageError(f"{directory}: no such folder. Fix: give the project folder.")
    out = Path(tempfile.mkdtemp(prefix="specgen-preview-"))
    state = State()
    try:
        server = http.server.ThreadingHTTPServer(("127.0.0.1", port), handler_for(out, state))
    except OSError as exc:
        shutil.rmtree(out, ignore_errors=True)
        raise UsageError(f"port {port}: cannot serve ({exc.strerror}). Fix: choose another "
                         "port with --port.") from None
    threading.Thread(target=server.serve_forever, daemon=True).start()
    say(f"Serving http://127.0.0.1:{port}/ (pages answer at once; Ctrl+C to stop)")
    previewer = Previewer(directory, out, state, say, progress)

    def first() -> None:   # run once the folder is watched: an edit meanwhile is not lost
        previewer.rebuild()
        if ready is not None:
            ready(state)
    stop = stop or threading.Event()
    try:
        watch(directory, lambda changed: previewer.rebuild(changed), stop, first=first)
    except KeyboardInterrupt:
        pass
    finally:
        server.shutdown()
        server.server_close()
        previewer.wait()
        shutil.rmtree(out, ignore_errors=True)
