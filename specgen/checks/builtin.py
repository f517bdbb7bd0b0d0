"""The built-in check modules; importing this registers them all."""
from specgen.checks import composition  # noqa: F401
