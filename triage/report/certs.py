"""The self-signed X.509 certificate of an ECDSA P-256 inspector key.

A standard PDF signature carries a certificate; ours is self-signed, made once by `key new`:
subject and issuer both `CN = <inspector's name>, serialNumber = <inspector's id>`, ten years'
validity from the moment it is made, key usage digital signature and non-repudiation, not a CA.
Nobody vouches for it: trust is a match of its public key with a key trusted on this laptop,
never an X.509 path.
"""

from __future__ import annotations

from datetime import UTC, datetime, timedelta

from cryptography import x509
from cryptography.hazmat.primitives import hashes, serialization
from cryptography.hazmat.primitives.asymmetric import ec
from cryptography.x509.oid import NameOID

VALID_DAYS = 3653  # ten years, leap days included
CURVE = "secp256r1"


def make_certificate(private: ec.EllipticCurvePrivateKey, name: str, ident: str,
                     now: datetime | None = None) -> bytes:
    """The DER of a self-signed certificate of `private`'s public key for `name` and `ident`."""
    now = (now or datetime.now(UTC)).replace(microsecond=0)
    subject = x509.Name([x509.NameAttribute(NameOID.COMMON_NAME, name),
                         x509.NameAttribute(NameOID.SERIAL_NUMBER, ident)])
    cert = (x509.CertificateBuilder()
            .subject_name(subject).issuer_name(subject)
            .public_key(private.public_key())
            .serial_number(x509.random_serial_number())
            .not_valid_before(now).not_valid_after(now + timedelta(days=VALID_DAYS))
            .add_extension(x509.BasicConstraints(ca=False, path_length=None), critical=True)
            .add_extension(x509.KeyUsage(
                digital_signature=True, content_commitment=True, key_encipherment=False,
                data_encipherment=False, key_agreement=False, key_cert_sign=False,
                crl_sign=False, encipher_only=False, decipher_only=False), critical=True)
            .sign(private, hashes.SHA256()))
    return cert.public_bytes(serialization.Encoding.DER)


def load_certificate(data: bytes) -> x509.Certificate:
    """A certificate from DER or PEM bytes; ValueError (one line) when it is not one."""
    try:
        if data.lstrip().startswith(b"-----BEGIN CERTIFICATE-----"):
            return x509.load_pem_x509_certificate(data)
        return x509.load_der_x509_certificate(data)
    except ValueError:
        raise ValueError("not an X.509 certificate") from None


def point_of(public: ec.EllipticCurvePublicKey) -> bytes:
    """The 65-byte uncompressed point (X9.62) of a P-256 public key."""
    return public.public_bytes(serialization.Encoding.X962,
                               serialization.PublicFormat.UncompressedPoint)


def certificate_point(cert: x509.Certificate) -> bytes:
    """The certificate's public key as a P-256 point; ValueError when it is another kind."""
    pub = cert.public_key()
    if not isinstance(pub, ec.EllipticCurvePublicKey) or pub.curve.name != CURVE:
        raise ValueError("its certificate's key is not ECDSA P-256")
    return point_of(pub)


def certificate_subject(cert: x509.Certificate) -> tuple[str | None, str | None]:
    """(common name, serialNumber) of the certificate's subject; None where absent."""
    def one(oid: x509.ObjectIdentifier) -> str | None:
        attrs = cert.subject.get_attributes_for_oid(oid)
        if len(attrs) != 1:
            return None
        value = attrs[0].value
        return value if isinstance(value, str) else None

    return one(NameOID.COMMON_NAME), one(NameOID.SERIAL_NUMBER)


def to_pem(der: bytes) -> str:
    """A certificate's DER as PEM text."""
    return x509.load_der_x509_certificate(der).public_bytes(
        serialization.Encoding.PEM).decode("ascii")
