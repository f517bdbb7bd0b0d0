"""Golden test: the demo's results.json is committed as expected output
(tests/expected/demo-results.json) and every run of the checks is compared with it — numbers
within 1e-9 relative, everything else exactly.  A change meant to change a result regenerates
it with ``python3 tools/golden.py``, so every changed number shows in the diff."""
from __future__ import annotations

import json
import math
from pathlib import Path

from specgen.build import check

ROOT = Path(__file__).resolve().parent.parent
EXPECTED = ROOT / "tests" / "expected" / "demo-results.json"
REL = 1e-9


def differences(expected, got, path="") -> list[str]:
    """Every place where ``got`` differs from ``expected`` (numbers within ``REL``)."""
    if isinstance(expected, bool) or isinstance(got, bool):
        return [] if expected is got else [f"{path}: {expected!r} → {got!r}"]
    if isinstance(expected, (int, float)) and isinstance(got, (int, float)):
        ok = math.isclose(expected, got, rel_tol=REL, abs_tol=0.0) or expected == got
        return [] if ok else [f"{path}: {expected!r} → {got!r}"]
    if type(expected) is not type(got):
        return [f"{path}: {type(expected).__name__} → {type(got).__name__}"]
    if isinstance(expected, dict):
        out = [f"{path}/{k}: missing" for k in expected if k not in got]
        out += [f"{path}/{k}: added" for k in got if k not in expected]
        for k in expected.keys() & got.keys():
            out += differences(expected[k], got[k], f"{path}/{k}")
        return out
    if isinstance(expected, list):
        if len(expected) != len(got):
            return [f"{path}: {len(expected)} items → {len(got)}"]
        return [d for i, (e, g) in enumerate(zip(expected, got))
                for d in differences(e, g, f"{path}[{i}]")]
    return [] if expected == got else [f"{path}: {expected!r} → {got!r}"]


def test_demo_results_match_the_committed_expected_output():
    _, results = check(ROOT / "demo_project")
    found = differences(json.loads(EXPECTED.read_text(encoding="utf-8")),
                        json.loads(results.to_json()))
    assert found == [], ("results differ from tests/expected/demo-results.json (if meant, "
                         "run python3 tools/golden.py and commit):\n" + "\n".join(found[:40]))


def test_the_comparison_tolerates_rounding_only():
    # the comparison itself: 1e-9 relative passes, 1e-8 does not; other values exactly
    assert differences({"a": [1.0, "x"]}, {"a": [1.0 + 5e-10, "x"]}) == []
    assert differences({"a": 1.0}, {"a": 1.0 + 1e-8}) == ["/a: 1.0 → 1.00000001"]
    assert differences({"a": "x"}, {"a": "y", "b": 1}) == ["/b: added", "/a: 'x' → 'y'"]
    assert differences({"a": True}, {"a": 1}) == ["/a: True → 1"]
