"""What the live preview puts on its pages: the preview bar (the revision, the PDF's state,
the figures of the page still being drawn), the notices of what a page does not show as the
latest edit would (a failed rebuild, a figure that could not be drawn), the small script that
puts each figure in place as it lands, and the page shown before the first build."""
from __future__ import annotations

import html
import json
import re
import threading
from dataclasses import dataclass, field
from pathlib import Path
from urllib.parse import parse_qs


@dataclass
class State:
    """What the server shows: the current revision, the PDF's state and any notice."""

    revision: str | None = None
    pdf: str = "waiting"          # waiting | building | ready | failed
    pdf_names: tuple[str, ...] = ()   # the volumes printed: the report, then its appendices
    notice: str = ""              # why the pages shown are not the latest edit
    generation: int = 0
    # the figures published as placeholders: page ("strength.html") → its figures, in order
    figures: dict[str, list[str]] = field(default_factory=dict)
    drawing: set[str] = field(default_factory=set)       # those not drawn yet
    failed: dict[str, str] = field(default_factory=dict)  # figure → why it was not drawn
    wanted: str = ""              # the page last asked for: its figures are drawn first
    building: set[str] = field(default_factory=set)  # pages not laid out yet (the first site)
    lock: threading.Lock = field(default_factory=threading.Lock)


STATUS_PATH = "/.specgen-preview/figures.json"   # what the page's script asks for
SCRIPT_PATH = "/.specgen-preview/live.js"         # the page's script
SCRIPT = Path(__file__).resolve().parent.parent / "content" / "preview" / "live.js"


def bar(state: State, page: str = "") -> str:
    """The preview bar put at the top of every page (escaped text only), with the notices
    of what ``page`` does not show as the latest edit would (the page's address in the
    current revision, ``strength.html``; "" for none)."""
    pdf = {"ready": _volume_links(state),
           "building": "PDF and Word exports: being made… (the PDF links appear when "
                       "they are done)",
           "waiting": "PDF: waiting for the site", "failed": "PDF: could not be printed"}
    parts = [f"Preview of revision {html.escape(state.revision or '—')}", pdf[state.pdf]]
    shown = state.figures.get(page, [])
    waiting = [f for f in shown if f in state.drawing]
    building = page in state.building
    if building:
        parts.append("This page is being built: it takes its place here in a moment")
    elif waiting:
        parts.append(f'<span id="sg-preview-figures">{figures_words(len(waiting))}</span>')
    out = ('<div role="status" style="position:sticky;top:0;z-index:1000;background:#1d3557;'
           'color:#fff;padding:.4em 1em;font:14px/1.4 sans-serif">' + " · ".join(parts)
           + "</div>")
    notices = []
    if state.notice:
        notices.append(("This page was not rebuilt after the last edit.", state.notice))
    failed = [state.failed[f] for f in shown if f in state.failed]
    if failed:
        notices.append((f"{len(failed)} of this page's figures and formulas could not be "
                        "drawn; the PDF is not printed while one is missing.", "\n".join(failed)
                        + "\nThe rest of the page is as built. Fix: check the data it "
                        "shows (the error names what it could not use); if it looks right, "
                        "report the error with the project folder."))
    for heading, text in notices:
        out += ('<div role="alert" style="background:#fff3cd;color:#3d2e00;border:2px solid '
                '#b8860b;padding:.6em 1em;font:14px/1.4 sans-serif;white-space:pre-wrap">'
                f'<strong>{html.escape(heading)}</strong>\n' + html.escape(text) + "</div>")
    return out + (_swap_script(state, page, waiting) if waiting or building else "")


def figures_words(n: int) -> str:
    """What the preview bar says of the figures of a page still being drawn."""
    if not n:
        return "Figures and formulas: all drawn"
    return (f"Figures and formulas: {n} of this page {'is' if n == 1 else 'are'} still being "
            "drawn (each takes its place as it is ready)")


def _swap_script(state: State, page: str, waiting: list[str]) -> str:
    """The page's script (``content/preview/live.js``, served at :data:`SCRIPT_PATH`) and what
    it starts from: the figures of the page not drawn yet, the build, the bar's words."""
    data = json.dumps({"page": page, "left": waiting, "generation": state.generation,
                       "building": page in state.building, "url": STATUS_PATH,
                       "words": [figures_words(0), figures_words(1), figures_words(2)]})
    return ('<script type="application/json" id="sg-preview-data">'
            + data.replace("<", "\\u003c") + f'</script><script src="{SCRIPT_PATH}"></script>')


#: how the preview bar names each volume of the PDF, in the order they are printed
VOLUME_WORDS = ("PDF: report", "appendices")


def _volume_links(state: State) -> str:
    """A link to each volume of the printed PDF (the report and its appendix volume)."""
    return " · ".join(f'<a href="/{state.revision}/{html.escape(name)}">{words}</a>'
                      for name, words in zip(state.pdf_names, VOLUME_WORDS))


def figure_status(state: State, page: str) -> bytes:
    """What the page's script asks: whether ``page`` is still being built and, of the figures
    it shows, those still being drawn and those that could not be, with the build they belong
    to."""
    with state.lock:
        shown = state.figures.get(page, [])
        data = {"generation": state.generation,
                "building": page in state.building,
                "drawing": [f for f in shown if f in state.drawing],
                "failed": [f for f in shown if f in state.failed]}
    return json.dumps(data).encode("utf-8")


def waiting_page(state: State) -> bytes:
    text = state.notice or "The first build of the site is running; this page reloads itself."
    return ("<!doctype html><html lang=\"en\"><head><meta charset=\"utf-8\">"
            "<meta http-equiv=\"refresh\" content=\"2\"><title>specgen preview</title></head>"
            f"<body><h1>specgen preview</h1><p style=\"white-space:pre-wrap\">"
            f"{html.escape(text)}</p></body></html>").encode("utf-8")


_BODY = re.compile(r"<body[^>]*>", re.I)


def with_bar(state: State, page: str, text: str) -> str:
    """A page of the site as served: the bar at the top of its body; its figures are the next
    drawn (the page a reader asked for last)."""
    with state.lock:
        if page:
            state.wanted = page
        shown = bar(state, page)
    return _BODY.sub(lambda m: m.group(0) + shown, text, count=1)


def own_answer(state: State, path: str, query: str) -> tuple[bytes, str] | None:
    """The preview's own answers: the page saying the first build runs (any address until
    there is a site; the page asked for is laid out first), the figures' status and the
    pages' script; None for an address of the site."""
    if state.revision is None:
        if path.endswith(".html"):
            state.wanted = path.lstrip("/")
        return waiting_page(state), "text/html; charset=utf-8"
    if path == STATUS_PATH:
        return figure_status(state, parse_qs(query).get("page", [""])[0]), "application/json"
    if path == SCRIPT_PATH:
        return SCRIPT.read_bytes(), "text/javascript; charset=utf-8"
    return None
