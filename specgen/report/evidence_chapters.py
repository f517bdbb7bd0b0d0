"""The evidence chapter: the sample register, the drawings with the zones and sample points
drawn on them, and for each sample the results that name it (and those that name none)."""
from __future__ import annotations

from specgen.report.chapters import badge, chapter, sheet_anchor
from specgen.report.fmt import anchor, as_given, date_text, num
from specgen.report.wording import reader

PAGE = "evidence.md"
KIND_WORDS = {"historic_mortar": "historic mortar", "historic_aggregate": "historic aggregate",
              "masonry_unit": "masonry unit", "render": "render", "raw_stone": "raw stone",
              "binder": "binder", "sand": "sand", "prisms": "prism series",
              "salt_powder": "drilled powder (salts)", "core": "core", "other": "other"}


def sample_href(sample_id: str, page: str = PAGE) -> str:
    """Where a sample's entry of the register is (the link every result carries)."""
    return f"{page}#sample-{anchor(sample_id)}"


def sample_links(ids) -> str:
    """Markdown links to the register entries of ``ids`` (ids are plain: letters, digits, . _ -)."""
    return ", ".join(f"[{i}]({sample_href(i)})" for i in ids)


@chapter(PAGE, "Evidence: samples and drawings", "evidence.md.j2", volume="appendix")
def evidence(env) -> dict:
    p = env.project
    named = _named(p)
    reports = _reports(env)
    register = [_entry(p, s, named.get(s.id, []), reports) for s in p.samples.values()]
    return {"register": register, "drawings": [_drawing(env, d) for d in p.drawings.values()],
            "unnamed": _unnamed(p), "series": _series(env), "images": _images(env),
            "reports": list(reports.values()), "has_register": bool(p.samples)}


def _reports(env) -> dict:
    """Each laboratory report published beside the PDF (attached to it, hashed in the
    manifest): reference → {href, title, file}."""
    out = {}
    for ref, (rep, data) in env.project.reports.items():
        name = rep.file.rsplit("/", 1)[-1]
        path = env.pageset.add_download(f"reports/{name}", data)
        out[ref] = {"reference": ref, "title": rep.title or ref, "href": f"./{path}",
                    "file": name, "kib": max(1, round(len(data) / 1024))}
    return out


def _images(env) -> list[dict]:
    """Photographs and drawings of the register, each a numbered figure."""
    out = []
    for iid, (img, data) in env.project.images.items():
        words = [img.kind] + ([date_text(img.taken_on)] if img.taken_on else []) + \
            ([f"by {img.by}"] if img.by else []) + ([f"zone {img.zone}"] if img.zone else [])
        out.append(picture(env, img, data, f"{img.caption} ({', '.join(words)})",
                           anchor_id=f"image-{anchor(iid)}"))
    return out


def picture(env, img, data: bytes, caption: str, anchor_id: str = "",
            numbered: bool = True) -> dict:
    """A photograph or drawing sheet placed in the dossier (the ``picture.md.j2`` context):
    the print-size image (``src``, for the PDF and the full view), the site's thumbnail
    (``thumb``, with its size), caption and alternative text; a numbered figure unless
    ``numbered`` is false.  The image is normalised once per size (Pillow); a drawing given
    as SVG has no raster sizes, so the site shows the drawing itself."""
    from specgen.report.evidence_images import extension, print_size, thumbnail
    # the print-size image may be left for later (the live preview): the site's pages show
    # the thumbnail, which is small and made now
    full, ext = print_size(data, img.file, img.keep_metadata, img.page), extension(data, img.file)
    alt = img.alt or f"{img.kind.capitalize()} {img.id}, as the caption below describes"
    src = f"images/{anchor(img.id)}.{ext}"
    fig = (env.figure(src, full, caption, alt) if numbered else
           {"src": env.unnumbered(src, full), "caption": caption, "alt": alt, "n": 0})
    if ext == "svg":
        return {**fig, "thumb": src, "thumb_size": None, "anchor": anchor_id}
    thumb, size = thumbnail(data, img.file, img.keep_metadata, img.page)
    thumb_src = env.pageset.add_asset(f"images/{anchor(img.id)}-thumb.{ext}", thumb)
    return {**fig, "thumb": thumb_src, "thumb_size": size, "anchor": anchor_id}


def _entry(p, s, results: list[str], reports: dict) -> dict:
    if s.location is not None:
        d = p.drawings.get(s.location.drawing)
        where = (f"drawing {s.location.drawing}, x {num(s.location.x, 3)}, y "
                 f"{num(s.location.y, 3)} {d.units if d else ''}").strip()
        where += f"; {s.grid}" if s.grid else ""
    else:
        where = s.grid or "—"
    return {"id": s.id, "anchor": f"sample-{anchor(s.id)}", "kind": KIND_WORDS[s.kind],
            "of": s.of or "—", "zone": s.zone or "—", "where": where,
            "description": s.description, "taken": s.taken_on.isoformat() if s.taken_on else "—",
            "by": s.taken_by or "—", "laboratory": s.laboratory or "—", "report": s.report or "—",
            "report_href": reports[s.report]["href"] if s.report in reports else "",
            "accreditation": s.accreditation or "not accredited (none stated)",
            "results": [reader(r) for r in results]}


def _named(p) -> dict[str, list[str]]:
    """Sample id → the results that name it, in words."""
    out: dict[str, list[str]] = {}
    for a in p.analyses.values():
        if a.lab_sample:
            out.setdefault(a.lab_sample, []).append(f"oxide analysis {a.id} "
                                                    "(Binder composition)")
    for kind, items in (("masonry unit", p.masonry_units), ("historic mortar",
                                                            p.historic_mortars),
                        ("mix", p.mortar_properties)):
        for key, m in items.items():
            for s in m.lab_samples:
                out.setdefault(s, []).append(f"measured properties of {kind} {key}")
    for attr, what in (("sieves", "sieve analysis of"), ("colours", "colour readings of"),
                       ("capillary", "capillary absorption of")):
        seen = set()
        for r in getattr(p, attr):
            if r.lab_sample and (r.lab_sample, r.sample) not in seen:
                seen.add((r.lab_sample, r.sample))
                out.setdefault(r.lab_sample, []).append(f"{what} {r.sample} ({r.file})")
    sets: dict = {}
    for r in p.strength:
        if r.lab_sample:
            sets.setdefault((r.lab_sample, r.mix), 0)
            sets[(r.lab_sample, r.mix)] += 1
    for (s, mix), n in sets.items():
        out.setdefault(s, []).append(f"{n} strength results of mix {mix} (lab/strength.csv)")
    return out


def _unnamed(p) -> list[str]:
    """Results that name no sample of the register: listed, never hidden."""
    out = [f"oxide analysis {a.id}" for a in p.analyses.values() if not a.lab_sample]
    for attr, what in (("sieves", "sieve analysis"), ("colours", "colour readings"),
                       ("capillary", "capillary readings"), ("strength", "strength results")):
        rows = [r for r in getattr(p, attr) if not r.lab_sample]
        if rows:
            subjects = sorted({getattr(r, "sample", None) or getattr(r, "mix", "") for r in rows})
            out.append(f"{what} of {', '.join(subjects)} ({len(rows)} rows of {rows[0].file})")
    return [reader(u) for u in out]


def _series(env) -> list[dict]:
    """Each mix's strength prisms: series, casting and test dates, regime and its verdict."""
    p, out = env.project, []
    for mix in p.mixes.values():
        rows = [r for r in p.strength if r.mix == mix.id]
        if not rows:
            continue
        check = next((c for c in env.results.checks
                      if c.code == "EVD-CURE" and c.subject == mix.id), None)
        cast = sorted({r.cast_on.isoformat() for r in rows if r.cast_on})
        tested = sorted({r.tested_on.isoformat() for r in rows if r.tested_on})
        regimes = sorted({r.curing_regime for r in rows if r.curing_regime})
        out.append({"mix": mix.id, "n": len(rows),
                    "series": sample_links(sorted({r.lab_sample for r in rows
                                                   if r.lab_sample})) or "—",
                    "cast": ", ".join(cast) or "—",
                    "tested": f"{tested[0]} to {tested[-1]}" if tested else
                    "at " + ", ".join(as_given(a) for a in sorted({round(r.age / 86400, 3)
                                                                    for r in rows})) + " d",
                    "regime": reader(", ".join(regimes)) if regimes else "not stated",
                    "badge": badge(check.status) if check else "",
                    "href": f"calculations.md#{sheet_anchor(check)}" if check else ""})
    return out


def _drawing(env, d) -> dict:
    from specgen.report.evidence_figures import overlay
    p = env.project
    points = [(s.id, s.location.x, s.location.y) for s in p.samples.values()
              if s.location is not None and s.location.drawing == d.id]
    zones = [(a.zone, a.x, a.y, a.width, a.height) for a in d.zones]
    sheet = None
    if d.image in p.images:   # made upright and to print size in the figure, drawn or later
        img, data = p.images[d.image]
        sheet = (data, img.file, img.page)
    svg = overlay(d.width, d.height, d.units, zones, points, d.north, sheet)
    caption = f"Drawing {d.id}: {d.title} — zones of work and sample points"
    if d.reference:
        caption += f" (from {d.reference})"
    return {"id": d.id, "title": d.title, "reference": d.reference or "—",
            "figure": env.figure(f"figures/drawing-{anchor(d.id)}.svg", svg, caption,
                                 _drawing_alt(d, zones, points, sheet is not None)),
            "points": len(points)}


def _drawing_alt(d, zones, points, sheet: bool) -> str:
    """What the overlay shows, in words: the zones' extents and each point's place."""
    u = d.units
    out = (f"{'The survey sheet of d' if sheet else 'D'}rawing {d.id}, {as_given(d.width)} by "
           f"{as_given(d.height)} {u}")
    if zones:
        out += ", with " + "; ".join(
            f"zone {z} outlined by a dashed rectangle from x {as_given(x)} to "
            f"{as_given(round(x + w, 6))} {u}" for z, x, _y, w, _h in zones)
    if points:
        out += (f"; {len(points)} sample point{'s' if len(points) != 1 else ''} marked by red "
                "dots with their labels: " + ", ".join(
                    f"{label} at x {as_given(x)} {u}, y {as_given(y)} {u}"
                    for label, x, y in points))
    return out + "."
