"""The quantities schedule and the batching-card steps, read from the works checks' results.

``schedule`` gathers, per zone, the mortar volumes and per mix every constituent's
mass (and bags) that ``WORKS-QTY`` recorded; ``to_csv`` writes it in a fixed,
sorted layout with fixed decimals, so the same results always give the same bytes.
Nothing is computed here that the checks did not record, except the wastage shown
beside the volumes, taken from the same ``zone_volume`` the check uses.
"""
from __future__ import annotations

import csv
import io
from dataclasses import dataclass

from specgen import views as wc
from specgen.report.fmt import rounded

KIND_ORDER = ("volume", "binder", "bags", "sand", "water", "admixture")
MASS_NAMES = (("binder", "binder_mass"), ("sand", "sand_mass"), ("admixture", "admixture_mass"))
CSV_HEADER = ("zone", "works", "mix", "kind", "item", "description", "value", "unit")
RISKY = ("=", "+", "-", "@", "\t", "\r")  # a cell a spreadsheet would run as a formula


@dataclass(frozen=True)
class Item:
    kind: str          # binder, sand, water, admixture
    id: str
    label: str
    mass: float        # kg
    bags: int | None = None
    bag_mass: float | None = None  # kg


@dataclass(frozen=True)
class MixItems:
    mix_id: str
    items: tuple[Item, ...]


@dataclass(frozen=True)
class ZoneSchedule:
    zone: object
    net: float | None        # m³
    total: float | None      # m³, wastage included
    wastage: float | None    # %
    joint_length: float | None
    mixes: tuple[MixItems, ...]


def label(project, mix, key: str) -> str:
    """A constituent's name for people: binder or sand name with its id, water, admixture."""
    if key in project.binders:
        return f"{key} — {project.binders[key].name}"
    if key in project.sands:
        return f"{key} — {project.sands[key].name}"
    return key


def kind_of(mix, key: str) -> str:
    if any(b.binder == key for b in mix.binders):
        return "binder"
    if any(s.sand == key for s in mix.sands):
        return "sand"
    return "water" if key == wc.WATER else "admixture"


def schedule(project, results) -> list[ZoneSchedule]:
    """Per zone (in dossier order): volumes and, per mix, every constituent's mass."""
    out = []
    for z in project.dossier.zones:
        total, wastage = results.value(z.id, "mortar_volume"), results.value(z.id, "wastage")
        mixes = tuple(m for m in (_mix_items(project, results, z.id, mix)
                                  for mix in wc.mixes_of(z, project)) if m.items)
        out.append(ZoneSchedule(z, results.value(z.id, "mortar_volume_net"), total, wastage,
                                results.value(z.id, "joint_length_per_m2"), mixes))
    return out


def _mix_items(project, results, zone_id: str, mix) -> MixItems:
    bags = (results.value(zone_id, "bags") or {}).get(mix.id, {})
    items = []
    for kind, name in MASS_NAMES:
        for key, kg in ((results.value(zone_id, name) or {}).get(mix.id) or {}).items():
            b = project.binders.get(key) if kind == "binder" else None
            items.append(Item(kind, key, label(project, mix, key), kg, bags.get(key),
                              b.bag_mass if b is not None and key in bags else None))
    water = (results.value(zone_id, "water_mass") or {}).get(mix.id)
    if water is not None:
        items.append(Item("water", wc.WATER, "water", water))
    return MixItems(mix.id, tuple(sorted(items, key=lambda i: (KIND_ORDER.index(i.kind), i.id))))


def csv_name(project) -> str:
    return f"{project.dossier.project.code}-{project.revision.code}-quantities.csv"


def _cell(text: str) -> str:
    return "'" + text if text.startswith(RISKY) else text


def _rows(zones: list[ZoneSchedule]) -> list[tuple]:
    rows = []
    for z in sorted(zones, key=lambda s: s.zone.id):
        if z.total is None:
            continue
        base = (z.zone.id, z.zone.works)
        rows.append(base + ("", "volume", "mortar_volume_net", "mortar volume before wastage",
                            f"{z.net:.4f}", "m3"))
        rows.append(base + ("", "volume", "mortar_volume", f"mortar volume with "
                            f"{z.wastage:.3g} % wastage", f"{z.total:.4f}", "m3"))
        for m in sorted(z.mixes, key=lambda m: m.mix_id):
            for i in m.items:
                rows.append(base + (m.mix_id, i.kind, i.id, i.label, f"{i.mass:.3f}", "kg"))
                if i.bags is not None:
                    rows.append(base + (m.mix_id, "bags", i.id, f"bags of {i.bag_mass:g} kg",
                                        str(i.bags), "bag"))
    return sorted(rows, key=lambda r: (r[0], r[2], KIND_ORDER.index(r[3]), r[4]))


def to_csv(zones: list[ZoneSchedule]) -> bytes:
    """The schedule as CSV (UTF-8, RFC 4180 line ends), sorted, with fixed decimals."""
    buf = io.StringIO()
    writer = csv.writer(buf, lineterminator="\r\n")
    writer.writerow(CSV_HEADER)
    for row in _rows(zones):
        writer.writerow([_cell(str(c)) for c in row])
    return buf.getvalue().encode("utf-8")


def card_steps(project, mix, g: dict) -> list[dict]:
    """The card's steps in the order of mixing: water (and admixtures), sands, binders, mixing."""
    steps = [{"kind": "water", "litres": f"{g['water_L']:.2f}",
              "kg": f"{g['mass_kg'][wc.WATER]:.2f}"}]
    steps += [{"kind": "admixture", "name": a.name, "purpose": a.purpose,
               "grams": f"{g['admixture_g'][a.name]:.1f}"} for a in mix.admixtures]
    for kind, parts in (("sand", [s.sand for s in mix.sands]),
                        ("binder", [b.binder for b in mix.binders])):
        steps += [{"kind": kind, "name": label(project, mix, k),
                   "measures": site_count(g["measures"][k]), "litres": f"{g['loose_L'][k]:g}",
                   "kg": f"{g['mass_kg'][k]:.2f}"} for k in parts]
    steps += [{"kind": "dry"}, {"kind": "wet"}, {"kind": "place"}]
    return [dict(s, n=i + 1) for i, s in enumerate(steps)]


FRACTIONS = {0.25: "¼", 0.5: "½", 0.75: "¾"}


def site_count(n: float) -> str:
    """A number of measures as a site team says it: ``2``, ``1½``, ``¾``."""
    whole, rest = int(n + 1e-9), round(n - int(n + 1e-9), 3)
    part = FRACTIONS.get(rest)
    if part is None:
        return f"{n:g}"
    return f"{whole}{part}" if whole else part


def card_zones(results, mix_id: str, most_per_day: float) -> list[dict]:
    """Per zone: the largest gauging placed in time, the card mixes made at once, and the
    gaugings a day (with a warning above ``most_per_day``, the rule of common practice)."""
    vmax = results.value(mix_id, "max_gauging_volume") or {}
    by_zone = results.value(mix_id, "gauging_by_zone") or {}
    # volumes by the dossier's one rule for litres (fmt.rounded), as the card's own line
    return [{"zone": z, "vmax": rounded(v, "L"), "times": by_zone.get(z, {}).get("times", 1),
             "volume": rounded(by_zone.get(z, {}).get("volume_L", 0), "L"),
             "per_day": by_zone.get(z, {}).get("per_day", "—"),
             "busy": by_zone.get(z, {}).get("per_day", 0) > most_per_day}
            for z, v in vmax.items()]
