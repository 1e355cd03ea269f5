"""Any PDF reader sees the signature: poppler's `pdfsig` prints the signer and "Signature is
Valid" for a report signed with a new (ECDSA P-256) key, and "Invalid" once a byte changed.

`pdfsig` comes with poppler-utils. Rule: when the environment variable CI is set (as `.ci/run`
sets it, and every CI service does) a missing `pdfsig` FAILS these tests; on a developer's
laptop without poppler they are skipped, saying so.
"""

from __future__ import annotations

import subprocess
from pathlib import Path

from tests.helpers import program
from triage.report import write_report
from triage.report.keys import new_key


def pdfsig() -> str:
    """The pdfsig program; a failure under CI, a skip elsewhere, when it is missing."""
    return program("pdfsig", "poppler-utils")


def run_pdfsig(pdf: Path) -> str:
    out = subprocess.run([pdfsig(), str(pdf)], capture_output=True, text=True, timeout=60)
    return out.stdout + out.stderr


def test_pdfsig_shows_signer_and_valid(clinic_pair, tmp_path: Path):
    s, a = clinic_pair
    key, _ = new_key("Aroha Ngāti", "R-77", tmp_path / "aroha.key", None)
    out = tmp_path / "r.pdf"
    write_report(s, a, out, key=key)
    text = run_pdfsig(out)
    assert "Signer Certificate Common Name: Aroha Ngāti" in text, text
    assert "serialNumber=R-77" in text
    assert "Signature Validation: Signature is Valid." in text
    assert "Total document signed" in text
    assert "ETSI.CAdES.detached" in text
    # a changed byte in the pages: poppler says so too
    data = bytearray(out.read_bytes())
    pos = data.index(b"stream\n", 2000) + 20
    data[pos] ^= 0x01
    changed = tmp_path / "changed.pdf"
    changed.write_bytes(bytes(data))
    assert "Signature is Valid." not in run_pdfsig(changed)


def test_pdfsig_sees_no_standard_signature_on_first_way_reports(clinic_pair, tmp_path: Path):
    s, a = clinic_pair
    key, _ = new_key("Aroha Ngāti", "R-77", tmp_path / "e.key", None, algorithm="ed25519")
    out = tmp_path / "e.pdf"
    write_report(s, a, out, key=key)
    assert "Signature is Valid" not in run_pdfsig(out)
