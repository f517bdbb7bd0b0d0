"""Reading the files of a project folder, keeping track of where each value was.

YAML is parsed with PyYAML's safe loader (no tags that build objects), and every
key's line is recorded so a validation error can name it.  CSV files are read
with the standard library; row numbers are the file's line numbers (header = 1).
Files are read as UTF-8 (a BOM is accepted); anything else is refused with the
byte offset and line where decoding failed.
"""
from __future__ import annotations

import csv
import io
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import yaml

from specgen.errors import ProblemLog

MAX_FILE_BYTES = 20 * 1024 * 1024   # lab exports are small; a bigger file is a mistake
MAX_YAML_NODES = 200_000            # bounds alias expansion ("billion laughs")
MAX_YAML_DEPTH = 40


@dataclass
class Located:
    """A parsed document plus the line of every key path in it."""

    data: Any
    lines: dict[tuple, int] = field(default_factory=dict)

    def line_of(self, path: tuple) -> int | None:
        """Line of the deepest known prefix of ``path`` (1-based)."""
        for end in range(len(path), -1, -1):
            if path[:end] in self.lines:
                return self.lines[path[:end]]
        return None


def read_text(path: Path, rel: str, log: ProblemLog) -> str | None:
    """Read a text file as UTF-8 with clear messages for size and encoding problems."""
    try:
        size = path.stat().st_size
        if size > MAX_FILE_BYTES:
            log.add(rel, f"file is {size / 1e6:.0f} MB; the limit is {MAX_FILE_BYTES // 2**20} MiB.",
                    fix="split it or remove what is not project data.")
            return None
        raw = path.read_bytes()
    except OSError as exc:
        log.add(rel, f"cannot be read ({exc.strerror}).", fix="check the file exists and is readable.")
        return None
    try:
        return raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = raw[: exc.start].count(b"\n") + 1
        log.add(rel, f"is not UTF-8 text (byte 0x{raw[exc.start]:02x} at offset {exc.start}).",
                line=line, fix="save the file as UTF-8 (in a spreadsheet: 'CSV UTF-8').")
        return None


def _flow_depth(text: str) -> int:
    """Deepest nesting of [ ] and { } (a cheap guard before the recursive parser)."""
    depth = deepest = 0
    for ch in text:
        if ch in "[{":
            depth += 1
            deepest = max(deepest, depth)
        elif ch in "]}":
            depth = max(0, depth - 1)
    return deepest


def _walk(node: yaml.Node, path: tuple, lines: dict, depth: int, budget: list) -> Any:
    budget[0] -= 1
    if budget[0] < 0:
        raise ValueError("the document expands to too many values (aliases nested too deep?)")
    if depth > MAX_YAML_DEPTH:
        raise ValueError(f"the document is nested more than {MAX_YAML_DEPTH} levels deep")
    lines[path] = node.start_mark.line + 1
    if isinstance(node, yaml.MappingNode):
        out: dict = {}
        for key_node, value_node in node.value:
            key = _scalar(key_node)
            if not isinstance(key, (str, int, float, bool)) or key is None:
                raise ValueError(f"line {key_node.start_mark.line + 1}: a key must be plain text")
            if key in out:
                raise ValueError(f"line {key_node.start_mark.line + 1}: key '{key}' appears twice")
            out[key] = _walk(value_node, path + (key,), lines, depth + 1, budget)
            lines[path + (key,)] = key_node.start_mark.line + 1
        return out
    if isinstance(node, yaml.SequenceNode):
        return [_walk(v, path + (i,), lines, depth + 1, budget) for i, v in enumerate(node.value)]
    return _scalar(node)


_CONSTRUCTOR = yaml.SafeLoader("")  # one loader builds every scalar (safe tags only)


def _scalar(node: yaml.Node) -> Any:
    if not isinstance(node, yaml.ScalarNode):
        return node  # rejected by the caller
    try:
        return _CONSTRUCTOR.construct_object(node, deep=True)
    finally:
        _CONSTRUCTOR.constructed_objects.clear()


def read_yaml(path: Path, rel: str, log: ProblemLog) -> Located | None:
    """Parse a YAML file; record problems (with line) in ``log`` and return ``None`` on failure."""
    text = read_text(path, rel, log)
    if text is None:
        return None
    depth = _flow_depth(text)
    if depth > MAX_YAML_DEPTH:
        log.add(rel, f"is nested {depth} levels deep; the limit is {MAX_YAML_DEPTH}.",
                fix="write the data out flat, as in the starter project.")
        return None
    try:
        root = yaml.compose(text, Loader=yaml.SafeLoader)
    except RecursionError:
        log.add(rel, f"is nested too deeply to read (more than {MAX_YAML_DEPTH} levels).",
                fix="write the data out flat, as in the starter project.")
        return None
    except yaml.MarkedYAMLError as exc:
        mark = exc.problem_mark or exc.context_mark
        line = mark.line + 1 if mark else None
        log.add(rel, f"is not valid YAML: {exc.problem or exc.context}.", line=line,
                fix="check indentation and quoting near that line (a value containing ': ' "
                    "needs quotes).")
        return None
    except yaml.YAMLError as exc:
        log.add(rel, f"is not valid YAML: {exc}.")
        return None
    if root is None:
        return Located({}, {})
    lines: dict[tuple, int] = {}
    try:
        data = _walk(root, (), lines, 0, [MAX_YAML_NODES])
    except (ValueError, yaml.YAMLError) as exc:
        log.add(rel, f"cannot be used: {exc}.", fix="write each value out in full.")
        return None
    return Located(data, lines)


@dataclass
class CsvTable:
    """Rows of a CSV file as dicts keyed by header text, with their file line numbers."""

    headers: list[str]
    rows: list[tuple[int, dict[str, str]]]


def read_csv(path: Path, rel: str, log: ProblemLog) -> CsvTable | None:
    """Read a CSV file (comma or semicolon separated); skip blank lines."""
    text = read_text(path, rel, log)
    if text is None:
        return None
    if not text.strip():
        log.add(rel, "is empty: expected a header row and at least one data row.",
                fix="add the results, or delete the file if there are none yet.")
        return None
    dialect = csv.excel
    first = text.splitlines()[0]
    if first.count(";") > first.count(","):
        dialect = csv.excel; delimiter = ";"
    else:
        delimiter = ","
    reader = csv.reader(io.StringIO(text), dialect, delimiter=delimiter)
    try:
        records = [(reader.line_num, r) for r in reader]
    except csv.Error as exc:
        log.add(rel, f"is not valid CSV: {exc}.", line=reader.line_num)
        return None
    headers = [h.strip() for h in records[0][1]]
    rows = []
    for line, rec in records[1:]:
        if not any(cell.strip() for cell in rec):
            continue
        if len(rec) != len(headers):
            log.add(rel, f"has {len(rec)} cells but the header has {len(headers)}.", row=line,
                    fix="check for a stray separator or a missing value.")
            continue
        rows.append((line, {h: c.strip() for h, c in zip(headers, rec)}))
    if not rows:
        log.add(rel, "has a header but no data rows.", row=1,
                fix="add the results, or delete the file if there are none yet.")
        return None
    return CsvTable(headers, rows)
