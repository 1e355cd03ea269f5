"""Schema 3: a first-round database's survey texts (`triage-survey/1`) rewritten as `/2`.

The fixture is a database as the first round left it: schema 1 (no photo table), each survey's
text and its import change marked `/1` without the keys `/2` added, one survey edited, one whose
text breaks a rule of the second round. Opening it migrates; the surveys are the same, ids,
revisions, change log and assessments untouched, and the same file imported again or the same
survey merged from elsewhere is "unchanged" rather than a different survey.
"""

from __future__ import annotations

import json
import sqlite3
from pathlib import Path
from typing import Any

import pytest

from tests.helpers import reading, storey, survey_dict
from tests.store.conftest import sample
from triage.model import FORMAT, canonical_json, parse_survey, parse_survey_text
from triage.store import Store, SurveyConflict, schema
from triage.store.merge import merge_into
from triage.store.texts import MIGRATION_KEY, as_written_now
from triage.store.writes import import_uid


def first_round_text(doc: dict[str, Any]) -> str:
    """A survey's text as the first round wrote it: marked /1, no empty `team` list."""
    d = json.loads(json.dumps(doc))
    d["format"] = "triage-survey/1"
    if not d["inspection"].get("team"):
        d["inspection"].pop("team", None)
    return canonical_json(d)


def _first_round_db(path: Path, monkeypatch: pytest.MonkeyPatch) -> dict[str, str]:
    """Three surveys (the third edited) at schema 1 with /1 texts; plus one a later rule
    refuses. Returns each survey's first-round file text by id."""
    files: dict[str, str] = {}
    with monkeypatch.context() as m:
        m.setattr(schema, "MIGRATIONS", schema.MIGRATIONS[:1])
        with Store.open(path, who="Tess Tester") as st:
            for i in range(3):
                s = sample(f"Building {i}")
                st.add_survey(s)
                files[str(s.survey_id)] = first_round_text(s.to_json_dict())
            st.set_value(s.survey_id, "storeys[0].notes", "stair cracked")
            st.refresh_stale()
    c = sqlite3.connect(path)
    with c:
        for sid, text in files.items():
            doc = json.loads(c.execute("SELECT doc FROM surveys WHERE id = ?",
                                       (sid,)).fetchone()[0])
            c.execute("UPDATE surveys SET doc = ? WHERE id = ?",
                      (first_round_text(doc), sid))
            c.execute("UPDATE changes SET new = ?, uid = ? WHERE survey_id = ? AND op = 'import'",
                      (text, import_uid(sid, text), sid))
        # a gauge 9 m long on a 3.2 m storey: taken then, refused by today's rules
        bad = survey_dict([storey("G", [reading("x", 3.0, gauge_mm=9000.0)])], name="Old Shed")
        bad["id"] = "0b6b2f5e-1c1d-4e0f-8a55-3f0d7c2e9a10"
        bad["building"]["id"] = "6a1f7d2c-3b4e-4f50-9a61-2c3d4e5f6a7b"
        text = canonical_json(bad)
        cols = {"building_id": bad["building"]["id"], "building": "Old Shed", "address": "x",
                "inspector": "Tess", "at": bad["inspection"]["at"], "at_utc": "2026-11-28T20:00"}
        c.execute("INSERT INTO surveys (id, building_id, building, address, inspector, at, "
                  "at_utc, revision, created_at, updated_at, doc) VALUES (:id, :building_id, "
                  ":building, :address, :inspector, :at, :at_utc, 1, 'then', 'then', :doc)",
                  {**cols, "id": bad["id"], "doc": text})
    c.close()
    return files


def _dump(path: Path) -> dict[str, list[tuple[Any, ...]]]:
    c = sqlite3.connect(path)
    out = {t: c.execute(f"SELECT * FROM {t} ORDER BY rowid").fetchall()
           for t in ("surveys", "changes", "assessments", "reports", "settings")}
    c.close()
    return out


def test_first_round_texts_are_rewritten_as_2_and_nothing_else_changes(tmp_path, monkeypatch):
    db = tmp_path / "field.db"
    files = _first_round_db(db, monkeypatch)
    before = _dump(db)
    with Store.open(db, refresh=False) as st:
        assert st.conn.execute("PRAGMA user_version").fetchone()[0] == 3
        assert st.migration_backup == tmp_path / "field.v1-backup.db"
        record = json.loads(st.conn.execute("SELECT value FROM meta WHERE key = ?",
                                            (MIGRATION_KEY,)).fetchone()[0])
        assert record["rewritten"] == 4
    after = _dump(db)
    # the change log, assessments, reports and settings exactly as they were: no edit logged
    for t in ("changes", "assessments", "reports", "settings"):
        assert after[t] == before[t], t
    doc_col = 23   # `doc` is the last column of `surveys`
    for old_row, new_row in zip(before["surveys"], after["surveys"], strict=True):
        assert old_row[:doc_col] == new_row[:doc_col]   # ids, revisions, times: unchanged
        old, new = old_row[doc_col], new_row[doc_col]
        assert json.loads(old)["format"] == "triage-survey/1"
        assert json.loads(new)["format"] == FORMAT
        if old_row[2] == "Old Shed":
            # refused by a later rule: every key and value kept, only marked /2
            assert json.loads(new) == {**json.loads(old), "format": FORMAT}
            continue
        # the same survey (same ids, same content), written as this version writes it
        assert parse_survey_text(new) == parse_survey_text(old)
        assert new == canonical_json(parse_survey_text(old).to_json_dict())
    # a rewritten text is as this version writes it: the rewrite leaves it alone
    assert all(as_written_now(r[doc_col]) == r[doc_col] for r in after["surveys"])
    # the first-round files imported again are the same surveys, not different ones (but the
    # one edited since, which is a different survey now, as before)
    edited = list(files)[-1]
    with Store.open(db) as st:
        for sid, text in files.items():
            if sid == edited:
                with pytest.raises(SurveyConflict):
                    st.add_survey(parse_survey_text(text))
            else:
                assert st.add_survey(parse_survey_text(text)) == "unchanged", sid


def test_a_first_round_laptop_merges_into_an_area_database_like_with_like(tmp_path,
                                                                          monkeypatch):
    laptop = tmp_path / "laptop.db"
    files = _first_round_db(laptop, monkeypatch)
    area = tmp_path / "area.db"
    with Store.open(area) as st:   # the same files imported at the centre by this version
        for text in files.values():
            assert st.add_survey(parse_survey_text(text)) == "added"
    with Store.open(area) as st:
        (r,) = merge_into(st, [laptop])
        assert r.skipped is None
        # two surveys unedited on the laptop: the same text both sides, no conflict copy;
        # the edited one differs from the centre's, as it did before (a conflict, kept both);
        # the survey only the laptop holds is added
        assert (r.added, r.unchanged, r.conflicts) == (1, 2, 1)
    assert laptop.exists() and sqlite3.connect(laptop).execute(
        "PRAGMA user_version").fetchone()[0] == 1   # the source is never changed


def test_without_the_rewrite_the_same_surveys_would_be_conflicts(tmp_path, monkeypatch):
    """The check above can fail: with schema 3's step doing nothing, texts differ."""
    laptop = tmp_path / "laptop.db"
    files = _first_round_db(laptop, monkeypatch)
    area = tmp_path / "area.db"
    monkeypatch.setattr("triage.store.texts.rewrite_v1_texts", lambda conn: 0)
    with Store.open(area) as st:
        for text in files.values():
            st.add_survey(parse_survey_text(text))
        (r,) = merge_into(st, [laptop])
        assert r.conflicts == 3


def test_a_text_of_format_2_or_not_json_is_left_as_it_is():
    s = sample()
    text = canonical_json(s.to_json_dict())
    assert as_written_now(text) == text
    assert as_written_now("not json") == "not json"
    assert as_written_now('["a list"]') == '["a list"]'
    # a /1 text whose id the model would derive differently keeps its keys, marked /2
    d = {**json.loads(first_round_text(s.to_json_dict())), "id": "not-a-uuid"}
    assert json.loads(as_written_now(canonical_json(d))) == {**d, "format": FORMAT}


def test_a_new_database_records_the_step_with_nothing_rewritten(tmp_path):
    with Store.open(tmp_path / "new.db") as st:
        record = json.loads(st.conn.execute("SELECT value FROM meta WHERE key = ?",
                                            (MIGRATION_KEY,)).fetchone()[0])
        assert record["rewritten"] == 0
        assert st.add_survey(parse_survey(sample().to_json_dict())) == "added"
