"""The starter project, one-run error reporting and the list of what is missing for issue."""
from __future__ import annotations

import openpyxl
import pytest

from specgen.project.load import DOCUMENTS, STRENGTH_FILE, TABLES


def test_starter_holds_every_file_of_the_format_commented(cli, tmp_path):
    target = tmp_path / "fresh"
    result = cli("new", target)
    assert result.exit_code == 0, result.output
    for name, (model, _) in DOCUMENTS.items():
        text = (target / name).read_text(encoding="utf-8")
        # every top-level key written in the file carries its description from the schema
        for key, info in model.model_fields.items():
            line = next((ln for ln in text.splitlines() if ln.startswith(f"{key}:")), None)
            if line is not None and info.description:
                assert f"# {info.description}" in line, (name, key)
    for rel in [STRENGTH_FILE, *TABLES, "lab/firing-B1.csv", "lab/README.md",
                "narrative/introduction.md"]:
        assert (target / rel).is_file(), rel
    assert "specification.yaml" in DOCUMENTS and "selections:" in (
        target / "specification.yaml").read_text()
    readme = (target / "lab" / "README.md").read_text()
    assert "`lab/capillary.csv`" in readme and "`lab/*.xlsx`" in readme
    checked = cli("check", target)
    assert checked.exit_code in (0, 1), checked.output   # verdicts, never an input error
    assert "SPEC-SELECT    Z1" in checked.output


@pytest.mark.e2e
def test_starter_builds(starter_build):
    """The starter as ``specgen new`` writes it (``write_starter``), built by ``specgen
    build`` once for the run (``starter_build``, which asserts the build's exit 0)."""
    _, out = starter_build
    rev = out / "R1"
    assert (rev / "index.html").is_file() and list(rev.glob("*.pdf"))
    assert (rev / "exports" / "NEW-001-R1-specification.docx").is_file()


def edit(path, old: str, new: str) -> None:
    text = path.read_text(encoding="utf-8")
    assert old in text, f"test setup: {old!r} not in {path.name}"
    path.write_text(text.replace(old, new, 1), encoding="utf-8")


def test_check_reports_every_input_problem_in_one_run(cli, demo_copy):
    edit(demo_copy / "mixes.yaml", "water_binder_ratio: 0.65", "water_binder_ration: 0.65")
    edit(demo_copy / "lab" / "strength.csv", "M1-01d-C2,M1,1,compressive,1.24,20",
         "M1-01d-C2,M1,1,compressive,abc,20")
    edit(demo_copy / "dossier.yaml", "candidates: [M1, M2, M3]", "candidates: [M1, M2, M9]")
    edit(demo_copy / "materials.yaml", "    analysis: NC1-A\n", "    analysis: NC1-X\n")
    result = cli("check", demo_copy)
    assert result.exit_code == 2 and "Traceback" not in result.output
    out = result.output
    assert out.startswith("4 problems in the project folder:")
    assert ("mixes.yaml, line 12: mixes[1].water_binder_ration: unknown key "
            "'water_binder_ration'. Fix: did you mean 'water_binder_ratio'?") in out
    assert "lab/strength.csv, row 3: value [MPa]: expected a number; found 'abc'." in out
    # checked although mixes.yaml itself failed validation: its ids are read as written
    assert ("dossier.yaml, line 38: zones[0].candidates[2]: names mix 'M9', which is not "
            "defined. Fix: define it, or use one of: M1, M2, M3.") in out
    assert ("materials.yaml, line 5: binders[0].analysis: names analysis 'NC1-X', which is "
            "not defined. Fix: did you mean 'NC1-A'?") in out


def _missing(cli, project):
    result = cli("missing", project)
    assert "Traceback" not in result.output
    return result


def test_missing_lists_what_the_demo_lacks_in_working_order(cli, demo_copy):
    result = _missing(cli, demo_copy)
    assert result.exit_code == 1
    out = result.output
    stages = ["Fabric and compatibility data:", "Binder analyses and firing:",
              "Laboratory tests of the candidate mixes:", "Choice of mortar, trial panels and "
              "costs:", "Review comments:", "Issue:"]
    positions = [out.index(s) for s in stages]
    assert positions == sorted(positions)
    # demo specification.yaml: panels TP3 (M3, Z3) and TP4 (M2, Z2) are pending
    assert "SPEC-PANEL Z2: no panel of M2 accepted when dry yet (TP4 pending)" in out
    assert "SPEC-PANEL Z3: no panel of M3 accepted when dry yet (TP3 pending)" in out
    # demo comments.yaml: C2 and C3 are open
    assert "C2: open comment raised in R2 about CHEM-CI/NHL-A" in out and "C3: open" in out
    assert "R3: the revision is a draft" in out
    # a justified failing choice (Z2, Z3) is a decision, not something missing
    assert "SPEC-SELECT Z2" not in out
    # each item under the stage whose work it asks for: the binder's soundness and setting
    # time (EN 196-3 tests of the paste) with the binder, freeze-thaw of the prisms with the
    # laboratory tests of the mixes, before the choice of mortar
    at = {s: out.index(s) for s in stages}
    binder, lab, choice = (at["Binder analyses and firing:"],
                           at["Laboratory tests of the candidate mixes:"],
                           at["Choice of mortar, trial panels and costs:"])
    assert binder < out.index("DUR-SOUND NC1") < lab
    assert binder < out.index("SITE-SET M2") < lab
    assert lab < out.index("DUR-FROST Z1/M2") < choice
    assert lab < out.index("DUR-TESTS Z1") < choice


def test_missing_names_untested_ages_unchosen_zones_and_unreported_samples(cli, demo_copy,
                                                                           tmp_path):
    edit(demo_copy / "dossier.yaml", '    - {age: "90 d", value: "3 MPa"}\n',
         '    - {age: "90 d", value: "3 MPa"}\n    - {age: "180 d", value: "3.5 MPa"}\n')
    spec = demo_copy / "specification.yaml"
    text = spec.read_text(encoding="utf-8")
    spec.write_text(text[:text.index("  - zone: Z3")] + text[text.index("\nsite_tests:"):],
                    encoding="utf-8")
    from specgen.labbook import write_workbook
    from specgen.build import load as load_project  # as every command reads a project
    book = tmp_path / "book.xlsx"
    write_workbook(load_project(demo_copy), book)
    wb = openpyxl.load_workbook(book)
    wb["strength"]["E2"] = 4.2            # one of the planned specimens reported
    wb.save(demo_copy / "lab" / "results.xlsx")
    out = _missing(cli, demo_copy).output
    for mix in ("M1", "M2", "M3"):
        assert (f"{mix}: no compressive results at 180 d, an age of "
                "requirements.min_compressive") in out
    assert ("SPEC-SELECT Z3: no mortar selected for zone Z3: add a selection to "
            "specification.yaml (candidates: M2, M3)") in out
    assert "SPEC-ACCEPT Z3" not in out     # the same cause, listed once
    # 180 d and 365 d planned for 3 mixes, 6 prisms each, one reported: 35 without a result
    assert "lab/results.xlsx, sheet 'strength': 35 planned test(s) without a result" in out
