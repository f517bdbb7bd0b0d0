"""Dates as the dossier writes them (one place for the render and publish stages)."""
from __future__ import annotations


def date_text(day) -> str:
    """A date as readers write it: ``27 August 2026``."""
    return f"{day.day} {day:%B %Y}"
