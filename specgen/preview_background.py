"""What the live preview does after a site is shown, in one background thread: the rest of
its pages (when only the first were laid out), the figures and formulas it shows as
placeholders — those of the page last asked for first, each put in its place as it lands —
and then the Word exports and the PDF (never printed from a placeholder).  The thread takes
the newest build asked for; work for a build superseded by a newer one stops."""
from __future__ import annotations

import threading
import time
from pathlib import Path


class Afterwards:
    """The background half of :class:`specgen.preview.Previewer` (which sets ``state``,
    ``out``, ``cache``, ``say`` and ``progress``)."""

    def __init__(self):
        self._pdf_thread: threading.Thread | None = None
        self._pdf_cv = threading.Condition()
        self._pdf_want = None
        self._pdf_busy = False
        # held while a site is put in place and while a figure is drawn into it, so nothing
        # of an older build lands in a newer one
        self._site_lock = threading.Lock()

    def wait(self) -> None:
        """Return when no PDF is being printed or waiting to be."""
        with self._pdf_cv:
            while self._pdf_want is not None or self._pdf_busy:
                self._pdf_cv.wait()

    def afterwards(self, prepared, target: Path, generation: int) -> None:
        """Ask for the rest of this generation's site, figures and PDF; the thread takes the
        newest request, so a site rebuild never waits for a PDF (a superseded one is
        discarded)."""
        with self._pdf_cv:
            self._pdf_want = (prepared, target, generation)
            self._pdf_cv.notify_all()
            if self._pdf_thread is None:
                self._pdf_thread = threading.Thread(target=self._printer, daemon=True)
                self._pdf_thread.start()

    def _printer(self) -> None:
        while True:
            with self._pdf_cv:
                while self._pdf_want is None:
                    self._pdf_cv.wait()
                (prepared, target, generation), self._pdf_want = self._pdf_want, None
                self._pdf_busy = True
            prepared = self._rest_of_site(prepared, generation)
            if prepared is not None and self._draw_figures(prepared, target, generation):
                self._print(prepared, target, generation)
            with self._pdf_cv:
                self._pdf_busy = False
                self._pdf_cv.notify_all()

    def _rest_of_site(self, prepared, generation: int):
        """Lay out the pages the first site said were being built (rendering them first, when
        the first site rendered only its own: ``build.complete``); the revision prepared
        whole, or None when superseded or failed."""
        from specgen.build import complete, preview_figures, preview_site
        from specgen.errors import SpecgenError
        if not self.state.building:
            return prepared
        started = time.monotonic()
        try:
            prepared = complete(prepared)
        except Exception as exc:  # noqa: BLE001 - reported on the pages, never a silent stop
            return self._not_built(exc)
        with self._site_lock:
            with self.state.lock:
                if self.state.generation != generation:
                    return None
            try:
                target = preview_site(prepared, self.out)
            except SpecgenError as exc:
                return self._not_built(exc)
            with self.state.lock:   # the whole page set's placeholders, by page
                self.state.building = set()
                self.state.figures = preview_figures(prepared)
                self.state.drawing = set(prepared.pages.drawing)
        self.say(f"whole site of {target.name} ready in {time.monotonic() - started:.1f} s")
        return prepared

    def _not_built(self, exc) -> None:
        """Say on every page, and in the terminal, why the rest of the site was not built."""
        from specgen.errors import InputErrors, SpecgenError
        text = exc.report() if isinstance(exc, InputErrors) else str(exc) \
            if isinstance(exc, SpecgenError) else f"{type(exc).__name__}: {exc}"
        with self.state.lock:
            self.state.notice = text
        self.say(f"the rest of the site was not built:\n{text}")

    def _next_figure(self) -> str | None:
        """The figure to draw next: the first not drawn of the page last asked for, else of
        the pages in the dossier's order (call with the state's lock held)."""
        s = self.state
        order = s.figures.get(s.wanted, []) + [f for page in s.figures.values() for f in page]
        return next((f for f in order if f in s.drawing), min(s.drawing, default=None))

    def _draw_figures(self, prepared, target: Path, generation: int) -> bool:
        """Draw the figures the site of ``generation`` shows as placeholders, each put in its
        place as it lands; False when a newer build superseded them."""
        from specgen.build import preview_figure
        started, failed, done = time.monotonic(), 0, 0
        while True:
            with self._site_lock:
                with self.state.lock:
                    if self.state.generation != generation:
                        return False
                    path = self._next_figure()
                if path is None:
                    break
                try:
                    preview_figure(prepared, target, path)
                    why = None
                except Exception as exc:  # noqa: BLE001 - reported on its pages, never fatal
                    why = f"{path}: {type(exc).__name__}: {exc}"
                with self.state.lock:
                    self.state.drawing.discard(path)
                    if why:
                        self.state.failed[path] = why
            done, failed = done + 1, failed + bool(why)
            if why:
                self.say(f"not drawn: {why}")
        if done:
            self.say(f"figures and formulas of {target.name} drawn: {done - failed} of {done} in "
                     f"{time.monotonic() - started:.1f} s")
        return True

    def _print(self, prepared, target: Path, generation: int) -> None:
        """Print the PDF (and make the Word exports) of ``generation``; its state on the bar."""
        from specgen.build import preview_pdf
        try:
            pdfs = preview_pdf(prepared, target, cache_dir=self.cache,
                               progress=self.progress)
            outcome = ("ready", tuple(p.name for p in pdfs))
            text = f"PDF of {target.name} ready ({len(pdfs)} volumes)"
        except Exception as exc:  # noqa: BLE001 - reported on the pages, never fatal
            outcome, text = ("failed", ()), f"PDF not printed: {exc}"
        with self.state.lock:
            current = self.state.generation == generation
            if current:
                self.state.pdf, self.state.pdf_names = outcome
        self.say(text if current else f"{text} (superseded by a newer edit)")
