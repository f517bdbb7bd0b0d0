"""Signing an issued revision (PAdES PDF signature, detached CMS on the manifest) and verifying it.

The certificate is made on the fly with the ``cryptography`` package (a self-signed RSA key);
the check values are the outcome of pyHanko's own validation, a library from the package
index: intact after signing, broken after a one-byte change of a signed file.
"""
from __future__ import annotations

import datetime as dt
import io
import json

import pytest

pytest.importorskip("pyhanko")


@pytest.fixture
def credentials(tmp_path):
    from cryptography import x509
    from cryptography.hazmat.primitives import hashes, serialization
    from cryptography.hazmat.primitives.asymmetric import rsa
    from cryptography.x509.oid import NameOID
    key = rsa.generate_private_key(public_exponent=65537, key_size=2048)
    name = x509.Name([x509.NameAttribute(NameOID.COMMON_NAME, "Test Specifier"),
                      x509.NameAttribute(NameOID.ORGANIZATION_NAME, "Invented Conservation")])
    now = dt.datetime.now(dt.timezone.utc)
    cert = (x509.CertificateBuilder().subject_name(name).issuer_name(name)
            .public_key(key.public_key()).serial_number(x509.random_serial_number())
            .not_valid_before(now - dt.timedelta(days=1))
            .not_valid_after(now + dt.timedelta(days=30))
            .add_extension(x509.BasicConstraints(ca=True, path_length=None), critical=True)
            .add_extension(x509.KeyUsage(digital_signature=True, content_commitment=True,
                                         key_encipherment=False, data_encipherment=False,
                                         key_agreement=False, key_cert_sign=True, crl_sign=True,
                                         encipher_only=False, decipher_only=False), critical=True)
            .sign(key, hashes.SHA256()))
    keys = tmp_path / "keys"   # outside the project and the output folder
    keys.mkdir()
    (keys / "key.pem").write_bytes(key.private_bytes(
        serialization.Encoding.PEM, serialization.PrivateFormat.PKCS8,
        serialization.NoEncryption()))
    (keys / "cert.pem").write_bytes(cert.public_bytes(serialization.Encoding.PEM))
    return keys / "key.pem", keys / "cert.pem"


def _revision(folder, status="issued"):
    """A small revision folder as specgen writes it: the PDF's two volumes (the main one is
    signed) and a manifest of their hashes."""
    from pypdf import PdfWriter
    from specgen.publish.output import sha256_file
    folder.mkdir(parents=True)
    w = PdfWriter()
    w.add_blank_page(width=595, height=842)
    buf = io.BytesIO()
    w.write(buf)
    (folder / "T-R1.pdf").write_bytes(buf.getvalue())
    (folder / "T-R1-appendices.pdf").write_bytes(buf.getvalue())
    (folder / "results.json").write_text("{}\n")
    manifest = {"revision": "R1", "status": status, "inputs": {},
                "outputs": {p: sha256_file(folder / p) for p in (
                    "T-R1.pdf", "T-R1-appendices.pdf", "results.json")}}
    (folder / "manifest.json").write_text(json.dumps(manifest))
    return folder


def test_signed_revision_verifies_and_a_one_byte_change_breaks_it(tmp_path, credentials, cli):
    key, cert = credentials
    rev = _revision(tmp_path / "out" / "R1")
    signed = cli("sign", rev, "--key", key, "--cert", cert)
    assert signed.exit_code == 0, signed.output
    assert "Signed" in signed.output and "Test Specifier" in signed.output
    assert not any(p.suffix == ".pem" for p in rev.rglob("*"))  # the key is never copied
    ok = cli("verify", rev, "--trust", cert)
    assert ok.exit_code == 0, ok.output
    assert "signature of T-R1.pdf: intact, signed by" in ok.output
    assert "certificate trusted" in ok.output
    assert "signature of manifest.json: intact" in ok.output
    untrusted = cli("verify", rev)
    assert untrusted.exit_code == 0 and "certificate not trusted" in untrusted.output

    data = bytearray((rev / "T-R1.pdf").read_bytes())
    i = data.index(b"/MediaBox")          # inside the signed byte range
    data[i + 1] ^= 0x01
    (rev / "T-R1.pdf").write_bytes(bytes(data))
    broken = cli("verify", rev, "--trust", cert)
    assert broken.exit_code == 1
    assert "modified: T-R1.pdf" in broken.output
    assert "signature of T-R1.pdf: BROKEN" in broken.output


def test_changed_manifest_breaks_its_signature(tmp_path, credentials, cli):
    key, cert = credentials
    rev = _revision(tmp_path / "R1")
    assert cli("sign", rev, "--key", key, "--cert", cert).exit_code == 0
    text = (rev / "manifest.json").read_bytes()
    (rev / "manifest.json").write_bytes(text.replace(b'"R1"', b'"R2"', 1))  # one byte
    bad = cli("verify", rev, "--trust", cert)
    assert bad.exit_code == 1
    assert "signature of manifest.json: BROKEN" in bad.output


def test_a_draft_is_not_signed(tmp_path, credentials, cli):
    key, cert = credentials
    rev = _revision(tmp_path / "R1", status="draft")
    result = cli("sign", rev, "--key", key, "--cert", cert)
    assert result.exit_code == 2
    assert "revision R1 is a draft; only an issued revision is signed." in result.output
    missing = cli("sign", _revision(tmp_path / "R2"), "--key", tmp_path / "nope.pem", "--cert", cert)
    assert missing.exit_code == 2 and "nope.pem: no such file." in missing.output
