"""Merge keeps retractions (undo, hide) and never flags two identical texts as a conflict."""

from __future__ import annotations

import sqlite3
from pathlib import Path

from tests.store.conftest import laptop
from triage.store import Store
from triage.store.merge import merge_into


def _offset(st: Store, sid: str) -> float | None:
    return st.load_survey(sid).storeys[0].readings[0].offset_mm


def _visible(st: Store) -> list[str]:
    return sorted(r.id for r in st.list_surveys())


def _changes(db: Path) -> int:
    c = sqlite3.connect(db)
    try:
        return int(c.execute("SELECT count(*) FROM changes").fetchone()[0])
    finally:
        c.close()


def test_a_hide_on_a_laptop_reaches_a_centre_holding_the_same_text(tmp_path):
    # The centre made an edit and took it back: same text as the laptop, different logs.
    lap, centre = tmp_path / "lap.db", tmp_path / "centre.db"
    (sid,) = laptop(lap, "Clinic")
    with Store.open(centre) as st:
        merge_into(st, [lap])
        st.set_value(sid, "storeys[0].notes", "looked again")
        st.undo_last(sid)
    with Store.open(lap) as st:
        st.hide_survey(sid)                        # the inspector withdraws the survey
    with Store.open(centre) as st:
        (r,) = merge_into(st, [lap])
        assert r.conflicts == 0 and r.updated == 1
        assert _visible(st) == []                  # before the fix: "unchanged", still shown
        assert "hide" in [c.op for c in st.change_log(sid)]
    n = _changes(centre)
    with Store.open(centre) as st:
        (r,) = merge_into(st, [lap])
        assert (r.updated, r.conflicts) == (0, 0)
    assert _changes(centre) == n                   # merging again changes nothing


def test_an_undone_hide_on_a_laptop_shows_the_survey_again(tmp_path):
    lap, centre = tmp_path / "lap.db", tmp_path / "centre.db"
    (sid,) = laptop(lap, "Clinic")
    with Store.open(lap) as st:
        st.hide_survey(sid)
    with Store.open(centre) as st:
        merge_into(st, [lap])
        assert _visible(st) == []
        st.set_value(sid, "storeys[0].notes", "x")
        st.undo_last(sid)                          # diverged logs, the same text
    with Store.open(lap) as st:
        st.undo_last(sid)                          # the hide taken back
    with Store.open(centre) as st:
        merge_into(st, [lap])
        assert _visible(st) == [sid]


def test_an_undo_on_a_laptop_retires_its_conflict_copy(tmp_path):
    lap, centre = tmp_path / "lap.db", tmp_path / "centre.db"
    (sid,) = laptop(lap, "Clinic")
    with Store.open(centre) as st:
        merge_into(st, [lap])
    with Store.open(lap) as st:
        st.set_value(sid, "storeys[0].readings[0].offset_mm", 30.0)
    with Store.open(centre) as st:
        st.set_value(sid, "storeys[0].notes", "centre note")
        st.undo_last(sid)                          # the centre's text is the original again
        (r,) = merge_into(st, [lap])
        assert r.conflicts == 1                    # 30 mm against the original: both kept
        assert len(_visible(st)) == 2
    with Store.open(lap) as st:
        st.undo_last(sid)                          # the inspector takes the 30 mm back
    with Store.open(centre) as st:
        (r,) = merge_into(st, [lap])
        assert r.conflicts == 0
        assert _visible(st) == [sid]               # no conflict left to show
        assert not any(row.conflict for row in st.list_surveys())
        assert _offset(st, sid) != 30.0


def test_area_to_laptop_to_area_adds_no_copy_of_the_centres_own_text(tmp_path):
    lap, area = tmp_path / "lap.db", tmp_path / "area.db"
    (sid,) = laptop(lap, "Clinic")
    with Store.open(area) as st:
        merge_into(st, [lap])
        st.set_value(sid, "storeys[0].readings[0].offset_mm", 5.0)      # the centre's edit
    with Store.open(lap) as st:
        st.set_value(sid, "storeys[0].readings[0].offset_mm", 9.0)      # the laptop's edit
        (r,) = merge_into(st, [area])                                     # area -> laptop
        assert r.conflicts == 1
    with Store.open(area) as st:
        (r,) = merge_into(st, [lap])                                      # laptop -> area
        rows = st.list_surveys()
        texts = {}
        for row in rows:
            doc = st.survey_json(row.id)
            doc["id"] = sid
            texts.setdefault(str(sorted(doc.items())), []).append(row.id)
        assert all(len(ids) == 1 for ids in texts.values()), texts   # no two identical texts
        assert len(rows) == 2 and r.conflicts == 1                        # 5 mm and 9 mm
        assert sorted(_offset(st, x.id) or 0 for x in rows) == [5.0, 9.0]
        before = _changes(area)
    with Store.open(area) as st:
        (r,) = merge_into(st, [lap])
        assert r.added == 0 and r.conflicts == 0
    assert _changes(area) == before


def test_each_source_is_reported_as_it_commits(tmp_path):
    a, b, centre = tmp_path / "a.db", tmp_path / "b.db", tmp_path / "centre.db"
    laptop(a, "Clinic")
    laptop(b, "School")
    seen: list[tuple[str, int]] = []

    def each(r):
        # called after the source's transaction committed: another connection sees it
        c = sqlite3.connect(centre)
        n = c.execute("SELECT count(*) FROM surveys").fetchone()[0]
        c.close()
        seen.append((Path(r.source).name, n))

    with Store.open(centre) as st:
        merge_into(st, [a, b], each=each)
    assert seen == [("a.db", 1), ("b.db", 2)]
