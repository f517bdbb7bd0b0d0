"""``json.dumps(obj, indent=2, sort_keys=True, ensure_ascii=False)``, the same text, faster.

``results.json`` of a large project is tens of megabytes.  Python's C encoder does not indent,
so with ``indent`` the standard library encodes in pure Python, one generator step per value;
and the results were first copied into dicts by ``dataclasses.asdict`` (a deep copy of every
check's steps and quantities).  :func:`dumps` writes the same text (the standard library's
rules: keys sorted before they are turned into strings, ``float.__repr__`` with ``NaN`` and
``Infinity``, strings by its own ``encode_basestring``) by building a list of pieces, and
encodes a dataclass instance as the dict ``asdict`` would give without copying it.
``tests/test_jsontext.py`` holds it to ``json.dumps`` on constructed values and on the demo's
and a synthetic project's results.
"""
from __future__ import annotations

import dataclasses
import json
from json.encoder import encode_basestring

# the standard library's one-line encoder (its C encoder where there is one): a list of plain
# numbers comes out of it as "[a, b, c]", each number as the indented form writes it
_ONE_LINE = json.JSONEncoder(ensure_ascii=False).encode
_NUMBERS = (int, float)

_INF = float("inf")


def _float(o: float) -> str:
    if o != o:
        return "NaN"
    if o == _INF:
        return "Infinity"
    if o == -_INF:
        return "-Infinity"
    return float.__repr__(o)


def _key(k) -> str:
    """A dict key as the standard library turns it into a string (skipkeys off)."""
    if isinstance(k, str):
        return k
    if isinstance(k, float):
        return _float(k)
    if k is True:
        return "true"
    if k is False:
        return "false"
    if k is None:
        return "null"
    if isinstance(k, int):
        return int.__repr__(k)
    raise TypeError(f"keys must be str, int, float, bool or None, not {k.__class__.__name__}")


_FIELDS: dict[type, tuple[str, ...]] = {}


def fields_of(o) -> dict:
    """The fields of a dataclass instance as a dict (what ``asdict`` gives, one level deep)."""
    names = _FIELDS.get(type(o))
    if names is None:
        names = _FIELDS[type(o)] = tuple(f.name for f in dataclasses.fields(o))
    return {n: getattr(o, n) for n in names}


def dumps(obj) -> str:
    """The text ``json.dumps(obj, indent=2, sort_keys=True, ensure_ascii=False)`` gives, where
    a dataclass instance (not a class) stands for ``dataclasses.asdict`` of it."""
    parts: list[str] = []
    _Writer(parts.append).value(obj, 0)
    return "".join(parts)


class _Writer:
    """The indented form, piece by piece, into ``put``."""

    def __init__(self, put):
        self.put = put

    def value(self, o, level: int) -> None:
        put = self.put
        if isinstance(o, str):
            put(encode_basestring(o))
        elif o is None:
            put("null")
        elif o is True:
            put("true")
        elif o is False:
            put("false")
        elif isinstance(o, int):
            put(int.__repr__(o))
        elif isinstance(o, float):
            put(_float(o))
        elif isinstance(o, (list, tuple)):
            self.sequence(o, level)
        elif isinstance(o, dict):
            self.mapping(o, level)
        elif dataclasses.is_dataclass(o) and not isinstance(o, type):
            self.mapping(fields_of(o), level)
        else:
            raise TypeError(f"Object of type {o.__class__.__name__} is not JSON serializable")

    def sequence(self, o, level: int) -> None:
        put = self.put
        if not o:
            put("[]")
            return
        inner = "\n" + "  " * (level + 1)
        if all(type(x) in _NUMBERS for x in o):   # plain ints and floats (not bool): at once
            put("[" + inner + ("," + inner).join(_ONE_LINE(o)[1:-1].split(", "))
                + "\n" + "  " * level + "]")
            return
        put("[" + inner)
        first = True
        for item in o:
            if not first:
                put("," + inner)
            first = False
            self.value(item, level + 1)
        put("\n" + "  " * level + "]")

    def mapping(self, o: dict, level: int) -> None:
        put = self.put
        if not o:
            put("{}")
            return
        inner = "\n" + "  " * (level + 1)
        put("{" + inner)
        first = True
        for k, v in sorted(o.items()):
            if not first:
                put("," + inner)
            first = False
            put(encode_basestring(_key(k)) + ": ")
            self.value(v, level + 1)
        put("\n" + "  " * level + "}")
