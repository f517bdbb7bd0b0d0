"""Signing an issued revision: its PDF (PAdES) and its manifest, with the specifier's key.

pyHanko does the cryptography.  The PDF receives an incremental-update PAdES signature
(``ETSI.CAdES.detached``), so the printed pages are untouched; the manifest, updated with
the signed PDF's hash, is signed the same way as a detached CMS signature in
``manifest.json.p7s`` beside it.  The key is read from the file the user names and is
never copied anywhere.  ``verify`` checks that every signature is intact (the bytes it
covers are unchanged) and, given trusted certificates, that the signer is trusted.
"""
from __future__ import annotations

import asyncio
import io
import json
from pathlib import Path

from specgen.errors import PublishError, UsageError
from specgen.publish.output import APPENDIX_SUFFIX, MANIFEST, sha256_file, write_atomic

MANIFEST_SIGNATURE = MANIFEST + ".p7s"


def _signer(key: Path, cert: Path, passphrase: bytes | None, chain: list[Path]):
    from pyhanko.sign import signers
    for p in (key, cert, *chain):
        if not Path(p).is_file():
            raise UsageError(f"{p}: no such file. Fix: name the key and certificate files (PEM).")
    signer = signers.SimpleSigner.load(str(key), str(cert), ca_chain_files=tuple(map(str, chain)),
                                       key_passphrase=passphrase)
    if signer is None:
        raise UsageError(f"{key}: the key or certificate could not be read (wrong passphrase, or "
                         "not PEM). Fix: give the PEM files and the passphrase variable.")
    return signer


def sign_revision(folder: Path, key: Path, cert: Path, *, passphrase: bytes | None = None,
                  chain: list[Path] = ()) -> dict:
    """Sign the revision's PDF (PAdES) and then its manifest (detached CMS)."""
    from pyhanko.pdf_utils.incremental_writer import IncrementalPdfFileWriter
    from pyhanko.sign import fields, signers
    manifest_path = folder / MANIFEST
    try:
        manifest = json.loads(manifest_path.read_text(encoding="utf-8"))
    except (OSError, ValueError) as exc:
        raise UsageError(f"{manifest_path}: no readable manifest. Fix: name a revision folder "
                         "written by specgen build, e.g. OUT/R4.") from exc
    if manifest.get("status") != "issued":
        raise UsageError(f"{folder}: revision {manifest.get('revision')} is a draft; only an "
                         "issued revision is signed. Fix: issue it first (specgen issue).")
    # the main volume is signed; the appendix volume is vouched for by its hash in the
    # manifest, which is signed next
    pdfs = [p for p in manifest.get("outputs", {}) if p.endswith(".pdf") and "/" not in p
            and not p.endswith(APPENDIX_SUFFIX)]
    if len(pdfs) != 1:
        raise PublishError(f"{folder}: expected one dossier PDF in the manifest, found "
                           f"{len(pdfs)}.")
    signer = _signer(key, cert, passphrase, list(chain))
    pdf = folder / pdfs[0]
    meta = signers.PdfSignatureMetadata(field_name="SpecifierSignature", md_algorithm="sha256",
                                        subfilter=fields.SigSeedSubFilter.PADES,
                                        reason=f"Issue of revision {manifest.get('revision')}")
    with open(pdf, "rb") as f:
        signed = signers.sign_pdf(IncrementalPdfFileWriter(f), meta, signer=signer)
    tmp = pdf.with_name(f".{pdf.name}.signed")
    tmp.write_bytes(signed.getvalue())
    tmp.replace(pdf)
    manifest["outputs"][pdfs[0]] = sha256_file(pdf)
    who = signer.signing_cert.subject.human_friendly
    manifest["signed"] = {"by": who, "pdf": pdfs[0], "manifest": MANIFEST_SIGNATURE}
    text = json.dumps(manifest, indent=2, sort_keys=True) + "\n"
    write_atomic(manifest_path, text)
    cms = asyncio.run(signer.async_sign_general_data(text.encode("utf-8"), "sha256",
                                                     detached=True))
    (folder / MANIFEST_SIGNATURE).write_bytes(cms.dump())
    return {"pdf": pdf, "manifest_signature": folder / MANIFEST_SIGNATURE, "signer": who}


def _context(trust: list[Path]):
    from pyhanko.keys import load_cert_from_pemder
    from pyhanko_certvalidator import ValidationContext
    return ValidationContext(trust_roots=[load_cert_from_pemder(str(t)) for t in trust],
                             allow_fetching=False)


def verify_signatures(folder: Path, trust: list[Path]) -> list[dict]:
    """Every signature of the revision: PDF signatures and the manifest's, each intact or not."""
    out = []
    try:
        manifest = json.loads((folder / MANIFEST).read_text(encoding="utf-8"))
    except (OSError, ValueError):
        return out
    signed = manifest.get("signed")
    if not signed:
        return out
    from pyhanko.pdf_utils.reader import PdfFileReader
    from pyhanko.sign.validation import validate_pdf_signature
    pdf = folder / signed["pdf"]
    try:
        reader = PdfFileReader(io.BytesIO(pdf.read_bytes()), strict=False)
        sigs = list(reader.embedded_signatures)
    except Exception as exc:  # a damaged PDF is a failed verification, said plainly
        sigs, error = [], f"cannot be read ({type(exc).__name__}: {exc})"
    else:
        error = "carries no signature although the manifest says it is signed"
    if not sigs:
        out.append({"file": signed["pdf"], "intact": False, "summary": error})
    for sig in sigs:
        st = validate_pdf_signature(sig, _context(trust))
        whole = st.coverage.name == "ENTIRE_FILE"
        out.append({"file": signed["pdf"], "intact": bool(st.intact and st.valid and whole),
                    "summary": _summary(st.intact and st.valid and whole, st.trusted,
                                        sig.signer_cert.subject.human_friendly, trust)})
    out.append(_verify_manifest(folder, trust))
    return out


def _verify_manifest(folder: Path, trust: list[Path]) -> dict:
    from asn1crypto import cms
    from pyhanko.sign.validation import async_validate_detached_cms
    path = folder / MANIFEST_SIGNATURE
    if not path.is_file():
        return {"file": MANIFEST, "intact": False, "summary": f"{MANIFEST_SIGNATURE} is missing"}
    try:
        info = cms.ContentInfo.load(path.read_bytes())
        st = asyncio.run(async_validate_detached_cms((folder / MANIFEST).read_bytes(),
                                                     info["content"], _context(trust)))
    except Exception as exc:  # a damaged signature file is a failed verification
        return {"file": MANIFEST, "intact": False,
                "summary": f"{MANIFEST_SIGNATURE} cannot be read ({type(exc).__name__})"}
    ok = bool(st.intact and st.valid)
    return {"file": MANIFEST, "intact": ok,
            "summary": _summary(ok, st.trusted, st.signing_cert.subject.human_friendly, trust)}


def _summary(ok: bool, trusted: bool, who: str, trust: list[Path]) -> str:
    if not ok:
        return f"BROKEN — the signed bytes were changed (signed by {who})"
    if trusted:
        return f"intact, signed by {who}, certificate trusted"
    return (f"intact, signed by {who}; certificate not trusted"
            + ("" if trust else " (name the signer's root certificate with --trust)"))
