"""Fuzzing the loaders: malformed project folders always end in a located message.

Every generated case must either load or raise InputErrors whose every problem
names a file (and, for parse/validation problems, a line, row or field) — never
another exception, never a hang.  Set SPECGEN_FUZZ=5000 for a longer run by hand.
"""
from __future__ import annotations

import os
import shutil
from pathlib import Path

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from specgen.errors import InputErrors
from specgen.build import load as load_project  # as every command reads a project
from specgen.refdata import CONTENT_DIR

STARTER = CONTENT_DIR / "starter"
STARTER_FILES = {q.relative_to(STARTER).as_posix() for q in STARTER.rglob("*") if q.is_file()}
FILES = ["dossier.yaml", "analyses.yaml", "materials.yaml", "mixes.yaml", "lab/strength.csv"]
N_CASES = int(os.environ.get("SPECGEN_FUZZ", "200"))
OUTCOMES = {"loaded": 0, "refused": 0}

NASTY_VALUES = ["nan", ".inf", "-.inf", "1e308", "-5", "0", "''", "null", "[]", "{}", "true",
                "\"12 MPa\"", "\"12 furlongs\"", "\"1740 psi\"", "\"\U0001F9F1\"", "x" * 5000,
                "&a [*a, *a]", "!!python/object:os.system ls", "\"\\u202e\"", "0x1F", "1_000"]


def alias_bomb() -> str:
    lines = ["a0: &a0 [x, x, x, x, x, x, x, x, x, x]"]
    for i in range(1, 9):
        lines.append(f"a{i}: &a{i} [" + ", ".join([f"*a{i-1}"] * 10) + "]")
    return "\n".join(lines) + "\n"


def deep_nesting(depth: int) -> str:
    return "project: " + "[" * depth + "]" * depth + "\n"


mutation = st.one_of(
    st.tuples(st.just("truncate"), st.floats(0, 1)),
    st.tuples(st.just("bytes"), st.binary(min_size=1, max_size=40)),
    st.tuples(st.just("value"), st.sampled_from(NASTY_VALUES)),
    st.tuples(st.just("bom"), st.sampled_from(["utf-8-sig", "utf-16", "latin-1", "cp1252"])),
    st.tuples(st.just("duplicate_line"), st.integers(0, 60)),
    st.tuples(st.just("empty"), st.just(None)),
    st.tuples(st.just("bomb"), st.just(None)),
    st.tuples(st.just("deep"), st.integers(50, 5000)),
    st.tuples(st.just("unicode_id"), st.text(min_size=1, max_size=30)),
)


def apply(path: Path, kind: str, arg) -> None:
    text = path.read_text(encoding="utf-8")
    if kind == "truncate":
        path.write_text(text[: int(len(text) * arg)], encoding="utf-8")
    elif kind == "bytes":
        raw = text.encode()
        cut = len(raw) // 2
        path.write_bytes(raw[:cut] + arg + raw[cut:])
    elif kind == "value":
        # put the nasty value after the first ': ' on some value line (YAML) or cell (CSV)
        if path.suffix == ".csv":
            lines = text.splitlines()
            lines[1] = ",".join([arg] + lines[1].split(",")[1:])
            path.write_text("\n".join(lines) + "\n", encoding="utf-8")
        else:
            head, sep, tail = text.partition(": ")
            path.write_text(head + sep + arg + "\n" + tail.partition("\n")[2], encoding="utf-8")
    elif kind == "bom":
        path.write_bytes(text.replace("a", "\u00e4", 3).encode(arg, errors="replace"))
    elif kind == "duplicate_line":
        lines = text.splitlines(keepends=True)
        i = arg % len(lines)
        path.write_text("".join(lines[: i + 1] + lines[i:]), encoding="utf-8")
    elif kind == "empty":
        path.write_text("", encoding="utf-8")
    elif kind == "bomb":
        path.write_text(alias_bomb(), encoding="utf-8")
    elif kind == "deep":
        path.write_text(deep_nesting(arg), encoding="utf-8")
    elif kind == "unicode_id":
        path.write_text(text.replace("M1", arg.replace("\n", " "), 1), encoding="utf-8")


def _one_case(tmp_path_factory, target, change):
    root = tmp_path_factory.mktemp("fuzz")
    shutil.copytree(STARTER, root, dirs_exist_ok=True)
    apply(root / target, *change)
    try:
        load_project(root)
        OUTCOMES["loaded"] += 1
    except InputErrors as exc:
        OUTCOMES["refused"] += 1
        assert exc.problems
        for p in exc.problems:
            assert p.file, p
            assert p.message and "Traceback" not in p.message
            assert p.file in STARTER_FILES or "/" in p.file, p   # a file of the project
    assert not any(p.name.startswith(".") for p in root.iterdir()), "nothing may be written"


def test_malformed_projects_end_in_located_messages(tmp_path_factory):
    """Every generated case loads or is refused with located messages; the tally is printed
    and the number of cases that ran is checked here, in the same test."""
    OUTCOMES.update(loaded=0, refused=0)

    @settings(max_examples=N_CASES, deadline=None, derandomize=True, database=None,
              suppress_health_check=list(HealthCheck))
    @given(target=st.sampled_from(FILES), change=mutation)
    def one(target, change):
        _one_case(tmp_path_factory, target, change)
    one()
    total = OUTCOMES["loaded"] + OUTCOMES["refused"]
    print(f"\nloader fuzz: {total} generated projects, {OUTCOMES['refused']} refused with "
          f"located messages, {OUTCOMES['loaded']} loaded")
    assert total >= N_CASES * 0.9, f"only {total} of {N_CASES} cases ran"


def test_oversized_file_is_cut_off(tmp_path):
    shutil.copytree(STARTER, tmp_path, dirs_exist_ok=True)
    big = tmp_path / "lab" / "strength.csv"
    with open(big, "r+b") as f:
        f.seek(300 * 1024 * 1024)  # a sparse 300 MB file: cheap to make, refused by size
        f.write(b"\n")
    try:
        load_project(tmp_path)
        raise AssertionError("an oversized file must be refused")
    except InputErrors as exc:
        assert "lab/strength.csv: file is 315 MB; the limit is 20 MiB." in str(exc)
