"""specgen: binder specification dossiers for historic masonry repair."""

__version__ = "0.1.0"
