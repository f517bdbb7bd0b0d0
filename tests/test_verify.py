"""Verify covers what it vouches for: the artefact cache is checked on use, `verify` checks
the outputs, the inputs the PDF carries, the inputs the project keeps for each issued
revision, versions.json and the root index; the PDF has no dead links."""
from __future__ import annotations

import json
import re
import shutil

import pytest

from specgen.build import verify
from specgen import cache

pytestmark = pytest.mark.costly(10)   # CPU s (tests/conftest.py)


def test_poisoned_cache_entry_is_discarded_and_drawn_again(tmp_path):
    drawn = []

    def draw():
        drawn.append(1)
        return b"<svg>x squared</svg>"
    with cache.using(tmp_path):
        assert cache.cached("math", "x^2", draw) == b"<svg>x squared</svg>"
        (entry,) = [p for p in tmp_path.rglob("*") if p.is_file()]
        raw = entry.read_bytes()
        entry.write_bytes(raw.replace(b"x squared", b"poisoned!"))  # same length, edited
        assert cache.cached("math", "x^2", draw) == b"<svg>x squared</svg>"
        assert len(drawn) == 2, "the poisoned entry was used"
        assert entry.read_bytes() == raw  # drawn again and kept with its digest
        entry.write_bytes(b"truncated")
        assert cache.lookup("math", "x^2") is None and not entry.exists()


def test_cache_hit_is_checked_and_kept(tmp_path):
    with cache.using(tmp_path):
        cache.store("math", "y", b"data")
        assert cache.lookup("math", "y") == b"data"


@pytest.fixture(scope="module")
def out_copy(demo_build, tmp_path_factory):
    copy = tmp_path_factory.mktemp("verify") / "out"
    shutil.copytree(demo_build, copy)
    return copy


@pytest.mark.e2e
def test_verify_an_output_folder_and_the_kept_inputs(out_copy, cli):
    from tests.conftest import DEMO
    assert verify(out_copy)["differences"] == []
    assert verify(out_copy, DEMO)["differences"] == []   # issued/R1, issued/R2 and the current R3 inputs
    ok = cli("verify", out_copy, "--project", DEMO)
    assert ok.exit_code == 0 and "every file matches its manifest" in ok.output


@pytest.mark.e2e
def test_verify_names_each_difference(out_copy, demo_copy, tmp_path, cli):
    out = tmp_path / "out"
    shutil.copytree(out_copy, out)
    versions = json.loads((out / "versions.json").read_text())
    (out / "versions.json").write_text(json.dumps([v for v in versions if v["version"] != "R1"]
                                                  + [{"version": "R9", "aliases": []}]))
    root = (out / "index.html").read_text()
    (out / "index.html").write_text(re.sub(r"url=R\d+/", "url=R7/", root))
    (demo_copy / "issued" / "R1" / "mixes.yaml").write_text("mixes: []\n")
    (demo_copy / "issued" / "R2" / "lab" / "strength.csv").unlink()
    found = verify(out, demo_copy)["differences"]
    assert "versions.json lists R9, which is not in the folder" in found
    assert "versions.json does not list R1" in found
    assert "index.html points at R7, which is not a revision in the folder" in found
    assert "R1 input modified: mixes.yaml" in found
    assert "R2 input missing: lab/strength.csv" in found
    result = cli("verify", out, "--project", demo_copy)
    assert result.exit_code == 1
    assert f"{out}: does NOT match its manifest ({len(found)} differences)" in result.output


@pytest.mark.e2e
def test_verify_checks_the_inputs_the_pdf_carries(out_copy, tmp_path):
    from pypdf import PdfReader, PdfWriter
    rev = tmp_path / "R2"
    shutil.copytree(out_copy / "R2", rev)
    pdf = rev / "WEP-2026-R2.pdf"   # the main volume carries the inputs
    reader = PdfReader(str(pdf))
    writer = PdfWriter(clone_from=reader)
    name = next(n for n in reader.attachments if n.startswith("input/"))
    writer.add_attachment("input/extra.yaml", b"not an input of R2\n")
    with open(pdf, "wb") as f:
        writer.write(f)
    found = verify(rev)["differences"]
    assert f"R2: modified: {pdf.name}" in found
    assert "R2: input in the PDF extra: extra.yaml" in found
    assert name  # the PDF carries the inputs it was built from


@pytest.mark.e2e
def test_verify_covers_both_volumes_of_the_pdf(out_copy, tmp_path):
    """The appendix volume is an output of the revision like any other: listed in the
    manifest, and a changed or missing appendix volume is named."""
    rev = tmp_path / "R3"
    shutil.copytree(out_copy / "R3", rev)
    manifest = json.loads((rev / "manifest.json").read_text())
    assert {"WEP-2026-R3.pdf", "WEP-2026-R3-appendices.pdf"} <= set(manifest["outputs"])
    assert verify(rev)["differences"] == []
    appendix = rev / "WEP-2026-R3-appendices.pdf"
    appendix.write_bytes(appendix.read_bytes() + b"\n%tampered\n")
    assert verify(rev)["differences"] == ["R3: modified: WEP-2026-R3-appendices.pdf"]
    appendix.unlink()
    assert verify(rev)["differences"] == ["R3: missing: WEP-2026-R3-appendices.pdf"]


@pytest.mark.e2e
def test_pdf_has_no_dead_links(demo_build):
    """Walk every link annotation: an internal link lands on a page of the document; a link
    to a file names one published beside the PDF; none points into the print engine's
    private address space (file:///specgen-pageset/…)."""
    from pypdf import PdfReader
    rev = demo_build / "R3"
    readers = {pdf.name: PdfReader(str(pdf)) for pdf in sorted(rev.glob("*.pdf"))}
    assert set(readers) == {"WEP-2026-R3.pdf", "WEP-2026-R3-appendices.pdf"}
    counts = {"internal": 0, "other volume": 0, "file": 0, "web": 0}
    dead = []
    for name, reader in readers.items():
        pages = {p.indirect_reference.idnum for p in reader.pages}
        for number, page in enumerate(reader.pages, 1):
            for ref in page.get("/Annots", []) or []:
                annot = ref.get_object()
                if annot.get("/Subtype") != "/Link":
                    continue
                if "/Dest" in annot:
                    dest = annot["/Dest"]
                    if dest[0].idnum not in pages:
                        dead.append((name, number, "internal", str(dest)))
                    counts["internal"] += 1
                    continue
                action = annot["/A"]
                if action["/S"] == "/GoToR":   # into the other volume, at a named destination
                    other = readers.get(str(action["/F"]))
                    if other is None or str(action["/D"]) not in other.named_destinations:
                        dead.append((name, number, "other volume", str(action)))
                    counts["other volume"] += 1
                    continue
                uri = str(action["/URI"])
                if uri.startswith(("http://", "https://", "mailto:")):
                    counts["web"] += 1
                elif ":" in uri.split("/", 1)[0] or not (rev / uri.split("#")[0]).is_file():
                    dead.append((name, number, "uri", uri))
                else:
                    counts["file"] += 1
    print(f"\nPDF links: {counts}")
    assert counts["internal"] > 100 and counts["other volume"] > 10
    assert dead == []
