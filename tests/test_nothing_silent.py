"""Nothing accepted silently: each corruption that once loaded without a word (and some
changed a verdict) is refused with its file, line or row, field and fix; messages stay
short; one file's failure adds no follow-on errors about another."""
from __future__ import annotations


import pytest

from specgen.errors import InputErrors, MAX_PER_FILE
from specgen.build import load as load_project  # as every command reads a project


def edit(path, old, new):
    text = path.read_text(encoding="utf-8")
    assert old in text, old
    path.write_text(text.replace(old, new, 1), encoding="utf-8")


def problems(root, archive=False) -> list[str]:
    from specgen.build import check
    with pytest.raises(InputErrors) as err:
        if archive:
            check(root)
        else:
            load_project(root)
    return [str(p) for p in err.value.problems]


CASES = [
    ("NUL before a sieve row", "lab/sieves.csv", "S1,2.36,92", "\x00S1,2.36,92",
     "lab/sieves.csv, line 3: holds the control character U+0000 at column 1. Fix: remove it "
     "(re-export the file as plain UTF-8 text)."),
    ("NUL before a strength row", "lab/strength.csv", "M1-01d-C2,M1", "\x00M1-01d-C2,M1",
     "lab/strength.csv, line 3: holds the control character U+0000 at column 1."),
    ("NUL escaped in YAML text", "dossier.yaml", "name: Inner face, repointing of brick courses",
     'name: "Inner\\0face"', "dossier.yaml, line 32: zones[0].name: holds a control character "
     "(such as NUL); write plain text (found 'Inner\\x00face')."),
    ("a zone listed twice", "dossier.yaml", "  - id: Z2\n", "  - id: Z1\n",
     "dossier.yaml, line 42: zones[1].id: zone id 'Z1' is given twice. Fix: give each one its "
     "own id."),
    ("a trial panel listed twice", "specification.yaml", "  - id: TP2\n", "  - id: TP1\n",
     "specification.yaml, line 84: trial_panels[1].id: trial panel id 'TP1' is given twice."),
    ("a candidate listed twice", "dossier.yaml", "candidates: [M1, M2, M3]",
     "candidates: [M1, M2, M1]", "dossier.yaml, line 38: zones[0].candidates[2]: candidate mix "
     "'M1' is given twice. Fix: merge the two entries into one."),
    ("a zone's mix that does not exist", "dossier.yaml", '    placing_rate: "8 L/h"\n',
     '    placing_rate: "8 L/h"\n    mix: M9\n', "dossier.yaml, line 42: zones[0].mix: names "
     "mix 'M9', which is not defined. Fix: define it, or use one of: M1, M2, M3."),
    ("a comment raised in an unknown revision", "comments.yaml", "raised_in: R1",
     "raised_in: R7", "comments.yaml, line 4: comments[0].raised_in: comment 'C1' was raised in "
     "revision 'R7', which is neither this revision nor an issued one. Fix: use one of: R3, R1, "
     "R2."),
    ("a comment closed in an unknown revision", "comments.yaml", "closed_in: R2",
     "closed_in: R0", "comments.yaml, line 15: comments[0].closed_in: comment 'C1' was closed "
     "in revision 'R0'"),
    ("a colour reading of an unknown sample", "lab/colour.csv", "HM2,", "HMX,",
     "lab/colour.csv, row 12: sample: sample 'HMX' is not defined; a sample here is a historic "
     "mortar, a mix, a masonry unit, a trial panel or a trial panel's colour_sample. Fix: did you mean 'HM2'?"),
    ("a capillary reading of an unknown sample", "lab/capillary.csv", "M2,5,", "M7,5,",
     "lab/capillary.csv, row 2: sample: sample 'M7' is not defined"),
    ("a duplicated CSV column", "lab/strength.csv",
     "specimen,mix,age [d],test,value [MPa],curing_temperature [degC]",
     "specimen,mix,age [d],test,value [MPa],value [MPa]",
     "lab/strength.csv, row 1: value [MPa]: column 'value' appears twice (columns 5 and 6). "
     "Fix: keep one of the two columns."),
    ("a sieve given twice", "lab/sieves.csv", "S1,2.36,92\n", "S1,2.36,92\nS1,2.36,92\n",
     "lab/sieves.csv, row 4: sieve: sieve of this sample already appears in row 3."),
    ("empty required text", "dossier.yaml", "name: Inner face, repointing of brick courses",
     "name: ''", "dossier.yaml, line 32: zones[0].name: is empty; this text is required."),
    ("a YAML tag", "mixes.yaml", "    water_binder_ratio: 0.65",
     "    water_binder_ratio: !!python/object:os.system ls", "mixes.yaml, line 12: cannot be "
     "used: the tag '!!python/object:os.system' is not allowed here. Fix: write the value "
     "plainly, without a '!' tag."),
    ("a merge key naming a scalar", "mixes.yaml", "  - id: M3\n", "  - <<: 5\n    id: M3\n",
     "mixes.yaml, line 13: cannot be used: the merge key '<<' must name a mapping (an alias "
     "such as *defaults, or a list of them). Fix: write each value out in full."),
]


@pytest.mark.parametrize("name, file, old, new, message", CASES, ids=[c[0] for c in CASES])
def test_corruption_is_refused_at_its_place(demo_copy, name, file, old, new, message):
    edit(demo_copy / file, old, new)
    found = problems(demo_copy)
    assert any(p.startswith(message) for p in found), found
    assert all(p.startswith(file) for p in found), f"follow-on errors: {found}"


def test_merge_key_works(demo_copy):
    edit(demo_copy / "mixes.yaml", "  - id: M2\n    name: \"Natural cement 1 : 2.5 sand\"\n",
         "  - id: M2\n    <<: {name: \"Natural cement 1 : 2.5 sand\", notes: merged}\n")
    mix = load_project(demo_copy).mixes["M2"]
    assert (mix.name, mix.notes) == ("Natural cement 1 : 2.5 sand", "merged")


def test_deep_nesting_and_alias_expansion_are_located(demo_copy):
    (demo_copy / "comments.yaml").write_text(
        "comments:\n  - id: C1\n    text: " + "[" * 60 + "]" * 60 + "\n")
    assert problems(demo_copy) == ["comments.yaml, line 3: is nested 60 levels deep; the limit "
                                   "is 40. Fix: write the data out flat, as in the starter "
                                   "project."]
    (demo_copy / "comments.yaml").write_text(
        "a0: &a0 [x, x, x, x, x, x, x, x, x, x]\n" + "".join(
            f"a{i}: &a{i} [" + ", ".join([f"*a{i - 1}"] * 10) + "]\n" for i in range(1, 9)))
    (found,) = problems(demo_copy)
    assert found.startswith("comments.yaml, line 1: cannot be used: the document expands to "
                            "more than 200,000 values")


def test_long_values_are_quoted_short(demo_copy):
    edit(demo_copy / "dossier.yaml", "name: Inner face, repointing of brick courses",
         "name: " + "x" * 200_000)
    (found,) = problems(demo_copy)
    assert len(found) < 400, len(found)
    assert "xxxx… (200000 characters)" in found


def test_problems_per_file_are_bounded_with_a_count(demo_copy):
    rows = "".join(f"M1-01d-C1,M1,1,compressive,1.{i % 9},20\n" for i in range(50_000))
    with open(demo_copy / "lab" / "strength.csv", "a", encoding="utf-8") as f:
        f.write(rows)
    with pytest.raises(InputErrors) as err:
        load_project(demo_copy)
    report = err.value.report()
    assert len(err.value.problems) == MAX_PER_FILE
    assert report.splitlines()[0] == "50000 problems in the project folder:"
    assert report.endswith("lab/strength.csv: 49980 more problems not shown (fix the ones "
                           "above first: the rest are often the same mistake).")
    assert len(report) < 10_000


def test_a_broken_file_adds_no_follow_on_errors(demo_copy):
    edit(demo_copy / "analyses.yaml", "analyses:", "analyses: [\n")
    found = problems(demo_copy)
    assert all(p.startswith("analyses.yaml") for p in found), found


def test_check_validates_the_archive_like_build(demo_copy, cli):
    edit(demo_copy / "issued" / "R1" / "mixes.yaml", "parts: 1", "parts: .nan")
    result = cli("check", demo_copy)
    assert result.exit_code == 2, result.output
    assert "issued/R1/mixes.yaml, line " in result.output
    assert "Traceback" not in result.output


def test_revision_dated_before_an_issued_one(demo_copy):
    edit(demo_copy / "dossier.yaml", "date: 2026-11-30", "date: 2025-01-01")
    found = problems(demo_copy, archive=True)
    assert any(p.startswith("dossier.yaml, line 23: revision.date: revision R3 is dated "
                            "2025-01-01, before revision R") for p in found), found


def test_missing_archived_dossier_is_named_plainly(demo_copy):
    (demo_copy / "issued" / "R1" / "dossier.yaml").unlink()
    found = problems(demo_copy, archive=True)
    assert found == ["issued/R1/dossier.yaml: not found: an archived revision folder holds the "
                     "complete inputs of the revision it is named after. Fix: restore the file "
                     "(the PDF of revision R1 carries it as the attachment input/dossier.yaml), "
                     "or remove the folder if it is not an issued revision."]
    assert "specgen new" not in found[0]
