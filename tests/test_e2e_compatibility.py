"""End-to-end: the historic-fabric and compatibility chapters of the demo build."""
from __future__ import annotations

import json
import re

import pytest

pytestmark = pytest.mark.e2e

REV = "R3"


def test_compatibility_matrix_links_every_pair_to_its_sheet(demo_build):
    html = (demo_build / REV / "compatibility.html").read_text()
    sheets = (demo_build / REV / "calculations.html").read_text()
    results = json.loads((demo_build / REV / "results.json").read_text())
    pairs = {c["subject"] for c in results["checks"] if c["code"].startswith("COMP-")}
    assert pairs == {"Z1/M1", "Z1/M2", "Z1/M3", "Z2/M1", "Z2/M2", "Z3/M2", "Z3/M3"}
    for code in ("comp-str-unit", "comp-str-hist", "comp-moist", "comp-move", "comp-salt",
                 "comp-grad", "comp-colour"):
        for pair in pairs:
            anchor = f"calc-{code}-{pair.lower().replace('/', '-')}"
            assert f'href="calculations.html#{anchor}"' in html, anchor
            assert f'id="{anchor}"' in sheets, anchor
    # two real tables per zone (compatibility with the fabric, then durability in the
    # zone's exposure), one row per candidate of each zone (3 + 2 + 2) in each
    assert len(re.findall(r"<tr[^>]*>\s*<td><strong>M\d</strong></td>", html)) == 2 * 7
    assert len(re.findall(r"Table \d+\. Compatibility of the candidates with the fabric of "
                          r"zone Z\d", html)) == 3


def test_compatibility_figures_and_colour_caveat(demo_build):
    html = (demo_build / REV / "compatibility.html").read_text()
    for zone in ("Z1", "Z2", "Z3"):
        assert f'src="figures/moisture-{zone}.svg"' in html
    assert 'src="figures/grading-Z1.svg"' in html and 'src="figures/colour-Z1.svg"' in html
    assert (demo_build / REV / "figures" / "grading-Z1.svg").read_bytes().startswith(b"<?xml")
    assert "No standard acceptance threshold exists for the colour of repointing" in html
    assert "trial panels, judged dry by eye in daylight, decide" in html


def test_fabric_chapter_lists_units_and_historic_mortars(demo_build):
    html = (demo_build / REV / "fabric.html").read_text()
    assert "EB1 — Blue engineering brick (1868)" in html
    # the value and its unit bound by the narrow no-break space (SI Brochure, 5.4.3; from memory)
    assert "<td>compressive strength</td>\n<td style=\"text-align: right;\">48\u202fMPa</td>" in html
    assert "HM2 — Parapet render, weathered" in html
    assert "Northstead Materials Laboratory, report NML-4502" in html


def test_durability_matrix_cells_read_in_words(demo_build):
    """The durability table names what the sulfate checks found (no bare condition counts):
    thaumasite needs C-S-H, sulfate, water, carbonate and cold together, ettringite aluminate,
    sulfate and water (Thaumasite Expert Group 1999, from memory)."""
    html = (demo_build / REV / "compatibility.html").read_text()
    text = re.sub(r"\s+", " ", re.sub(r"<[^>]+>", " ", html))
    tables = re.findall(r"Durability of the candidates in the exposure of zone Z\d(.*?)Figure",
                        text)
    assert len(tables) == 3
    assert "all 5 conditions met" in tables[0] and "aluminate absent" in tables[0]
    assert not any(re.search(r"(attention|pass|fail) \d+(\.\d+)? (attention|pass|fail|hold)",
                             t) for t in tables)

