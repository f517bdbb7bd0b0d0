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
