"""``specgen serve``: answers at once, bare page addresses, the preview bar and notices, the
watcher; and (end to end, on the starter) site first, PDF afterwards, partial rebuilds."""
from __future__ import annotations

import http.server
import threading
import time
import urllib.error
import urllib.request

import pytest

from specgen.preview import State, handler_for, watch

pytestmark = pytest.mark.costly(35)   # CPU s (tests/conftest.py)


@pytest.fixture
def served(tmp_path):
    out = tmp_path / "out"
    (out / "R1").mkdir(parents=True)
    (out / "R1" / "index.html").write_text("<html><body><h1>Summary</h1></body></html>")
    (out / "R1" / "strength.html").write_text("<html><body class=x><h1>Strength</h1></body></html>")
    (out / "R1" / "P-R1.pdf").write_bytes(b"%PDF-1.7")
    (out / "R1" / "P-R1-appendices.pdf").write_bytes(b"%PDF-1.7")
    (out / "R1" / "assets").mkdir()
    (out / "R1" / "assets" / "site.css").write_text("body{color:#111}")
    state = State()
    server = http.server.ThreadingHTTPServer(("127.0.0.1", 0), handler_for(out, state))
    threading.Thread(target=server.serve_forever, daemon=True).start()
    base = f"http://127.0.0.1:{server.server_address[1]}"
    yield base, state
    server.shutdown()
    server.server_close()


def get(url):
    try:
        with urllib.request.urlopen(url, timeout=10) as r:
            return r.status, r.read().decode("utf-8", "replace")
    except urllib.error.HTTPError as e:
        return e.code, e.read().decode("utf-8", "replace")


def test_answers_before_the_first_build_with_a_page_that_reloads(served):
    base, state = served
    started = time.monotonic()
    status, body = get(base + "/strength.html")
    assert status == 200 and time.monotonic() - started < 2
    assert '<meta http-equiv="refresh" content="2">' in body
    assert "The first build of the site is running" in body


def test_bare_page_address_answers_the_current_revision_with_the_bar(served):
    base, state = served
    state.revision, state.pdf = "R1", "building"
    status, body = get(base + "/strength.html")
    assert status == 200 and "<h1>Strength</h1>" in body
    assert "Preview of revision R1" in body and "PDF and Word exports: being made…" in body
    assert get(base + "/")[1].count("<h1>Summary</h1>") == 1
    # the PDF is not handed out half-printed
    assert get(base + "/R1/P-R1.pdf")[0] == 503
    state.pdf, state.pdf_names = "ready", ("P-R1.pdf", "P-R1-appendices.pdf")
    # both volumes linked: the report and its appendix volume of calculation sheets
    assert ('<a href="/R1/P-R1.pdf">PDF: report</a> · <a href="/R1/P-R1-appendices.pdf">'
            'appendices</a>') in get(base + "/R1/strength.html")[1]
    assert get(base + "/R1/P-R1.pdf")[0] == 200
    assert get(base + "/R1/P-R1-appendices.pdf")[0] == 200
    # the page's own relative links (assets/…) resolve from a bare address too
    assert get(base + "/assets/site.css") == (200, "body{color:#111}")
    assert get(base + "/nothing.html")[0] == 404
    assert get(base + "/..%2f..%2fetc/passwd")[0] == 404


def test_a_page_not_rebuilt_carries_the_error_text(served):
    base, state = served
    state.revision = "R1"
    state.notice = ("1 problem in the project folder:\n  - mixes.yaml, line 7: <b>x</b>: "
                    "unknown key")
    body = get(base + "/strength.html")[1]
    assert "This page was not rebuilt after the last edit." in body
    assert "mixes.yaml, line 7: &lt;b&gt;x&lt;/b&gt;: unknown key" in body
    assert 'role="alert"' in body


def test_watcher_reports_changed_files_and_ignores_editor_droppings(tmp_path):
    project = tmp_path / "p"
    (project / "narrative").mkdir(parents=True)
    seen, stop, started = [], threading.Event(), threading.Event()

    def changed(paths):
        seen.append(paths)
        stop.set()
    thread = threading.Thread(target=watch, args=(project, changed, stop, started), daemon=True)
    thread.start()
    assert started.wait(60)
    (project / "narrative" / ".summary.md.swp").write_text("x")
    (project / "narrative" / "summary.md").write_text("New text.")
    thread.join(timeout=30)
    assert seen and "narrative/summary.md" in seen[0]
    assert not any(".swp" in p for s in seen for p in s)


def test_an_edit_made_while_the_first_build_runs_is_not_lost(tmp_path):
    """The folder is watched before the first build starts: a file saved while it runs is
    rebuilt as soon as it ends (before, the watcher started after it and the edit was never
    seen, the preview showing the old text with no notice)."""
    project = tmp_path / "p"
    (project / "lab").mkdir(parents=True)
    seen, stop, order = [], threading.Event(), []

    def first_build():
        order.append("first build")
        (project / "lab" / "strength.csv").write_text("specimen\n")   # saved meanwhile
        time.sleep(1.0)        # the build goes on; the event is collected, not handled yet

    def changed(paths):
        order.append("rebuild")
        seen.append(paths)
        stop.set()
    thread = threading.Thread(target=watch, args=(project, changed, stop),
                              kwargs={"first": first_build}, daemon=True)
    thread.start()
    thread.join(timeout=60)
    assert order == ["first build", "rebuild"]
    assert "lab/strength.csv" in seen[0]


@pytest.mark.e2e
def test_previewer_site_first_then_pdf_and_partial_rebuilds(tmp_path, monkeypatch):
    from specgen.preview import Previewer
    from specgen.starter import write_starter
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "cache"))
    project, out = tmp_path / "p", tmp_path / "out"
    write_starter(project)
    said, state = [], State()
    pv = Previewer(project, out, state, say=said.append)
    assert pv.rebuild()
    assert state.revision == "R1" and (out / "R1" / "strength.html").is_file()
    assert state.pdf in ("building", "ready")
    first = pv.prepared.results
    # narrative only: the check results are kept
    (project / "narrative" / "introduction.md").write_text("Edited introduction.\n")
    assert pv.rebuild({"narrative/introduction.md"})
    assert pv.prepared.results is first
    assert "Edited introduction." in (out / "R1" / "index.html").read_text()
    # an input error: the last good pages stay, with the error as the notice
    mixes = project / "mixes.yaml"
    mixes.write_text(mixes.read_text().replace("water_binder_ratio:", "water_binder_ration:", 1))
    assert not pv.rebuild({"mixes.yaml"})
    assert "water_binder_ration" in state.notice and "did you mean" in state.notice
    assert "Edited introduction." in (out / "R1" / "index.html").read_text()
    pv.wait()
    assert state.pdf == "ready" and len(state.pdf_names) == 2
    assert state.pdf_names[1].endswith("-appendices.pdf")
    assert all((out / "R1" / name).is_file() for name in state.pdf_names)
    # the Word exports, made after the site with the PDF, are there beside it
    import docx
    made = sorted((out / "R1" / "exports").glob("*.docx"))
    assert made and all(docx.Document(str(f)).paragraphs for f in made)


class _Rev:
    def __init__(self, code, status):
        self.code, self.status = code, status


class _Prepared:
    def __init__(self, status="draft"):
        from specgen.report.pageset import PageSet
        self.project = type("P", (), {"revision": _Rev("R2", status)})()
        self.results = object()
        self.pages = PageSet()      # every figure drawn
        self.first = None           # no page laid out before the others


def _previewer(tmp_path, monkeypatch, status="draft"):
    """A previewer whose prepare and site steps are stand-ins (what is tested here is what it
    does with a change before and after them, not the build)."""
    import specgen.build
    from specgen.preview import Previewer
    built = []
    monkeypatch.setattr(specgen.build, "prepare", lambda *a, **k: _Prepared(status))

    def site(prepared, out, first=None):
        built.append(prepared)
        (out / "R2").mkdir(parents=True, exist_ok=True)
        return out / "R2"
    monkeypatch.setattr(specgen.build, "preview_site", site)
    project = tmp_path / "p"
    (project / "issued" / "R1").mkdir(parents=True)
    (project / "issued" / "R1" / "mixes.yaml").write_text("mixes: []\n")
    state = State()
    pv = Previewer(project, tmp_path / "out", state, say=lambda text: None)
    pv.afterwards = lambda *a: None     # no background work (rest of site, figures, PDF)
    return pv, state, project, built


def test_an_edit_to_an_issued_revision_is_not_previewed_and_says_why(tmp_path, monkeypatch):
    pv, state, project, built = _previewer(tmp_path, monkeypatch)
    assert pv.rebuild() and len(built) == 1 and state.notice == ""
    (project / "issued" / "R1" / "mixes.yaml").write_text("mixes: [edited]\n")
    assert not pv.rebuild({"issued/R1/mixes.yaml"})
    assert len(built) == 1                                  # nothing rebuilt
    assert "issued/R1/mixes.yaml: the inputs of issued revision R1 are frozen" in state.notice
    assert "Fix: restore the file as issued" in state.notice
    # (the server shows state.notice on every page: test_a_page_not_rebuilt_carries_the_error_text)
    # a revision issued since (a new folder, as `specgen issue` writes it) is not an edit
    (project / "issued" / "R1" / "mixes.yaml").write_text("mixes: []\n")
    (project / "issued" / "R2").mkdir()
    (project / "issued" / "R2" / "mixes.yaml").write_text("mixes: []\n")
    assert pv.rebuild({"issued/R2/mixes.yaml", "issued/R1/mixes.yaml"})
    assert len(built) == 2 and state.notice == ""


def test_an_edit_while_the_current_revision_is_issued_is_not_previewed(tmp_path, monkeypatch):
    pv, state, project, built = _previewer(tmp_path, monkeypatch, status="issued")
    assert pv.rebuild()                                     # the first build shows it
    assert not pv.rebuild({"mixes.yaml"})
    assert len(built) == 1
    assert "mixes.yaml: revision R2 is issued, so its pages are not rebuilt" in state.notice


def test_a_browser_that_leaves_before_the_answer_is_no_error(tmp_path, monkeypatch):
    """A reload or a closed tab breaks the connection mid-answer: the server says nothing
    (before, socketserver printed a traceback on the terminal)."""
    import http.server
    handler = handler_for(tmp_path, State())

    def gone(self):
        raise BrokenPipeError(32, "Broken pipe")
    monkeypatch.setattr(http.server.BaseHTTPRequestHandler, "handle", gone)
    assert handler.handle(handler.__new__(handler)) is None
    monkeypatch.setattr(http.server.BaseHTTPRequestHandler, "handle",
                        lambda self: (_ for _ in ()).throw(ValueError("a real bug")))
    with pytest.raises(ValueError):
        handler.handle(handler.__new__(handler))
