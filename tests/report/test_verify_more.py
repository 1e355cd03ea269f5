"""Verify when a signed report lacks an embedded file, when the trusted-key list cannot be read,
and when this engine refuses or cannot read the embedded survey or assessment.

Each report here is made by the real writer and signed for real (both ways); only what goes
into it is changed, before signing, so the signature itself is sound and the check under test
is the one that answers.
"""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any

import pytest

import triage.report as report
import triage.report.draw as draw
from triage.assess.result import Assessment
from triage.report import write_report
from triage.report.keys import TRUST_FILE, home
from triage.report.verify import VerifyResult, import_verdict, verify_report


def _signed_with(monkeypatch, clinic_pair, key, out: Path, where: Any, name: str,
                 stand_in: Any) -> VerifyResult:
    """The clinic's report written to `out` and signed by `key` while `where.name` is
    `stand_in` (so the signature is sound over what went in), then verified."""
    monkeypatch.setattr(where, name, stand_in)
    write_report(*clinic_pair, out, key=key)
    monkeypatch.undo()
    return verify_report(out, trusted=[key.public])


def _survey_text(survey, *changes: tuple[Any, ...]):
    """A stand-in for `survey_text`: the survey's JSON with each (path..., value) set."""
    def text(_survey) -> str:
        d = json.loads(survey.model_dump_json())
        for *path, value in changes:
            at = d
            for k in path[:-1]:
                at = at[k]
            at[path[-1]] = value
        return json.dumps(d)
    return text


NEGATIVE_HEIGHT = ("storeys", 0, "height_m", -3.0)   # no storey is of negative height

@pytest.mark.parametrize("dropped", ["survey.json", "assessment.json", "signer.json"])
def test_a_signed_report_missing_an_embedded_file_is_changed(clinic_pair, key, tmp_path,
                                                             monkeypatch, dropped):
    real = draw.add_to_document

    def without(doc, files, signed):
        real(doc, [f for f in files if f[0] != dropped], signed)

    out = tmp_path / "r.pdf"
    r = _signed_with(monkeypatch, clinic_pair, key, out, draw, "add_to_document", without)
    assert (r.code, r.message) == (1, f"{out}: changed or damaged: embedded {dropped} missing")
    v = import_verdict(out, trusted=[key.public])
    assert v.refused == (f"{out}: refused, the report is changed or damaged: embedded "
                         f"{dropped} missing")


def test_an_unreadable_trusted_key_list_is_said_and_not_trusted(clinic_pair, key, tmp_path):
    out = tmp_path / "r.pdf"
    write_report(*clinic_pair, out, key=key)
    assert verify_report(out).code == 0   # trusted here by new_key
    (home() / TRUST_FILE).write_text("{ not json", encoding="utf-8")
    r = verify_report(out)
    assert r.code == 4
    assert r.message == (f"{out}: intact, signed by Aroha Ngāti (id R-77), key "
                         f"{key.fingerprint}, at {r.signed_at}; the trusted-key list cannot be "
                         "read")
    # naming the key on the command line does without the list
    assert verify_report(out, expect=key.fingerprint).code == 0


def test_an_embedded_survey_this_engine_refuses_is_exit_5(clinic_pair, key, tmp_path,
                                                          monkeypatch):
    out = tmp_path / "r.pdf"
    r = _signed_with(monkeypatch, clinic_pair, key, out, report, "survey_text",
                     _survey_text(clinic_pair[0], NEGATIVE_HEIGHT))
    assert r.code == 5, r.message
    assert "; but this engine refuses the embedded survey (storeys[0].height_m: " in r.message
    assert r.message.startswith(f"{out}: intact, signed by Aroha Ngāti (id R-77)")
    assert "\n" not in r.message
    v = import_verdict(out, trusted=[key.public])
    assert v.refused is None and v.warning is not None
    assert v.warning.startswith(f"{out}: imported with a warning: intact, signed by")


@pytest.mark.parametrize("change,said", [
    (lambda d: d.pop("tier"), ["tier: field required"]),
    (lambda d: d.update(tier="maybe"), ["tier: input should be 'occupy', 'hold' or 'evacuate'"]),
    (lambda d: (d.pop("tier"), d.pop("building")), ["building: field required",
                                                    "tier: field required"]),
], ids=["no tier", "an unknown tier", "two keys"])
def test_an_embedded_assessment_this_engine_cannot_read_is_exit_5(clinic_pair, key, tmp_path,
                                                                  monkeypatch, change, said):
    d = json.loads(clinic_pair[1].to_json())
    change(d)
    text = json.dumps(d)
    r = _signed_with(monkeypatch, clinic_pair, key, tmp_path / "r.pdf", Assessment, "to_json",
                     lambda self: text)
    assert r.code == 5, r.message
    # each key refused is named, never "1 validation error for Assessment"
    more = f"; {len(said)} keys refused, each in the notes" if len(said) > 1 else ""
    assert r.message.endswith(f"; but this engine cannot read the embedded assessment "
                              f"({said[0]}{more})"), r.message
    assert r.notes == tuple(f"embedded assessment: {x}" for x in said)
    assert "\n" not in r.message


def test_every_rule_an_embedded_survey_breaks_is_named_once_each(clinic_pair, key, tmp_path,
                                                                 monkeypatch, capsys):
    out = tmp_path / "r.pdf"
    r = _signed_with(monkeypatch, clinic_pair, key, out, report, "survey_text",
                     _survey_text(clinic_pair[0], NEGATIVE_HEIGHT,
                                  ("storeys", 0, "readings", 0, "dir", "z")))
    assert r.code == 5 and "more" not in r.message
    assert "(storeys[0].height_m: " in r.message and "; 2 rules broken, each in the notes)" \
        in r.message
    assert [n.split(": ")[:2] for n in r.notes] == [["embedded survey", "storeys[0].height_m"],
                                                    ["embedded survey",
                                                     "storeys[0].readings[0].dir"]]
    # the command line: the verdict, then each note on its own line naming the file
    from triage.cli import main
    from triage.report.keys import trust_key

    monkeypatch.setenv("TRIAGE_HOME", str(tmp_path / "home"))
    trust_key(key.public)
    assert main(["verify", str(out)]) == 5
    lines = capsys.readouterr().err.splitlines()
    assert lines == [f"triage verify: {r.message}",
                     *(f"triage verify: {out}: note: {n}" for n in r.notes)]


def test_an_assessment_error_that_is_not_pydantics_is_one_line() -> None:
    from triage.report.verify import _error_lines

    assert _error_lines(ValueError("no tier here\nsecond line")) == ["no tier here"]
    assert _error_lines(ValueError("")) == ["ValueError"]
