"""The screens' facade onto the store (`triage.ui.data.FieldData`) on its own: every refusal
comes back as `Refused` with one line and nothing saved; the demo's samples load, a broken one
left out; reports are recorded; messages read as words."""

from __future__ import annotations

import json
import shutil
from pathlib import Path

import pytest
from conftest import SID

from triage.resources import samples_dir
from triage.store import Store
from triage.ui.data import FieldData, Refused, now_local, rule_of, said


@pytest.fixture
def fd(db: Path):
    d = FieldData(db)
    yield d
    d.close()


def test_refusals_are_one_line_and_save_nothing(fd: FieldData) -> None:
    before = fd.revision(SID)
    cases = [
        lambda: fd.set(SID, "storeys[0].height_m", -3.0, "Tess"),
        lambda: fd.add(SID, "storeys[0].readings", {"dir": "z"}, "Tess"),
        lambda: fd.remove(SID, "storeys[0].readings[9]", "Tess"),
        lambda: fd.add_survey({"format": "triage-survey/1"}, "Tess"),
    ]
    for call in cases:
        with pytest.raises(Refused) as err:
            call()
        assert str(err.value) and "\n" not in str(err.value)
    assert fd.revision(SID) == before
    assert len(fd.surveys()) == 2


def test_undo_and_nothing_to_undo(tmp_path: Path) -> None:
    fd = FieldData(tmp_path / "f.db")
    try:
        sid = fd.new_survey({"building": {"name": "Boat Shed", "address": "2 Slip Way, "
                                          "Kōwhai Bay", "system": {"x": "rc_frame",
                                                                  "y": "rc_frame"}},
                             "inspection": {"inspector": {"name": "Tess Tester"}},
                             "storeys": [{"label": "G", "height_m": 3.0}]}, "Tess")
        assert fd.undo(sid, "Tess") is None        # only its creation: nothing to undo
        fd.set(sid, "storeys[0].notes", "kept", "Tess")
        undone = fd.undo(sid, "Tess")
        assert (undone.op, undone.path) == ("set", "storeys[0].notes")
        assert fd.load(sid).storeys[0].notes is None
    finally:
        fd.close()


def test_a_database_that_cannot_be_opened_is_refused(tmp_path: Path) -> None:
    bad = tmp_path / "bad.db"
    bad.write_bytes(b"not a database\n" * 20)
    with pytest.raises(Refused) as err:
        FieldData(bad)
    assert str(bad) in str(err.value) and "\n" not in str(err.value)


def test_demo_samples_load_and_a_broken_one_is_left_out(tmp_path: Path) -> None:
    folder = tmp_path / "samples"
    shutil.copytree(samples_dir(), folder)
    (folder / "zz_broken.json").write_text('{"format": "triage-survey/1"', encoding="utf-8")
    n = len(list(samples_dir().glob("*.json")))
    fd = FieldData(tmp_path / "demo.db")
    try:
        assert fd.load_samples(folder, "demo") == n
        assert len(fd.surveys()) == n
    finally:
        fd.close()


def test_a_report_is_recorded(fd: FieldData, db: Path) -> None:
    rev = fd.revision(SID)
    fd.record_report(SID, rev, "/tmp/r.pdf", None)
    assert fd.row(SID).reported_revision == rev
    with Store.open(db, refresh=False) as st:
        assert st.survey_row(SID).reported_revision == rev


def test_messages_in_words(fd: FieldData) -> None:
    s = fd.load(SID)
    msg = "storeys[0].height_m: must be above 0 (storey G, height (m))"
    assert rule_of(msg) == "must be above 0 (storey G, height (m))"
    assert rule_of("a plain message") == "a plain message"
    assert said("kinds: rc_frame needs columns", s) == said("kinds: rc_frame needs columns")
    assert "rc_frame" not in said("kinds: rc_frame needs columns")
    assert now_local().utcoffset() is not None
    assert json.dumps(str(now_local()))
