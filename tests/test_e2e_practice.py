"""End-to-end (shared demo build): the scope page states the practice, a draft lists its
values to confirm on one page and nowhere inside clauses or sheets, and the reference list
holds every standard the dossier names."""
from __future__ import annotations

import html
import re

import pytest

from specgen.report.references import library

pytestmark = pytest.mark.e2e

REV = "R3"
STANDARD = re.compile(r"\b((?:EN ISO|EN|ISO|ASTM) [A-Z]?\d+(?:-\d+)*)")


def _text(path) -> str:
    raw = re.sub(r"<[^>]+>", " ", path.read_text(encoding="utf-8"))
    return " ".join(html.unescape(raw).split())


def test_scope_states_the_practice(demo_build):
    text = _text(demo_build / REV / "scope.html")
    assert "This dossier follows European practice (EN standards)" in text
    assert "Taken from the other practice: grading envelope ASTM C144" in text
    assert "Reason given: The laboratory sieves on its ASTM E11 sieves" in text


def test_values_to_confirm_on_one_page_not_in_clauses(demo_build):
    rev = demo_build / REV
    confirm = _text(rev / "confirm.html")
    assert "content/data/grading_envelopes.yaml: astm_c144_natural" in confirm
    assert "a revision for construction is not issued while any remains" in confirm
    for page in rev.glob("*.html"):
        if page.name == "confirm.html":
            continue
        text = _text(page)
        assert "(memory)" not in text and "from memory; confirm" not in text, page.name


def test_reference_list_holds_every_standard_named(demo_build):
    rev = demo_build / REV
    known = {e["number"].split("/")[0] for e in library().values() if e.get("number")}
    refs = _text(rev / "references.html")
    for page in sorted(rev.glob("*.html")):
        for name in set(STANDARD.findall(_text(page))):
            assert name in known, f"{page.name} names {name}, which the bibliography lacks"
            assert name in refs, f"{page.name} names {name}, missing from the reference list"
