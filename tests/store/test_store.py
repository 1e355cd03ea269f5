"""Surveys in, assessments kept with them, revisions and reports, settings."""

from __future__ import annotations

from pathlib import Path

import pytest

from tests.store.conftest import fixed_clock, sample, sample_dict
from triage.assess import assess
from triage.model import parse_survey
from triage.store import Store, StoreError, SurveyConflict


def test_add_is_idempotent_and_a_changed_survey_under_a_stored_id_is_refused(store):
    s = sample()
    assert store.add_survey(s) == "added"
    assert store.add_survey(s) == "unchanged"
    d = s.to_json_dict()
    d["building"]["name"] = "Somewhere Else"
    with pytest.raises(SurveyConflict, match=f"survey {s.survey_id}: a different survey"):
        store.add_survey(parse_survey(d))
    assert store.load_survey(s.survey_id) == s
    assert store.conn.execute("SELECT count(*) FROM changes").fetchone()[0] == 1


def test_the_assessment_is_stored_with_the_revision_it_was_computed_for(stored):
    store, sid = stored
    row = store.survey_row(sid)
    expected = assess(store.load_survey(sid))
    assert row is not None
    assert (row.tier, row.level, row.provisional) == (
        expected.tier, expected.performance_level, expected.provisional)
    assert (row.governing_storey, row.governing_dir, row.governing_basis) == (
        expected.governing.storey, expected.governing.dir, expected.governing.basis)
    assert row.assessed_revision == 1 and not row.stale
    assert store.load_assessment(sid) == expected


def test_an_edit_leaves_the_assessment_stale_until_saved_for_its_revision(stored):
    store, sid = stored
    rev = store.set_value(sid, "storeys[2].readings[1].offset_mm", 30.0)   # 1.5% in y
    row = store.survey_row(sid)
    assert row is not None and row.stale and row.tier == "occupy"
    result = assess(store.load_survey(sid))
    assert result.tier == "evacuate"
    # A result computed for an older revision is not stored over a newer one.
    assert store.save_assessment(sid, rev - 1, result) is False
    assert store.save_assessment(sid, rev, result) is True
    row = store.survey_row(sid)
    assert row is not None and not row.stale and row.tier == "evacuate"


def test_a_survey_left_stale_by_a_crash_is_refreshed_on_the_next_open(db):
    st = Store.open(db, clock=fixed_clock)
    s = sample()
    st.add_survey(s)
    st.set_value(s.survey_id, "storeys[2].readings[1].offset_mm", 30.0)
    st.close()   # as if the process died before the recompute was saved
    with Store.open(db, refresh=False) as again:
        assert again.stale_ids() == [str(s.survey_id)]
    with Store.open(db) as again:
        assert again.stale_ids() == []
        row = again.survey_row(s.survey_id)
        assert row is not None and row.tier == "evacuate" and row.assessed_revision == 2


def test_reports_record_their_revision_and_a_later_edit_shows(stored):
    store, sid = stored
    row = store.survey_row(sid)
    assert row is not None and row.edited_since_report is None
    store.record_report(sid, 1, "/tmp/r.pdf", "ab12")
    row = store.survey_row(sid)
    assert row is not None and row.edited_since_report is False
    store.set_value(sid, "storeys[0].notes", "rechecked")
    row = store.survey_row(sid)
    assert row is not None and row.edited_since_report is True and row.reported_revision == 1
    store.record_report(sid, 2, "/tmp/r2.pdf", "cd34")
    assert store.survey_row(sid).edited_since_report is False  # type: ignore[union-attr]
    assert [r["revision"] for r in store.reports(sid)] == [1, 2]
    with pytest.raises(StoreError, match="revision 9 does not exist"):
        store.record_report(sid, 9)


def test_surveys_of_one_building_share_its_id_and_the_list_reads_columns(store):
    first = sample()
    d = sample_dict()
    d["building"]["id"] = str(first.building_id)
    d["inspection"]["at"] = "2026-11-30T10:00:00+13:00"
    d["inspection"]["previous"] = str(first.survey_id)
    again = parse_survey(d)
    store.add_survey(first)
    store.add_survey(again)
    rows = store.list_surveys()
    assert [r.id for r in rows] == [str(again.survey_id), str(first.survey_id)]
    assert {r.building_id for r in rows} == {str(first.building_id)}


def test_settings_are_remembered(store):
    assert store.settings_get("last_gauge_mm", 2000) == 2000
    store.settings_set("last_gauge_mm", 1500)
    store.settings_set("inspector", {"name": "Ana", "id": "E-7"})
    assert store.settings_get("last_gauge_mm") == 1500
    assert store.settings_get("inspector") == {"name": "Ana", "id": "E-7"}


def test_every_connection_has_the_pragmas(stored):
    store, _ = stored
    c = store.conn
    assert c.execute("PRAGMA journal_mode").fetchone()[0] == "wal"
    assert c.execute("PRAGMA synchronous").fetchone()[0] == 2   # FULL
    assert c.execute("PRAGMA foreign_keys").fetchone()[0] == 1
    assert c.execute("PRAGMA busy_timeout").fetchone()[0] >= 5000


def test_open_without_create_refuses_a_missing_file(tmp_path):
    with pytest.raises(StoreError, match="no database there"):
        Store.open(tmp_path / "nope.db", create=False)
    assert not (tmp_path / "nope.db").exists()


def test_the_default_database_is_kept_in_the_users_data_folder(tmp_path, monkeypatch, cli):
    import platformdirs

    from triage.resources import samples_dir
    from triage.store import default_db_path

    monkeypatch.delenv("TRIAGE_HOME", raising=False)
    assert default_db_path() == Path(
        platformdirs.user_data_dir("triage", appauthor=False)) / "triage.db"
    # $TRIAGE_HOME moves it, with the keys (one folder for all of an inspector's data).
    monkeypatch.setenv("TRIAGE_HOME", str(tmp_path / "home"))
    assert default_db_path() == tmp_path / "home" / "triage.db"
    code, out, _ = cli("import", str(samples_dir() / "school_saltmarsh_road.json"))
    assert code == 0, out
    with Store.open(tmp_path / "home" / "triage.db", create=False) as st:
        assert len(st.list_surveys()) == 1


def test_photo_paths_are_relative_to_the_file_a_survey_was_imported_from(store, tmp_path):
    s = sample()
    src = tmp_path / "trip" / "harbour.json"
    src.parent.mkdir()
    src.write_text("{}", encoding="utf-8")
    store.add_survey(s, source=str(src))
    assert store.photo_dir(s.survey_id) == src.parent
    src.unlink()   # the file moved away: its folder no longer says where the photos are
    assert store.photo_dir(s.survey_id) is None
    made_here = sample("Made In The App")
    store.add_survey(made_here)
    assert store.photo_dir(made_here.survey_id) is None
    merged = sample("Merged From A Laptop")
    laptop = tmp_path / "laptop.db"
    laptop.write_bytes(b"")
    store.add_survey(merged, source=str(laptop))
    assert store.photo_dir(merged.survey_id) is None
