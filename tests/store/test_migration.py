"""Schema migrations: 1 to 2 (photos), and the current one to a test-only next, every row kept."""

from __future__ import annotations

import sqlite3
from pathlib import Path

import pytest

from tests.store.conftest import sample
from triage.store import Store, StoreError, schema

NOW = schema.current_version()
NEXT = NOW + 1


def _to_2(conn: sqlite3.Connection) -> None:
    # Test only: what a real next version might do (a column with a default, a new table).
    conn.execute("ALTER TABLE surveys ADD COLUMN weather TEXT NOT NULL DEFAULT 'unknown'")
    conn.execute("CREATE TABLE sketches (survey_id TEXT REFERENCES surveys(id), path TEXT)")


def _broken_to_2(conn: sqlite3.Connection) -> None:
    conn.execute("ALTER TABLE surveys ADD COLUMN weather TEXT")
    raise RuntimeError("power cut halfway")


def _tables(path: Path) -> dict[str, list[tuple[object, ...]]]:
    c = sqlite3.connect(path)
    out = {t: c.execute(f"SELECT * FROM {t} ORDER BY rowid").fetchall()
           for t in ("surveys", "changes", "assessments", "reports", "meta", "settings")
           if c.execute("SELECT 1 FROM sqlite_schema WHERE name = ?", (t,)).fetchone()}
    c.close()
    return out


def _v1(path: Path) -> None:
    with Store.open(path) as st:
        for i in range(3):
            s = sample(f"Building {i}")
            st.add_survey(s)
            st.set_value(s.survey_id, "storeys[0].notes", f"note {i}")
            st.remove_item(s.survey_id, "storeys[1].readings[0]")
        st.record_report(s.survey_id, 2, "r.pdf", "ff00")
        st.settings_set("last_gauge_mm", 1500)
        st.refresh_stale()   # so that opening later has nothing of its own to write


def test_version_1_gets_the_photo_table_keeping_every_row_and_a_backup(tmp_path, monkeypatch):
    db = tmp_path / "field.db"
    with monkeypatch.context() as m:
        m.setattr(schema, "MIGRATIONS", schema.MIGRATIONS[:1])
        _v1(db)
    before = _tables(db)
    with Store.open(db) as st:
        assert st.conn.execute("PRAGMA user_version").fetchone()[0] == NOW >= 2
        assert st.migration_backup == tmp_path / "field.v1-backup.db"
        cols = [r[1] for r in st.conn.execute("PRAGMA table_info(photos)")]
        assert cols == ["sha256", "format", "width", "height", "size", "added_at", "data"]
    after = _tables(db)
    # every row kept; meta gains only the record of schema 3's step (texts already /2 here)
    added = [r for r in after["meta"] if r not in before["meta"]]
    assert [r[0] for r in added] == ["survey_texts_v2"] and '"rewritten": 0' in added[0][1]
    after["meta"] = before["meta"]
    assert {t: after[t] for t in before} == before
    c = sqlite3.connect(tmp_path / "field.v1-backup.db")
    assert c.execute("PRAGMA user_version").fetchone()[0] == 1
    c.close()


def test_the_current_version_to_the_next_keeps_every_row_and_leaves_a_backup(tmp_path,
                                                                            monkeypatch):
    db = tmp_path / "field.db"
    _v1(db)
    before = _tables(db)
    monkeypatch.setattr(schema, "MIGRATIONS", [*schema.MIGRATIONS, _to_2])
    with Store.open(db) as st:
        assert st.conn.execute("PRAGMA user_version").fetchone()[0] == NEXT
        backup = st.migration_backup
        weather = {r[0] for r in st.conn.execute("SELECT weather FROM surveys")}
        assert weather == {"unknown"}
        assert len(st.list_surveys()) == 3
    assert backup == tmp_path / f"field.v{NOW}-backup.db"
    after = _tables(db)
    for table, rows in before.items():
        if table == "surveys":
            assert [r[:-1] for r in after[table]] == rows   # the new column is the last one
        else:
            assert after[table] == rows, table
    # The backup is the file as it was.
    assert _tables(backup) == before
    c = sqlite3.connect(backup)
    assert c.execute("PRAGMA user_version").fetchone()[0] == NOW
    c.close()
    # Opening again migrates nothing and makes no second backup.
    with Store.open(db) as st:
        assert st.migration_backup is None
    assert sorted(p.name for p in tmp_path.glob("*backup*")) == [f"field.v{NOW}-backup.db"]


def test_a_migration_that_fails_leaves_the_file_whole(tmp_path, monkeypatch):
    db = tmp_path / "field.db"
    _v1(db)
    before = _tables(db)
    monkeypatch.setattr(schema, "MIGRATIONS", [*schema.MIGRATIONS, _broken_to_2])
    with pytest.raises(RuntimeError, match="power cut"):
        Store.open(db)
    c = sqlite3.connect(db)
    assert c.execute("PRAGMA user_version").fetchone()[0] == NOW
    cols = [r[1] for r in c.execute("PRAGMA table_info(surveys)")]
    c.close()
    assert "weather" not in cols
    assert _tables(db) == before
    assert (tmp_path / f"field.v{NOW}-backup.db").exists()


def test_this_version_refuses_a_file_of_the_next(tmp_path, monkeypatch):
    db = tmp_path / "field.db"
    _v1(db)
    monkeypatch.setattr(schema, "MIGRATIONS", [*schema.MIGRATIONS, _to_2])
    Store.open(db).close()
    monkeypatch.undo()
    with pytest.raises(StoreError, match=f"newer triage \\(schema {NEXT}; this one knows {NOW}\\)"):
        Store.open(db)


def test_an_older_source_is_merged_through_an_upgraded_copy(tmp_path, monkeypatch):
    from triage.store.merge import merge_into

    old = tmp_path / "laptop.db"
    _v1(old)
    before = old.read_bytes()
    monkeypatch.setattr(schema, "MIGRATIONS", [*schema.MIGRATIONS, _to_2])
    with Store.open(tmp_path / "centre.db") as st:
        (r,) = merge_into(st, [old])
        assert r.skipped is None and r.added == 3
        assert st.conn.execute("PRAGMA user_version").fetchone()[0] == NEXT
        assert {x.building for x in st.list_surveys()} == {f"Building {i}" for i in range(3)}
    assert old.read_bytes() == before   # the source itself stays at version 1
    assert not list(tmp_path.glob("laptop.v1-backup*"))
