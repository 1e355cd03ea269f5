"""A report signed the first way (Ed25519, before standard PDF signatures), kept as a test file,
still verifies with the same exit codes (tests/report/data/README.md says how it was made)."""

from __future__ import annotations

from pathlib import Path

import pytest

from triage.report.keys import read_public
from triage.report.verify import import_verdict, verify_report

DATA = Path(__file__).parent / "data"
PDF = DATA / "first-round-ed25519.pdf"
PUB = DATA / "first-round-ed25519.pub"


@pytest.fixture
def pub():
    return read_public(PUB)


def test_still_verifies(pub):
    assert pub.algorithm == "ed25519" and (pub.name, pub.id) == ("Tess Tester", "T-1")
    r = verify_report(PDF, trusted=[pub])
    assert r.code == 0, r.message
    assert r.scheme == "Ed25519 (first way)" and r.fingerprint == pub.fingerprint
    assert r.signed_at == "2026-12-01T20:00:00+00:00"
    assert "same tier and level, hold/LS" in r.message
    assert verify_report(PDF, trusted=[], expect=pub.fingerprint).code == 0
    assert import_verdict(PDF, trusted=[pub]).warning is None


def test_same_exit_codes(pub, tmp_path: Path):
    assert verify_report(PDF, trusted=[]).code == 4
    from dataclasses import replace

    assert verify_report(PDF, trusted=[replace(pub, name="Tess T.")]).code == 4
    data = PDF.read_bytes()
    target = tmp_path / "t.pdf"
    for pos in (0, 100, len(data) // 2, len(data) - 1):
        b = bytearray(data)
        b[pos] ^= 0x01
        target.write_bytes(bytes(b))
        assert verify_report(target, trusted=[pub]).code == 1
    target.write_bytes(data + b"\n")
    assert verify_report(target, trusted=[pub]).code == 1
