"""Stage 3, check: registered checks → :class:`~specgen.checks.run.Results`."""
from specgen.checks.registry import register
from specgen.checks.result import Basis, CheckResult, Input, Limit, Quantity, Step

__all__ = ["register", "Basis", "CheckResult", "Input", "Limit", "Quantity", "Step"]
