"""Bad input: one located, actionable message per problem, exit 2, nothing written.

Messages are asserted word for word where they matter (file, line/row, field, fix).
"""
from __future__ import annotations

import hashlib
import re

import pytest


def edit(path, old: str, new: str) -> None:
    text = path.read_text(encoding="utf-8")
    assert old in text, f"test setup: {old!r} not in {path.name}"
    path.write_text(text.replace(old, new, 1), encoding="utf-8")


def run_check(cli, project):
    result = cli("check", project)
    assert result.exit_code == 2, result.output
    assert "Traceback" not in result.output
    assert isinstance(result.exception, SystemExit)
    return result.output


def test_missing_root_file(cli, tmp_path):
    out = run_check(cli, tmp_path)
    assert f"{tmp_path}/dossier.yaml: not found: a project folder needs this root file." in out
    assert f"Fix: run 'specgen new {tmp_path}' for a starter project" in out


def test_yaml_syntax_error(cli, demo_copy):
    edit(demo_copy / "mixes.yaml", "  - id: M2\n", "  - id: M2\n   name: [unclosed\n")
    out = run_check(cli, demo_copy)
    assert re.search(r"mixes\.yaml, line \d+: is not valid YAML: ", out)
    assert "Fix: check indentation and quoting near that line" in out


def test_unknown_key_suggests_nearest(cli, demo_copy):
    edit(demo_copy / "mixes.yaml", "water_binder_ratio: 0.55", "water_binder_ration: 0.55")
    out = run_check(cli, demo_copy)
    assert ("mixes.yaml, line 7: mixes[0].water_binder_ration: unknown key "
            "'water_binder_ration'. Fix: did you mean 'water_binder_ratio'?") in out


def test_missing_required_field(cli, demo_copy):
    edit(demo_copy / "dossier.yaml", "  client: Wrenmouth Harbour Commissioners\n", "")
    out = run_check(cli, demo_copy)
    assert ("dossier.yaml, line 2: project.client: this required field is missing. "
            "Fix: add 'client:'.") in out


def test_missing_unit(cli, demo_copy):
    edit(demo_copy / "materials.yaml", 'compressive_strength: "48 MPa"', "compressive_strength: 48")
    out = run_check(cli, demo_copy)
    assert ("materials.yaml, line 20: masonry_units[0].compressive_strength: the number 48 has "
            "no unit; write it with its unit, e.g. '12 MPa' or '1740 psi'.") in out


def test_wrong_unit(cli, demo_copy):
    edit(demo_copy / "dossier.yaml", 'area: "240 m^2"', 'area: "240 m"')
    out = run_check(cli, demo_copy)
    assert "dossier.yaml, line 37: zones[0].area: 'm' is not a area unit" in out


def test_csv_header_without_unit(cli, demo_copy):
    edit(demo_copy / "lab/strength.csv", "value [MPa]", "value")
    out = run_check(cli, demo_copy)
    assert ("lab/strength.csv, row 1: value: column 'value' has no unit. "
            "Fix: write the unit in the header, e.g. 'value [MPa]'.") in out


@pytest.mark.parametrize("age", ["0", "-7"])
def test_zero_or_negative_age(cli, demo_copy, age):
    edit(demo_copy / "lab/strength.csv", "M1-01d-C1,M1,1,", f"M1-01d-C1,M1,{age},")
    out = run_check(cli, demo_copy)
    assert (f"lab/strength.csv, row 2: age [d]: age must be greater than zero; found {age}. "
            "Fix: give the age at test in days since casting.") in out


def test_negative_strength(cli, demo_copy):
    edit(demo_copy / "lab/strength.csv", "M1-01d-C1,M1,1,compressive,1.18", "M1-01d-C1,M1,1,compressive,-1.18")
    out = run_check(cli, demo_copy)
    assert "lab/strength.csv, row 2: value [MPa]: strength must be greater than zero; found -1.18." in out


def test_duplicate_specimen(cli, demo_copy):
    edit(demo_copy / "lab/strength.csv", "M1-01d-C2,", "M1-01d-C1,")
    out = run_check(cli, demo_copy)
    assert ("lab/strength.csv, row 3: specimen: specimen 'M1-01d-C1' already appears in row 2. "
            "Fix: give each specimen its own id.") in out


def test_mix_names_unknown_binder(cli, demo_copy):
    edit(demo_copy / "mixes.yaml", "binders: [{binder: NH35, parts: 1}]", "binders: [{binder: NH53, parts: 1}]")
    out = run_check(cli, demo_copy)
    assert ("mixes.yaml, line 15: mixes[2].binders[0].binder: names binder 'NH53', which is not "
            "defined. Fix: did you mean 'NH35'?") in out


def test_oxide_total_far_from_100(cli, demo_copy):
    edit(demo_copy / "analyses.yaml", "CaO: 40.1,", "CaO: 90.1,")
    out = run_check(cli, demo_copy)
    assert ("analyses.yaml, line 9: analyses[0].mass_percent: constituents of analysis 'BS-1' add "
            "up to 149.6 %; expected close to 100 % (accepted 85–115 %).") in out


def test_empty_csv(cli, demo_copy):
    (demo_copy / "lab/strength.csv").write_text("", encoding="utf-8")
    out = run_check(cli, demo_copy)
    assert ("lab/strength.csv: is empty: expected a header row and at least one data row. "
            "Fix: add the results, or delete the file if there are none yet.") in out


def test_non_utf8_file(cli, demo_copy):
    path = demo_copy / "materials.yaml"
    path.write_bytes(path.read_bytes().replace("Blue engineering".encode(), "Bleu \xe9ngineering".encode("latin-1")))
    out = run_check(cli, demo_copy)
    assert re.search(r"materials\.yaml, line 20: is not UTF-8 text \(byte 0xe9 at offset \d+\)\. "
                     r"Fix: save the file as UTF-8", out)


def test_all_problems_reported_together(cli, demo_copy):
    edit(demo_copy / "mixes.yaml", "water_binder_ratio: 0.55", "water_binder_ration: 0.55")
    edit(demo_copy / "lab/strength.csv", "M1-01d-C2,", "M1-01d-C1,")
    edit(demo_copy / "materials.yaml", 'compressive_strength: "48 MPa"', "compressive_strength: 48")
    out = run_check(cli, demo_copy)
    assert out.startswith("3 problems in the project folder:")
    assert "water_binder_ration" in out and "already appears" in out and "has no unit" in out


def _tree_hashes(root):
    return {p.relative_to(root).as_posix(): hashlib.sha256(p.read_bytes()).hexdigest()
            for p in sorted(root.rglob("*")) if p.is_file()}


@pytest.mark.e2e
def test_bad_build_writes_nothing_and_keeps_earlier_build(cli, demo_copy, demo_build):
    before = _tree_hashes(demo_build)
    edit(demo_copy / "lab/strength.csv", "M1-01d-C2,", "M1-01d-C1,")
    result = cli("build", demo_copy, "--out", demo_build, "--quiet")
    assert result.exit_code == 2 and "already appears in row 2" in result.output
    assert "Traceback" not in result.output
    assert _tree_hashes(demo_build) == before
    # no staging folder left behind (the artefact cache .cache/ is kept on purpose)
    assert not [p for p in demo_build.iterdir() if p.name.startswith(".") and p.name != ".cache"]


def test_sieve_passing_above_100(cli, demo_copy):
    edit(demo_copy / "lab/sieves.csv", "S1,2.36,92", "S1,2.36,192")
    out = run_check(cli, demo_copy)
    assert ("lab/sieves.csv, row 3: passing: passing must lie between 0 and 100 %; found 192 %. "
            "Fix: give the cumulative percentage passing.") in out


def test_sieve_table_without_retained_or_passing(cli, demo_copy):
    (demo_copy / "lab/sieves.csv").write_text("sample,sieve [mm]\nS1,4.75\n", encoding="utf-8")
    out = run_check(cli, demo_copy)
    assert ("lab/sieves.csv, row 1: needs a column 'retained' (mass on each sieve) or 'passing' "
            "(cumulative %). Fix: add e.g. 'retained [g]' or 'passing [%]'.") in out


def test_colour_lightness_out_of_range(cli, demo_copy):
    edit(demo_copy / "lab/colour.csv", "HM1,61.8,", "HM1,161.8,")
    out = run_check(cli, demo_copy)
    assert ("lab/colour.csv, row 2: L: L* must lie between 0 and 100; found 161.8. Fix: check the "
            "column order (L*, a*, b*) and the instrument's export.") in out


def test_colour_unknown_illuminant(cli, demo_copy):
    edit(demo_copy / "lab/colour.csv", "HM1,61.8,3.9,14.2,D65", "HM1,61.8,3.9,14.2,D66")
    out = run_check(cli, demo_copy)
    assert "lab/colour.csv, row 2: illuminant: 'D66' is not allowed here. Fix: did you mean 'D65'?" in out


def test_repeated_ids_are_located_at_their_line(cli, demo_copy):
    edit(demo_copy / "materials.yaml", "  - {id: S2, name: Crushed gritstone fines",
         "  - {id: S1, name: Crushed gritstone fines")
    out = run_check(cli, demo_copy)
    assert ("materials.yaml, line 41: sands[1].id: sand id 'S1' is given twice. Fix: give each "
            "one its own id.") in out


def test_repeated_mortar_properties_are_located(cli, demo_copy):
    path = demo_copy / "materials.yaml"
    text = path.read_text(encoding="utf-8")
    lines = text.splitlines(keepends=True)
    first = next(i for i, line in enumerate(lines) if line.startswith("  - {mix: M2,"))
    lines[first] = lines[first].replace("{mix: M2,", "{mix: M1,")
    path.write_text("".join(lines), encoding="utf-8")
    out = run_check(cli, demo_copy)
    assert (f"materials.yaml, line {first + 1}: mortar_properties[1].mix: mortar_properties of "
            "mix 'M1' is given twice. Fix: merge the two entries into one.") in out
