"""Soundness of a binder: what its analysis and firing say about late-slaking lime and magnesia.

Free lime left uncombined by the firing, and magnesia fired to periclase, hydrate after the
mortar has hardened and expand.  When nothing is measured the potential phases bound them:
the free lime of the phase estimate depends on where the alumina and iron are assigned
(:data:`specgen.science.phases.ASSIGNMENTS`), so its range over the assignments is the
honest statement; all MgO as periclase is the upper bound of free magnesia.  The firing
peak is placed against the kiln stages (content/data/kiln_stages.yaml, passed in).
"""
from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass

from specgen.science import phases


@dataclass(frozen=True)
class FreeOxideRange:
    """Free lime by assignment and the periclase upper bound (mass % of the binder)."""

    free_lime: dict          # assignment → free lime, mass %
    periclase: float

    @property
    def low(self) -> float:
        return min(self.free_lime.values())

    @property
    def high(self) -> float:
        return max(self.free_lime.values())


def free_oxide_range(ox: Mapping[str, float], atomic_weights: Mapping[str, float]) -> FreeOxideRange:
    """Free lime of the unsintered phase estimate under every aluminate assignment."""
    out, mgo = {}, 0.0
    for name in phases.ASSIGNMENTS:
        pa = phases.unsintered_phases(ox, name, atomic_weights)
        out[name] = float(pa.phases.get("free lime", 0.0))
        mgo = float(pa.phases.get("periclase", 0.0))
    return FreeOxideRange(out, mgo)


def firing_position(peak_c: float, stages: list[dict]) -> tuple[str, str]:
    """('under' | 'within' | 'over', reason) of a peak (°C) against the kiln stages."""
    by = {s["key"]: s for s in stages}
    calc, usual = by["calcite_decomposition"], by["natural_cement_firing"]
    if peak_c < calc["upper_C"]:
        return "under", (f"peak {peak_c:g} °C below the end of calcite decomposition "
                         f"({calc['upper_C']} °C): carbonate left and lime not yet combined "
                         "with the clay's silica")
    if peak_c > usual["upper_C"]:
        return "over", (f"peak {peak_c:g} °C above the usual natural-cement range (to "
                        f"{usual['upper_C']} °C): hard-burnt lime and periclase slake late")
    return "within", (f"peak {peak_c:g} °C within the usual range ({usual['lower_C']}–"
                      f"{usual['upper_C']} °C) and past calcite decomposition")
