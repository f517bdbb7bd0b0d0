"""``specgen serve`` on a cold artefact cache: the first page answers before the figures and
formulas are drawn (each shown as a placeholder, its alternative text kept, the preview bar
saying so), they are drawn in the background — those of the page asked for first — and each
takes its place as it lands; a figure that cannot be drawn is reported on its page, never a
hang; the PDF is never printed from a placeholder."""
from __future__ import annotations

import html
import http.server
import json
import re
import threading
import time

import pytest

from specgen.preview import Previewer, State, handler_for
from specgen.preview_bar import SCRIPT_PATH, STATUS_PATH, own_answer

from tests.test_preview import get


@pytest.fixture
def cold(tmp_path, monkeypatch):
    """The starter project previewed with an empty artefact cache (no shared one), the server
    answering for its output folder, the background work (rest of the site, figures, PDF)
    held until the test starts it: (previewer, base URL, started background requests)."""
    from specgen.starter import write_starter
    monkeypatch.delenv("SPECGEN_SHARED_CACHE", raising=False)
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "cache"))
    project, out = tmp_path / "p", tmp_path / "out"
    write_starter(project)
    out.mkdir()
    state = State()
    server = http.server.ThreadingHTTPServer(("127.0.0.1", 0), handler_for(out, state))
    threading.Thread(target=server.serve_forever, daemon=True).start()
    pv = Previewer(project, out, state, say=lambda text: None)
    held = []
    monkeypatch.setattr(pv, "afterwards", lambda *request: held.append(request))
    yield pv, f"http://127.0.0.1:{server.server_address[1]}", held
    with state.lock:
        state.generation += 1          # a newer build: whatever is left of the work stops
    pv.wait()
    server.shutdown()
    server.server_close()


def _start(pv, held) -> None:
    """Let the held background work run (the real thread of the previewer)."""
    from specgen.preview_background import Afterwards
    Afterwards.afterwards(pv, *held[-1])


def _until(condition, seconds: float = 240.0) -> None:
    deadline = time.monotonic() + seconds
    while not condition():
        assert time.monotonic() < deadline, "the background work did not finish in time"
        time.sleep(0.1)


def _figures(body: str) -> dict[str, str]:
    """The figures a page shows: src → alternative text."""
    return dict(re.findall(r'<img src="(figures/[^"]+\.svg)" alt="([^"]*)"', body))


def test_first_page_cold_shows_placeholders_then_the_real_figures(cold, monkeypatch):
    pv, base, held = cold
    # a reader asked for the strength page while the first build ran (the waiting page)
    assert "The first build of the site is running" in get(base + "/strength.html")[1]
    assert pv.rebuild()
    state = pv.state
    assert state.drawing and held                # nothing drawn yet, the work not started
    status, body = get(base + "/strength.html")
    assert status == 200 and "Preview of revision R1" in body
    shown = _figures(body)
    assert shown and set(shown) == set(state.figures["strength.html"])
    # the alternative text is the figure's own, not the placeholder's words
    assert all(alt and "being drawn" not in alt for alt in shown.values())
    assert (f"Figures and formulas: {len(shown)} of this page are still being drawn (each "
            "takes its place as it is ready)") in body
    assert f'<script src="{SCRIPT_PATH}"></script>' in body
    assert 'id="sg-preview-data"' in body and "sg-preview-data" in get(base + SCRIPT_PATH)[1]
    first = next(iter(shown))
    placeholder = get(f"{base}/{first}")[1]
    assert "is being drawn" in placeholder and "It takes its place here" in placeholder
    # the summary and the page asked for are laid out; the others say they are being built
    assert "being built" not in get(base + "/index.html")[1]
    later = get(base + "/calculations.html")[1]
    assert "This page is being built for the preview" in later
    assert "This page is being built: it takes its place here in a moment" in later
    assert json.loads(get(f"{base}{STATUS_PATH}?page=calculations.html")[1])["building"]

    order = []
    import specgen.build
    real = specgen.build.preview_figure

    def drawn_in_order(prepared, target, path):
        order.append(path)
        return real(prepared, target, path)
    monkeypatch.setattr(specgen.build, "preview_figure", drawn_in_order)
    get(base + "/strength.html")                  # the reader is back on the strength page
    _start(pv, held)
    _until(lambda: not set(shown) & state.drawing)
    # the page asked for had its figures drawn before any other
    assert set(order[:len(shown)]) == set(shown)
    drawn = get(f"{base}/{first}")[1]
    assert drawn.startswith(("<?xml", "<svg")) and "being drawn" not in drawn
    assert "<path" in drawn                       # matplotlib's drawing, not our text box
    status = json.loads(get(f"{base}{STATUS_PATH}?page=strength.html")[1])
    assert status["drawing"] == [] and status["failed"] == [] and not status["building"]
    body = get(base + "/strength.html")[1]
    assert "still being drawn" not in body and SCRIPT_PATH not in body
    assert _figures(body) == shown
    # the rest of the site was laid out before the figures were drawn
    assert "being built" not in get(base + "/calculations.html")[1]


def test_a_figure_that_cannot_be_drawn_is_reported_on_its_page_not_a_hang(cold, monkeypatch):
    pv, base, held = cold
    state = pv.state
    with state.lock:
        state.wanted = "strength.html"       # asked for while the first build ran
    assert pv.rebuild()
    broken = state.figures["strength.html"][0]
    from specgen.report.pageset import PageSet
    real = PageSet.draw

    def fails(pages, path):   # whichever page set the background draws from (the whole one)
        if path == broken:
            raise ValueError("the curve has no point to draw")
        return real(pages, path)
    monkeypatch.setattr(PageSet, "draw", fails)
    _start(pv, held)
    _until(lambda: broken in state.failed)
    body = get(base + "/strength.html")[1]
    assert 'role="alert"' in body
    assert html.escape("of this page's figures and formulas could not be drawn; the PDF is not "
                       "printed while one is missing.") in body
    assert f"{broken}: ValueError: the curve has no point to draw" in body
    assert "Fix: check the data it shows" in body
    assert "could not be drawn" in get(f"{base}/{broken}")[1]
    assert json.loads(get(f"{base}{STATUS_PATH}?page=strength.html")[1])["failed"] == [broken]
    # the others are drawn all the same
    others = [f for f in state.figures["strength.html"] if f != broken]
    _until(lambda: not set(others) & state.drawing)


def test_the_pdf_is_never_printed_from_a_placeholder(tmp_path):
    """What is left as a placeholder is drawn before the PDF; a placeholder that cannot be
    drawn stops the PDF before anything is printed, and the printer refuses a page set that
    still holds one."""
    from specgen.build import preview_pdf
    from specgen.errors import PublishError
    from specgen.publish.pdf import write_pdf
    from specgen.report.pageset import PageSet
    pages = PageSet()
    pages.add_page("index.md", "Summary", '<img src="figures/a.svg" alt="A chart">')
    pages.add_placeholder("figures/a.svg", b"<svg>being drawn</svg>", lambda: 1 / 0)
    target = tmp_path / "R1"
    target.mkdir()
    prepared = type("Prepared", (), {"pages": pages, "project": None, "results": None})()
    with pytest.raises(ZeroDivisionError):
        preview_pdf(prepared, target, cache_dir=tmp_path / "cache")
    assert not list(target.glob("*.pdf"))
    with pytest.raises(PublishError, match=r"1 figure\(s\) not drawn yet \(figures/a.svg\); "
                                           "a PDF is never printed with a placeholder"):
        write_pdf(pages, {}, tmp_path / "x.pdf", attachments={})
    assert not (tmp_path / "x.pdf").exists()
    pages.drawing["figures/a.svg"] = lambda: b"<svg>drawn</svg>"
    assert pages.draw("figures/a.svg") == b"<svg>drawn</svg>"
    assert pages.assets["figures/a.svg"] == b"<svg>drawn</svg>" and not pages.drawing


def _photo_env(tmp_path):
    """A render environment and a photograph of the demo, as the evidence chapter places it."""
    from types import SimpleNamespace

    from specgen.report.pageset import PageSet
    from specgen.report.render import RenderEnv
    from tests.conftest import DEMO
    data = (DEMO / "images" / "P1-inner-face-bay3.jpg").read_bytes()
    img = SimpleNamespace(id="P1", file="images/P1-inner-face-bay3.jpg", keep_metadata=False,
                          page=None, alt="Inner face of bay 3, mortar joints raked out",
                          kind="photograph")
    return RenderEnv(None, None, PageSet(), None), img, data


def test_a_photograph_not_made_yet_is_a_placeholder_its_thumbnail_is_real(tmp_path):
    # the live preview's first pages leave the print-size image for later (the PDF page of a
    # survey sheet took a fifth of a second); the site's page shows the thumbnail, made now
    from specgen import cache
    from specgen.report.evidence_chapters import picture
    from specgen.report.evidence_images import PRINT_PX, THUMB_PX, normalise
    env, img, data = _photo_env(tmp_path)
    with cache.using(tmp_path / "c"), cache.drawing_later():
        pic = picture(env, img, data, "Bay 3, inner face (photograph)")
        unnumbered = picture(env, img, data, "Bay 3 again", numbered=False)
    assert pic["src"] == unnumbered["src"] == "images/p1.jpg"
    assert list(env.pageset.drawing) == ["images/p1.jpg"]
    assert env.pageset.assets["images/p1.jpg"].startswith(b"<svg")
    assert b"Figure 1 is being drawn" in env.pageset.assets["images/p1.jpg"]
    assert env.pageset.assets[pic["thumb"]] == normalise(data, img.file, THUMB_PX)[0]
    assert pic["thumb_size"] == normalise(data, img.file, THUMB_PX)[2]
    # drawn in the background: the very bytes a build places
    assert env.pageset.draw("images/p1.jpg") == normalise(data, img.file, PRINT_PX)[0]


def test_a_photograph_placeholder_is_served_as_svg(tmp_path):
    # the placeholder stands under the photograph's name (.jpg): served as what it is, so the
    # browser shows the box that says the image is being drawn, not a broken image
    from specgen.report.figures import placeholder
    out = tmp_path / "out"
    (out / "R1" / "images").mkdir(parents=True)
    (out / "R1" / "images" / "p1.jpg").write_bytes(placeholder(3))
    (out / "R1" / "images" / "p2.jpg").write_bytes(b"\xff\xd8\xff\xe0 a JPEG")
    state = State(revision="R1")
    server = http.server.ThreadingHTTPServer(("127.0.0.1", 0), handler_for(out, state))
    threading.Thread(target=server.serve_forever, daemon=True).start()
    import urllib.request
    try:
        base = f"http://127.0.0.1:{server.server_address[1]}"
        with urllib.request.urlopen(base + "/images/p1.jpg", timeout=10) as r:
            assert r.headers["Content-Type"] == "image/svg+xml"
            assert b"Figure 3 is being drawn" in r.read()
        with urllib.request.urlopen(base + "/images/p2.jpg", timeout=10) as r:
            assert r.headers["Content-Type"] == "image/jpeg"
    finally:
        server.shutdown()
        server.server_close()


def _article(page: str) -> str:
    """A page's content as the theme lays it out (its ``<article>``), without the frame."""
    found = re.search(r"<article\b.*?</article>", page, re.S)
    assert found, "no article on the page"
    return found.group(0)


def test_the_first_pages_read_exactly_as_the_built_pages(starter_build, tmp_path, monkeypatch):
    """The first site lays out only the summary and the page asked for (the rest of the pages
    named, not rendered, until the whole site follows); those two read exactly as in a full
    ``specgen build`` of the same project, figures and formulas at their places with their
    alternative text (the placeholders' bytes aside, which are the figures' files)."""
    project, built = starter_build
    monkeypatch.delenv("SPECGEN_SHARED_CACHE", raising=False)
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "cache"))
    out = tmp_path / "out"
    out.mkdir()
    state = State(wanted="strength.html")    # asked for while the first build ran
    pv = Previewer(project, out, state, say=lambda text: None)
    held = []
    monkeypatch.setattr(pv, "afterwards", lambda *request: held.append(request))
    assert pv.rebuild() and held
    pages = pv.prepared.pages
    # the first render laid out what the first site shows, and no page after the one asked for
    assert "index.md" not in pages.unrendered and "strength.md" not in pages.unrendered
    assert {"calculations.md", "references.md"} <= pages.unrendered
    assert state.building and "calculations.html" in state.building
    for page in ("index.html", "strength.html"):
        served = (out / "R1" / page).read_text(encoding="utf-8")
        whole = (built / "R1" / page).read_text(encoding="utf-8")
        assert "being built" not in served
        assert _article(served) == _article(whole), page
    assert "This page is being built for the preview" in (out / "R1" / "calculations.html"
                                                         ).read_text(encoding="utf-8")


def test_a_page_asked_for_in_its_revision_folder_while_the_project_loads_comes_first(
        starter_build, tmp_path, monkeypatch):
    """A reader who asks for ``/R1/strength.html`` (the address a link or a bookmark of the
    revision gives) while the first build is still loading and checking the project gets that
    page in the first site, laid out in full, not a page saying it is being built until the
    whole site follows."""
    project, built = starter_build
    monkeypatch.delenv("SPECGEN_SHARED_CACHE", raising=False)
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "cache"))
    out = tmp_path / "out"
    out.mkdir()
    state = State()      # nothing asked for when the build starts

    def heard(step, *args, **kwargs):
        if step.startswith("check"):     # the project loaded, its checks running
            own_answer(state, "/R1/strength.html", "")
    pv = Previewer(project, out, state, say=lambda text: None, progress=heard)
    monkeypatch.setattr(pv, "afterwards", lambda *request: None)
    assert state.wanted == "" and pv.rebuild()
    assert state.wanted == "R1/strength.html"
    pages = pv.prepared.pages
    assert "strength.md" not in pages.unrendered and "calculations.md" in pages.unrendered
    assert "strength.html" not in state.building and "calculations.html" in state.building
    served = (out / "R1" / "strength.html").read_text(encoding="utf-8")
    assert "being built" not in served
    assert _article(served) == _article((built / "R1" / "strength.html").read_text(
        encoding="utf-8"))


def test_a_chapter_declared_as_one_page_that_makes_a_family_is_refused():
    # render names a one-page chapter after the first pages from its declaration alone, so a
    # chapter whose declaration and pages disagree is an error, never a wrong navigation
    from specgen.report.chapters import ChapterSpec
    from specgen.report.render import _pages_of, one_page

    def family(env) -> dict:
        return [{"path": "card/a.md", "title": "A"}]
    spec = ChapterSpec("card.md", "Cards", 0, "card.md.j2", family)
    assert one_page(spec)
    with pytest.raises(TypeError, match="declared as one page"):
        _pages_of(spec, family(None))


def test_a_page_only_named_is_never_published(tmp_path):
    from specgen.publish.preview import site_only
    from specgen.report.pageset import PageSet
    pages = PageSet()
    pages.add_page("index.md", "Summary", "# Summary\n")
    pages.add_page("checks.md", "Check register", "")
    pages.unrendered.add("checks.md")
    with pytest.raises(ValueError, match="pages not rendered cannot be laid out: checks.md"):
        site_only(None, None, pages, tmp_path)            # the whole site from a first render
    assert not any(tmp_path.iterdir())                     # nothing written
