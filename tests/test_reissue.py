"""Re-issue by what changed: after one new lab result only the PDF parts whose print changed
(their HTML, or a figure or formula they show) are laid out again; every other part comes
from the output folder's artefact cache byte for byte, and the page numbers, contents and
running heads are those of the new whole.  The PDFs are read back with pypdf."""
from __future__ import annotations

import re
import shutil

import pytest

NEW_RESULT = "M1-90d-C9,M1,90,compressive,7.9,20\n"


def _print_units(project_dir, out):
    """What decides whether a part is laid out again: per piece of the print, its volume,
    HTML and the SHA-256 of every asset it shows (the part cache's key, less what every part
    shares: CSS, options, engine)."""
    from specgen import cache
    from specgen.build import check
    from specgen.publish.history import history_for
    from specgen.publish.pdf import pieces
    from specgen.publish.pdf_parts import _asset_digests
    from specgen.report.render import render
    project, results = check(project_dir)
    with cache.using(out / cache.CACHE_DIR):
        pages = render(project, results, history_for(out, project, results))
    return [(p.id, p.volume, p.html, repr(_asset_digests(p.html, pages)))
            for p in pieces(pages)]


def _page_texts(pdf):
    from pypdf import PdfReader
    return [page.extract_text() for page in PdfReader(str(pdf)).pages]


@pytest.fixture(scope="module")
def reissued(demo_build, tmp_path_factory):
    """The demo re-issued after one new M1 result into a copy of the session's demo build
    (its artefact cache warm, no shared cache), once for the tests below:
    (units before, units after, parts heard, OUT)."""
    from specgen.build import build
    from tests.conftest import DEMO
    where = tmp_path_factory.mktemp("reissue")
    project, out = where / "project", where / "out"
    shutil.copytree(DEMO, project)
    shutil.copytree(demo_build, out)
    with pytest.MonkeyPatch.context() as env:
        env.delenv("SPECGEN_SHARED_CACHE", raising=False)
        before = _print_units(project, out)
        csv = project / "lab" / "strength.csv"
        csv.write_text(csv.read_text() + NEW_RESULT)
        after = _print_units(project, out)
        heard = {}

        def progress(step, done=None, total=None):
            if step.endswith("from the cache"):
                heard["parts"] = (done, total)
        build(project, out, progress=progress)
    return before, after, heard["parts"], out


def test_a_new_result_relays_only_the_parts_it_changes(reissued):
    before, after, (reused, total), _ = reissued
    changed = [u for u in after if u not in before]
    assert total == len(after)
    assert total - reused == len(changed)          # exactly the parts whose print changed
    assert 0 < len(changed) <= 0.4 * total         # most of the dossier is reused
    ids = {u[0] for u in changed}
    # M1's strength and what cites it are laid out again …
    assert {"page-strength", "page-calculations", "page-checks"} <= ids
    # … the parts that do not mention M1's strength are not
    assert not ids & {"page-index", "page-specification", "page-card-M2", "page-card-M3",
                      "page-cautions", "page-references", "page-glossary"}


def test_reissued_pdf_numbers_its_pages_and_contents_as_a_whole(reissued, demo_build):
    """Page numbers, contents and running heads come from the new whole: every page says
    "page i of n", and each contents entry names the page its chapter starts on (the
    outline, made from the headings, leads there)."""
    from pypdf import PdfReader
    *_, out = reissued
    (main,) = [p for p in (out / "R3").glob("*.pdf") if not p.name.endswith("-appendices.pdf")]
    for pdf in (main, out / "R3" / main.name.replace(".pdf", "-appendices.pdf")):
        reader = PdfReader(str(pdf))
        texts = _page_texts(pdf)
        n = len(texts)
        assert all(f"page {i + 1} of {n}" in t for i, t in enumerate(texts))
        toc = {m.group(1).strip(): int(m.group(2)) for m in
               re.finditer(r"^(.+?) \.{3,}\s*(\d+)$", "\n".join(texts[1:3]), flags=re.M)}
        marks = {o.title: reader.get_destination_page_number(o) + 1
                 for o in reader.outline if not isinstance(o, list)}
        agree = [t for t in toc if t in marks]
        assert len(agree) >= 5 and all(marks[t] == toc[t] for t in agree)
    # the chapters none of whose parts was laid out again read as before, page for page and
    # word for word, but for the folios (which count the pages of the new whole)
    before, after, _, _ = reissued
    changed = {u[0] for u in after if u not in before}
    old = _chapter_pages(next(p for p in (demo_build / "R3").glob("*.pdf")
                              if not p.name.endswith("-appendices.pdf")), before)
    new = _chapter_pages(main, after)
    kept = [c for c in new if c not in changed]
    assert len(kept) >= 8
    folio = re.compile(r"page \d+ of \d+")
    for chapter in kept:
        assert [folio.sub("", t) for t in old[chapter]] == [folio.sub("", t) for t in new[chapter]]


def _chapter_pages(pdf, units) -> dict[str, list[str]]:
    """Chapter id → the text of its pages in the main volume (each chapter starts a page and
    has one top-level bookmark, in the order of the chapters)."""
    from pypdf import PdfReader
    reader = PdfReader(str(pdf))
    starts = [reader.get_destination_page_number(o) for o in reader.outline
              if not isinstance(o, list)]
    ids = list(dict.fromkeys(u[0] for u in units if u[1] == "main"))
    assert len(starts) == len(ids)
    texts = _page_texts(pdf)
    ends = [*starts[1:], len(texts)]
    return {i: texts[a:b] for i, a, b in zip(ids, starts, ends)}


def test_a_reissue_reads_as_a_cold_build(starter_build, tmp_path, monkeypatch):
    """The starter re-issued after one new result (its unchanged parts from the cache) and
    the same project built cold (nothing cached) give PDFs with the same pages: the same
    count, the same text on each (folios and contents numbers included) and the same
    outline destinations."""
    from pypdf import PdfReader

    from specgen.build import build
    from tests.conftest import copy_build
    monkeypatch.delenv("SPECGEN_SHARED_CACHE", raising=False)
    root, out = copy_build(starter_build, tmp_path / "warm")
    csv = root / "lab" / "strength.csv"
    csv.write_text(csv.read_text() + "M2-28d-C4,M2,28,compressive,1.7,20\n")
    heard = {}

    def progress(step, done=None, total=None):
        if step.endswith("from the cache"):
            heard["parts"] = (done, total)
    build(root, out, progress=progress)
    reused, total = heard["parts"]
    assert 0 < reused < total                      # some parts reused, some laid out again
    cold = tmp_path / "cold" / "project"
    shutil.copytree(root, cold)
    build(cold, tmp_path / "cold" / "out")         # no cache anywhere: every part laid out
    for warm_pdf in sorted((out / "R1").glob("*.pdf")):
        cold_pdf = tmp_path / "cold" / "out" / "R1" / warm_pdf.name
        assert _page_texts(warm_pdf) == _page_texts(cold_pdf), warm_pdf.name
        a, b = PdfReader(str(warm_pdf)), PdfReader(str(cold_pdf))
        assert [(o.title, a.get_destination_page_number(o)) for o in a.outline
                if not isinstance(o, list)] == \
            [(o.title, b.get_destination_page_number(o)) for o in b.outline
             if not isinstance(o, list)]
