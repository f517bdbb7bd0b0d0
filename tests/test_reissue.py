"""A re-issue equals a cold build of the same inputs.

After one new laboratory result, a build into the same output folder lays out again only the
PDF parts whose content changed and takes the rest from the output folder's artefact cache
(``publish/pdf.py``).  What the reader gets must not depend on that: the test builds the
changed project twice, once as a re-issue (into the copy of a built output folder, its cache
warm) and once cold (a fresh folder, no cache anywhere), and compares every site page as
text, the text of every page of a PDF whose bytes differ, and every file of the revision
byte for byte (DESIGN.md, "Reproducible": same inputs give byte-identical site, figures and
PDF)."""
from __future__ import annotations

from pathlib import Path

import pytest

from specgen.build import build
from tests.conftest import copy_build

pytestmark = pytest.mark.costly(80)   # CPU s (tests/conftest.py)


def _files(revision: Path) -> dict[str, bytes]:
    return {p.relative_to(revision).as_posix(): p.read_bytes()
            for p in sorted(revision.rglob("*")) if p.is_file()}


def _page_texts(pdf: Path) -> list[str]:
    from pypdf import PdfReader
    return [page.extract_text() for page in PdfReader(str(pdf)).pages]


def test_reissue_after_one_new_result_equals_a_cold_build(starter_build, tmp_path, monkeypatch):
    monkeypatch.delenv("SPECGEN_SHARED_CACHE", raising=False)  # only the folder's own cache
    project, out = copy_build(starter_build, tmp_path / "reissue")
    csv = project / "lab" / "strength.csv"
    # one more 90-day prism of M1 at 4.0 MPa: M1 stays weaker than the starter's historic
    # mortar (the value tests/test_render_cache.py and tests/test_lifecycle.py add too)
    csv.write_text(csv.read_text() + "M1-90d-C9,M1,90,compressive,4.0,20\n")
    heard = {}

    def progress(step, done=None, total=None):
        if step.endswith("from the cache"):
            heard["parts"] = (done, total)
    reissued = build(project, out, progress=progress)
    reused, total = heard["parts"]
    assert 0 < reused < total        # some parts taken from the cache, some laid out again
    cold = build(project, tmp_path / "cold")
    assert cold.name == reissued.name
    a, b = _files(reissued), _files(cold)
    assert sorted(a) == sorted(b)
    pdfs = sorted(name for name in a if name.endswith(".pdf"))
    assert len(pdfs) == 2            # the report and its appendix volume
    for name in pdfs:
        # the same bytes are the same text on every page; the text (34 CPU s for both
        # volumes of both builds, measured under load) is read only for a volume whose
        # bytes differ, where it names what a reader would see differ
        if a[name] != b[name]:
            assert _page_texts(reissued / name) == _page_texts(cold / name), name
    pages = sorted(name for name in a if name.endswith(".html"))
    assert "strength.html" in pages and "calculations.html" in pages
    for name in pages:
        assert a[name].decode("utf-8") == b[name].decode("utf-8"), name
    assert [n for n in sorted(a) if a[n] != b[n]] == []   # every file, byte for byte
