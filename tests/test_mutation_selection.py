"""The mutation tool's test selection (tools/mutation.py, run by hand): a test is picked when
it names what a check module registers, directly or through the file's helpers, however
deeply the helpers call each other."""
import importlib.util
from pathlib import Path

TOOL = Path(__file__).resolve().parent.parent / "tools" / "mutation.py"


def _tool():
    spec = importlib.util.spec_from_file_location("mutation_tool", TOOL)
    mod = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(mod)
    return mod


def test_tests_reached_through_helpers_of_helpers_are_selected(tmp_path):
    (tmp_path / "t.py").write_text(
        "def _run(x):\n    return check_it(x)\n\n"
        "def _pair():\n    return _run(1), _run(2)\n\n"
        "def _far():\n    return _pair()\n\n"
        "def test_direct():\n    assert check_it(0)\n\n"
        "def test_one_helper():\n    assert _run(0)\n\n"
        "def test_helper_of_helper():\n    assert _pair()\n\n"
        "def test_three_deep():\n    assert _far()\n\n"
        "def test_other():\n    assert 1 + 1 == 2\n", encoding="utf-8")
    got = _tool().tests_naming(["t.py"], {r"\bcheck_it\s*\("}, root=tmp_path)
    assert got == ["t.py::test_direct", "t.py::test_one_helper", "t.py::test_helper_of_helper",
                   "t.py::test_three_deep"]
    assert _tool().tests_naming(["t.py"], {r"\bnothing_here\s*\("}, root=tmp_path) == ["t.py"]
