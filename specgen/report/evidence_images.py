"""Photographs and drawings placed in the dossier, normalised with Pillow: turned upright by
their EXIF orientation, scaled to the print size, re-encoded without metadata (the GPS position
never survives; the camera's other metadata only when the project keeps it)."""
from __future__ import annotations

import io

#: long side of a placed image: about 200 dpi across a printed page width, sharp on screens
PRINT_PX = 1600
#: long side of a thumbnail for the site's list of images
THUMB_PX = 360
GPS_IFD = 0x8825


def normalise(data: bytes, name: str, long_side: int = PRINT_PX,
              keep_metadata: bool = False) -> tuple[bytes, str, tuple[int, int]]:
    """``data`` upright, at most ``long_side`` px, as (bytes, extension, (width, height)).

    SVG drawings are passed through unchanged (size (0, 0)); JPEG stays JPEG, PNG stays PNG."""
    if name.lower().endswith(".svg"):
        return data, "svg", (0, 0)
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
