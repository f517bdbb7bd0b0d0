"""Exposure of masonry: from a zone's conditions to its class, with the reasoning.

European practice: the micro conditions of EN 1996-2, 2.1.2.1 and Annex A (MX1 dry; MX2 wetting,
MX2.1 moisture / MX2.2 severe wetting; MX3 the same plus freeze–thaw, MX3.1 / MX3.2;
MX4 salt air, sea water or de-icing salts; MX5 aggressive chemicals).  MX4 and MX5 name
the salt or chemical source; the wetting and freeze–thaw sub-class is kept beside them
(e.g. MX4 with MX3.2) because the frost requirement rests on it.  American practice: the
location of ASTM C270 Table X1.1 with its recommended mortar type, and a weathering
severity from the same freeze–thaw reasoning.  The vocabulary (condition → wetting, sea
source, aggressive, frost) is passed in from content/data/exposure_classes.yaml.
"""
from __future__ import annotations

from dataclasses import dataclass

WETTING = ("dry", "moisture", "severe")


@dataclass(frozen=True)
class ExposureClass:
    """The classes a zone falls in and why."""

    wetting: str                      # dry | moisture | severe
    freeze_thaw: bool | None          # None: the climate is not known
    sea: tuple[str, ...]              # salt or sea-water sources found
    aggressive: bool
    base: str                         # MX1, MX2.1, MX2.2, MX3.1 or MX3.2 (MX2.x when frost unknown)
    classes: tuple[str, ...]          # e.g. ("MX4", "MX3.2")
    reasons: tuple[str, ...]

    @property
    def designation(self) -> str:
        """``MX4 with MX3.2`` — the source class first, then the wetting/frost sub-class."""
        extra = [c for c in self.classes if c in ("MX4", "MX5")]
        return " and ".join(extra) + (f" with {self.base}" if extra else self.base)


def classify(conditions, vocabulary: dict, freezing: bool | None) -> ExposureClass:
    """The EN 1996-2 micro condition of a zone from its conditions and the site's frost."""
    if not conditions:
        raise ValueError("no exposure condition given")
    reasons, wet, sea, aggressive, cycled = [], 0, [], False, True
    for c in conditions:
        spec = vocabulary[c]
        w = WETTING.index(spec["wetting"])
        wet = max(wet, w)
        line = f"{c.replace('_', ' ')}: {spec['wetting']} wetting"
        if spec.get("sea"):
            sea.append(spec["sea"])
            line += f"; salt source: {spec['sea']}"
        if spec.get("aggressive"):
            aggressive = True
            line += "; aggressive chemical environment"
        if spec.get("frost") is False:
            line += "; not cycled by frost while immersed"
        reasons.append(line)
    # a zone only partly immersed (tidal, splash) is cycled; wholly submerged masonry is not
    cycled = not all(vocabulary[c].get("frost") is False for c in conditions
                     if WETTING.index(vocabulary[c]["wetting"]) == wet)
    wetting = WETTING[wet]
    if wetting == "dry":
        ft = False
        base = "MX1"
        reasons.append("dry: no wetting, so no freeze-thaw cycling → MX1")
    else:
        sub = "1" if wetting == "moisture" else "2"
        ft = None if freezing is None else bool(freezing and cycled)
        base = f"MX{'3' if ft else '2'}.{sub}"
        frost_word = ("site climate not stated (dossier.yaml durability.freezing): taken without "
                      "freeze-thaw until it is" if freezing is None else
                      "freezing site and the masonry wet → freeze-thaw cycling" if ft else
                      "no freeze-thaw cycling (" + ("site without frost" if not freezing
                                                    else "permanently immersed") + ")")
        reasons.append(f"{wetting} wetting ({'MX2.2/MX3.2' if sub == '2' else 'MX2.1/MX3.1'}); "
                       f"{frost_word} → {base}")
    classes = []
    if sea:
        classes.append("MX4")
        reasons.append("salt air, sea water or de-icing salts → MX4")
    if aggressive:
        classes.append("MX5")
        reasons.append("aggressive chemical environment → MX5")
    classes.append(base)
    return ExposureClass(wetting, ft, tuple(dict.fromkeys(sea)), aggressive, base,
                         tuple(classes), tuple(reasons))


def american_location(conditions) -> str:
    """Key of the ASTM C270 Table X1.1 location a zone's conditions describe."""
    cs = set(conditions)
    if cs & {"below_dpc", "ground_contact", "submerged", "tidal", "aggressive_ground"}:
        return "at_or_below_grade"
    if cs & {"parapet", "coping"}:
        return "parapet"
    if cs == {"internal"}:
        return "interior"
    return "exterior_above_grade"


def weathering(ec: ExposureClass) -> str:
    """Weathering severity in the American sense, from wetting and freeze-thaw (simplified:
    the weathering index of ASTM C62/C216 needs freezing-cycle days and winter rainfall)."""
    if ec.freeze_thaw is None:
        return "unknown"
    if not ec.freeze_thaw:
        return "negligible"
    return "severe" if ec.wetting == "severe" else "moderate"
