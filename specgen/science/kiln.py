"""A firing record against the kiln stages: stage table in °C to kelvin, and what the
record's peak and series say about each stage (under-burnt, over-fired, not reached).

**Temperatures are kelvin** throughout; :func:`stages_to_kelvin` converts a stage table
kept in °C.  Part of the raw-stone and firing science (:mod:`specgen.science.calcination`
gathers it).
"""
from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

from specgen.science.oxides import ChemistryInputError

#: Stage keys the firing checks need in the stage table.
REQUIRED_STAGES = ("dehydroxylation", "calcite_decomposition", "sintering")
_CELSIUS_ZERO = 273.15  # K, definition of the Celsius scale


def stages_to_kelvin(rows: Sequence[Mapping[str, object]]) -> dict[str, tuple[float, float]]:
    """Stage table rows ``{key, lower_C, upper_C}`` (°C) as ``{key: (lower_K, upper_K)}``."""
    out = {}
    for row in rows:
        try:
            out[str(row["key"])] = (float(row["lower_C"]) + _CELSIUS_ZERO,
                                    float(row["upper_C"]) + _CELSIUS_ZERO)
        except (KeyError, TypeError, ValueError) as exc:
            raise ChemistryInputError(f"a kiln stage needs key, lower_C, upper_C: {exc}") from None
    return out


@dataclass(frozen=True)
class FiringFinding:
    """One observation on a firing record; temperatures in kelvin."""

    key: str
    message: str
    temperatures: tuple[float, ...]


def check_firing(stages: Mapping[str, tuple[float, float]], peak: float | None = None,
                 series: Sequence[tuple[float, float]] | None = None) -> list[FiringFinding]:
    """Check a firing (peak temperature, K, and/or (time s, temperature K) series) against stages.

    ``stages`` maps at least :data:`REQUIRED_STAGES` to (lower, upper) in K.  Returns
    attention items; an empty list means nothing to note.
    """
    missing = [k for k in REQUIRED_STAGES if k not in stages]
    if missing:
        raise ChemistryInputError(f"the kiln stage table lacks {', '.join(missing)}")
    findings: list[FiringFinding] = []
    if series:
        findings += _series_findings(stages, series, peak)
        peak = max(t for _, t in series) if peak is None else peak
    if peak is None:
        raise ChemistryInputError("a firing record needs a peak temperature or a series")
    if not math.isfinite(peak) or peak <= 0:
        raise ChemistryInputError(f"peak temperature must be a positive kelvin value, got {peak!r}")
    return _peak_findings(stages, peak) + findings


def _peak_findings(stages: Mapping[str, tuple[float, float]], peak: float) -> list[FiringFinding]:
    """Findings from the peak temperature alone (K): the first rule that applies."""
    usual = stages.get("natural_cement_firing", (0.0, math.inf))  # optional stage row
    rules = (  # (applies, key, message, stage) in order of firing progress
        (peak < stages["dehydroxylation"][0], "firing.clay_not_activated",
         "peak below clay dehydroxylation: the clay stays inert", "dehydroxylation"),
        (peak < stages["calcite_decomposition"][0], "firing.calcite_not_decomposed",
         "peak below calcite decomposition: expect carbonate to remain", "calcite_decomposition"),
        (peak < stages["calcite_decomposition"][1], "firing.calcite_partly_decomposed",
         "peak within the calcite decomposition range: residual carbonate likely unless "
         "held long enough", "calcite_decomposition"),
        (peak >= stages["sintering"][0], "firing.sintering_reached",
         "peak at or above the sintering limit: melt and alite may form, no longer an "
         "unsintered binder", "sintering"),
        (peak > usual[1], "firing.above_usual_range", "peak above the usual natural-cement "
         "firing range (best strengths are found at its low end)", "natural_cement_firing"),
    )
    for applies, key, message, stage in rules:
        if applies:
            return [FiringFinding(key, message, (peak, *stages[stage]))]
    return []


def _series_findings(stages: Mapping[str, tuple[float, float]], series: Sequence[tuple],
                     peak: float | None) -> list[FiringFinding]:
    """Findings from a time-temperature series: time held above calcite decomposition."""
    times = [float(t) for t, _ in series]
    temps = [float(k) for _, k in series]
    if any(not math.isfinite(v) for v in times + temps) or any(k <= 0 for k in temps):
        raise ChemistryInputError("a firing series needs finite times and positive kelvin values")
    if any(b <= a for a, b in zip(times, times[1:])):
        raise ChemistryInputError("firing series times must increase strictly")
    out = []
    if peak is not None and abs(max(temps) - peak) > 1e-9:
        out.append(FiringFinding("firing.peak_disagrees", "the stated peak differs from the "
                                 "series maximum", (peak, max(temps))))
    onset = stages["calcite_decomposition"][0]
    held = sum(b - a for (a, b), k1, k2 in zip(zip(times, times[1:]), temps, temps[1:])
               if min(k1, k2) >= onset)
    if max(temps) >= onset and held == 0.0:
        out.append(FiringFinding("firing.no_soak", "the series never holds above the calcite "
                                 "decomposition onset between two readings", (onset,)))
    return out
