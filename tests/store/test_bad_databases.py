"""Bad databases are refused in one line naming the path; their bytes are never changed."""

from __future__ import annotations

import hashlib
import json
import multiprocessing
import os
import shutil
import sqlite3
import tempfile
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
    st.conn.execute(f"PRAGMA max_page_count = {pages + 40}")  # room for a few
    # Each write the store acknowledged (returned from) is recorded with the text it left;
    # the one refused is named.
    acknowledged = [("notes kept", st.survey_json(sid))]
    refused = None
    for k in range(200):
        for what, write in ((f"notes {k}", lambda k=k: st.set_value(
                                sid, "storeys[0].notes", f"{k:03d}" + "x" * 19000)),
                            (f"reading {k}", lambda k=k: st.add_item(
                                sid, "storeys[0].readings",
                                {"dir": "x", "tilt_deg": 0.01, "where": f"{k:03d}" + "y" * 1900}))):
            try:
                write()
            except StoreError as err:
                assert str(err) == (f"{p}: the disk is full; this change was not saved and "
                                    "earlier data is whole; free some space and try again")
                refused = what
                break
            acknowledged.append((what, st.survey_json(sid)))
        if refused:
            break
    assert refused is not None, "the disk never filled"
    assert len(acknowledged) >= 3   # some writes went through before the disk filled
    st.close()
    last_what, last_doc = acknowledged[-1]
    with Store.open(p) as again:
        assert again.integrity() == "ok"
        # exactly the last acknowledged write is there, and nothing of the refused one
        assert again.survey_json(sid) == last_doc, (last_what, refused)
        again.load_survey(sid)
        log = again.change_log(sid)
        assert len([c for c in log if c.op != "import"]) == len(acknowledged)


def test_a_read_only_database_gives_a_clear_message(tmp_path):
    p = _real_db(tmp_path / "ro.db")
    c = sqlite3.connect(f"file:{p}?mode=ro", uri=True)
    with pytest.raises(sqlite3.Error) as err:
        c.execute("CREATE TABLE t (x)")
    c.close()
    msg = str(explain(err.value, p))
    assert msg.startswith(f"{p}: the database or its folder is read-only; nothing was changed")


def test_a_store_opened_read_only_reads_and_refuses_an_edit_unchanged(tmp_path):
    p = _real_db(tmp_path / "ro.db")
    with Store.open(p) as st:
        ids = [r.id for r in st.list_surveys()]
        sid = ids[0]
        doc = st.survey_json(sid)
    before = _digest(p)
    with Store.open(p, read_only=True) as st:
        assert [r.id for r in st.list_surveys()] == ids and len(ids) == 3
        assert st.survey_json(sid) == doc
        with pytest.raises(StoreError) as err:
            st.set_value(sid, "storeys[0].notes", "never saved")
        assert str(err.value) == (f"{p}: the database or its folder is read-only; nothing was "
                                  "changed; use a writable folder (triage --db PATH)")
        assert st.survey_json(sid) == doc
    assert _digest(p) == before


def test_a_missing_folder_gives_a_clear_message(tmp_path):
    blocker = tmp_path / "file"
    blocker.write_text("x")
    with pytest.raises(StoreError, match="cannot create the folder"):
        Store.open(blocker / "sub" / "f.db")


def _as_a_user_who_cannot_write(work, *args):
    """Run `work(*args)` where permissions hold: in a child as 'nobody' when we are root.

    Root writes through any mode bits, and CI runs as root; the child gives up root first.
    Returns what `work` returned (over a pipe).
    """
    ctx = multiprocessing.get_context("fork")
    mine, theirs = ctx.Pipe()

    def child() -> None:
        if os.geteuid() == 0:
            os.setgid(65534)
            os.setuid(65534)
        theirs.send(work(*args))

    proc = ctx.Process(target=child)
    proc.start()
    got = mine.recv()
    proc.join()
    assert proc.exitcode == 0
    return got


def _open_and_edit(path: str, sid: str) -> list[str]:
    said = []
    try:
        st = Store.open(Path(path))
    except StoreError as err:
        return [f"open: {err}"]
    try:
        st.set_value(sid, "storeys[0].notes", "written in a read-only place")
        said.append("edit: saved")
    except StoreError as err:
        said.append(f"edit: {err}")
    st.close()
    return said


def _cli(*argv: str) -> tuple[int, str]:
    import contextlib
    import io

    from triage.cli import main

    err = io.StringIO()
    with contextlib.redirect_stderr(err), contextlib.redirect_stdout(io.StringIO()):
        code = main(list(argv))
    return code, err.getvalue()


@pytest.fixture
def shared_dir():
    """A folder outside pytest's own (which only its owner may enter), removed afterwards."""
    d = Path(tempfile.mkdtemp(prefix="triage-ro-"))
    d.chmod(0o777)
    yield d
    d.chmod(0o777)
    shutil.rmtree(d)


def test_a_read_only_folder_refuses_in_one_line_and_changes_nothing(shared_dir):
    p = _real_db(shared_dir / "field.db")
    with Store.open(p) as st:
        sid = st.list_surveys()[0].id
    p.chmod(0o666)
    before = _digest(p)
    survey_file = write_json(shared_dir / "new.json", sample_dict("Brand New Flats"))
    survey_file.chmod(0o644)
    shared_dir.chmod(0o555)
    said = _as_a_user_who_cannot_write(_open_and_edit, str(p), sid)
    assert said == [f"open: {p}: the database or its folder is read-only; nothing was "
                    "changed; use a writable folder (triage --db PATH)"]
    code, err = _as_a_user_who_cannot_write(_cli, "--db", str(p), "list")
    assert code == 0, err      # a command that only reads works on a read-only folder
    new = shared_dir / "new.db"
    code, err = _as_a_user_who_cannot_write(_cli, "--db", str(new), "import", str(survey_file))
    assert code == 1 and err.count("\n") == 1 and "cannot open or create" in err, err
    assert not new.exists()
    said = _as_a_user_who_cannot_write(_open_and_edit, str(new), sid)
    assert said == [f"open: {new}: cannot open or create the database there (missing or "
                    "read-only folder?); use triage --db PATH with a writable folder"]
    assert _digest(p) == before
    assert sorted(x.name for x in shared_dir.iterdir()) == ["field.db", "new.json"]


def test_a_read_only_file_is_read_but_an_edit_is_refused_and_nothing_changes(shared_dir):
    p = _real_db(shared_dir / "field.db")
    with Store.open(p) as st:
        sid = st.list_surveys()[0].id
        before = st.survey_json(sid)
    p.chmod(0o444)
    said = _as_a_user_who_cannot_write(_open_and_edit, str(p), sid)
    assert said == [f"edit: {p}: the database or its folder is read-only; nothing was "
                    "changed; use a writable folder (triage --db PATH)"]
    p.chmod(0o644)
    with Store.open(p) as st:
        assert st.survey_json(sid) == before
        assert st.integrity() == "ok"


def _read_everything(db: str, sid: str, out_dir: str) -> dict[str, tuple[int, str]]:
    import contextlib
    import io

    from triage.cli import main

    said = {}
    runs = {"list": ["list"], "summary": ["summary", "--format", "csv"],
            "export": ["export", sid[:8], "-o", f"{out_dir}/s.json"],
            "export dir": ["export", sid[:8], "-o", f"{out_dir}/folder/"],
            "backup": ["backup", "-o", f"{out_dir}/copy.db"],
            "report": ["report", sid[:8], "-o", f"{out_dir}/r.pdf"],
            "compare": ["compare", sid, sid]}
    for name, argv in runs.items():
        out, err = io.StringIO(), io.StringIO()
        with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
            code = main(["--db", db, *argv])
        said[name] = (code, out.getvalue() + err.getvalue())
    return said


@pytest.mark.parametrize("how", ["folder", "file", "folder with a wal"])
def test_reading_commands_work_on_a_read_only_medium_and_change_nothing(shared_dir, tmp_path,
                                                                         how):
    stick = shared_dir / "stick"
    stick.mkdir()
    p = _real_db(stick / "field.db")
    with Store.open(p) as st:
        sid = st.list_surveys()[0].id
    keep_open = None
    if how == "folder with a wal":
        # a writer still holds it: a -wal (with an unsaved-to-the-file edit) lies beside it
        keep_open = Store.open(p)
        keep_open.conn.execute("PRAGMA wal_autocheckpoint = 0")
        keep_open.set_value(sid, "storeys[0].notes", "only in the wal")
        assert (stick / "field.db-wal").stat().st_size > 0
        frozen = shared_dir / "frozen"
        frozen.mkdir()
        for f in stick.iterdir():
            shutil.copyfile(f, frozen / f.name)
        keep_open.close()
        shutil.rmtree(stick)
        frozen.rename(stick)
        p = stick / "field.db"
    before = {f.name: _digest(f) for f in stick.iterdir()}
    for f in stick.iterdir():
        f.chmod(0o444)
    if how != "file":
        stick.chmod(0o555)
    # The child gives up root and may not read root's Python install: load every module the
    # commands use here first, on a copy (the child inherits them).
    warm = tmp_path / "warm"
    warm.mkdir()
    shutil.copyfile(_real_db(tmp_path / "w.db"), warm / "w.db")
    with Store.open(warm / "w.db") as st:
        wid = st.list_surveys()[0].id
    _read_everything(str(warm / "w.db"), wid, str(warm))
    out = shared_dir / "out"
    out.mkdir()
    out.chmod(0o777)
    said = _as_a_user_who_cannot_write(_read_everything, str(p), sid, str(out))
    for name, (code, text) in said.items():
        assert code == 0, (name, text)
    assert "not recorded" in said["report"][1]
    assert (out / "r.pdf").read_bytes().startswith(b"%PDF")
    assert json.loads((out / "s.json").read_text())["id"] == sid
    if how == "folder with a wal":
        assert json.loads((out / "s.json").read_text())["storeys"][0]["notes"] == \
            "only in the wal"
    stick.chmod(0o755)
    assert {f.name: _digest(f) for f in stick.iterdir()} == before
    with Store.open(out / "copy.db") as copy:
        assert sid in [r.id for r in copy.list_surveys()] and copy.integrity() == "ok"
