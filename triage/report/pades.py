"""The standard PDF signature of a report: PAdES baseline B (B-B) with an ECDSA P-256 key.

pyHanko appends the signature to the finished report as an incremental update: a signature
field on page one (no appearance: page one prints the signature block itself) whose CMS
signature (`ETSI.CAdES.detached`, SHA-256) covers the byte range of the whole file but the
signature value, and embeds the key's self-signed certificate. Any PDF reader lists it; poppler's
`pdfsig` prints the signer's name and "Signature is Valid" (and, rightly, that the issuer is
unknown). pyHanko is imported only here, inside functions, so start-up stays fast.

`check` accepts exactly one such signature whose byte range starts at byte 0, leaves out only
the signature value and ends at the file's last byte; it returns the certificate, for the
caller to match its key with the keys trusted on this laptop (trust is that match, never an
X.509 path).
"""

from __future__ import annotations

import io
import logging
import re
from collections.abc import Callable
from dataclasses import dataclass
from datetime import datetime
from typing import TYPE_CHECKING, Any, TypeVar

if TYPE_CHECKING:
    from .keys import SigningKey

T = TypeVar("T")
FIELD_NAME = "InspectorSignature"
REASON = "indicative triage report; the engineer of record decides"
_HEX = re.compile(rb"(?:[0-9A-F]{2})+")  # as pyHanko writes it: upper case, whole bytes


class BrokenSignature(ValueError):
    """The standard signature is missing, damaged, or does not cover the file as it is."""


@dataclass(frozen=True)
class Checked:
    """What a sound standard signature says: its certificate (DER) and its time."""

    certificate: bytes
    signed_at: datetime | None


def _outside_event_loop(fn: Callable[[], T]) -> T:
    """Run `fn` here, or in a thread of its own when this thread runs an asyncio loop.

    pyHanko's synchronous calls start a loop of their own, which a running one (the screens)
    forbids.
    """
    import asyncio

    try:
        asyncio.get_running_loop()
    except RuntimeError:
        return fn()
    from concurrent.futures import ThreadPoolExecutor

    with ThreadPoolExecutor(max_workers=1) as pool:
        return pool.submit(fn).result()


def _quiet() -> None:
    for name in ("pyhanko", "pyhanko_certvalidator"):
        logging.getLogger(name).setLevel(logging.CRITICAL)


def sign(data: bytes, key: SigningKey, at: datetime) -> bytes:
    """The report `data` with a PAdES B-B signature by `key` (P-256 with its certificate)."""
    from asn1crypto import keys as akeys
    from asn1crypto import x509 as ax509
    from cryptography.hazmat.primitives import serialization
    from pyhanko.pdf_utils.incremental_writer import IncrementalPdfFileWriter
    from pyhanko.sign import fields, signers
    from pyhanko.sign.signers.pdf_signer import PdfSigner
    from pyhanko_certvalidator.registry import SimpleCertificateStore

    if key.certificate is None:
        raise ValueError("a standard PDF signature needs a P-256 key with its certificate")
    _quiet()
    cert = ax509.Certificate.load(key.certificate)
    private = akeys.PrivateKeyInfo.load(key.private.private_bytes(
        serialization.Encoding.DER, serialization.PrivateFormat.PKCS8,
        serialization.NoEncryption()))
    store = SimpleCertificateStore()  # type: ignore[no-untyped-call]  # unannotated __init__
    signer = signers.SimpleSigner(signing_cert=cert, signing_key=private, cert_registry=store)
    meta = signers.PdfSignatureMetadata(
        field_name=FIELD_NAME, subfilter=fields.SigSeedSubFilter.PADES, md_algorithm="sha256",
        name=key.name, reason=REASON)

    class _AtTime(PdfSigner):  # the signing time printed on page one, not a second later
        def init_signing_session(self, pdf_out: Any, existing_fields_only: bool = False) -> Any:
            session = super().init_signing_session(pdf_out, existing_fields_only)
            session.system_time = at
            return session

    def run() -> bytes:
        writer = IncrementalPdfFileWriter(io.BytesIO(data))
        return bytes(_AtTime(meta, signer=signer).sign_pdf(writer).getbuffer())

    return _outside_event_loop(run)


def has_standard_signature(data: bytes) -> bool:
    """Whether the file shows any sign of a standard PDF signature."""
    return b"/ByteRange" in data or b"/Type /Sig" in data or b"/Type/Sig" in data


def check(data: bytes) -> Checked:
    """Check the one standard signature of `data`; BrokenSignature (one line) when unsound."""
    from pyhanko.pdf_utils.reader import PdfFileReader
    from pyhanko.sign.validation import validate_pdf_signature
    from pyhanko.sign.validation.status import SignatureCoverageLevel
    from pyhanko_certvalidator import ValidationContext

    _quiet()
    try:
        reader = PdfFileReader(io.BytesIO(data), strict=False)
        sigs = reader.embedded_signatures
    except Exception as err:  # a hostile file may break the parser anywhere: one line
        raise BrokenSignature(f"the PDF cannot be read ({type(err).__name__})") from None
    if len(sigs) != 1:
        raise BrokenSignature(f"{len(sigs)} PDF signatures where one is expected"
                              if sigs else "the PDF signature is damaged")
    sig = sigs[0]
    _check_byte_range(data, sig.byte_range)
    try:
        cert = sig.signer_cert
        status = _outside_event_loop(lambda: validate_pdf_signature(
            sig, ValidationContext(trust_roots=[cert], allow_fetching=False), skip_diff=True))
    except Exception as err:  # malformed CMS and the like
        raise BrokenSignature(f"the PDF signature cannot be read ({type(err).__name__})"
                              ) from None
    if not status.intact:
        raise BrokenSignature("the file does not match its PDF signature")
    if not status.valid:
        raise BrokenSignature("the PDF signature is not valid for its certificate's key")
    if status.coverage != SignatureCoverageLevel.ENTIRE_FILE:
        raise BrokenSignature("the PDF signature does not cover the whole file (bytes were "
                              "added after it)")
    _check_cms(sig.pkcs7_content, cert.dump())
    return Checked(cert.dump(), status.signer_reported_dt)


def _check_cms(der: bytes, cert_der: bytes) -> None:
    """Accept only the CMS our signer writes, so that no byte of it can change unnoticed.

    Its unsigned parts (versions, algorithm names, the certificate) are checked one by one;
    the certificate is bound by the signed signingCertificateV2 hash and by its own
    self-signature.
    """
    import hashlib

    from asn1crypto import cms, tsp
    from cryptography import x509
    from cryptography.exceptions import InvalidSignature

    def bad(what: str) -> BrokenSignature:
        return BrokenSignature(f"the PDF signature is not as this tool makes it ({what})")

    size = _der_size(der)
    if size is None:
        raise bad("not in DER")
    der = der[:size]  # the padding after it was checked with the byte range
    try:
        if not _strict_der(der):
            raise bad("not in DER")
        ci = cms.ContentInfo.load(der, strict=True)
        sd = ci["content"]
        if ci["content_type"].native != "signed_data" or sd["version"].native != "v1":
            raise bad("content type or version")
        if ([(a["algorithm"].native, a["parameters"].native) for a in sd["digest_algorithms"]]
                != [("sha256", None)]):
            raise bad("digest algorithms")
        eci = sd["encap_content_info"]
        if eci["content_type"].native != "data" or eci["content"].native is not None:
            raise bad("encapsulated content")
        certs = list(sd["certificates"]) if sd["certificates"].native is not None else []
        if len(certs) != 1 or certs[0].chosen.dump() != cert_der or sd["crls"].native:
            raise bad("certificates")
        if len(sd["signer_infos"]) != 1:
            raise bad("signer infos")
        si = sd["signer_infos"][0]
        sid = si["sid"].chosen
        tbs = certs[0].chosen["tbs_certificate"]
        if (si["version"].native != "v1" or si["sid"].name != "issuer_and_serial_number"
                or sid["issuer"].dump() != tbs["issuer"].dump()
                or sid["serial_number"].native != tbs["serial_number"].native):
            raise bad("signer identifier")
        if (si["digest_algorithm"]["algorithm"].native != "sha256"
                or si["digest_algorithm"]["parameters"].native is not None
                or si["signature_algorithm"]["algorithm"].native != "sha256_ecdsa"
                or si["signature_algorithm"]["parameters"].native is not None
                or si["unsigned_attrs"].native is not None):
            raise bad("algorithms or unsigned attributes")
        ess = [a for a in si["signed_attrs"] if a["type"].dotted == _SIGNING_CERT_V2]
        if len(ess) != 1 or len(ess[0]["values"]) != 1:
            raise bad("signing certificate attribute")
        ids = tsp.SigningCertificateV2.load(ess[0]["values"][0].dump())["certs"]
        if (len(ids) != 1 or ids[0]["hash_algorithm"]["algorithm"].native != "sha256"
                or ids[0]["cert_hash"].native != hashlib.sha256(cert_der).digest()):
            raise bad("the certificate is not the one signed for")
    except BrokenSignature:
        raise
    except Exception as err:  # a malformed structure can fail anywhere in the parser
        raise bad(type(err).__name__) from None
    try:
        cert = x509.load_der_x509_certificate(cert_der)
        cert.verify_directly_issued_by(cert)
    except (ValueError, TypeError, InvalidSignature):
        raise bad("its certificate is not self-signed by its key") from None


_SIGNING_CERT_V2 = "1.2.840.113549.1.9.16.2.47"  # id-aa-signingCertificateV2 (RFC 5035)


def _check_byte_range(data: bytes, byte_range: Any) -> None:
    """Byte range [0, a, b, n - b]: everything from byte 0 to the end but `<…>` at [a, b)."""
    try:
        br = [int(x) for x in byte_range]
    except (TypeError, ValueError):
        raise BrokenSignature("the signature's byte range is damaged") from None
    if len(br) != 4:
        raise BrokenSignature("the signature's byte range is damaged")
    _, a, b, c = br
    if br[0] != 0 or not 0 < a < b or b + c != len(data) or c <= 0:
        raise BrokenSignature("the signature's byte range does not cover the whole file but "
                              "the signature")
    hexed = data[a + 1:b - 1]
    if data[a:a + 1] != b"<" or data[b - 1:b] != b">" or not _HEX.fullmatch(hexed):
        raise BrokenSignature("the signature's byte range leaves out more than the signature")
    # The bytes left out must say one thing only: the DER signature, then "0" padding. So no
    # byte outside the range can change (a case or a padding digit) and still verify.
    der = bytes.fromhex(hexed.decode("ascii"))
    size = _der_size(der)
    if size is None or hexed[2 * size:].strip(b"0"):
        raise BrokenSignature("the signature value is damaged")


def _der_size(der: bytes) -> int | None:
    """The length of the DER element at the start of `der` (tag, length, content); None if bad."""
    if len(der) < 2 or der[0] != 0x30:
        return None
    first = der[1]
    if first < 0x80:
        size = 2 + first
    else:
        n = first & 0x7F
        if not 1 <= n <= 4 or len(der) < 2 + n:
            return None
        size = 2 + n + int.from_bytes(der[2:2 + n], "big")
    return size if size <= len(der) else None


def _strict_der(der: bytes) -> bool:
    """Whether `der` is one DER element whose every constructed part its children fill exactly.

    Definite, minimal lengths; no end-of-contents markers; booleans 00 or FF. (Cheaper than a
    re-encoding, and it leaves no second spelling of the same structure.)
    """
    def walk(i: int, end: int) -> int:
        while i < end:
            tag = der[i]
            if tag == 0 or tag & 0x1F == 0x1F or i + 2 > end:
                raise ValueError
            first = der[i + 1]
            i += 2
            if first < 0x80:
                n = first
            else:
                k = first & 0x7F
                if not 1 <= k <= 4 or i + k > end or der[i] == 0:
                    raise ValueError
                n = int.from_bytes(der[i:i + k], "big")
                if n < 0x80:
                    raise ValueError
                i += k
            if i + n > end:
                raise ValueError
            if tag == 0x01 and (n != 1 or der[i] not in (0x00, 0xFF)):
                raise ValueError
            if tag & 0x20:
                walk(i, i + n)
            i += n
        if i != end:
            raise ValueError
        return i

    try:
        return len(der) > 0 and der[0] == 0x30 and walk(0, len(der)) == len(der)
    except (ValueError, IndexError, RecursionError):
        return False
