"""``specgen.jsontext.dumps`` against the reference it stands in for: the standard library's
``json.dumps(obj, indent=2, sort_keys=True, ensure_ascii=False)``, with dataclass instances
given to the reference as ``dataclasses.asdict`` of them."""
from __future__ import annotations

import json
from dataclasses import asdict, dataclass, field
from pathlib import Path

import numpy as np
import pytest

from specgen import build
from specgen.jsontext import dumps
from specgen.synthetic import write_project
from tests.conftest import DEMO



def _reference(obj) -> str:
    return json.dumps(obj, indent=2, sort_keys=True, ensure_ascii=False)


@dataclass(frozen=True)
class _Inner:
    symbol: str
    value: float | None
    notes: tuple[str, ...] = ()


@dataclass(frozen=True)
class _Outer:
    code: str
    inputs: tuple[_Inner, ...]
    extra: dict = field(default_factory=dict)


@pytest.mark.parametrize("obj", [
    {},
    [],
    "",
    0,
    -0.0,
    1e-05,                     # repr writes an exponent
    123456789012345678901234567890,
    [1.0, 2.5, float("nan"), float("inf"), float("-inf")],
    [3, -7, 0, 2 ** 70],
    [1, True, 2.0, False],     # bools among numbers are words, not numbers
    {"b": 1, "a": [None, True, False, {}, [], ""]},
    {2: "int key", 1.5: "float key", True: "bool key"},   # sorted as numbers, then named
    {None: "null key"},
    {False: "f", True: "t"},
    {"µ": "kg/m³", "quote\"d": "tab\there", "nl": "line\nbreak", "ctl": "\x01"},
    ("a", ("b", ("c",)), [[[]]]),
    {"float64": np.float64(0.1), "nested": [{"z": 1, "y": {"x": [1, {"w": 2}]}}]},
])
def test_the_same_text_as_the_standard_library(obj):
    assert dumps(obj) == _reference(obj)


def test_a_dataclass_is_written_as_asdict_would_give_it():
    obj = {"checks": [_Outer("C-1", (_Inner("w", 0.25, ("read",)), _Inner("n", None)),
                             {"k": _Inner("deep", 1e300)})], "n": 1}
    deep = {"checks": [asdict(obj["checks"][0])], "n": 1}
    assert dumps(obj) == _reference(deep)


def test_what_the_standard_library_refuses_is_refused():
    with pytest.raises(TypeError):
        dumps({"path": Path("x")})
    with pytest.raises(TypeError):
        dumps({("tuple", "key"): 1})


def test_results_json_of_the_demo_and_a_synthetic_project(tmp_path):
    for project in (DEMO, write_project(tmp_path / "syn", 3)):
        results = build.check(project)[1]
        assert results.to_json() == _reference(results.to_dict()) + "\n"
