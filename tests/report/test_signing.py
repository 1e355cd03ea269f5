"""Signed reports, both kinds: every changed byte is caught, signers are accepted or not, and
the embedded survey is re-assessed (exit codes of docs/index.md: 0, 1, 3, 4, 5).

New keys (ECDSA P-256) make a standard PDF signature (PAdES B-B); Ed25519 keys of the first
round keep signing the first way. Tests that hold for both run once per kind.
"""

from __future__ import annotations

import io
import re
from pathlib import Path

import pytest

from triage.report import read_embedded, render_report, write_report
from triage.report.keys import new_key
from triage.report.pdfparts import SLOT_KEY
from triage.report.signing import file_digest, find_slot
from triage.report.verify import verify_report


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
    assert r.scheme == ("PAdES B-B" if key.algorithm == "ecdsa-p256" else "Ed25519 (first way)")
    assert r.signed_at and "Aroha Ngāti" in r.message and key.fingerprint in r.message
    assert "same tier and level, hold/LS" in r.message
    assert verify_report(signed, expect=key.fingerprint.upper()).code == 0


def test_new_keys_make_a_standard_signature(signed: Path, key):
    data = signed.read_bytes()
    if key.algorithm == "ecdsa-p256":
        assert b"/ETSI.CAdES.detached" in data and b"/ByteRange" in data
        assert SLOT_KEY not in data and b"/TriageSignature" not in data
    else:
        assert b"/ByteRange" not in data and data.count(SLOT_KEY) == 1


def test_signature_block_on_page_one(signed: Path, key):
    from pypdf import PdfReader

    one = " ".join(PdfReader(signed).pages[0].extract_text().split())
    assert f"Digitally signed by Aroha Ngāti (id R-77), key fingerprint {key.fingerprint}" in one
    assert re.search(r"signed at \d{1,2} [A-Z][a-z]+ 20\d\d, \d\d:\d\d:\d\d UTC; "
                     r"covers every byte of this file but the signature", one)
    assert ("PAdES B-B" in one) == (key.algorithm == "ecdsa-p256")
    # the survey's inspector is Tess Tester (T-1), not the signer: the block says so
    assert "Note: the signer is not the inspector of this survey (Tess Tester (id T-1))" in one
    assert "UNSIGNED" not in one


def test_no_note_when_the_inspector_signs(clinic_pair, tmp_path: Path):
    from pypdf import PdfReader

    s, a = clinic_pair
    k, _ = new_key("Tess Tester", "T-1", tmp_path / "t.key", None)
    out = tmp_path / "t.pdf"
    write_report(s, a, out, key=k)
    one = " ".join(PdfReader(out).pages[0].extract_text().split())
    assert "Digitally signed by Tess Tester (id T-1)" in one
    assert "not the inspector" not in one
    assert verify_report(out).code == 0


def _places(n: int, count: int, edges: list[int]) -> list[int]:
    return sorted({*(i * (n - 1) // (count - 1) for i in range(count)), 0, n - 1,
                   *(e for e in edges if 0 <= e < n)})


def test_every_flipped_byte_is_caught_first_way(clinic_pair, tmp_path: Path):
    s, a = clinic_pair
    key, _ = new_key("Aroha Ngāti", "R-77", tmp_path / "e.key", None, algorithm="ed25519")
    data = render_report(s, a, key=key)
    start, end = find_slot(data)
    places = _places(len(data), 300, [start - 1, start, end - 1, end])
    target = tmp_path / "flipped.pdf"
    for pos in places:
        for mask in (0x01, 0x20):
            b = bytearray(data)
            b[pos] ^= mask
            target.write_bytes(bytes(b))
            r = verify_report(target)
            assert r.code == 1, f"byte {pos} ^ {mask:#x}: {r.code} {r.message}"
    assert len(places) >= 300


def test_every_flipped_byte_is_caught_standard(clinic_pair, tmp_path: Path):
    """Spread over the file, and densely over the signature value the byte range leaves out."""
    s, a = clinic_pair
    key, _ = new_key("Aroha Ngāti", "R-77", tmp_path / "p.key", None)
    data = render_report(s, a, key=key)
    m = re.search(rb"/ByteRange \[\s*0 (\d+) (\d+) (\d+)", data)
    assert m is not None
    lo, hi = int(m.group(1)), int(m.group(2))
    # the signature value: its first DER bytes, its last, the padding, both brackets
    # (lo + 3 … lo + 8: the outer length; a longer one would swallow padding zeros)
    value = [lo - 1, *range(lo, lo + 9), lo + 40, lo + 140, hi - 2, hi - 1, hi, hi + 1]
    pad = data.index(b"0000", lo + 200)
    value += [pad, pad + 1, pad + 10, pad - 1, pad - 2]
    places = _places(len(data), 90, value)
    target = tmp_path / "flipped.pdf"
    for k, pos in enumerate(places):
        for mask in ((0x01, 0x20) if pos in value else ((0x01, 0x20)[k % 2],)):
            b = bytearray(data)
            b[pos] ^= mask
            target.write_bytes(bytes(b))
            r = verify_report(target)
            assert r.code == 1, f"byte {pos} ^ {mask:#x}: {r.code} {r.message}"
    assert len(places) >= 90


def test_appended_and_truncated_bytes_are_caught(signed: Path, tmp_path: Path):
    data = signed.read_bytes()
    target = tmp_path / "t.pdf"
    for changed in (data + b"\n", data + b"%%EOF\n", data + data[-200:], data[:-1],
                    data[:-7]):
        target.write_bytes(changed)
        r = verify_report(target)
        assert r.code == 1, r.message


def _replace_embedded_survey(data: bytes, new: bytes) -> bytes:
    """An incremental update (as any PDF editor appends one) that swaps survey.json."""
    from pyhanko.pdf_utils import generic
    from pyhanko.pdf_utils.incremental_writer import IncrementalPdfFileWriter

    w = IncrementalPdfFileWriter(io.BytesIO(data))
    names = w.root["/Names"]["/EmbeddedFiles"]["/Names"]
    for i in range(0, len(names), 2):
        if str(names[i]) == "survey.json":
            ref = names.raw_get(i + 1)
            spec = ref.get_object()
            stream = generic.StreamObject({generic.pdf_name("/Type"):
                                           generic.pdf_name("/EmbeddedFile")},
                                          stream_data=new)
            spec["/EF"] = generic.DictionaryObject({generic.pdf_name("/F"):
                                                    w.add_object(stream)})
            w.mark_update(ref)
            break
    else:
        raise AssertionError("no survey.json")
    out = io.BytesIO()
    w.write(out)
    return out.getvalue()


def test_incremental_update_replacing_the_survey_is_caught(signed: Path, tmp_path: Path):
    original, _ = read_embedded(signed)
    forged = original.replace("Ngāti Whare Clinic", "Forged Clinic")
    assert forged != original
    target = tmp_path / "forged.pdf"
    target.write_bytes(_replace_embedded_survey(signed.read_bytes(), forged.encode()))
    assert read_embedded(target)[0] == forged  # a reader sees the forged survey
    r = verify_report(target)
    assert r.code == 1 and "changed or damaged" in r.message, r.message


def test_first_way_slot_parsed_strictly(clinic_pair, tmp_path: Path):
    s, a = clinic_pair
    key, _ = new_key("Aroha Ngāti", "R-77", tmp_path / "e.key", None, algorithm="ed25519")
    data = render_report(s, a, key=key)
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


def test_standard_signature_value_parsed_strictly(clinic_pair, tmp_path: Path):
    s, a = clinic_pair
    key, _ = new_key("Aroha Ngāti", "R-77", tmp_path / "p.key", None)
    data = render_report(s, a, key=key)
    m = re.search(rb"/ByteRange \[\s*0 (\d+) (\d+) (\d+)", data)
    assert m is not None
    lo, hi = int(m.group(1)), int(m.group(2))
    target = tmp_path / "t.pdf"
    # the same value in lower case, or with something in its padding, is not accepted
    target.write_bytes(data[:lo] + data[lo:hi].lower() + data[hi:])
    assert data[lo:hi].lower() != data[lo:hi]
    assert verify_report(target).code == 1
    pad = data.rindex(b"00", lo, hi - 1)
    target.write_bytes(data[:pad] + b"AB" + data[pad + 2:])
    assert "signature value is damaged" in verify_report(target).message


def test_both_kinds_at_once_or_signer_without_signature(clinic_pair, tmp_path: Path):
    s, a = clinic_pair
    key, _ = new_key("Aroha Ngāti", "R-77", tmp_path / "p.key", None)
    data = render_report(s, a, key=key)
    target = tmp_path / "t.pdf"
    # the signature's revision cut off: a whole PDF again, naming a signer, signed by nobody
    first = data[:data.index(b"%%EOF") + 6]
    assert b"/ByteRange" not in first
    target.write_bytes(first)
    r = verify_report(target)
    assert r.code == 1 and "names a signer but carries no signature" in r.message
    target.write_bytes(data + b"%/TriageSignature\n")
    assert "both kinds of signature" in verify_report(target).message


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
    assert verify_report(tmp_path).code == 1


def test_other_tier_on_reassessment_gives_5(clinic_pair, key, tmp_path: Path):
    s, a = clinic_pair
    forged = a.model_copy(update={"tier": "occupy", "performance_level": "IO"})
    out = tmp_path / "other.pdf"
    write_report(s, forged, out, key=key)
    r = verify_report(out)
    assert r.code == 5
    assert "hold/LS" in r.message and "occupy/IO" in r.message


def test_probabilities_beyond_001_give_5(clinic_pair, tmp_path: Path):
    s, a = clinic_pair
    key, _ = new_key("Aroha Ngāti", "R-77", tmp_path / "p.key", None)
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


def test_other_engine_version_and_assumptions_named(clinic_pair, tmp_path: Path):
    s, a = clinic_pair
    key, _ = new_key("Aroha Ngāti", "R-77", tmp_path / "p.key", None)
    assumptions = {**a.engine.assumptions, "keep_out_factor": 1.5}
    engine = a.engine.model_copy(update={"version": "0.0.9", "assumptions": assumptions})
    out = tmp_path / "e.pdf"
    write_report(s, a.model_copy(update={"engine": engine}), out, key=key)
    r = verify_report(out)
    assert r.code == 0, r.message
    assert "engine 0.0.9" in r.message
    # the assumption in words (docs: no internal key reaches a person)
    assert "assumptions differ: keep-out width per height 1.5 then, 1.0 now" in r.message


def test_first_way_reports_differ_only_by_time(clinic_pair, tmp_path: Path):
    from datetime import UTC, datetime

    s, a = clinic_pair
    key, _ = new_key("Aroha Ngāti", "R-77", tmp_path / "e.key", None, algorithm="ed25519")
    t = datetime(2026, 11, 29, 1, 2, 3, tzinfo=UTC)
    one = render_report(s, a, key=key, signed_at=t)
    # Ed25519 is deterministic: same key, time and content give the same file
    assert render_report(s, a, key=key, signed_at=t) == one
    assert render_report(s, a, key=key) != one


def test_standard_signature_time_is_the_printed_time(clinic_pair, tmp_path: Path):
    from datetime import UTC, datetime

    s, a = clinic_pair
    key, _ = new_key("Aroha Ngāti", "R-77", tmp_path / "p.key", None)
    t = datetime(2026, 11, 29, 1, 2, 3, tzinfo=UTC)
    out = tmp_path / "t.pdf"
    out.write_bytes(render_report(s, a, key=key, signed_at=t))
    r = verify_report(out)
    assert r.code == 0 and r.signed_at == "2026-11-29T01:02:03+00:00"
    assert re.search(rb"/M \(D(:|\\072)20261129010203", out.read_bytes())


def test_trusted_under_another_name_gives_4_naming_both(signed: Path, key):
    from dataclasses import replace

    as_trusted = replace(key.public, name="Aroha N.", id="R-77-old")
    r = verify_report(signed, trusted=[as_trusted])
    assert r.code == 4
    assert ("the report names the signer Aroha Ngāti (id R-77), while key "
            f"{key.fingerprint} is trusted here as Aroha N. (id R-77-old)") in r.message


def test_a_signer_cannot_borrow_a_name_first_way(clinic_pair, tmp_path: Path):
    """A key trusted as Aroha, its file header edited to say Mere, signs: exit 4, both named."""
    from triage.report.keys import load_key

    s, a = clinic_pair
    path = tmp_path / "aroha.key"
    new_key("Aroha Ngāti", "R-77", path, None, algorithm="ed25519")  # trusted as Aroha
    text = path.read_text(encoding="utf-8")
    path.write_text(text.replace('"Aroha Ngāti"', '"Mere Kōwhai"').replace('"R-77"', '"M-1"'),
                    encoding="utf-8")
    borrowed = load_key(path, None)
    assert (borrowed.name, borrowed.id) == ("Mere Kōwhai", "M-1")
    out = tmp_path / "b.pdf"
    write_report(s, a, out, key=borrowed)
    r = verify_report(out)
    assert r.code == 4, r.message
    assert "Mere Kōwhai (id M-1)" in r.message and "Aroha Ngāti (id R-77)" in r.message


def test_a_signer_cannot_borrow_a_name_standard(clinic_pair, tmp_path: Path):
    """The edited key file is refused at loading; a key object renamed in memory (a modified
    program) makes a report that verify still refuses, naming both."""
    from dataclasses import replace

    s, a = clinic_pair
    key, _ = new_key("Aroha Ngāti", "R-77", tmp_path / "aroha.key", None)
    out = tmp_path / "b.pdf"
    write_report(s, a, out, key=replace(key, name="Mere Kōwhai", id="M-1"))
    r = verify_report(out)
    assert r.code == 4, r.message
    assert ("the report names the signer Mere Kōwhai (id M-1), but the signature's "
            "certificate was made for Aroha Ngāti (id R-77)") in r.message


def test_page_one_must_print_the_signer(clinic_pair, tmp_path: Path, monkeypatch):
    """signer.json names the key's owner, but page one prints someone else: exit 4."""
    from dataclasses import replace

    import triage.report.model as model

    s, a = clinic_pair
    key, _ = new_key("Aroha Ngāti", "R-77", tmp_path / "aroha.key", None)
    real = model.build_report_model

    def lying(*args, **kw):
        kw["signer"] = replace(kw["signer"], name="Mere Kōwhai", id="M-1")
        return real(*args, **kw)

    monkeypatch.setattr(model, "build_report_model", lying)
    out = tmp_path / "b.pdf"
    write_report(s, a, out, key=key)
    r = verify_report(out)
    assert r.code == 4, r.message
    assert "page one does not print 'signed by Aroha Ngāti (id R-77)'" in r.message


def test_sign_and_verify_inside_a_running_event_loop(clinic_pair, tmp_path: Path):
    """The screens run an asyncio loop; pyHanko's synchronous calls must still work there."""
    import asyncio

    s, a = clinic_pair
    key, _ = new_key("Aroha Ngāti", "R-77", tmp_path / "p.key", None)
    out = tmp_path / "loop.pdf"

    async def inside() -> int:
        write_report(s, a, out, key=key)
        return verify_report(out).code

    assert asyncio.run(inside()) == 0
