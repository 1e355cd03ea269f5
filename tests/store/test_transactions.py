"""The store's write transaction when SQLite fails at BEGIN, inside, or at COMMIT; explain().

Every write is one BEGIN IMMEDIATE transaction: a failure at any step is one line naming the
file (`explain`), the transaction is rolled back, and what was saved before stays as it was.
"""

from __future__ import annotations

import sqlite3
from pathlib import Path
from typing import Any

import pytest

from tests.store.conftest import sample
from triage.errors import IOFailure
from triage.store import Store, StoreError
from triage.store.connect import StoreIOFailure, explain, immediate

P = Path("/media/usb/field.db")

# What SQLite says -> (the class raised, the one line triage says)
MESSAGES = [
    ("database or disk is full", StoreIOFailure,
     f"{P}: the disk is full; this change was not saved and earlier data is whole; free some "
     "space and try again"),
    ("attempt to write a readonly database", StoreIOFailure,
     f"{P}: the database or its folder is read-only; nothing was changed; use a writable "
     "folder (triage --db PATH)"),
    ("unable to open database file", StoreIOFailure,
     f"{P}: cannot open or create the database there (missing or read-only folder?); use "
     "triage --db PATH with a writable folder"),
    ("database is locked", StoreIOFailure,
     f"{P}: the database stayed busy in another program for 15 s; nothing was changed; try "
     "again"),
    ("database table is locked: surveys", StoreIOFailure,
     f"{P}: the database stayed busy in another program for 15 s; nothing was changed; try "
     "again"),
    ("file is not a database", StoreError,
     f"{P}: damaged database (file is not a database); it was left as it is; restore it from "
     "a backup (triage backup) or use another --db"),
    ("database disk image is malformed", StoreError,
     f"{P}: damaged database (database disk image is malformed); it was left as it is; "
     "restore it from a backup (triage backup) or use another --db"),
    ("disk I/O error\n  at page 7", StoreError, f"{P}: database error: disk I/O error at page 7"),
]


@pytest.mark.parametrize(("said", "cls", "line"), MESSAGES, ids=[m[0] for m in MESSAGES])
def test_every_explain_message(said: str, cls: type, line: str) -> None:
    got = explain(sqlite3.OperationalError(said), P)
    assert type(got) is cls
    assert str(got) == line and "\n" not in str(got)
    # the I/O ones are IOFailure (told as input/output), the damaged ones are not
    assert isinstance(got, IOFailure) == (cls is StoreIOFailure)


class _FailingAt:
    """A connection that fails one statement (by its first word) with SQLite's error."""

    def __init__(self, conn: sqlite3.Connection, word: str, said: str) -> None:
        self.conn, self.word, self.said = conn, word, said
        self.seen: list[str] = []

    def execute(self, sql: str, *args: Any) -> Any:
        self.seen.append(sql.split()[0].upper())
        if sql.strip().upper().startswith(self.word):
            raise sqlite3.OperationalError(self.said)
        return self.conn.execute(sql, *args)

    def __getattr__(self, name: str) -> Any:
        return getattr(self.conn, name)


@pytest.fixture
def saved(tmp_path: Path):
    st = Store.open(tmp_path / "field.db")
    s = sample()
    st.add_survey(s)
    sid = str(s.survey_id)
    st.set_value(sid, "storeys[0].notes", "kept")
    yield st, sid
    st.close()


def test_a_commit_that_fails_is_rolled_back_and_said_in_one_line(saved) -> None:
    st, sid = saved
    before, log = st.survey_json(sid), len(st.change_log(sid))
    real = st.conn
    st.conn = _FailingAt(real, "COMMIT", "disk I/O error")   # type: ignore[assignment]
    try:
        with pytest.raises(StoreError) as err:
            st.set_value(sid, "storeys[0].notes", "never saved")
        assert st.conn.seen[0] == "BEGIN" and st.conn.seen[-2:] == ["COMMIT", "ROLLBACK"]
    finally:
        st.conn = real
    assert str(err.value) == f"{st.path}: database error: disk I/O error"
    assert not real.in_transaction
    assert st.survey_json(sid) == before and len(st.change_log(sid)) == log
    st.set_value(sid, "storeys[0].notes", "later")   # the store goes on working
    assert st.survey_json(sid)["storeys"][0]["notes"] == "later"


def test_a_begin_that_fails_changes_nothing(saved) -> None:
    st, sid = saved
    before = st.survey_json(sid)
    real = st.conn
    st.conn = _FailingAt(real, "BEGIN", "database or disk is full")   # type: ignore[assignment]
    try:
        with pytest.raises(StoreIOFailure, match="the disk is full; this change was not saved"):
            st.set_value(sid, "storeys[0].notes", "never saved")
        assert st.conn.seen == ["BEGIN"]   # nothing else was tried
    finally:
        st.conn = real
    assert st.survey_json(sid) == before


def test_begin_refused_while_another_program_writes(saved, tmp_path: Path) -> None:
    # A real lock: a second connection holds a write transaction; the store waits its busy
    # timeout (shortened here) and then refuses in one line, having changed nothing.
    st, sid = saved
    before = st.survey_json(sid)
    other = sqlite3.connect(st.path, isolation_level=None)
    other.execute("BEGIN IMMEDIATE")
    st.conn.execute("PRAGMA busy_timeout = 50")
    try:
        with pytest.raises(StoreIOFailure) as err:
            st.set_value(sid, "storeys[0].notes", "never saved")
    finally:
        other.execute("ROLLBACK")
        other.close()
    assert str(err.value) == (f"{st.path}: the database stayed busy in another program for "
                              "15 s; nothing was changed; try again")
    assert st.survey_json(sid) == before


def test_an_error_inside_rolls_back_and_a_bug_passes_through_unchanged(tmp_path: Path) -> None:
    conn = sqlite3.connect(tmp_path / "t.db", isolation_level=None)
    conn.execute("CREATE TABLE t (x INTEGER NOT NULL)")
    with (pytest.raises(StoreError, match=r"database error: NOT NULL constraint failed: t\.x"),
          immediate(conn, tmp_path / "t.db") as c):
        c.execute("INSERT INTO t VALUES (1)")
        c.execute("INSERT INTO t VALUES (NULL)")
    # not an SQLite error: rolled back, raised as it is
    with pytest.raises(KeyError), immediate(conn, tmp_path / "t.db") as c:
        c.execute("INSERT INTO t VALUES (2)")
        raise KeyError("a bug of ours")
    assert conn.execute("SELECT count(*) FROM t").fetchone() == (0,)
    assert not conn.in_transaction
    conn.close()
