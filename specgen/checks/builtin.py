"""Import every built-in check module, which registers its checks.

Built-in check modules are the modules of this package whose name ends in
``_checks`` (``composition_checks``, ``strength_checks`` ...): adding a module is
all it takes to add a family of checks; extensions use the same decorator.
"""
import importlib
import pkgutil

import specgen.checks as _pkg

for _info in sorted(pkgutil.iter_modules(_pkg.__path__), key=lambda m: m.name):
    if _info.name.endswith("_checks"):
        importlib.import_module(f"specgen.checks.{_info.name}")
