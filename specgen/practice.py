"""The practice a project follows: which standards its dossier applies, resolved once.

``content/data/practice.yaml`` holds the built-in sets (European, American); a project names
one in ``dossier.yaml`` (``practice.follows``) and may take the mortar classification or the
grading envelope of the other set only by saying why (``practice.mixing_reason``).  Loading
(its checks of the choice), the checks (which tables they apply) and the scope page (which set
the dossier follows) all read the same :class:`Practice`, so the choice is made in one place.
"""
from __future__ import annotations

from dataclasses import dataclass

from specgen import refdata

DEFAULT = "american"  # what a project that states no practice is taken to follow


@dataclass(frozen=True)
class Practice:
    """The resolved set: its key and title and the tables and methods it selects."""

    key: str
    title: str
    stated: bool                     # named in dossier.yaml (else the default)
    sieve_series: str                # key of sieve_series.yaml 'series'
    grading_envelope: str            # key of grading_envelopes.yaml (the project's choice wins)
    mortar_classes: str              # key of strength_classes.yaml
    binder_classes: str
    capillary_method: str            # 'two_point' (EN 1015-18) or 'regression'
    test_methods: tuple[dict, ...]
    paper: str
    unit_display: str
    mixing_reason: str
    mixed: tuple[str, ...]           # what is taken from another set, in words
    tag: str


def sets() -> dict:
    """The built-in sets by key (content/data/practice.yaml)."""
    return refdata.load("practice").data


def envelope_practice(key: str) -> str:
    """The practice a grading envelope belongs to."""
    return refdata.load("grading_envelopes").data[key].get("practice", "")


def mortar_class_practice(key: str) -> str:
    """The practice whose set names ``key`` as its mortar classification ('' if none)."""
    return next((k for k, s in sets().items() if s["mortar_classes"] == key), "")


def series_title(key: str) -> str:
    return refdata.load("sieve_series").data["series"][key]["title"]


def resolve(dossier) -> Practice:
    """The practice of a validated ``schema.Dossier`` (names already checked on loading).

    Resolving reads which tables the set names, not their values: nothing is recorded as
    used here (the checks record the values they then read)."""
    with refdata.unrecorded():
        return _resolve(dossier)


def _resolve(dossier) -> Practice:
    chosen = dossier.practice
    key = chosen.follows or DEFAULT
    s = sets()[key]
    env = dossier.compatibility.grading_envelope or s["grading_envelope"]
    mortar = chosen.mortar_classes or s["mortar_classes"]
    mixed = []
    if envelope_practice(env) not in ("", key):
        mixed.append(f"grading envelope {refdata.load('grading_envelopes').data[env]['title']}")
    if mortar_class_practice(mortar) not in ("", key):
        mixed.append(f"mortar classification {mortar}")
    return Practice(key=key, title=s["title"], stated=chosen.follows is not None,
                    sieve_series=s["sieve_series"], grading_envelope=env, mortar_classes=mortar,
                    binder_classes=s["binder_classes"], capillary_method=s["capillary_method"],
                    test_methods=tuple(s.get("test_methods", ())), paper=s["paper"],
                    unit_display=s["unit_display"], mixing_reason=chosen.mixing_reason,
                    mixed=tuple(mixed), tag=str(s.get("tag", "")))
