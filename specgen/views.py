"""Views of the Project object that the checks and the render stage share (neither owns them),
so a chapter finds what the checks assessed without importing a check module: each candidate
mix of a zone against the zone's fabric (subject ``<zone>/<mix>``), a binder's analyses, and
the order an analysis report lists its constituents in.  Lookups only: nothing is computed.
"""
from __future__ import annotations

from dataclasses import dataclass

# the input file the selections, hold points, site tests and prices are read from; the
# checks name it as the source of what they read from it
SPEC_FILE = "specification.yaml"


@dataclass(frozen=True)
class Pair:
    """One candidate mix against the fabric of one zone."""

    zone: object
    mix: object              # schema.Mix, or None when the id is unknown
    mix_id: str
    unit: object             # schema.MasonryUnit or None
    historic: object         # schema.HistoricMortar or None
    props: object            # schema.MortarProperties or None

    @property
    def subject(self) -> str:
        return f"{self.zone.id}/{self.mix_id}"


def pairs(zone, project) -> list[Pair]:
    """Every candidate of ``zone`` with the zone's fabric and the mix's measured properties."""
    unit = project.masonry_units.get(zone.units) if zone.units else None
    hist = project.historic_mortars.get(zone.historic_mortar) if zone.historic_mortar else None
    return [Pair(zone, project.mixes.get(m), m, unit, hist, project.mortar_properties.get(m))
            for m in zone.candidates]


def binder_analysis(binder, project):
    """The analysis of a fired binder: ``analysis:`` of the binder, else one of kind binder."""
    if binder.analysis and binder.analysis in project.analyses:
        return project.analyses[binder.analysis]
    return next((a for a in project.analyses.values()
                 if a.kind == "binder" and a.material == binder.id), None)


def raw_analyses(binder, project) -> list:
    """Raw-stone analyses linked to a binder by ``material:``."""
    return [a for a in project.analyses.values()
            if a.kind == "raw_stone" and a.material == binder.id]


# Conventional order of an analysis report: silicate-forming oxides, bases, volatiles.
ORDER = ["SiO2", "Al2O3", "Fe2O3", "CaO", "MgO", "SO3", "K2O", "Na2O", "CO2", "LOI"]


def oxide_order(name: str):
    """Sort key of a constituent in the conventional order (others after, by name)."""
    return (ORDER.index(name) if name in ORDER else len(ORDER), name)


def applicable(results, project, zone_id: str, mix_id: str) -> list:
    """Results of every check that applies to ``mix_id`` in ``zone_id`` (SPEC-* excepted)."""
    mix = project.mixes.get(mix_id)
    binders = {b.binder for b in mix.binders} if mix else set()
    subjects = {mix_id, f"{zone_id}/{mix_id}"} | binders
    return [r for r in results if r.subject in subjects and not r.code.startswith("SPEC-")]


#: How the dossier names each binder family (materials.yaml ``type``): the trade's names, the
#: limes with their EN 459-1 notation, and the short form a parenthesis takes (NHL).  The one
#: table: a check writing a family into its text and a chapter showing one both read it here,
#: so no key ("nhl", "air_lime") reaches a reader.
FAMILIES = {"natural_cement": ("natural cement", "natural cement"),
            "nhl": ("natural hydraulic lime (NHL)", "NHL"),
            "fl": ("formulated lime (FL)", "FL"), "hl": ("hydraulic lime (HL)", "HL"),
            "air_lime": ("air lime", "air lime"),
            "portland": ("Portland cement", "Portland cement"),
            "pozzolan": ("pozzolan", "pozzolan")}
FAMILY_WORDS = {key: words for key, (words, _) in FAMILIES.items()}


def family_words(*families: str, short: bool = False) -> str:
    """The binder ``families`` (materials.yaml ``type`` keys) as a reader reads them, joined
    with commas: ``family_words("nhl", "portland")`` → "natural hydraulic lime (NHL),
    Portland cement"; ``short``: the form inside a parenthesis ("NH35 (NHL)").  A key the
    table lacks reads with spaces for its underscores."""
    return ", ".join(FAMILIES[f][short] if f in FAMILIES else str(f).replace("_", " ")
                     for f in families)


# the key of the gauging water among a mix's constituents (quantities and schedules)
WATER = "water"


def mixes_of(zone, project) -> list:
    """Mixes a zone's quantities are worked out for: its ``mix``, else every candidate."""
    ids = [zone.mix] if zone.mix else list(zone.candidates)
    return [project.mixes[m] for m in ids if m in project.mixes]
