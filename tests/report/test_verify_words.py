"""Verify's exact words: how `triage import` takes each exit status, the embedded assessment's
refusals, the engine's notes, and the first way's damaged signer file and signature.

Reports here are made by the real writer and signed for real (the first way, Ed25519); only
what goes into them is changed, before signing, so the check under test is the one answering.
"""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any

import pytest

import triage.report.draw as draw
import triage.report.verify as verify
from triage.report import write_report
from triage.report.keys import new_key
from triage.report.verify import VerifyResult, _error_lines, _reassess, import_verdict
from triage.standards.vocabulary import words

PDF = Path("/reports/clinic.pdf")
UNSIGNED = ("unsigned: nothing shows who made this report or that it is unchanged; its survey "
            "is imported as it reads")


@pytest.mark.parametrize(("code", "refused", "warning"), [
    (0, None, None),
    (1, f"{PDF}: refused, the report is why it is", None),
    (3, None, f"{PDF}: imported with a warning: {UNSIGNED}"),
    (4, None, f"{PDF}: imported with a warning: why it is"),
    (5, None, f"{PDF}: imported with a warning: why it is"),
])
def test_import_takes_each_exit_status_its_own_way(monkeypatch, code, refused, warning):
    r = VerifyResult(code, f"{PDF}: why it is")
    monkeypatch.setattr(verify, "verify_report", lambda pdf, trusted=None: r)
    v = import_verdict(PDF)
    assert (v.refused, v.warning) == (refused, warning)
    assert v.result is r


def test_import_keeps_a_message_that_does_not_start_with_the_file_whole(monkeypatch):
    r = VerifyResult(4, "a message of its own")
    monkeypatch.setattr(verify, "verify_report", lambda pdf, trusted=None: r)
    assert import_verdict(PDF).warning == f"{PDF}: imported with a warning: a message of its own"


class _Errors(ValueError):
    """A ValueError shaped like pydantic's: `errors()` gives the list given."""

    def __init__(self, errors: list[dict[str, Any]], text: str = "first\nsecond") -> None:
        super().__init__(text)
        self._errors = errors

    def errors(self, include_url: bool = True) -> list[dict[str, Any]]:
        return self._errors


def test_each_assessment_error_is_its_key_path_and_its_rule():
    err = _Errors([{"loc": ("storeys", 0, "members", 12, "class"), "msg": "Input is bad"},
                   {"loc": (), "msg": "Whole thing is bad"},
                   {"msg": "No place given"}, {"loc": ("tier",)}])
    assert _error_lines(err) == ["storeys[0].members[12].class: input is bad",
                                 "(assessment): whole thing is bad",
                                 "(assessment): no place given", "tier: "]
    assert _error_lines(_Errors([])) == ["first"]


def test_an_unknown_key_of_the_embedded_assessment_is_named_as_written(clinic_pair):
    s, a = clinic_pair
    data = json.loads(a.to_json())
    data["Xtra"] = 1
    code, message, notes = _reassess(json.loads(s.model_dump_json()), data)
    assert code == 5
    assert message == ("but this engine cannot read the embedded assessment (Xtra: extra "
                       "inputs are not permitted)")
    assert notes == ["embedded assessment: Xtra: extra inputs are not permitted"]


def test_one_rule_broken_is_named_without_a_count(clinic_pair):
    s, a = clinic_pair
    d = json.loads(s.model_dump_json())
    d["storeys"][0]["height_m"] = -3.0
    code, message, notes = _reassess(d, json.loads(a.to_json()))
    assert code == 5 and len(notes) == 1
    rule = notes[0].removeprefix("embedded survey: ")
    assert message == f"but this engine refuses the embedded survey ({rule})"


def test_the_same_engine_and_assumptions_leave_no_note(clinic_pair):
    s, a = clinic_pair
    code, message, notes = _reassess(json.loads(s.model_dump_json()), json.loads(a.to_json()))
    assert (code, notes) == (0, [])
    assert message == "re-assessed to the same tier and level, hold/LS"


def test_assumptions_added_removed_or_changed_are_each_named(clinic_pair):
    s, a = clinic_pair
    data = json.loads(a.to_json())
    assumptions = data["engine"]["assumptions"]
    gone = sorted(assumptions)[0]
    now_value = assumptions.pop(gone)
    assumptions["a_retired_factor"] = 2
    code, _, notes = _reassess(json.loads(s.model_dump_json()), data)
    assert code == 0 and len(notes) == 1
    said = {"a_retired_factor": f"{words('assumptions', 'a_retired_factor')} 2 then, None now",
            gone: f"{words('assumptions', gone)} None then, {now_value!r} now"}
    assert notes[0] == "assumptions differ: " + ", ".join(said[k] for k in sorted(said))


def test_a_report_without_a_level_says_no_level(clinic_pair):
    s, a = clinic_pair
    data = json.loads(a.to_json())
    data["performance_level"] = None
    code, message, _ = _reassess(json.loads(s.model_dump_json()), data)
    assert code == 5
    assert message == ("but this engine re-assesses the survey to hold/LS; the report says "
                       "hold/no level")
    empty = json.loads(s.model_dump_json())
    for st in empty["storeys"]:   # nothing read, nothing logged: no level to name
        st["readings"], st["members"] = [], []
    code, message, _ = _reassess(empty, json.loads(a.to_json()))
    assert code == 5
    assert message == ("but this engine re-assesses the survey to hold/no level; the report "
                       "says hold/LS")


# --- the first way's own damage ------------------------------------------------------------

@pytest.fixture
def ed_key(tmp_path: Path):
    k, _ = new_key("Aroha Ngāti", "R-77", tmp_path / "aroha.key", None, algorithm="ed25519")
    return k


def _first_way(clinic_pair, key, out: Path, monkeypatch, signer: Any = None) -> Path:
    """A report signed the first way, its signer.json changed by `signer` before signing."""
    real = draw.add_to_document

    def changed(doc, files, signed):
        out_files = []
        for name, data, what in files:
            if name == "signer.json" and signer is not None:
                d = json.loads(data)
                signer(d)
                data = json.dumps(d).encode("utf-8")
            out_files.append((name, data, what))
        real(doc, out_files, signed)

    with monkeypatch.context() as m:   # only the writing: TRIAGE_HOME stays this test's
        m.setattr(draw, "add_to_document", changed)
        write_report(*clinic_pair, out, key=key)
    return out


def test_a_first_way_signer_file_with_a_broken_key_is_changed(clinic_pair, ed_key, tmp_path,
                                                               monkeypatch):
    out = _first_way(clinic_pair, ed_key, tmp_path / "r.pdf", monkeypatch,
                     lambda d: d.update(public_key="zz"))
    r = verify.verify_report(out, trusted=[ed_key.public])
    assert (r.code, r.message) == (1, f"{out}: changed or damaged: the embedded signer.json "
                                      "cannot be read")


def test_a_first_way_signer_file_without_a_time_says_so(clinic_pair, ed_key, tmp_path,
                                                        monkeypatch):
    out = _first_way(clinic_pair, ed_key, tmp_path / "r.pdf", monkeypatch,
                     lambda d: d.pop("signed_at"))
    r = verify.verify_report(out, trusted=[ed_key.public])
    assert r.code == 0, r.message
    assert r.signed_at is None
    assert f"key {ed_key.fingerprint}, at an unrecorded time; re-assessed" in r.message


def test_a_first_way_signature_of_other_bytes_does_not_match(clinic_pair, ed_key, tmp_path,
                                                             monkeypatch):
    from triage.report.signing import find_slot

    out = _first_way(clinic_pair, ed_key, tmp_path / "r.pdf", monkeypatch)
    data = bytearray(out.read_bytes())
    start, _ = find_slot(bytes(data))
    data[start] = ord("0") if data[start] != ord("0") else ord("1")   # still a hex digit
    out.write_bytes(bytes(data))
    r = verify.verify_report(out, trusted=[ed_key.public])
    assert (r.code, r.message) == (1, f"{out}: changed or damaged: the signature does not "
                                      "match the file")


def test_a_tier_the_report_gives_no_probability_counts_as_zero(clinic_pair):
    s, a = clinic_pair
    data = json.loads(a.to_json())
    assert data["tier_probability"]["occupy"] == 0.0
    del data["tier_probability"]["occupy"]   # 0 left out: still the same
    assert _reassess(json.loads(s.model_dump_json()), data)[0] == 0
    del data["tier_probability"]["hold"]   # 1 left out: differs by 1
    code, message, _ = _reassess(json.loads(s.model_dump_json()), data)
    assert code == 5 and "differ by 1.000 (more than 0.01)" in message
