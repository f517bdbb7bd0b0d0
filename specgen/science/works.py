"""Works quantities: mortar volume of a zone of work, constituent totals and bags.

SI units: lengths in m, areas in m², volumes in m³, masses in kg; wastage and mortar
fraction as plain fractions.

Joint length of a wall face in stretcher bond [common practice, derived here].  Each
unit with its share of joint occupies a cell (l + j) wide and (h + j) high.  Bed
joints are continuous horizontal lines one course apart, so per m² of face there
are ``1/(h + j)`` metres of bed joint.  Each cell has one perpend of height ``h``
(its crossing with the bed joint is already counted there), and there are
``1/((l + j)(h + j))`` cells per m²:

    L = 1/(h + j) + h / ((l + j)(h + j)) = (l + j + h) / ((l + j)(h + j))

For 215 × 65 mm bricks with 10 mm joints: 13.333 + 3.852 = 17.19 m/m².  Counting the
perpends at full cell height (h + j) instead would double count the crossings and
give 1/(h + j) + 1/(l + j) = 17.78 m/m².

Mortar volume of each kind of work (net, before wastage):

* repointing: ``A · L · j · d``      (joint width j, depth of raking-out d)
* render:     ``A · Σ t_k``          (thickness of each coat)
* bedding:    ``V_masonry · f``      (volume of masonry rebuilt, mortar fraction f)

The wastage allowance is applied once, to the volume: ``V = V_net (1 + w)``; every
constituent total is then ``c_i · V`` and is never increased again.
"""
from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

from specgen.errors import ScienceInputError


class WorksInputError(ScienceInputError):
    """Dimensions or amounts the works calculation cannot use."""


def _positive(**values: float) -> None:
    for name, v in values.items():
        if not (isinstance(v, (int, float)) and math.isfinite(v) and v > 0):
            raise WorksInputError(f"{name} must be greater than zero; found {v!r}")


def joint_length_per_m2(length: float, height: float, joint: float) -> float:
    """Metres of joint per m² of face, stretcher bond (bed joints + perpends net of crossings)."""
    _positive(length=length, height=height, joint=joint)
    if joint >= min(length, height):
        raise WorksInputError(f"the joint ({joint:g} m) is not narrower than the unit "
                              f"({length:g} × {height:g} m)")
    return (length + joint + height) / ((length + joint) * (height + joint))


def repointing_volume(area: float, joint_length: float, joint_width: float,
                      joint_depth: float) -> float:
    """Net mortar volume of repointing ``area`` m²: A · L · j · d (m³)."""
    _positive(area=area, joint_length=joint_length, joint_width=joint_width,
              joint_depth=joint_depth)
    return area * joint_length * joint_width * joint_depth


def render_volume(area: float, coats: Sequence[float]) -> float:
    """Net mortar volume of a render of ``coats`` (thickness of each coat, m): A · Σ t (m³)."""
    _positive(area=area)
    if not coats:
        raise WorksInputError("a render needs at least one coat")
    for i, t in enumerate(coats):
        _positive(**{f"coat {i + 1} thickness": t})
    return area * sum(coats)


def bedding_volume(masonry_volume: float, mortar_fraction: float) -> float:
    """Net mortar volume of bedding/rebuilding: V_masonry · f (m³)."""
    _positive(masonry_volume=masonry_volume, mortar_fraction=mortar_fraction)
    if mortar_fraction >= 1:
        raise WorksInputError(f"the mortar fraction must be below 1; found {mortar_fraction:g}")
    return masonry_volume * mortar_fraction


def with_wastage(net_volume: float, wastage: float) -> float:
    """The volume to be mixed: V_net · (1 + w), the only place wastage is applied."""
    _positive(net_volume=net_volume)
    if not 0 <= wastage < 1:
        raise WorksInputError(f"the wastage allowance must lie in 0–100 %; found {wastage:g}")
    return net_volume * (1.0 + wastage)


@dataclass(frozen=True)
class Totals:
    """Constituent totals for a volume of fresh mortar (kg), and bags of each binder."""

    volume: float                  # m³ of fresh mortar (wastage included)
    masses: dict[str, float]       # kg of each constituent
    bags: dict[str, int]           # whole bags of each binder with a bag mass


def totals(volume: float, per_m3: Mapping[str, float],
           bag_masses: Mapping[str, float] | None = None) -> Totals:
    """Masses ``c_i · V`` of every constituent; bags = ⌈m / bag mass⌉ for each binder given."""
    _positive(volume=volume)
    masses = {k: c * volume for k, c in per_m3.items()}
    bags = {}
    for name, bag in (bag_masses or {}).items():
        _positive(**{f"bag mass of {name}": bag})
        bags[name] = bags_needed(masses[name], bag)
    return Totals(volume, masses, bags)


def bags_needed(mass: float, bag_mass: float) -> int:
    """Whole bags: ⌈m / m_bag⌉ (a rounding guard keeps 50.0000001 from becoming 51)."""
    _positive(bag_mass=bag_mass)
    return max(0, math.ceil(mass / bag_mass - 1e-9))


def rake_out_depth(joint_width: float, ratio: float, minimum: float) -> float:
    """Depth to rake a joint out to (m): ``max(ratio · j, d_min)`` — a multiple of the joint
    width, never shallower than the least depth that keys a repair (common practice)."""
    _positive(joint_width=joint_width, ratio=ratio, minimum=minimum)
    return max(ratio * joint_width, minimum)


def bay_area(rate: float, day: float, volume_net: float, area: float) -> float:
    """Face area (m²) one crew fills in a working day: ``min(q · T · A / V, A)`` — the mortar
    it places in a day (rate ``q`` m³/s for ``T`` s) over the mortar a square metre of the face
    takes (net volume ``V`` m³ over the zone's area ``A`` m²), never more than the zone
    (common practice: a bay is a day's work, so no day joint is left open)."""
    _positive(rate=rate, day=day, volume_net=volume_net, area=area)
    return min(rate * day * area / volume_net, area)
