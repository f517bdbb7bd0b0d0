"""Stage 1, load: project folder → validated :class:`Project` in SI units."""
from specgen.project.load import Project, load_project

__all__ = ["Project", "load_project"]
