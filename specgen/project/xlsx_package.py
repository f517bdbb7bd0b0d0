"""The package of a laboratory workbook (an xlsx file is a zip archive of XML parts): what is
checked before any reader opens it.

Macro-enabled and old binary files are never opened (so no macro can run); a damaged archive, an
archive that would inflate beyond a limit and a macro project inside an ``.xlsx`` are refused.
The cells of every part are searched for a formula or an error value, which decides the reader
(:mod:`specgen.project.workbook`), and the layout specgen wrote into the document's custom
properties is read back (the sheets and headers a returned workbook must still have).
"""
from __future__ import annotations

import io
import json
import re
import struct
import zipfile
import zlib
from pathlib import Path

from specgen.errors import ProblemLog
from specgen.project.files import MAX_FILE_BYTES

# a workbook written by specgen records its sheets and headers in this document property
LAYOUT_PROPERTY = "specgen-layout"
MACRO_SUFFIXES = {".xlsm", ".xltm", ".xlsb", ".xlam"}
OLD_SUFFIXES = {".xls", ".xlt"}
MAX_UNZIPPED_BYTES = 200 * 1024 * 1024   # a workbook that inflates beyond this is refused
CUSTOM_PART = "docProps/custom.xml"   # the document's custom properties
SAVE_AS = "save it from the spreadsheet as 'Excel Workbook (.xlsx)'"


# parts of the package that never hold cells (themes, styles, the shared strings, properties,
# the sheet list, the content types)
_NO_CELLS = re.compile(r"(docProps/|xl/theme/|xl/(styles|sharedStrings|workbook)\.xml$|"
                       r"\[Content_Types\]\.xml$)")


_AFTER_NAME = frozenset(b" \t\r\n>/")


def _formula_or_error(part: bytes) -> bool:
    """Whether a part may hold a formula (an element ``f``, with any namespace prefix) or an
    error value (a cell of type ``"e"``) among its cells.  A false alarm (``<f`` or ``:f`` in a
    text, ``"e"`` in an attribute) only sends the file to openpyxl; a formula missed would be
    read as its last computed value.

    Only the cells are searched — the element ``sheetData``, where a reader finds them (the
    ``<xm:f>`` of a list validation a spreadsheet program writes after it is no formula in a
    cell); a mention of the name elsewhere only widens the search.  Plain searches, as few as the part allows (a regular
    expression costs as much as calamine's read, and each search of a full sheet a good part
    of it): a prefixed ``:f`` is looked for only where a prefix is declared (``xmlns:``), a
    single-quoted ``'e'`` only where a single quote appears."""
    start = part.find(b"sheetData")
    if start < 0:
        return False   # no cells: not a worksheet
    end = part.rfind(b"sheetData")
    if end == start and part[start:part.find(b">", start)].rstrip().endswith(b"/"):
        return False   # <sheetData/>: a sheet without cells
    if end <= start:
        end = len(part)
    leads = (b"<f", b":f") if b"xmlns:" in part else (b"<f",)
    for lead in leads:
        i = part.find(lead, start, end)
        while i >= 0:
            if i + 2 < len(part) and part[i + 2] in _AFTER_NAME:
                return True
            i = part.find(lead, i + 2, end)
    return (part.find(b'"e"', start, end) >= 0
            or (part.find(b"'", start, end) >= 0 and part.find(b"'e'", start, end) >= 0))


def _part(z: zipfile.ZipFile, data: bytes, item: zipfile.ZipInfo) -> bytes:
    """One part of the package, inflated straight from the file's bytes in memory.

    zipfile's reader (a file object per part) costs about twice the inflation itself on these
    small parts, and calamine reads the same parts again and checks their CRC; the inflated
    size is capped at the one the directory declares (which :func:`inspect` holds to the
    limit), so a part cannot inflate beyond it.  A part stored another way goes to zipfile."""
    if item.compress_type != zipfile.ZIP_DEFLATED or item.flag_bits & 1:
        return z.read(item)   # stored, another method, or encrypted (zipfile says which)
    at = item.header_offset
    if data[at:at + 4] != b"PK\x03\x04":
        raise zipfile.BadZipFile(f"no local header for {item.filename}")
    name, extra = struct.unpack_from("<HH", data, at + 26)
    start = at + 30 + name + extra
    out = zlib.decompressobj(-15).decompress(data[start:start + item.compress_size],
                                             item.file_size + 1)
    if len(out) != item.file_size:
        raise zipfile.BadZipFile(f"{item.filename} does not inflate to its declared size")
    return out


def inspect(path: Path, rel: str, log: ProblemLog
             ) -> tuple[bytes, dict[str, list[str]], bool] | None:
    """(the file's bytes, the layout specgen wrote, whether any part holds a formula or an
    error value), or ``None`` when the file is not to be opened (the reason in ``log``)."""
    suffix = path.suffix.lower()
    if suffix in MACRO_SUFFIXES:
        log.add(rel, "is a macro-enabled workbook; specgen does not open it, so no macro runs.",
                fix=SAVE_AS + " (macros are dropped), then delete this file.")
        return None
    if suffix in OLD_SUFFIXES:
        log.add(rel, "is in the old binary spreadsheet format, which specgen does not read.",
                fix=SAVE_AS + ".")
        return None
    if path.stat().st_size > MAX_FILE_BYTES:
        log.add(rel, f"is larger than {MAX_FILE_BYTES // 2**20} MiB.",
                fix="keep only the project's results in the workbook.")
        return None
    data = path.read_bytes()   # read once: both the checks and the reader work from memory
    try:
        z = zipfile.ZipFile(io.BytesIO(data))
    except (zipfile.BadZipFile, OSError, EOFError, ValueError):
        log.add(rel, "is not an xlsx workbook (an xlsx file is a zip archive).",
                fix=SAVE_AS + ", or export each sheet as 'CSV UTF-8'.")
        return None
    try:
        with z:
            items = z.infolist()
            names = [i.filename for i in items]
            if any(n.lower().endswith("vbaproject.bin") for n in names):
                log.add(rel, "holds macros (a macro project inside an .xlsx); specgen does not "
                        "open it, so no macro runs.", fix=SAVE_AS + " without macros.")
                return None
            inflated = sum(i.file_size for i in items)
            if inflated > MAX_UNZIPPED_BYTES:
                log.add(rel, f"inflates to {inflated / 1e6:.0f} MB; the limit is "
                        f"{MAX_UNZIPPED_BYTES // 2**20} MiB.", fix="keep only the project's results.")
                return None
            # every part that may hold cells, not only xl/worksheets/
            formulas = any(_formula_or_error(_part(z, data, i)) for i in items
                           if i.filename.lower().endswith(".xml")
                           and not _NO_CELLS.match(i.filename))
            custom = z.read(CUSTOM_PART) if CUSTOM_PART in names else None
    except (zipfile.BadZipFile, zlib.error, OSError, EOFError, RuntimeError, ValueError,
            struct.error) as exc:
        log.add(rel, f"cannot be read as an xlsx workbook ({type(exc).__name__}: "
                f"{str(exc)[:80]}).", fix=SAVE_AS + ", or export each sheet as 'CSV UTF-8'.")
        return None
    return data, _layout(custom), formulas


def _layout(custom: bytes | None) -> dict[str, list[str]]:
    """Sheets and headers as specgen wrote them (empty for a workbook made elsewhere)."""
    if not custom:
        return {}
    from xml.etree import ElementTree as ET
    try:
        root = ET.fromstring(custom)
    except ET.ParseError:
        return {}
    for prop in root:
        if prop.get("name") == LAYOUT_PROPERTY and len(prop):
            try:
                data = json.loads(prop[0].text or "")
            except (TypeError, ValueError):
                return {}
            return {k: [str(h) for h in v] for k, v in data.items()
                    if isinstance(v, list)} if isinstance(data, dict) else {}
    return {}
