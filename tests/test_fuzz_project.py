"""Fuzzing the whole project format: every corruption ends in a located message.

Each generated case is a copy of demo_project (every file of the format: the six YAML
documents, the five lab tables and the firing record, the narrative, the archived issued
revisions) with one corruption of one kind:

- ``number``: a numeric field set to NaN, ±infinity or ±1e308 (YAML and quantity text);
- ``id_twice``: an entry's id (or key) set to another entry's of the same list;
- ``dangling``: a reference (mix, binder, sand, analysis, zone, sample, revision …) set to
  an id that does not exist;
- ``empty_text``: a required text field left empty; ``long_text``: 200 000 characters;
- ``unknown_key``: a misspelt key; ``structure``: an alias bomb or deep nesting;
- ``bytes``: a NUL, another control character or a byte that is not UTF-8 inserted anywhere
  in any file (narrative and archive included);
- ``csv_cell``, ``csv_row_twice``, ``csv_column_twice``: a lab table's number made absurd, a
  row repeated, a column repeated; ``date_order``: a revision dated before the issued ones.

Every case must be refused (``InputErrors``: the CLI's exit 2) — a load that succeeds is a
*silent acceptance* — and every problem must name its file and line or row; the problem
about the corrupted place must name it (line or row, and the field where there is one);
problems must all be about the corrupted file (no follow-on errors); messages stay short.
Any other exception is a *traceback*.  The test prints its tally.

Default: a bounded run (``SPECGEN_FUZZ_CASES``, 150 cases) that takes well under a minute.
Long mode by hand: ``SPECGEN_FUZZ_CASES=1200 python3 -m pytest -q -n 0 -s tests/test_fuzz_project.py``.
"""
from __future__ import annotations

import csv
import io
import os
import random
import shutil
import tempfile
from collections import Counter
from pathlib import Path

import pytest
import yaml
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from specgen.errors import InputErrors
from specgen.project import schema
from specgen.project.files import read_yaml
from specgen.project.load import DOCUMENTS

pytestmark = pytest.mark.costly(20)   # CPU s (tests/conftest.py)

REPO = Path(__file__).resolve().parent.parent
DEMO = REPO / "demo_project"
N_CASES = int(os.environ.get("SPECGEN_FUZZ_CASES", "150"))
MAX_PROBLEM_CHARS = 1200  # a message quotes at most ~80 characters of a value

NASTY_NUMBERS = [float("nan"), float("inf"), float("-inf"), 1e308, -1e308]
NASTY_QUANTITY = ["nan", "inf", "-inf", "1e308", "-1e308"]
NASTY_CELLS = ["nan", "inf", "-inf", "1e308", "-1e308", "NaN"]
BYTES = [b"\x00", b"\x01", b"\x1b", b"\x7f", b"\xff", b"\xc3\x28"]
# keys whose value names something defined elsewhere (file → keys)
REF_KEYS = {"units", "historic_mortar", "candidates", "mix", "analysis", "binder_analysis",
            "aggregate_sample", "material", "binder", "sand", "raised_in", "closed_in",
            "zone", "released_in", "released_by", "reviewer", "colour_sample", "check", "about"}
# fields named like a reference that hold plain text (a drawing's units: 'm', 'mm')
NOT_REFS = {("samples.yaml", "drawings", "units")}
# lab tables whose rows must not repeat (the key column repeated is the corruption)
ROW_UNIQUE = {"lab/strength.csv", "lab/sieves.csv", "lab/capillary.csv",
              "lab/site-temperature.csv", "lab/firing-NC1.csv"}
TALLY: Counter = Counter()


# ------------------------------------------------------------------ the targets
def _models() -> dict[str, type]:
    return {name: model for name, (model, _) in DOCUMENTS.items()}


def _annotation(model, path: tuple):
    """Annotation of the field at ``path`` in ``model`` (dict values included), or None."""
    holder = schema.model_at(model, tuple(p for p in path[:-1]))
    key = path[-1]
    if holder is None:  # inside a dict field (mass_percent: {CaO: …}, lumped_split: …)
        for cut in range(len(path) - 1, 0, -1):
            h = schema.model_at(model, path[:cut - 1]) if cut > 1 else model
            if h is not None and isinstance(path[cut - 1], str) and path[cut - 1] in h.model_fields:
                return h.model_fields[path[cut - 1]].annotation
        return None
    if isinstance(key, int):
        return holder.model_fields[path[-2]].annotation if isinstance(path[-2], str) else None
    info = holder.model_fields.get(key)
    return info.annotation if info is not None else None


def _is_numeric(annotation) -> bool:
    text = repr(annotation)
    return ("float" in text or "int" in text) and "str" not in text.replace("dict[str", "")


def _leaves(data, path=()):
    if isinstance(data, dict):
        for k, v in data.items():
            yield from _leaves(v, path + (k,))
    elif isinstance(data, list):
        for i, v in enumerate(data):
            yield from _leaves(v, path + (i,))
    else:
        yield path, data


def _yaml_files() -> list[str]:
    return sorted(p.relative_to(DEMO).as_posix() for p in DEMO.rglob("*.yaml"))


def _targets() -> dict[str, list]:
    """Every place of the demo project a corruption of each kind can be aimed at."""
    models = _models()
    t: dict[str, list] = {k: [] for k in ("number", "id_twice", "dangling", "empty_text",
                                          "long_text", "unknown_key")}
    for rel in _yaml_files():
        model = models[rel.rsplit("/", 1)[-1]]
        data = yaml.safe_load((DEMO / rel).read_text(encoding="utf-8"))
        for path, value in _leaves(data):
            ann = _annotation(model, path)
            if isinstance(value, (int, float, str)) and not isinstance(value, bool) \
                    and ann is not None and _is_numeric(ann) and not _is_date(value):
                t["number"].append((rel, path, isinstance(value, str)))
            key = next((p for p in reversed(path) if isinstance(p, str)), None)
            if key in REF_KEYS and isinstance(value, str) and (rel, path[0], key) not in NOT_REFS:
                t["dangling"].append((rel, path))
            holder = schema.model_at(model, path[:-1]) if isinstance(path[-1], str) else None
            info = holder.model_fields.get(path[-1]) if holder is not None else None
            if info is not None and isinstance(value, str) and "Literal" not in repr(info.annotation):
                if info.is_required() and info.metadata == [] or info.is_required():
                    t["empty_text"].append((rel, path))
                if "pattern" not in repr(info.metadata) + repr(info.annotation):
                    t["long_text"].append((rel, path))
        for path in _mappings(data):
            t["unknown_key"].append((rel, path))
        for path, items in _id_lists(data):
            t["id_twice"].append((rel, path, items))
    return t


def _is_date(value) -> bool:
    import datetime as dt
    return isinstance(value, (dt.date, dt.datetime))


def _mappings(data, path=()):
    if isinstance(data, dict):
        yield path
        for k, v in data.items():
            yield from _mappings(v, path + (k,))
    elif isinstance(data, list):
        for i, v in enumerate(data):
            yield from _mappings(v, path + (i,))


ID_FIELDS = ("id", "mix", "zone", "rule", "binder", "sand")


def _id_lists(data, path=()):
    """(path of a list, its id field) for lists of two or more entries keyed by an id."""
    if isinstance(data, dict):
        for k, v in data.items():
            yield from _id_lists(v, path + (k,))
    elif isinstance(data, list):
        if len(data) >= 2 and all(isinstance(x, dict) for x in data):
            field = next((f for f in ID_FIELDS if all(f in x for x in data)), None)
            if field is not None and len({x[field] for x in data}) == len(data):
                yield path, field
        if len(data) >= 2 and path and path[-1] == "candidates":
            yield path, None   # a list of ids (a zone's candidates)
        for i, v in enumerate(data):
            yield from _id_lists(v, path + (i,))


TARGETS = _targets()
CSV_FILES = sorted(p.relative_to(DEMO).as_posix() for p in DEMO.rglob("*.csv"))
ALL_FILES = sorted(p.relative_to(DEMO).as_posix() for p in DEMO.rglob("*") if p.is_file())
#: the text files of the format (stray bytes go into these); placed photographs and report
#: PDFs are opaque to the loader beyond their kind, which tests/test_evidence.py checks
TEXT_FILES = [f for f in ALL_FILES if f.endswith((".yaml", ".csv", ".md"))]
CATEGORIES = ["number", "id_twice", "dangling", "empty_text", "long_text", "unknown_key",
              "structure", "bytes", "csv_cell", "csv_row_twice", "csv_column_twice",
              "date_order"]


# ------------------------------------------------------------------ applying a corruption
def _get(data, path):
    for p in path:
        data = data[p]
    return data


def _set(data, path, value):
    _get(data, path[:-1])[path[-1]] = value


def _dump(root: Path, rel: str, data) -> None:
    (root / rel).write_text(yaml.safe_dump(data, sort_keys=False, allow_unicode=True,
                                           width=1000), encoding="utf-8")


def corrupt(root: Path, kind: str, pick: int, rng: random.Random) -> dict:
    """Apply one corruption of ``kind``; return where it is: file, and path or row/column."""
    if kind in TARGETS:
        target = TARGETS[kind][pick % len(TARGETS[kind])]
        rel, path = target[0], target[1]
        data = yaml.safe_load((root / rel).read_text(encoding="utf-8"))
        if kind == "number":
            if target[2]:  # a quantity written with its unit
                unit = str(_get(data, path)).split(None, 1)[1:] or [""]
                _set(data, path, f"{rng.choice(NASTY_QUANTITY)} {unit[0]}".strip())
            else:
                _set(data, path, rng.choice(NASTY_NUMBERS))
        elif kind == "dangling":
            _set(data, path, "ZZ9")
        elif kind == "empty_text":
            _set(data, path, "")
        elif kind == "long_text":
            _set(data, path, "x" * 200_000)
        elif kind == "unknown_key":
            _get(data, path)["colour_tpyo"] = "x"
            path = path + ("colour_tpyo",)
        elif kind == "id_twice":
            items = _get(data, path)
            field = target[2]
            j = 1 + pick % (len(items) - 1)
            if field is None:
                items[j] = items[0]
                path = path + (j,)
            else:
                items[j][field] = items[0][field]
                path = path + (j, field)
        _dump(root, rel, data)
        return {"file": rel, "path": path}
    if kind == "structure":
        rel = _yaml_files()[pick % len(_yaml_files())]
        if pick % 2:
            text = "a0: &a0 [x, x, x, x, x, x, x, x, x, x]\n" + "".join(
                f"a{i}: &a{i} [" + ", ".join([f"*a{i - 1}"] * 10) + "]\n" for i in range(1, 9))
        else:
            text = "project:\n  title: " + "[" * 500 + "]" * 500 + "\n"
        (root / rel).write_text(text, encoding="utf-8")
        return {"file": rel, "path": None}
    if kind == "bytes":
        rel = TEXT_FILES[pick % len(TEXT_FILES)]
        raw = (root / rel).read_bytes()
        at = rng.randrange(len(raw) + 1)
        (root / rel).write_bytes(raw[:at] + rng.choice(BYTES) + raw[at:])
        return {"file": rel, "path": None}
    if kind == "date_order":
        data = yaml.safe_load((root / "dossier.yaml").read_text(encoding="utf-8"))
        data["revision"]["date"] = "1999-01-01"
        _dump(root, "dossier.yaml", data)
        return {"file": "dossier.yaml", "path": ("revision", "date")}
    return _corrupt_csv(root, kind, pick, rng)


def _corrupt_csv(root: Path, kind: str, pick: int, rng: random.Random) -> dict:
    files = sorted(ROW_UNIQUE) if kind == "csv_row_twice" else CSV_FILES
    rel = files[pick % len(files)]
    rows = list(csv.reader(io.StringIO((root / rel).read_text(encoding="utf-8"))))
    header, body = rows[0], rows[1:]
    where: dict = {"file": rel, "path": None}
    if kind == "csv_cell":
        numeric = [j for j, h in enumerate(header) if "[" in h]
        j = numeric[pick % len(numeric)]
        i = rng.randrange(len(body))
        body[i][j] = rng.choice(NASTY_CELLS)
        where.update(row=i + 2, field=header[j])
    elif kind == "csv_row_twice":
        i = rng.randrange(len(body))
        body.insert(i + 1, list(body[i]))
        where.update(row=i + 3)
    elif kind == "csv_column_twice":
        j = pick % len(header)
        header.append(header[j])
        for r in body:
            r.append(r[j])
        where.update(row=1, field=header[j])
    out = io.StringIO()
    csv.writer(out, lineterminator="\n").writerows([header] + body)
    (root / rel).write_text(out.getvalue(), encoding="utf-8")
    return where


# ------------------------------------------------------------------ judging a case
def load_like_check(root: Path):
    """What ``specgen check`` reads: the project and its archived issued revisions."""
    from specgen.build import _load_archive, load as _load
    project = _load(root)   # with the check codes and page names, as the pipeline loads
    _load_archive(root, project)
    return project


def expected_line(root: Path, where: dict) -> int | None:
    if where.get("path") is None or where["file"].endswith(".csv"):
        return None
    located = read_yaml(root / where["file"], where["file"], _NullLog())
    return located.line_of(tuple(where["path"])) if located else None


class _NullLog:
    def add(self, *a, **k):
        pass


def judge(root: Path, where: dict, exc: InputErrors) -> list[str]:
    """Faults of a refusal: unlocated problems, follow-ons, the corrupted place unnamed."""
    faults = []
    corrupted = where["file"]
    problems = exc.problems
    for p in problems:
        if p.line is None and p.row is None:
            faults.append(f"unlocated: {p}")
        if len(str(p)) > MAX_PROBLEM_CHARS:
            faults.append(f"long message ({len(str(p))} characters): {str(p)[:120]}")
        if p.file != corrupted and where.get("path") != ("revision", "date"):
            faults.append(f"follow-on in another file: {p}")
    line = expected_line(root, where)
    if line is not None and not any(p.line == line for p in problems):
        faults.append(f"no problem at line {line} ({where['path']}): {[str(p) for p in problems]}")
    if where.get("row") is not None and not any(p.row == where["row"] for p in problems):
        faults.append(f"no problem at row {where['row']}: {[str(p) for p in problems]}")
    if where.get("field") and not any(p.field for p in problems):
        faults.append(f"no field named: {[str(p) for p in problems]}")
    return faults


def run_case(kind: str, pick: int, rng_state: int) -> tuple[str, list[str]]:
    """(outcome, faults) of one generated case."""
    rng = random.Random(rng_state)
    with tempfile.TemporaryDirectory() as tmp:
        root = Path(tmp) / "project"
        shutil.copytree(DEMO, root)
        where = corrupt(root, kind, pick, rng)
        try:
            load_like_check(root)
        except InputErrors as exc:
            faults = judge(root, where, exc)
            return ("refused" if not faults else "refused, badly located"), faults
        except Exception as exc:  # noqa: BLE001 - exactly what the fuzz hunts
            return "traceback", [f"{type(exc).__name__}: {exc}"]
        return "silently accepted", [f"{kind} at {where} was accepted"]


# ------------------------------------------------------------------ the test
def _fuzz_kind(kind: str, failures: list[str]) -> None:
    @settings(max_examples=max(1, N_CASES // len(CATEGORIES)), deadline=None,
              derandomize=True, database=None, suppress_health_check=list(HealthCheck))
    @given(pick=st.integers(0, 10_000), rng_state=st.integers(0, 2**32 - 1))
    def one(pick, rng_state):
        outcome, faults = run_case(kind, pick, rng_state)
        TALLY["cases"] += 1
        TALLY[outcome] += 1
        TALLY[f"{kind}: {outcome}"] += 1
        failures.extend(f"[{kind} #{pick}/{rng_state}] {f}" for f in faults)
    one()


def test_every_corruption_is_refused_with_its_place():
    failures: list[str] = []
    for kind in CATEGORIES:  # the same share of cases for every kind of corruption
        _fuzz_kind(kind, failures)
    total = TALLY["cases"]
    print(f"\nproject fuzz: {total} generated cases over {len(ALL_FILES)} files; "
          f"{TALLY['refused']} refused with file, line or row and field "
          f"({100 * TALLY['refused'] / max(total, 1):.1f} %), "
          f"{TALLY['refused, badly located']} refused but badly located, "
          f"{TALLY['traceback']} tracebacks, {TALLY['silently accepted']} silently accepted")
    for kind in CATEGORIES:
        n = sum(v for k, v in TALLY.items() if k.startswith(kind + ": "))
        ok = TALLY[f"{kind}: refused"]
        print(f"  {kind:18s} {ok:5d} / {n:<5d} refused and located")
    assert total >= (N_CASES // len(CATEGORIES)) * len(CATEGORIES) * 0.9, f"only {total} ran"
    assert not failures, "\n".join(failures[:30]) + f"\n… {len(failures)} faults in all"


def test_every_file_of_the_format_is_a_target():
    """The corruptions reach every file: each YAML document, each lab table, the narrative
    and the archive."""
    targeted = {t[0] for ts in TARGETS.values() for t in ts} | set(CSV_FILES) | set(ALL_FILES)
    for name in DOCUMENTS:
        assert name in targeted
    for rel in ("lab/strength.csv", "lab/sieves.csv", "lab/colour.csv", "lab/capillary.csv",
                "lab/site-temperature.csv", "lab/firing-NC1.csv", "narrative/introduction.md",
                "issued/R2/dossier.yaml"):
        assert rel in targeted, rel
    for kind, ts in TARGETS.items():
        assert ts, f"no target for {kind}"
