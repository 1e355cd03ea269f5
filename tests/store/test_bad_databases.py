"""Bad databases are refused in one line naming the path; their bytes are never changed."""

from __future__ import annotations

import hashlib
import sqlite3
from pathlib import Path

import pytest

from tests.store.conftest import sample, sample_dict, write_json
from triage.store import Store, StoreError
from triage.store.connect import explain


def _digest(p: Path) -> str:
    return hashlib.sha256(p.read_bytes()).hexdigest()


def _real_db(path: Path, n: int = 3) -> Path:
    with Store.open(path) as st:
        for i in range(n):
            st.add_survey(sample(f"Building {i}"))
    return path


def _refused(path: Path, cli, match: str) -> None:
    before = _digest(path)
    with pytest.raises(StoreError, match=match) as err:
        Store.open(path)
    assert str(path) in str(err.value) and "\n" not in str(err.value)
    code, out, msg = cli("--db", str(path), "list")
    assert code == 1 and out == "" and len(msg.splitlines()) == 1 and str(path) in msg
    code, _, _ = cli("--db", str(path), "import", str(write_json(path.parent / "s.json",
                                                                 sample_dict())))
    assert code == 1
    assert _digest(path) == before
    assert not Path(str(path) + "-wal").exists()


def test_a_file_that_is_not_a_database(tmp_path, cli):
    p = tmp_path / "notes.db"
    p.write_text("inspection notes, not a database\n" * 20, encoding="utf-8")
    _refused(p, cli, "not a database file")


def test_a_truncated_database(tmp_path, cli):
    p = _real_db(tmp_path / "cut.db", n=20)
    data = p.read_bytes()
    p.write_bytes(data[: len(data) // 2])
    _refused(p, cli, "truncated database")


def test_a_database_that_fails_quick_check(tmp_path, cli):
    p = _real_db(tmp_path / "bad.db", n=20)
    data = bytearray(p.read_bytes())
    page = int.from_bytes(data[16:18], "big")
    # Scribble over the b-tree pages after the schema page (a damaged sector).
    for k in range(page + 8, len(data) - page, page):
        data[k:k + 64] = b"\xa5" * 64
    p.write_bytes(bytes(data))
    _refused(p, cli, "damaged database")


def test_a_database_of_another_program(tmp_path, cli):
    p = tmp_path / "other.db"
    c = sqlite3.connect(p)
    c.execute("CREATE TABLE birds (name TEXT)")
    c.commit()
    c.close()
    _refused(p, cli, "another program")


def test_a_newer_schema_is_refused_unchanged(tmp_path, cli):
    p = _real_db(tmp_path / "new.db")
    c = sqlite3.connect(p)
    c.execute("PRAGMA user_version = 99")
    c.close()
    _refused(p, cli, "newer triage \\(schema 99")


def test_a_full_disk_keeps_earlier_data_whole(tmp_path):
    p = tmp_path / "full.db"
    st = Store.open(p)
    s = sample()
    st.add_survey(s)
    sid = str(s.survey_id)
    st.set_value(sid, "storeys[0].notes", "kept")
    pages = st.conn.execute("PRAGMA page_count").fetchone()[0]
    st.conn.execute(f"PRAGMA max_page_count = {pages}")
    before = st.survey_json(sid)
    with pytest.raises(StoreError, match="the disk is full; this change was not saved"):
        for _ in range(200):
            st.set_value(sid, "storeys[0].notes", "x" * 20000)
            st.add_item(sid, "storeys[0].readings", {"dir": "x", "tilt_deg": 0.01,
                                                     "where": "y" * 5000})
    st.close()
    with Store.open(p) as again:
        assert again.integrity() == "ok"
        # Whatever was acknowledged before the full disk is there; the survey still loads.
        doc = again.survey_json(sid)
        assert doc["storeys"][0]["notes"] in ("kept", "x" * 20000)
        again.load_survey(sid)
        assert doc["storeys"][1] == before["storeys"][1]


def test_a_read_only_database_gives_a_clear_message(tmp_path):
    p = _real_db(tmp_path / "ro.db")
    c = sqlite3.connect(f"file:{p}?mode=ro", uri=True)
    with pytest.raises(sqlite3.Error) as err:
        c.execute("CREATE TABLE t (x)")
    c.close()
    msg = str(explain(err.value, p))
    assert msg.startswith(f"{p}: the database or its folder is read-only; nothing was changed")


def test_a_missing_folder_gives_a_clear_message(tmp_path):
    blocker = tmp_path / "file"
    blocker.write_text("x")
    with pytest.raises(StoreError, match="cannot create the folder"):
        Store.open(blocker / "sub" / "f.db")
