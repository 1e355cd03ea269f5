"""Migrations when two programs open an older file at once, and when the backup before fails.

Each step runs in its own BEGIN IMMEDIATE transaction and first reads `user_version` again: a
step another program ran meanwhile is not run twice. A backup that cannot be written stops the
upgrade before anything changed.
"""

from __future__ import annotations

import errno
import multiprocessing
import os
import sqlite3
import sys
from pathlib import Path
from typing import Any

import pytest

from tests.store.conftest import sample
from tests.store.test_migration import _tables, _v1
from triage.store import Store, StoreError, schema
from triage.store.connect import connect

NOW = schema.current_version()
CALLS: list[int] = []


def _counted_next(conn: sqlite3.Connection) -> None:
    # a test-only next version; ALTER TABLE twice would fail with "duplicate column name"
    CALLS.append(1)
    conn.execute("ALTER TABLE surveys ADD COLUMN weather TEXT NOT NULL DEFAULT 'unknown'")


@pytest.fixture
def behind(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> Path:
    """A database of one survey, one step behind: a test-only next version, its runs counted."""
    db = tmp_path / "field.db"
    with Store.open(db) as st:
        st.add_survey(sample())
    monkeypatch.setattr(schema, "MIGRATIONS", [*schema.MIGRATIONS, _counted_next])
    CALLS.clear()
    return db


def _version(path: Path) -> int:
    c = sqlite3.connect(path)
    try:
        return int(c.execute("PRAGMA user_version").fetchone()[0])
    finally:
        c.close()


def test_a_step_another_program_ran_meanwhile_is_not_run_again(tmp_path, monkeypatch):
    db = tmp_path / "field.db"
    _v1(db)
    monkeypatch.setattr(schema, "MIGRATIONS", [*schema.MIGRATIONS, _counted_next])
    CALLS.clear()
    # This program read version NOW and is about to upgrade ...
    mine = sqlite3.connect(db, isolation_level=None)
    seen = int(mine.execute("PRAGMA user_version").fetchone()[0])
    assert seen == NOW
    # ... when another one opens the file and upgrades it first.
    Store.open(db).close()
    assert CALLS == [1] and _version(db) == NOW + 1
    saved = schema.ensure_schema(mine, db, seen)
    mine.close()
    assert CALLS == [1]                     # the step was not run a second time
    assert _version(db) == NOW + 1
    assert saved is not None and saved.exists()   # its own backup was still made first
    assert _version(saved) == NOW + 1       # (a copy of the file as it found it)
    with Store.open(db) as st:
        assert len(st.list_surveys()) == 3


def _open_at_once(db: str, barrier: Any, out: Any) -> None:
    barrier.wait(timeout=30)
    try:
        with Store.open(Path(db)) as st:
            out.put(("ok", len(st.list_surveys())))
    except BaseException as err:   # reported to the parent, which fails the test
        out.put(("error", repr(err)))


@pytest.mark.skipif(sys.platform == "win32", reason="needs fork")
def test_two_programs_opening_an_older_file_at_once_both_open_it(tmp_path, monkeypatch):
    db = tmp_path / "field.db"
    with monkeypatch.context() as m:
        m.setattr(schema, "MIGRATIONS", schema.MIGRATIONS[:1])
        _v1(db)
    assert _version(db) == 1
    before = _tables(db)
    ctx = multiprocessing.get_context("fork")
    barrier, out = ctx.Barrier(2), ctx.Queue()
    procs = [ctx.Process(target=_open_at_once, args=(str(db), barrier, out)) for _ in range(2)]
    for p in procs:
        p.start()
    got = [out.get(timeout=60) for _ in procs]
    for p in procs:
        p.join(timeout=30)
    assert got == [("ok", 3), ("ok", 3)], got
    assert _version(db) == NOW
    after = _tables(db)
    # every row kept, none doubled; the upgrade only adds its own record to meta
    assert {t: after[t] for t in before if t != "meta"} == {
        t: rows for t, rows in before.items() if t != "meta"}
    assert [r for r in after["meta"] if r[0] != "survey_texts_v2"] == before["meta"]
    assert [r[0] for r in after["meta"]].count("survey_texts_v2") == 1
    c = sqlite3.connect(db)
    assert [r[0] for r in c.execute(
        "SELECT name FROM sqlite_schema WHERE name = 'photos'")] == ["photos"]
    c.close()


class _NoVacuum:
    def __init__(self, conn: sqlite3.Connection) -> None:
        self.conn = conn

    def execute(self, sql: str, *args: Any) -> Any:
        if sql.startswith("VACUUM"):
            raise sqlite3.OperationalError("database or disk is full")
        return self.conn.execute(sql, *args)


def _disk_full(conn: sqlite3.Connection, monkeypatch: pytest.MonkeyPatch) -> Any:
    return _NoVacuum(conn)


def _read_only_folder(conn: sqlite3.Connection, monkeypatch: pytest.MonkeyPatch) -> Any:
    def read_only(*args: Any) -> int:
        raise OSError(errno.EROFS, os.strerror(errno.EROFS))

    monkeypatch.setattr(schema.os, "open", read_only)
    return conn


@pytest.mark.parametrize("fail,said", [
    (_disk_full, "the disk is full; this change was not saved and earlier data is whole; free "
                 "some space and try again"),
    (_read_only_folder, "Read-only file system"),
], ids=["the copy cannot be written", "its name cannot be claimed"])
def test_a_backup_that_cannot_be_made_stops_the_upgrade_unchanged(behind, tmp_path, monkeypatch,
                                                                  fail, said):
    before = _tables(behind)
    conn = connect(behind)
    try:
        with pytest.raises(StoreError) as err:
            schema.ensure_schema(fail(conn, monkeypatch), behind, NOW)
    finally:
        monkeypatch.undo()
        conn.close()
    backup = tmp_path / f"field.v{NOW}-backup.db"
    assert str(err.value) == (f"{behind}: could not back up before upgrading the schema "
                              f"({backup}: {said}); nothing was changed")
    assert CALLS == [] and _version(behind) == NOW and _tables(behind) == before
    assert not backup.exists()     # the name claimed for the copy is given back, or never taken


def test_the_backup_name_never_replaces_an_earlier_backup(tmp_path):
    db = tmp_path / "field.db"
    first = schema.backup_path(db, 1)
    assert first == tmp_path / "field.v1-backup.db"
    first.write_text("an earlier backup")
    second = schema.backup_path(db, 1)
    assert second == tmp_path / "field.v1-backup-2.db"
    second.write_text("another")
    assert schema.backup_path(db, 1) == tmp_path / "field.v1-backup-3.db"
    assert schema.backup_path(tmp_path / "noext", 2) == tmp_path / "noext.v2-backup.db"


def test_a_backup_name_is_claimed_so_two_programs_never_share_one(tmp_path, monkeypatch):
    db = tmp_path / "field.db"
    earlier = tmp_path / "field.v1-backup.db"
    earlier.write_text("an earlier backup")
    mine = schema.claim_backup(db, 1)
    theirs = schema.claim_backup(db, 1)
    assert (mine, theirs) == (tmp_path / "field.v1-backup-2.db", tmp_path / "field.v1-backup-3.db")
    assert mine.read_bytes() == b"" and theirs.read_bytes() == b""   # empty: VACUUM INTO takes it
    assert earlier.read_text() == "an earlier backup"
    # Another program takes the free name between this one's look and its claim: the next.
    real = schema.backup_path

    def taken_meanwhile(path: Path, version: int) -> Path:
        out = real(path, version)
        if out.name == "field.v1-backup-4.db" and not out.exists():
            out.write_text("the other program's copy")
        return out

    monkeypatch.setattr(schema, "backup_path", taken_meanwhile)
    assert schema.claim_backup(db, 1) == tmp_path / "field.v1-backup-5.db"
    assert (tmp_path / "field.v1-backup-4.db").read_text() == "the other program's copy"


def test_an_upgrade_copies_into_the_name_it_claimed(behind, tmp_path):
    db = behind
    (tmp_path / f"field.v{NOW}-backup.db").write_text("taken")
    conn = connect(db)
    try:
        saved = schema.ensure_schema(conn, db, NOW)
    finally:
        conn.close()
    assert saved == tmp_path / f"field.v{NOW}-backup-2.db"
    assert _version(saved) == NOW and _version(db) == NOW + 1
    assert (tmp_path / f"field.v{NOW}-backup.db").read_text() == "taken"

