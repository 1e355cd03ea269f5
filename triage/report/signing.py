"""The two ways a report is signed, and the signed payloads.

A standard PDF signature (ECDSA P-256 keys, `triage.report.pades`) covers every byte of the
file but its own value; the signed `signer.json` inside it names the signer and carries the
SHA-256 of the RFC 8785 canonical JSON of the embedded survey and assessment
(`content_digests`), so the content is bound by meaning as well as by bytes.

The first way (Ed25519 keys of the first round, which keep signing so): a digest of the file
outside one fixed slot, signed with Ed25519.
Like a PDF signature's byte range, the digest (SHA-256) covers every byte of the file except
the 128 hex digits of the slot `/Slot <…>` in the `/TriageSignature` dictionary; the covered
range runs to the file's last byte, so appended bytes change it. The slot is parsed strictly:
the key occurs once, followed by exactly 128 lowercase hex digits and `>`.

The signed payload is the canonical (sorted-key, compact) JSON of the survey, the assessment
and that file digest, after a line naming this scheme: the canonical text of
`triage.model.canonical_json`, kept unchanged so those reports keep verifying.
"""

from __future__ import annotations

import hashlib
import re
from typing import Any

from triage.model import canonical_json

from .pdfparts import PLACEHOLDER, SIG_HEX_LEN, SIG_TYPE, SLOT_KEY

SCHEME = b"triage-report-signature/1\n"
CANONICAL = "RFC 8785"
_HEX = re.compile(rb"[0-9a-f]{%d}" % SIG_HEX_LEN)


class SlotError(ValueError):
    """The signature slot is missing, repeated or malformed (the file was changed)."""


SIGNER_MARK = b"(signer.json)"  # the embedded file naming the signer, as reportlab writes it


def looks_signed(data: bytes) -> bool:
    """Whether the file carries any sign of being signed the first way (slot or dictionary)."""
    return SLOT_KEY in data or SIG_TYPE in data


def find_slot(data: bytes) -> tuple[int, int]:
    """The byte range [start, end) of the slot's hex digits; SlotError when not exactly one."""
    if data.count(SLOT_KEY) != 1:
        raise SlotError("the signature slot is missing or repeated")
    if data.count(SIG_TYPE) != 2:
        raise SlotError("the signature dictionary is damaged")
    start = data.index(SLOT_KEY) + len(SLOT_KEY)
    end = start + SIG_HEX_LEN
    if not _HEX.fullmatch(data[start:end]) or data[end:end + 1] != b">":
        raise SlotError("the signature slot is malformed")
    return start, end


def file_digest(data: bytes, start: int, end: int) -> str:
    """SHA-256 (hex) of every byte outside the slot, through the last byte of the file."""
    h = hashlib.sha256()
    h.update(data[:start])
    h.update(data[end:])
    return h.hexdigest()


def payload(survey: dict[str, Any], assessment: dict[str, Any], digest: str) -> bytes:
    """The bytes that are signed."""
    body = canonical_json({"assessment": assessment, "file_sha256": digest, "survey": survey})
    return SCHEME + body.encode("utf-8")


def fill_slot(data: bytes, signature: bytes) -> bytes:
    """The file with the signature written into its (placeholder) slot."""
    start, end = find_slot(data)
    if data[start:end] != PLACEHOLDER:
        raise SlotError("the slot is already filled")
    hexsig = signature.hex().encode("ascii")
    if len(hexsig) != SIG_HEX_LEN:
        raise SlotError("a signature of the wrong length")
    return data[:start] + hexsig + data[end:]


def rfc8785_sha256(value: Any) -> str:
    """SHA-256 (hex) of the RFC 8785 canonical JSON of `value`; ValueError when it has none."""
    import rfc8785

    try:
        return hashlib.sha256(rfc8785.dumps(value)).hexdigest()
    except rfc8785.CanonicalizationError as err:
        raise ValueError(f"no RFC 8785 canonical form ({err})") from None
    except RecursionError:
        raise ValueError("no RFC 8785 canonical form (nested too deeply)") from None


def content_digests(survey: Any, assessment: Any) -> dict[str, str]:
    """The signed digests of a standard-signed report's embedded survey and assessment."""
    return {"survey_sha256": rfc8785_sha256(survey),
            "assessment_sha256": rfc8785_sha256(assessment)}
