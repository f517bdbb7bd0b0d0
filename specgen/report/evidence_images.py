"""Photographs and drawings placed in the dossier, normalised with Pillow: turned upright by
their EXIF orientation, scaled to the print size, re-encoded without metadata (the GPS position
never survives; the camera's other metadata only when the project keeps it).  A drawing given
as a page of a PDF is rendered to PNG with pypdfium2 (PDFium) first."""
from __future__ import annotations

import io

#: long side of a placed image: about 200 dpi across a printed page width, sharp on screens
PRINT_PX = 1600
#: long side of a thumbnail for the site's list of images
THUMB_PX = 360
GPS_IFD = 0x8825


def normalise(data: bytes, name: str, long_side: int = PRINT_PX,
              keep_metadata: bool = False, page: int | None = None
              ) -> tuple[bytes, str, tuple[int, int]]:
    """``data`` upright, at most ``long_side`` px, as (bytes, extension, (width, height)).

    SVG drawings are passed through unchanged (size (0, 0)); JPEG stays JPEG, PNG stays PNG;
    page ``page`` (from 1; the first when None) of a PDF becomes a PNG ``long_side`` px long."""
    if name.lower().endswith(".svg"):
        return data, "svg", (0, 0)
    if name.lower().endswith(".pdf"):
        im = pdf_page(data, page or 1, long_side)
        out = io.BytesIO()
        im.save(out, "PNG", optimize=True)
        return out.getvalue(), "png", im.size
    from PIL import Image, ImageOps
    with Image.open(io.BytesIO(data)) as src:
        fmt = src.format
        exif = src.getexif()
        im = ImageOps.exif_transpose(src)
        im.thumbnail((long_side, long_side), Image.Resampling.LANCZOS)
        out = io.BytesIO()
        kwargs = {}
        if keep_metadata and exif:
            exif.pop(GPS_IFD, None)
            exif.pop(0x0112, None)   # orientation applied above
            kwargs["exif"] = exif.tobytes()
        if fmt == "JPEG":
            im.convert("RGB").save(out, "JPEG", quality=85, optimize=True, **kwargs)
            return out.getvalue(), "jpg", im.size
        im.save(out, "PNG", optimize=True, **kwargs)
        return out.getvalue(), "png", im.size


def extension(data: bytes, name: str) -> str:
    """The extension :func:`normalise` gives ``data`` (read from the file's header alone)."""
    if name.lower().endswith(".svg"):
        return "svg"
    if name.lower().endswith(".pdf"):
        return "png"
    from PIL import Image
    with Image.open(io.BytesIO(data)) as src:   # lazy: the header, not the pixels
        return "jpg" if src.format == "JPEG" else "png"


def print_size(data: bytes, name: str, keep_metadata: bool = False, page: int | None = None):
    """:func:`normalise` at :data:`PRINT_PX` (the bytes), through the artefact cache; within
    ``cache.drawing_later`` (the live preview's first pages) a :class:`specgen.cache.Later`
    when the cache does not hold it, placed as a figure still being drawn."""
    import hashlib

    from specgen import cache
    if name.lower().endswith(".svg"):
        return data
    key = [hashlib.sha256(data).hexdigest(), name, PRINT_PX, keep_metadata, page]
    return cache.drawn_or_later("image", key, lambda: normalise(
        data, name, PRINT_PX, keep_metadata, page)[0])


def thumbnail(data: bytes, name: str, keep_metadata: bool = False, page: int | None = None
              ) -> tuple[bytes, tuple[int, int]]:
    """:func:`normalise` at :data:`THUMB_PX` (the bytes and the size), through the artefact
    cache (small: always made now)."""
    import hashlib

    from PIL import Image

    from specgen import cache
    key = [hashlib.sha256(data).hexdigest(), name, THUMB_PX, keep_metadata, page]
    thumb = cache.cached("image", key, lambda: normalise(data, name, THUMB_PX, keep_metadata,
                                                         page)[0])
    with Image.open(io.BytesIO(thumb)) as im:
        return thumb, im.size


def pdf_page(data: bytes, page: int, long_side: int):
    """Page ``page`` (from 1) of the PDF ``data`` as an RGB Pillow image ``long_side`` px on its
    long side, white behind (loading has checked the file, its page count and that it is not
    encrypted)."""
    import pypdfium2 as pdfium
    pdf = pdfium.PdfDocument(data)
    try:
        sheet = pdf[page - 1]
        width, height = sheet.get_size()        # PDF points, rotation applied
        bitmap = sheet.render(scale=long_side / max(width, height), fill_color=(255, 255, 255, 255))
        return bitmap.to_pil().convert("RGB")
    finally:
        pdf.close()
