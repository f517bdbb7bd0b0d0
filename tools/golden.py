"""Write the demo's expected results (tests/expected/demo-results.json) from the code as it is.

    python3 tools/golden.py

tests/test_golden.py compares every build of the checks with this file (numbers within
1e-9 relative, everything else exactly).  Run this after a change that is meant to change a
result, and commit the file with the change, so a reviewer sees every changed number in the
diff.
"""
from __future__ import annotations

import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from specgen.build import check  # noqa: E402

DEMO = ROOT / "demo_project"
EXPECTED = ROOT / "tests" / "expected" / "demo-results.json"


def main() -> None:
    _, results = check(DEMO)
    EXPECTED.parent.mkdir(parents=True, exist_ok=True)
    EXPECTED.write_text(results.to_json(), encoding="utf-8")
    print(f"wrote {EXPECTED.relative_to(ROOT)}")


if __name__ == "__main__":
    main()
