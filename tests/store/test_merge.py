"""`triage merge`: idempotent, conflicts kept and flagged, sources never changed."""

from __future__ import annotations

import hashlib
import json
import sqlite3
from pathlib import Path

from tests.store.conftest import laptop
from triage.store import Store
from triage.store.area import building_rows
from triage.store.merge import merge_into


def _bytes(*paths: Path) -> dict[str, str | None]:
    return {p.name: (hashlib.sha256(p.read_bytes()).hexdigest() if p.exists() else None)
            for p in paths}


def _dump(db: Path) -> dict[str, list[tuple[object, ...]]]:
    c = sqlite3.connect(db)
    out = {t: sorted(c.execute(f"SELECT * FROM {t}").fetchall(), key=repr)
           for t in ("surveys", "assessments", "reports")}
    out["changes"] = sorted(c.execute("SELECT uid, survey_id, revision, op, path, old, new, at, "
                                      "who, undoes FROM changes").fetchall(), key=repr)
    c.close()
    return out


def test_merge_gathers_every_survey_with_its_log_and_again_changes_nothing(tmp_path, cli):
    a, b, target = tmp_path / "ana.db", tmp_path / "ben.db", tmp_path / "centre.db"
    ids_a = laptop(a, "Clinic", "School")
    ids_b = laptop(b, "Warehouse")
    with Store.open(a) as st:
        st.set_value(ids_a[0], "storeys[0].notes", "checked twice")
        st.record_report(ids_a[0], 2, "clinic.pdf", "aa")
    code, out, err = cli("merge", str(a), str(b), "--into", str(target))
    assert code == 0, err
    assert out == "" and "ana.db: 2 added" in err and "ben.db: 1 added" in err
    with Store.open(target) as st:
        rows = {r.id: r for r in st.list_surveys()}
        assert set(rows) == set(ids_a + ids_b)
        assert rows[ids_a[0]].source == str(a.resolve())
        assert rows[ids_b[0]].source == str(b.resolve())
        assert [c.op for c in st.change_log(ids_a[0])] == ["set", "import"]
        assert rows[ids_a[0]].reported_revision == 2
        assert st.survey_json(ids_a[0])["storeys"][0]["notes"] == "checked twice"
        with Store.open(a) as src:
            assert st.conn.execute("SELECT source_db FROM surveys WHERE id = ?",
                                   (ids_a[0],)).fetchone()[0] == src.db_id
    first = _dump(target)
    code, _, err = cli("merge", str(a), str(b), "--into", str(target))
    assert code == 0 and "0 added, 0 brought up to date, 2 unchanged" in err
    assert _dump(target) == first


def test_a_source_edited_further_brings_the_target_forward(tmp_path):
    a, target = tmp_path / "ana.db", tmp_path / "centre.db"
    (sid,) = laptop(a, "Clinic")
    with Store.open(target) as st:
        merge_into(st, [a])
    with Store.open(a) as st:
        st.set_value(sid, "storeys[1].readings[0].offset_mm", 9.0)
        st.remove_item(sid, "storeys[2].members[1]")
    with Store.open(target) as st:
        (r,) = merge_into(st, [a])
        assert (r.added, r.updated, r.unchanged, r.conflicts) == (0, 1, 0, 0)
        s = st.load_survey(sid)
        assert s.storeys[1].readings[0].offset_mm == 9.0 and len(s.storeys[2].members) == 1
        assert [c.op for c in st.change_log(sid)] == ["remove", "set", "import"]
        assert st.list_surveys()[0].conflict is False
        assert st.stale_ids() == []


def test_edited_differently_on_two_laptops_keeps_both_and_flags_the_conflict(tmp_path, cli):
    a, b, target = tmp_path / "ana.db", tmp_path / "ben.db", tmp_path / "centre.db"
    (sid,) = laptop(a, "Clinic")
    laptop(b, "Clinic")   # the same survey file imported on both laptops
    with Store.open(a) as st:
        st.set_value(sid, "storeys[0].readings[0].offset_mm", 3.0)
    with Store.open(b) as st:
        st.set_value(sid, "storeys[0].readings[0].offset_mm", 30.0)
    code, out, err = cli("merge", str(a), str(b), "--into", str(target))
    assert code == 0 and out == "" and "1 edited differently" in err
    with Store.open(target) as st:
        rows = st.list_surveys()
        assert len(rows) == 2
        first = next(r for r in rows if r.id == sid)
        second = next(r for r in rows if r.id != sid)
        assert second.conflict_of == sid and first.conflict and second.conflict
        assert second.source == str(b.resolve())
        assert st.load_survey(sid).storeys[0].readings[0].offset_mm == 3.0
        kept = st.load_survey(second.id)
        assert kept.storeys[0].readings[0].offset_mm == 30.0
        assert str(kept.survey_id) == second.id
        assert second.tier == "evacuate" and not second.stale   # assessed for its own id
        assert [c.op for c in st.change_log(second.id)] == ["set", "import"]
        (b_row,) = building_rows(st)
        assert b_row.conflict and b_row.surveys == 2
    code, out, _ = cli("--db", str(target), "list")
    assert out.count("CONFLICT") == 2
    code, out, _ = cli("--db", str(target), "summary")
    assert "CONFLICT" in out and "1 with a conflict to resolve" in out
    # Merging again keeps the two, adds no third.
    before = _dump(target)
    assert cli("merge", str(a), str(b), "--into", str(target))[0] == 0
    assert _dump(target) == before
    # Hiding one version resolves the flag; nothing is deleted.
    with Store.open(target) as st:
        st.hide_survey(second.id)
        assert [r.conflict for r in st.list_surveys()] == [False]


def test_sources_are_never_changed_and_their_wal_edits_are_not_lost(tmp_path, cli):
    a, target = tmp_path / "ana.db", tmp_path / "centre.db"
    (sid,) = laptop(a, "Clinic")
    live = Store.open(a)   # still open: the last edits are only in ana.db-wal
    live.conn.execute("PRAGMA wal_autocheckpoint = 0")
    live.set_value(sid, "storeys[0].notes", "only in the WAL")
    wal = Path(str(a) + "-wal")
    assert wal.stat().st_size > 0
    before = _bytes(a, wal)
    code, _, err = cli("merge", str(a), "--into", str(target))
    assert code == 0, err
    assert _bytes(a, wal) == before
    with Store.open(target) as st:
        assert st.survey_json(sid)["storeys"][0]["notes"] == "only in the WAL"
    live.close()
    # A closed source (no -wal) is read in place, and nothing is created beside it.
    before = _bytes(a)
    names = sorted(p.name for p in tmp_path.iterdir())
    assert cli("merge", str(a), "--into", str(target))[0] == 0
    assert _bytes(a) == before
    assert sorted(p.name for p in tmp_path.iterdir()) == names


def test_a_bad_or_newer_source_is_named_and_skipped_and_the_rest_go_on(tmp_path, cli):
    good, target = tmp_path / "good.db", tmp_path / "centre.db"
    (sid,) = laptop(good, "Clinic")
    junk = tmp_path / "photo.db"
    junk.write_bytes(b"\xff\xd8\xff\xe0 not a database" * 10)
    newer = tmp_path / "newer.db"
    laptop(newer, "School")
    c = sqlite3.connect(newer)
    c.execute("PRAGMA user_version = 7")
    c.close()
    before = _bytes(junk, newer)
    code, out, err = cli("merge", str(junk), str(newer), str(good), str(tmp_path / "gone.db"),
                         "--into", str(target))
    assert code == 1
    lines = [line for line in err.splitlines() if line.endswith("; skipped")]
    assert len(lines) == 3 and out == ""
    assert str(junk) in lines[0] and "not a database file" in lines[0] and "skipped" in lines[0]
    assert str(newer) in lines[1] and "newer triage (schema 7" in lines[1]
    assert "gone.db: no such file; skipped" in lines[2]
    assert "good.db: 1 added" in err
    assert _bytes(junk, newer) == before
    with Store.open(target) as st:
        assert [r.id for r in st.list_surveys()] == [sid]


def test_merging_the_target_into_itself_is_refused(tmp_path, cli):
    target = tmp_path / "centre.db"
    laptop(target, "Clinic")
    code, _, err = cli("merge", str(target), "--into", str(target))
    assert code == 1 and "is the target database itself" in err


def test_merged_json_is_the_source_json(tmp_path):
    a, target = tmp_path / "ana.db", tmp_path / "centre.db"
    ids = laptop(a, "Clinic", "Flats")
    with Store.open(target) as st:
        merge_into(st, [a])
        with Store.open(a) as src:
            for sid in ids:
                assert st.survey_json(sid) == src.survey_json(sid)
                assert json.loads(json.dumps(st.survey_json(sid)))["id"] == sid


def test_a_damaged_source_with_its_wal_is_named_not_its_copy(tmp_path, cli):
    bad, target = tmp_path / "bad.db", tmp_path / "centre.db"
    laptop(bad, "Clinic", "School", "Flats", "Shed", "Store", "Hall")
    data = bytearray(bad.read_bytes())
    page = int.from_bytes(data[16:18], "big")
    for k in range(page + 8, len(data) - page, page):
        data[k:k + 64] = b"\xa5" * 64
    bad.write_bytes(bytes(data))
    wal = Path(str(bad) + "-wal")
    wal.write_bytes(b"")   # a -wal beside it: the source is read through a copy
    before = _bytes(bad, wal)
    code, _, err = cli("merge", str(bad), "--into", str(target))
    assert code == 1
    assert err.startswith(f"triage merge: {bad}: damaged database") and "triage-merge-" not in err
    assert _bytes(bad, wal) == before
