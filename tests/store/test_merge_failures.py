"""Merge when a source cannot be read or attached, or SQLite fails half-way through one.

A source that cannot be read or attached is skipped, named, with the reason; an error in the
middle of a source's transaction rolls that source back whole (nothing of it kept), says so in
one line naming the target, and leaves the source detached so the next merge works.
"""

from __future__ import annotations

import hashlib
import sqlite3
from pathlib import Path

import pytest

from tests.store.conftest import laptop
from triage.store import Store, StoreError
from triage.store.merge import merge_into, merge_source


def _digest(p: Path) -> str:
    return hashlib.sha256(p.read_bytes()).hexdigest()


def _attached(st: Store) -> list[str]:
    return [r[1] for r in st.conn.execute("PRAGMA database_list")]


def test_a_source_whose_journal_cannot_be_read_is_skipped_with_the_reason(tmp_path: Path):
    src = tmp_path / "laptop.db"
    laptop(src, "Harbour Flats")
    (tmp_path / "laptop.db-wal").mkdir()   # a sidecar that cannot be copied
    with Store.open(tmp_path / "area.db") as st:
        r = merge_source(st, src)
        assert r.skipped == "cannot be read (Is a directory)"
        assert (r.added, r.updated, r.conflicts) == (0, 0, 0)
        assert st.list_surveys() == []


def test_a_source_that_cannot_be_attached_is_skipped_and_the_target_unchanged(tmp_path: Path):
    src = tmp_path / "laptop.db"
    laptop(src, "Harbour Flats")
    before = _digest(src)
    with Store.open(tmp_path / "area.db") as st:
        st.conn.execute("ATTACH DATABASE ':memory:' AS src")   # the name merge attaches as
        r = merge_source(st, src)
        assert r.skipped == "database error: database src is already in use"
        assert st.list_surveys() == []
        st.conn.execute("DETACH DATABASE src")
        assert merge_source(st, src).added == 1   # once free, the same source merges
    assert _digest(src) == before


def test_an_error_half_way_rolls_the_source_back_and_detaches_it(tmp_path: Path):
    a, b = tmp_path / "a.db", tmp_path / "b.db"
    ids_a = laptop(a, "Harbour Flats")
    ids_b = laptop(b, "Quay Stores", "Old Post Office")
    target = tmp_path / "area.db"
    said = []
    with Store.open(target) as st:
        # The first source goes in; the second fails on its change-log rows, after its
        # surveys were inserted in the same transaction.
        merge_into(st, [a])
        st.conn.execute(
            "CREATE TEMP TRIGGER boom BEFORE INSERT ON main.changes "
            "WHEN NEW.survey_id IN (SELECT id FROM src.surveys) "
            "BEGIN SELECT RAISE(ABORT, 'database or disk is full'); END")
        with pytest.raises(StoreError) as err:
            merge_into(st, [b], each=said.append)
        assert str(err.value) == (f"{target}: the disk is full; this change was not saved and "
                                  "earlier data is whole; free some space and try again")
        assert said == []                                  # b never reported as merged
        assert _attached(st) == ["main", "temp"]           # detached after the failure
        assert sorted(r.id for r in st.list_surveys()) == sorted(ids_a)   # nothing of b
        assert not st.conn.in_transaction
        st.conn.execute("DROP TRIGGER temp.boom")
        r = merge_into(st, [b])[0]
        assert (r.added, r.skipped) == (2, None)
        assert sorted(r.id for r in st.list_surveys()) == sorted(ids_a + ids_b)
    with Store.open(target) as st:
        assert st.integrity() == "ok"
        for sid in ids_b:
            assert [c.op for c in st.change_log(sid)] == ["import"]


def test_the_merge_command_names_each_source_and_goes_on_past_a_missing_one(tmp_path: Path, cli):
    a, b = tmp_path / "a.db", tmp_path / "b.db"
    laptop(a, "Harbour Flats")
    laptop(b, "Quay Stores")
    target = tmp_path / "area.db"
    code, out, err = cli("merge", str(a), str(tmp_path / "missing.db"), str(b), "--into",
                         str(target))
    assert code == 1   # a source was skipped
    assert out == ""   # status lines go to standard error, in the sources' order
    assert err.splitlines() == [f"merged {a}: 1 added, 0 brought up to date, 0 unchanged",
                                f"triage merge: {tmp_path / 'missing.db'}: no such file; skipped",
                                f"merged {b}: 1 added, 0 brought up to date, 0 unchanged"]
    with Store.open(target) as st:
        assert sorted(r.building for r in st.list_surveys()) == ["Harbour Flats", "Quay Stores"]


def test_a_source_holding_no_survey_table_is_skipped(tmp_path: Path):
    src = tmp_path / "empty.db"
    c = sqlite3.connect(src)
    c.close()
    with Store.open(tmp_path / "area.db") as st:
        r = merge_source(st, src)
    assert r.skipped == "not a triage database (empty)"
