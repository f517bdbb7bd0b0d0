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
import re
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import yaml

from specgen.errors import ProblemLog, quote

MAX_FILE_BYTES = 20 * 1024 * 1024   # lab exports are small; a bigger file is a mistake
MAX_YAML_NODES = 200_000            # bounds alias expansion ("billion laughs")
MAX_YAML_DEPTH = 40
# C0 control characters other than tab, line feed and carriage return, DEL, and the C1 set
CONTROL = re.compile("[\x00-\x08\x0b\x0c\x0e-\x1f\x7f-\x9f]")
MERGE_TAG = "tag:yaml.org,2002:merge"


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
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = raw[: exc.start].count(b"\n") + 1
        log.add(rel, f"is not UTF-8 text (byte 0x{raw[exc.start]:02x} at offset {exc.start}).",
                line=line, fix="save the file as UTF-8 (in a spreadsheet: 'CSV UTF-8').")
        return None
    if (bad := CONTROL.search(text)) is not None:
        # a NUL or other control character is damage (a bad export or copy), never data:
        # silently dropped it would change a row's meaning, so the file is refused
        line = text.count("\n", 0, bad.start()) + 1
        column = bad.start() - (text.rfind("\n", 0, bad.start()) + 1) + 1
        log.add(rel, f"holds the control character U+{ord(bad.group()):04X} at column {column}.",
                line=line, fix="remove it (re-export the file as plain UTF-8 text).")
        return None
    return text


class _Refused(ValueError):
    """A document that parses but cannot be used, with the line where it goes wrong."""

    def __init__(self, message: str, line: int | None, fix: str = "write each value out in full."):
        super().__init__(message)
        self.line = line
        self.fix = fix


def _flow_depth(text: str) -> tuple[int, int]:
    """Deepest nesting of [ ] and { } and the line where it is first reached (a cheap
    guard before the recursive parser)."""
    depth = deepest = 0
    line = where = 1
    for ch in text:
        if ch in "[{":
            depth += 1
            if depth > deepest:
                deepest, where = depth, line
        elif ch in "]}":
            depth = max(0, depth - 1)
        elif ch == "\n":
            line += 1
    return deepest, where


def _deepest_indent(text: str) -> int:
    """Line of the most indented line (where a block-style nesting is deepest)."""
    best, where = -1, 1
    for i, line in enumerate(text.splitlines(), 1):
        indent = len(line) - len(line.lstrip(" -"))
        if line.strip() and indent > best:
            best, where = indent, i
    return where


def _walk(node: yaml.Node, path: tuple, lines: dict, depth: int, budget: list) -> Any:
    line = node.start_mark.line + 1
    budget[0] -= 1
    if budget[0] < 0:
        raise _Refused(f"the document expands to more than {MAX_YAML_NODES:,} values "
                       "(aliases repeating aliases?)", line)
    if depth > MAX_YAML_DEPTH:
        raise _Refused(f"the document is nested more than {MAX_YAML_DEPTH} levels deep", line)
    lines[path] = line
    if isinstance(node, yaml.MappingNode):
        return _mapping(node, path, lines, depth, budget)
    if isinstance(node, yaml.SequenceNode):
        return [_walk(v, path + (i,), lines, depth + 1, budget) for i, v in enumerate(node.value)]
    return _scalar(node)


def _mapping(node: yaml.MappingNode, path: tuple, lines: dict, depth: int, budget: list) -> dict:
    """A mapping; the merge key ``<<`` (YAML 1.1) copies the keys of the mapping(s) it names,
    and keys written out beside it take precedence, as the YAML merge-key spec says."""
    out: dict = {}
    merged: dict = {}
    for key_node, value_node in node.value:
        key_line = key_node.start_mark.line + 1
        if key_node.tag == MERGE_TAG:
            sources = value_node.value if isinstance(value_node, yaml.SequenceNode) \
                else [value_node]
            for src in sources:
                if not isinstance(src, yaml.MappingNode):
                    raise _Refused("the merge key '<<' must name a mapping (an alias such as "
                                   "*defaults, or a list of them)", key_line)
                for k, v in _walk(src, path, lines, depth + 1, budget).items():
                    merged.setdefault(k, v)  # the first mapping listed wins (merge-key spec)
            continue
        key = _scalar(key_node)
        if not isinstance(key, (str, int, float, bool)) or key is None:
            raise _Refused("a key must be plain text", key_line)
        if key in out:
            raise _Refused(f"key '{quote(key)}' appears twice in the same mapping", key_line,
                           "keep one of the two (a second value would silently replace the first).")
        out[key] = _walk(value_node, path + (key,), lines, depth + 1, budget)
        lines[path + (key,)] = key_line
    return {**{k: v for k, v in merged.items() if k not in out}, **out}


_CONSTRUCTOR = yaml.SafeLoader("")  # one loader builds every scalar (safe tags only)


def _scalar(node: yaml.Node) -> Any:
    if not isinstance(node, yaml.ScalarNode):
        return node  # rejected by the caller
    try:
        return _CONSTRUCTOR.construct_object(node, deep=True)
    except yaml.constructor.ConstructorError:
        tag = quote(node.tag.replace("tag:yaml.org,2002:", "!!"), 40)
        raise _Refused(f"the tag '{tag}' is not allowed here", node.start_mark.line + 1,
                       "write the value plainly, without a '!' tag.") from None
    except (ValueError, OverflowError) as exc:  # e.g. a date such as 2026-13-45
        raise _Refused(f"'{quote(node.value, 40)}' cannot be read ({quote(str(exc), 60)})",
                       node.start_mark.line + 1, "write a real date as YYYY-MM-DD, or quote "
                       "the value if it is text.") from None
    finally:
        _CONSTRUCTOR.constructed_objects.clear()


def compose(text: str) -> yaml.Node | None:
    """The node tree of a YAML document (safe tags): by libyaml when PyYAML has it (about
    15 times faster), else by PyYAML's own parser, which also makes the error of a document
    libyaml refuses, so a message reads the same either way."""
    if _FAST_LOADER is not yaml.SafeLoader:
        try:
            return yaml.compose(text, Loader=_FAST_LOADER)
        except yaml.YAMLError:
            pass   # the pure parser's error (and its wording) follows
    return yaml.compose(text, Loader=yaml.SafeLoader)


_FAST_LOADER = getattr(yaml, "CSafeLoader", yaml.SafeLoader)


def read_yaml(path: Path, rel: str, log: ProblemLog) -> Located | None:
    """Parse a YAML file; record problems (with line) in ``log`` and return ``None`` on failure."""
    text = read_text(path, rel, log)
    if text is None:
        return None
    depth, deep_line = _flow_depth(text)
    if depth > MAX_YAML_DEPTH:
        log.add(rel, f"is nested {depth} levels deep; the limit is {MAX_YAML_DEPTH}.",
                line=deep_line, fix="write the data out flat, as in the starter project.")
        return None
    try:
        root = compose(text)
    except RecursionError:
        log.add(rel, f"is nested too deeply to read (more than {MAX_YAML_DEPTH} levels).",
                line=_deepest_indent(text), fix="write the data out flat, as in the starter "
                "project.")
        return None
    except yaml.MarkedYAMLError as exc:
        mark = exc.problem_mark or exc.context_mark
        line = mark.line + 1 if mark else None
        log.add(rel, f"is not valid YAML: {quote(exc.problem or exc.context)}.", line=line,
                fix="check indentation and quoting near that line (a value containing ': ' "
                    "needs quotes).")
        return None
    except yaml.YAMLError as exc:
        log.add(rel, f"is not valid YAML: {quote(str(exc))}.", line=1)
        return None
    if root is None:
        return Located({}, {})
    lines: dict[tuple, int] = {}
    try:
        data = _walk(root, (), lines, 0, [MAX_YAML_NODES])
    except _Refused as exc:
        log.add(rel, f"cannot be used: {exc}.", line=exc.line, fix=exc.fix)
        return None
    except yaml.YAMLError as exc:
        mark = getattr(exc, "problem_mark", None) or getattr(exc, "context_mark", None)
        log.add(rel, f"cannot be used: {quote(getattr(exc, 'problem', None) or str(exc))}.",
                line=mark.line + 1 if mark else 1, fix="write each value out in full.")
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
