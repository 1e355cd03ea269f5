"""Backup refuses a copy that fails its check or cannot be written, and leaves neither the copy
nor its `.part`; a copy kept is one file with no journal beside it."""

from __future__ import annotations

import errno
import os
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


class _FailingSource:
    """The store's connection, whose copy step fails the way SQLite does on a full disk."""

    def __init__(self, conn: sqlite3.Connection, part: Path, message: str):
        self.conn, self.part, self.message = conn, part, message

    def backup(self, out: sqlite3.Connection) -> None:
        self.conn.backup(out)
        assert self.part.exists()          # half a copy is on disk when the step fails
        raise sqlite3.OperationalError(self.message)


@pytest.mark.parametrize("message, words", [
    ("database or disk is full", "the disk is full"),
    ("disk I/O error", "database error: disk I/O error"),
])
def test_an_sqlite_failure_while_copying_is_one_line_and_leaves_no_part(tmp_path: Path,
                                                                        message, words):
    db, dest = tmp_path / "s.db", tmp_path / "copy.db"
    part = tmp_path / "copy.db.part"
    with Store.open(db) as st:
        st.add_survey(sample("Harbour Flats"))
        with pytest.raises(StoreError) as err:
            backup_connection(_FailingSource(st.conn, part, message), db,  # type: ignore[arg-type]
                              dest)
    text = str(err.value)
    assert text.startswith(f"{dest}: ") and words in text and "\n" not in text
    assert sorted(p.name for p in tmp_path.iterdir() if p.name.startswith("copy")) == []


def test_an_os_failure_at_the_rename_is_named_and_leaves_no_part(tmp_path: Path, monkeypatch):
    db, dest = tmp_path / "s.db", tmp_path / "copy.db"
    renamed: list[tuple[str, str]] = []

    def full(src, dst):
        renamed.append((os.fspath(src), os.fspath(dst)))
        raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))

    with Store.open(db) as st:
        st.add_survey(sample("Harbour Flats"))
        monkeypatch.setattr("triage.store.backup.os.replace", full)
        with pytest.raises(StoreError) as err:
            st.backup_to(dest)
    assert renamed == [(str(tmp_path / "copy.db.part"), str(dest))]   # the checked copy's turn
    assert str(err.value) == f"{dest}: cannot write the backup (No space left on device)"
    assert not dest.exists() and not (tmp_path / "copy.db.part").exists()


def test_a_copy_is_one_file_that_needs_no_journal(tmp_path: Path):
    db, dest = tmp_path / "s.db", tmp_path / "copy.db"
    with Store.open(db) as st:
        st.add_survey(sample("Harbour Flats"))
        st.backup_to(dest)
    assert sorted(p.name for p in tmp_path.iterdir() if p.name.startswith("copy")) == ["copy.db"]
    c = sqlite3.connect(dest)
    try:
        assert c.execute("PRAGMA journal_mode").fetchone()[0] == "delete"
        assert c.execute("PRAGMA quick_check").fetchone()[0] == "ok"
    finally:
        c.close()


def test_a_file_made_at_a_dangling_links_target_meanwhile_is_not_replaced(tmp_path: Path,
                                                                          monkeypatch):
    """The link's target is free when looked at, and another program makes it before the copy
    goes there: refused as taken, that file kept, nothing left behind."""
    import triage.output as output

    db, link = tmp_path / "s.db", tmp_path / "usb.db"
    target = tmp_path / "stick" / "field-copy.db"
    target.parent.mkdir()
    link.symlink_to(target)
    real = output.output_target

    def made_meanwhile(path: Path) -> Path:
        found = real(path)
        target.write_bytes(b"the other program's file")
        return found

    with Store.open(db) as st:
        st.add_survey(sample("Harbour Flats"))
        monkeypatch.setattr(output, "output_target", made_meanwhile)
        with pytest.raises(StoreError) as err:
            st.backup_to(link)
    assert str(err.value) == (f"{os.path.realpath(target)}: exists already; choose a new file "
                              "name for the backup")
    assert target.read_bytes() == b"the other program's file" and link.is_symlink()
    assert sorted(p.name for p in target.parent.iterdir()) == ["field-copy.db"]


def test_the_name_a_database_was_opened_by_is_never_written_once_its_file_moved(tmp_path: Path):
    """Its journal files still sit beside that name: a backup there is refused as the database
    itself, and nothing is written."""
    db = tmp_path / "s.db"
    with Store.open(db) as st:
        st.add_survey(sample("Harbour Flats"))
        os.rename(db, tmp_path / "moved.db")
        with pytest.raises(StoreError) as err:
            st.backup_to(db)
        assert str(err.value) == f"{db}: is the database itself; choose another file"
        assert not db.exists() and not (tmp_path / "s.db.part").exists()
        assert [s.building for s in st.list_surveys()] == ["Harbour Flats"]   # still open
