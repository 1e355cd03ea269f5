"""The signing parts one by one, on bytes typed in: the slot's bounds and refusals, the filled
slot, the signed payload and the RFC 8785 digests (the whole reports are test_signing.py's)."""

from __future__ import annotations

import hashlib

import pytest

from triage.report.pdfparts import PLACEHOLDER, SIG_HEX_LEN, SIG_TYPE, SLOT_KEY
from triage.report.signing import (
    SCHEME,
    SlotError,
    content_digests,
    file_digest,
    fill_slot,
    find_slot,
    looks_signed,
    payload,
    rfc8785_sha256,
)

HEAD = b"%PDF-1.4 1 0 obj << /Sig 2 0 R /Kind /TriageSignature >> "
BODY = b"2 0 obj << /Type /TriageSignature "
TAIL = b" >> endobj %%EOF\n"


def _file(slot: bytes = b"<" + PLACEHOLDER + b">", head: bytes = HEAD) -> bytes:
    return head + BODY + b"/Slot " + slot + TAIL


def test_the_slot_is_the_128_hex_digits_after_its_key():
    data = _file()
    start, end = find_slot(data)
    assert start == len(HEAD + BODY) + len(SLOT_KEY)
    assert end - start == SIG_HEX_LEN == 128
    assert data[start:end] == PLACEHOLDER
    assert data[start - 1:start] == b"<" and data[end:end + 1] == b">"


@pytest.mark.parametrize("data, message", [
    (HEAD + BODY + TAIL, "the signature slot is missing or repeated"),
    (_file() + b"/Slot <" + PLACEHOLDER + b">", "the signature slot is missing or repeated"),
    (_file(head=b"%PDF-1.4 "), "the signature dictionary is damaged"),
    (_file() + SIG_TYPE, "the signature dictionary is damaged"),
    (_file(b"<" + b"A" * 128 + b">"), "the signature slot is malformed"),
    (_file(b"<" + b"0" * 127 + b">"), "the signature slot is malformed"),
    (_file(b"<" + b"0" * 127 + b"g>"), "the signature slot is malformed"),
    (_file(b"<" + b"0" * 129 + b">"), "the signature slot is malformed"),
    (_file(b"<" + PLACEHOLDER + b" >"), "the signature slot is malformed"),
], ids=["none", "two", "one-dictionary-mark", "three-dictionary-marks", "upper-case",
        "127-digits", "not-hex", "129-digits", "space-before-close"])
def test_a_slot_not_exactly_one_well_formed_is_refused_by_name(data: bytes, message: str):
    with pytest.raises(SlotError) as err:
        find_slot(data)
    assert str(err.value) == message


def test_the_close_is_the_byte_right_after_the_digits():
    # The byte after '>' is not the close: a slot followed by '>>' directly still parses,
    # and one whose close is one byte late does not.
    start, end = find_slot(_file(b"<" + PLACEHOLDER + b">>"))
    assert end - start == 128
    with pytest.raises(SlotError, match="malformed"):
        find_slot(_file(b"<" + PLACEHOLDER + b"x>"))


def test_filled_slot_holds_the_signature_in_lower_case_hex_and_nothing_else_moves():
    data = _file()
    start, end = find_slot(data)
    sig = bytes(range(64))
    out = fill_slot(data, sig)
    assert len(out) == len(data)
    assert out[:start] == data[:start] and out[end:] == data[end:]
    assert out[start:end] == sig.hex().encode()
    assert out[start:start + 6] == b"000102"
    assert find_slot(out) == (start, end)


def test_a_filled_slot_or_a_wrong_length_is_refused():
    data = _file()
    filled = fill_slot(data, b"\x01" * 64)
    with pytest.raises(SlotError) as err:
        fill_slot(filled, b"\x02" * 64)
    assert str(err.value) == "the slot is already filled"
    for n in (63, 65, 0):
        with pytest.raises(SlotError) as err:
            fill_slot(data, b"\x01" * n)
        assert str(err.value) == "a signature of the wrong length"


def test_file_digest_skips_exactly_the_slot():
    data = _file()
    start, end = find_slot(data)
    want = hashlib.sha256(data[:start] + data[end:]).hexdigest()
    assert file_digest(data, start, end) == want
    assert file_digest(fill_slot(data, b"\x07" * 64), start, end) == want
    assert file_digest(data + b"\n", start, end) != want


def test_looks_signed_by_either_mark():
    assert looks_signed(b"x /Slot <y")
    assert looks_signed(b"x /TriageSignature y")
    assert not looks_signed(b"%PDF-1.7 /Sig /ByteRange")


def test_payload_is_the_scheme_line_then_the_canonical_json():
    got = payload({"b": "é", "a": 1}, {"tier": "x"}, "ab12")
    assert got == (b"triage-report-signature/1\n"
                   b'{"assessment":{"tier":"x"},"file_sha256":"ab12",'
                   b'"survey":{"a":1,"b":"\xc3\xa9"}}')
    assert got.startswith(SCHEME)


def test_rfc8785_digest_of_typed_in_canonical_text():
    # RFC 8785: keys sorted by UTF-16 code units, no spaces, 1.0 written as 1, strings in
    # UTF-8 as they are; the digest is of exactly those bytes.
    value = {"b": [1.0, "é"], "a": {"z": None, "y": True}}
    text = '{"a":{"y":true,"z":null},"b":[1,"é"]}'.encode()
    assert rfc8785_sha256(value) == hashlib.sha256(text).hexdigest()


def test_content_digests_name_both_parts():
    survey, assessment = {"id": "s"}, {"tier": 2}
    assert content_digests(survey, assessment) == {
        "survey_sha256": hashlib.sha256(b'{"id":"s"}').hexdigest(),
        "assessment_sha256": hashlib.sha256(b'{"tier":2}').hexdigest(),
    }


def test_no_canonical_form_is_one_value_error():
    with pytest.raises(ValueError) as err:
        rfc8785_sha256({"x": float("nan")})
    assert str(err.value).startswith("no RFC 8785 canonical form (")
    assert err.value.__cause__ is None and err.value.__suppress_context__
    with pytest.raises(ValueError) as err:
        content_digests({"x": 2 ** 60}, {})
    assert str(err.value).startswith("no RFC 8785 canonical form (")


def test_nesting_too_deep_is_one_value_error():
    deep: list = []
    for _ in range(5000):
        deep = [deep]
    with pytest.raises(ValueError) as err:
        rfc8785_sha256(deep)
    assert str(err.value) == "no RFC 8785 canonical form (nested too deeply)"
    assert err.value.__suppress_context__
