"""`Store.open_read_only` on files it cannot read in place: an older schema is read through an
upgraded copy in a temporary folder (the file itself never changed, the copy gone on close);
a missing or empty file and a copy that cannot be made are one line."""

from __future__ import annotations

import hashlib
import tempfile
from pathlib import Path

import pytest

from tests.store.conftest import sample
from tests.store.test_migration import _v1
from triage.store import Store, StoreError, schema


def _digest(p: Path) -> str:
    return hashlib.sha256(p.read_bytes()).hexdigest()


def _older(tmp_path: Path, monkeypatch) -> Path:
    db = tmp_path / "field.db"
    with monkeypatch.context() as m:
        m.setattr(schema, "MIGRATIONS", schema.MIGRATIONS[:1])
        _v1(db)
    return db


def _scratch_folders() -> set[str]:
    return {p.name for p in Path(tempfile.gettempdir()).glob("triage-read-*")}


def test_an_older_schema_is_read_through_an_upgraded_copy(tmp_path, monkeypatch):
    db = _older(tmp_path, monkeypatch)
    before, files = _digest(db), sorted(p.name for p in tmp_path.iterdir())
    folders = _scratch_folders()
    st = Store.open_read_only(db)
    try:
        assert st.read_only and st.path == db
        assert [r.building for r in st.list_surveys()] == [
            "Building 0", "Building 1", "Building 2"]
        made = _scratch_folders() - folders
        assert len(made) == 1   # the copy, in a temporary folder of its own
        with pytest.raises(StoreError, match="read-only"):
            st.set_value(st.list_surveys()[0].id, "storeys[0].notes", "never")
    finally:
        st.close()
    assert _scratch_folders() == folders             # removed on close
    assert _digest(db) == before                     # the file itself untouched
    assert sorted(p.name for p in tmp_path.iterdir()) == files   # and no backup beside it


def test_a_missing_or_empty_file_is_one_line(tmp_path):
    with pytest.raises(StoreError) as err:
        Store.open_read_only(tmp_path / "none.db")
    assert str(err.value) == (f"{tmp_path / 'none.db'}: no database there; check the path "
                              "(--db PATH)")
    empty = tmp_path / "empty.db"
    empty.write_bytes(b"")
    with pytest.raises(StoreError) as err:
        Store.open_read_only(empty)
    assert str(err.value) == (f"{empty}: an empty file, not yet a triage database (--db PATH)")


def test_a_copy_that_cannot_be_made_is_one_line_and_leaves_nothing(tmp_path, monkeypatch):
    import errno

    import triage.store.store as store_module

    db = _older(tmp_path, monkeypatch)
    before = _digest(db)

    def full(src: object, dst: object) -> None:   # the temporary folder's disk is full
        raise OSError(errno.ENOSPC, "No space left on device")

    monkeypatch.setattr(store_module.shutil, "copyfile", full)
    folders = _scratch_folders()
    with pytest.raises(StoreError) as err:
        Store.open_read_only(db)
    assert str(err.value) == f"{db}: cannot be read (No space left on device)"
    assert _scratch_folders() == folders and _digest(db) == before


def test_a_report_of_a_survey_not_there_is_refused(tmp_path):
    with Store.open(tmp_path / "f.db") as st:
        with pytest.raises(StoreError) as err:
            st.record_report("9a5d7c3e-1b46-4f80-9e2a-0c7b4d6f8e13", 1)
        assert str(err.value) == ("survey 9a5d7c3e-1b46-4f80-9e2a-0c7b4d6f8e13: not in this "
                                  f"database ({tmp_path / 'f.db'})")
        s = sample()
        st.add_survey(s)
        with pytest.raises(StoreError, match=r"revision 5 does not exist \(current: 1\)"):
            st.record_report(s.survey_id, 5)
