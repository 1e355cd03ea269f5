"""Signed reports: every changed byte is caught, signers are accepted or not, and the embedded
survey is re-assessed (exit codes of DESIGN.md: 0, 1, 3, 4, 5)."""

from __future__ import annotations

from pathlib import Path

import pytest

from triage.report import render_report, write_report
from triage.report.keys import new_key
from triage.report.pdfparts import SLOT_KEY
from triage.report.signing import file_digest, find_slot
from triage.report.verify import verify_report


@pytest.fixture
def key(tmp_path: Path):
    k, _ = new_key("Aroha Ngāti", "R-77", tmp_path / "aroha.key", None)
    return k


@pytest.fixture
def signed(clinic_pair, key, tmp_path: Path) -> Path:
    s, a = clinic_pair
    out = tmp_path / "signed.pdf"
    info = write_report(s, a, out, key=key)
    assert info.signed and info.fingerprint == key.fingerprint
    return out


def test_intact_and_trusted_is_0(signed: Path, key):
    r = verify_report(signed)
    assert r.code == 0, r.message
    assert (r.signer_name, r.signer_id, r.fingerprint) == ("Aroha Ngāti", "R-77",
                                                           key.fingerprint)
    assert r.signed_at and "Aroha Ngāti" in r.message and key.fingerprint in r.message
    assert "same tier and level, hold/LS" in r.message
    assert verify_report(signed, expect=key.fingerprint.upper()).code == 0


def test_signer_shown_on_page_one(signed: Path, key):
    from pypdf import PdfReader

    one = " ".join(PdfReader(signed).pages[0].extract_text().split())
    assert f"Digitally signed by Aroha Ngāti (id R-77), key fingerprint {key.fingerprint}" in one
    assert "UNSIGNED" not in one


def test_every_flipped_byte_is_caught(signed: Path, tmp_path: Path):
    data = signed.read_bytes()
    start, end = find_slot(data)
    n = len(data)
    # 300 places spread over the whole file, plus the slot's edges and the file's ends
    places = sorted({*(i * (n - 1) // 299 for i in range(300)), 0, n - 1, start - 1, start,
                     end - 1, end})
    target = tmp_path / "flipped.pdf"
    for pos in places:
        for mask in (0x01, 0x20):
            b = bytearray(data)
            b[pos] ^= mask
            target.write_bytes(bytes(b))
            r = verify_report(target)
            assert r.code == 1, f"byte {pos} ^ {mask:#x}: {r.code} {r.message}"
    assert len(places) >= 300


def test_appended_and_truncated_bytes_are_caught(signed: Path, tmp_path: Path):
    data = signed.read_bytes()
    target = tmp_path / "t.pdf"
    for changed in (data + b"\n", data + b"%%EOF\n", data + data[-200:], data[:-1],
                    data[:-7]):
        target.write_bytes(changed)
        r = verify_report(target)
        assert r.code == 1, r.message


def test_slot_parsed_strictly(signed: Path, tmp_path: Path):
    data = signed.read_bytes()
    start, end = find_slot(data)
    target = tmp_path / "t.pdf"
    # the same signature in upper case is not accepted
    target.write_bytes(data[:start] + data[start:end].upper() + data[end:])
    assert data[start:end].upper() != data[start:end]
    assert verify_report(target).code == 1
    # a second slot, anywhere, is refused
    target.write_bytes(data + b"\n%" + SLOT_KEY + data[start:end] + b">\n")
    assert "missing or repeated" in verify_report(target).message
    # the digest covers everything outside the slot, to the last byte
    assert file_digest(data, start, end) != file_digest(data + b" ", start, end)


def test_wrong_expect_gives_4(signed: Path, tmp_path: Path):
    other, _ = new_key("Øster Bay Engineer", "E-2", tmp_path / "other.key", None)
    r = verify_report(signed, expect=other.fingerprint)
    assert r.code == 4
    assert other.fingerprint in r.message and r.fingerprint != other.fingerprint


def test_untrusted_signer_gives_4(signed: Path, key):
    assert verify_report(signed, trusted=[]).code == 4
    assert "not trusted" in verify_report(signed, trusted=[]).message
    assert verify_report(signed, trusted=[key.public]).code == 0
    # --expect accepts a key this laptop does not trust
    assert verify_report(signed, trusted=[], expect=key.fingerprint).code == 0


def test_unsigned_gives_3(clinic_pair, tmp_path: Path):
    s, a = clinic_pair
    out = tmp_path / "u.pdf"
    write_report(s, a, out)
    r = verify_report(out)
    assert r.code == 3 and "no signature" in r.message
    junk = tmp_path / "junk.pdf"
    junk.write_bytes(b"not a pdf")
    assert verify_report(junk).code == 1
    assert verify_report(tmp_path / "absent.pdf").code == 1


def test_other_tier_on_reassessment_gives_5(clinic_pair, key, tmp_path: Path):
    s, a = clinic_pair
    forged = a.model_copy(update={"tier": "occupy", "performance_level": "IO"})
    out = tmp_path / "other.pdf"
    write_report(s, forged, out, key=key)
    r = verify_report(out)
    assert r.code == 5
    assert "hold/LS" in r.message and "occupy/IO" in r.message


def test_probabilities_beyond_001_give_5(clinic_pair, key, tmp_path: Path):
    s, a = clinic_pair
    p = dict(a.tier_probability)
    p["hold"], p["evacuate"] = p["hold"] - 0.05, p["evacuate"] + 0.05
    out = tmp_path / "p.pdf"
    write_report(s, a.model_copy(update={"tier_probability": p}), out, key=key)
    r = verify_report(out)
    assert r.code == 5 and "probabilities differ by 0.050" in r.message
    p["hold"], p["evacuate"] = a.tier_probability["hold"] - 0.005, a.tier_probability[
        "evacuate"] + 0.005
    write_report(s, a.model_copy(update={"tier_probability": p}), out, key=key)
    assert verify_report(out).code == 0


def test_other_engine_version_and_assumptions_named(clinic_pair, key, tmp_path: Path):
    s, a = clinic_pair
    assumptions = {**a.engine.assumptions, "keep_out_factor": 1.5}
    engine = a.engine.model_copy(update={"version": "0.0.9", "assumptions": assumptions})
    out = tmp_path / "e.pdf"
    write_report(s, a.model_copy(update={"engine": engine}), out, key=key)
    r = verify_report(out)
    assert r.code == 0, r.message
    assert "engine 0.0.9" in r.message
    assert "keep_out_factor 1.5 then, 1.0 now" in r.message


def test_signed_reports_differ_only_by_time(clinic_pair, key):
    from datetime import UTC, datetime

    s, a = clinic_pair
    t = datetime(2026, 11, 29, 1, 2, 3, tzinfo=UTC)
    one = render_report(s, a, key=key, signed_at=t)
    # Ed25519 is deterministic: same key, time and content give the same file
    assert render_report(s, a, key=key, signed_at=t) == one
    assert render_report(s, a, key=key) != one


def test_trusted_name_shown_when_the_report_names_another(signed: Path, key):
    from triage.report.keys import PublicKey

    as_trusted = PublicKey("Aroha N.", "R-77-old", key.public.raw)
    r = verify_report(signed, trusted=[as_trusted])
    assert r.code == 0
    assert "a key trusted here as Aroha N., id R-77-old" in r.message
