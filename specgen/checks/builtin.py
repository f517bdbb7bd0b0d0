"""Import every built-in check module, which registers its checks.

Built-in check modules are the modules of this package whose name ends in
``_checks`` (``composition_checks``, ``strength_checks`` ...): adding a module is
all it takes to add a family of checks; extensions use the same decorator.
"""
import importlib
import pkgutil
from pathlib import Path

# the package's folder, found from this file (importing the package here would be a cycle)
for _info in sorted(pkgutil.iter_modules([str(Path(__file__).parent)]), key=lambda m: m.name):
    if _info.name.endswith("_checks"):
        importlib.import_module(f"specgen.checks.{_info.name}")
