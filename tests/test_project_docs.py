"""The project's own promises: README commands, CI script, documented names, light imports."""
from __future__ import annotations

import math
import re
import subprocess
import sys
from pathlib import Path

import pytest
from scipy import stats

REPO = Path(__file__).resolve().parent.parent


def test_ci_runs_exactly_the_readme_test_command():
    readme = (REPO / "README.md").read_text()
    blocks = re.findall(r"```sh\n(.*?)\n```", readme, flags=re.S)
    assert len(blocks) >= 2, "README needs the build command and the test command"
    build_cmd, test_cmd = blocks[0].strip(), blocks[1].strip()
    assert "specgen build demo_project" in build_cmd
    assert "pytest" in test_cmd
    assert test_cmd in (REPO / ".ci" / "run").read_text()


def test_results_names_documented():
    out = subprocess.run([sys.executable, "-m", "specgen", "names", "--format", "markdown"],
                         capture_output=True, text=True, check=True).stdout
    dev = (REPO / "DEVELOPERS.md").read_text()
    table = re.search(r"<!-- names:start -->\n(.*)<!-- names:end -->", dev, flags=re.S).group(1)
    assert table == out, "regenerate with: specgen names --format markdown"


def test_help_and_check_import_no_heavy_library():
    code = ("import sys, runpy\n"
            "sys.argv = ['specgen', '--help']\n"
            "from specgen import cli\n"
            "try:\n    cli.main()\nexcept SystemExit:\n    pass\n"
            "sys.argv = ['specgen', 'check', 'demo_project']\n"
            "try:\n    cli.main()\nexcept SystemExit:\n    pass\n"
            "heavy = [m for m in ('matplotlib', 'weasyprint', 'mkdocs') if m in sys.modules]\n"
            "print('HEAVY', heavy)\n")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=REPO)
    assert "HEAVY []" in out.stdout, out.stdout + out.stderr


def test_python_m_specgen_works():
    out = subprocess.run([sys.executable, "-m", "specgen", "--version"], capture_output=True,
                         text=True)
    assert out.returncode == 0 and "specgen" in out.stdout


def test_duplicate_check_code_refused():
    import pytest

    from specgen.checks.registry import DuplicateCheckCode, checks, register
    checks()  # built-ins loaded
    with pytest.raises(DuplicateCheckCode, match="check code 'CHEM-CI' is already registered"):
        register("CHEM-CI", "again", "analysis")(lambda s, c: None)


def test_every_recorded_quantity_is_declared(demo_copy):
    from specgen.build import check
    from specgen.checks.registry import is_declared
    _, results = check(demo_copy)
    names = {n for qs in results.quantities.values() for n in qs}
    assert names and all(is_declared(n) for n in names)


def test_new_writes_a_starter_that_checks(cli, tmp_path):
    target = tmp_path / "fresh"
    result = cli("new", target)
    assert result.exit_code == 0 and (target / "dossier.yaml").is_file()
    checked = cli("check", target, "--wide")
    # The starter's invented 28-d results for M2, 1.6, 1.8 and 1.7 MPa, against its 1.5 MPa
    # minimum: mean 1.7, s = 0.1, k_n = t(0.95, 2) sqrt(1 + 1/3) = 3.3717 (EN 1990 Annex D
    # formula, scipy.stats.t) -> f_k = 1.7 - 0.3372 = 1.363 MPa < 1.5: exactly one failing
    # check, so exit 1 (a failed check), not 0 and not 2 (bad input)
    fk = 1.7 - stats.t.ppf(0.95, 2) * math.sqrt(1 + 1 / 3) * 0.1
    assert fk == pytest.approx(1.363, abs=1e-3)
    assert checked.exit_code == 1, checked.output
    assert "measured f_k 1.36 MPa" in checked.output
    assert "R1: 1 fail," in checked.output
    again = cli("new", target)
    assert again.exit_code == 2
    assert "the folder is not empty. Fix: name a new folder" in again.output


def test_check_exit_code_one_on_a_failed_check(cli, demo_copy):
    # closure 100 ± 2.5 % fails beyond: CaO 40.1 -> 44.1 makes BS-1 total 103.6 %
    path = demo_copy / "analyses.yaml"
    path.write_text(path.read_text().replace("CaO: 40.1,", "CaO: 44.1,", 1))
    result = cli("check", demo_copy)
    assert result.exit_code == 1
    assert re.search(r"CHEM-CLOSURE\s+BS-1\s+fail", result.output)


def test_format_reference_is_generated_from_the_schema():
    from specgen.project.reference import markdown
    shipped = (REPO / "content" / "format-reference.md").read_text()
    assert shipped == markdown(), "regenerate with: specgen format > content/format-reference.md"
    for key in ("`revision.code`", "`zones[].area`", "`mixes[].binders[].parts`", "`value`"):
        assert key in shipped


def test_starter_comments_come_from_the_schema(tmp_path):
    from specgen.project.schema import Revision, Zone
    from specgen.starter import write_starter
    write_starter(tmp_path / "p")
    text = (tmp_path / "p" / "dossier.yaml").read_text()
    assert f"# {Revision.model_fields['date'].description}" in text
    assert f"# {Zone.model_fields['works'].description} (repointing | render | bedding)" in text
