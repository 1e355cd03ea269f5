"""Backup refuses a copy that fails its check, and leaves neither the copy nor its `.part`."""

from __future__ import annotations

import sqlite3
from pathlib import Path

import pytest

from tests.store.conftest import sample
from triage.store import Store
from triage.store.backup import backup_connection
from triage.store.connect import StoreError


class _CorruptingSource:
    """The store's connection, whose copy step damages the copy's first table after copying."""

    def __init__(self, conn: sqlite3.Connection, part: Path):
        self.conn, self.part = conn, part

    def backup(self, out: sqlite3.Connection) -> None:
        self.conn.backup(out)
        data = bytearray(self.part.read_bytes())
        size = int.from_bytes(data[16:18], "big") or 65536
        data[size:size + 8] = b"\xff" * 8                 # page 2: no b-tree page kind at all
        data[24:28] = (int.from_bytes(data[24:28], "big") + 1).to_bytes(4, "big")  # changed
        self.part.write_bytes(bytes(data))


def test_a_copy_failing_its_check_is_refused_and_removed(tmp_path: Path):
    db, dest = tmp_path / "s.db", tmp_path / "copy.db"
    part = tmp_path / "copy.db.part"
    with Store.open(db) as st:
        st.add_survey(sample("Harbour Flats"))
        with pytest.raises(StoreError) as err:
            backup_connection(_CorruptingSource(st.conn, part), db, dest)   # type: ignore[arg-type]
        assert str(dest) in str(err.value) and "\n" not in str(err.value)
        assert not dest.exists() and not part.exists()
        # the same copy step, undamaged, makes a backup that opens with the survey in it
        assert backup_connection(st.conn, db, dest) == dest
        assert not part.exists()
    with Store.open(dest) as copy:
        assert [s.building for s in copy.list_surveys()] == ["Harbour Flats"]


def test_refusals_name_the_file_and_leave_no_part(tmp_path: Path):
    db = tmp_path / "s.db"
    with Store.open(db) as st:
        st.add_survey(sample("Harbour Flats"))
        taken = tmp_path / "taken.db"
        taken.write_bytes(b"mine")
        with pytest.raises(StoreError, match="exists already"):
            st.backup_to(taken)
        assert taken.read_bytes() == b"mine"
        before = db.read_bytes()
        with pytest.raises(StoreError, match="exists already"):   # the database itself
            backup_connection(st.conn, db, tmp_path / "." / "s.db")
        assert db.read_bytes() == before
        with pytest.raises(StoreError, match="no such folder"):
            st.backup_to(tmp_path / "absent" / "b.db")
        stale = tmp_path / "b.db.part"
        stale.write_bytes(b"left from a crash")
        assert st.backup_to(tmp_path / "b.db") == tmp_path / "b.db"
        assert not stale.exists()
    assert sorted(p.name for p in tmp_path.iterdir() if p.name.startswith("b.db")) == ["b.db"]
