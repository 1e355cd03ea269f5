"""Merge, the conflict copies: a copy moved on with its source, a copy retired when the source
comes back to the target's text, and the hidden flag carried only by hides and their undos."""

from __future__ import annotations

import uuid
from pathlib import Path

from tests.store.conftest import fetch, laptop
from triage.store import Store
from triage.store.merge import MergeResult, conflict_id, merge_into

OFFSET = "storeys[0].readings[0].offset_mm"


def _counts(r: MergeResult) -> tuple[int, int, int, int]:
    return r.added, r.updated, r.unchanged, r.conflicts


def _offset(st: Store, sid: str) -> float | None:
    return st.load_survey(sid).storeys[0].readings[0].offset_mm


def _with_a_copy(tmp_path: Path) -> tuple[Path, Path, str, str]:
    """A centre holding a laptop's survey (with a note of its own) and the laptop's 30 mm copy."""
    lap, centre = tmp_path / "lap.db", tmp_path / "centre.db"
    (sid,) = laptop(lap, "Clinic")
    with Store.open(centre) as st:
        merge_into(st, [lap])
    with Store.open(lap, who="lap") as st:
        st.set_value(sid, OFFSET, 30.0)
    with Store.open(centre) as st:
        st.set_value(sid, "storeys[0].notes", "centre note")
        (r,) = merge_into(st, [lap])
        assert _counts(r) == (0, 0, 0, 1)
        (cid,) = [x.id for x in st.list_surveys() if x.id != sid]
    return lap, centre, sid, cid


def test_merging_the_conflicts_source_again_reports_it_unchanged(tmp_path: Path):
    lap, centre, sid, cid = _with_a_copy(tmp_path)
    # the id the centre gives the same version too (docs/centre.md, Conflicts)
    (lap_doc,) = fetch(lap, "SELECT doc FROM surveys WHERE id = ?", sid)
    assert cid == conflict_id(sid, str(lap_doc[0]))
    with Store.open(centre) as st:
        before = st.survey_row(cid)
        (r,) = merge_into(st, [lap])
        assert _counts(r) == (0, 0, 1, 0)         # not "brought up to date": nothing moved
        assert st.survey_row(cid) == before


def test_a_copy_moves_on_with_its_source_to_the_sources_version(tmp_path: Path):
    lap, centre, sid, cid = _with_a_copy(tmp_path)
    with Store.open(lap, who="lap") as st:
        st.set_value(sid, OFFSET, 31.0)             # the laptop goes on from its 30 mm
        st.set_value(sid, "building.name", "Clinic annex")
        lap_rev = st.revision(sid)
        lap_row = st.survey_row(sid)
    with Store.open(centre) as st:
        (r,) = merge_into(st, [lap])
        assert _counts(r) == (0, 1, 0, 0)         # the copy brought forward, no new copy
        assert len(st.list_surveys()) == 2
        copy = st.survey_row(cid)
        assert copy is not None and lap_row is not None
        assert copy.revision == lap_rev == 4 and copy.building == "Clinic annex"
        assert (copy.tier, copy.level) == (lap_row.tier, lap_row.level)
        assert copy.conflict_of == sid and not copy.hidden and not copy.stale
        doc = st.survey_json(cid)
        assert doc["id"] == cid and "ID" not in doc and "XXidXX" not in doc
        assert _offset(st, cid) == 31.0 and _offset(st, sid) != 31.0
        assert [c.op for c in st.change_log(cid)] == ["set", "set", "set", "import"]
        assert st.survey_row(sid).building == "Clinic"   # the centre's own version untouched


def test_a_copy_retired_by_an_undo_is_hidden_by_a_logged_change_of_the_merge(tmp_path: Path):
    lap, centre, sid, cid = _with_a_copy(tmp_path)
    with Store.open(centre) as st:
        st.undo_last(sid)                            # the centre's note taken back
    with Store.open(lap, who="lap") as st:
        st.undo_last(sid)                            # the laptop's 30 mm taken back
    with Store.open(centre) as st:
        (r,) = merge_into(st, [lap])
        assert _counts(r) == (0, 1, 0, 0)
        copy = st.survey_row(cid)
        assert copy is not None and copy.hidden
        hide = st.change_log(cid)[0]
        assert (hide.op, hide.path, hide.old, hide.new, hide.who) == (
            "hide", "hidden", False, True, "merge")
        assert uuid.UUID(hide.uid).version == 4
        assert hide.revision == copy.revision == 3
        assert hide.at.endswith("+00:00")           # stamped in UTC, like every change
        # the laptop's undo is in the original's log too, so merging again changes nothing
        assert "undo" in [c.op for c in st.change_log(sid) if c.who == "lap"]
        n = len(st.change_log(sid)) + len(st.change_log(cid))
        (r,) = merge_into(st, [lap])
        assert _counts(r) == (0, 0, 1, 0)
        assert len(st.change_log(sid)) + len(st.change_log(cid)) == n


def test_a_second_laptops_edit_never_overwrites_the_first_laptops_copy(tmp_path: Path):
    a, b, centre = tmp_path / "ana.db", tmp_path / "ben.db", tmp_path / "centre.db"
    (sid,) = laptop(a, "Clinic")
    laptop(b, "Clinic")                              # the same survey file on both laptops
    with Store.open(centre) as st:
        merge_into(st, [a])
        st.set_value(sid, "storeys[0].notes", "centre note")
    with Store.open(b) as st:
        st.set_value(sid, OFFSET, 30.0)
    with Store.open(centre) as st:
        (r,) = merge_into(st, [b])
        assert r.conflicts == 1
    with Store.open(a) as st:
        st.set_value(sid, OFFSET, 3.0)
    with Store.open(centre) as st:
        (r,) = merge_into(st, [a])
        assert _counts(r) == (0, 0, 0, 1)
        every = {x.id: x for x in st.list_surveys()}
        assert len(every) == 3 and all(x.conflict_of == sid for i, x in every.items() if i != sid)
        offsets = sorted(_offset(st, i) or 0.0 for i in every if i != sid)
        assert offsets == [3.0, 30.0]                # ben's 30 mm kept beside ana's 3 mm


def _hidden_at_centre(tmp_path: Path) -> tuple[Path, Path, str]:
    """A laptop's survey merged into the centre and hidden there: the laptop, the centre, its id."""
    lap, centre = tmp_path / "lap.db", tmp_path / "centre.db"
    (sid,) = laptop(lap, "Clinic")
    with Store.open(centre) as st:
        merge_into(st, [lap])
        st.hide_survey(sid)
    return lap, centre, sid


def test_an_unrelated_undo_on_a_laptop_does_not_show_a_survey_hidden_at_the_centre(
        tmp_path: Path):
    lap, centre, sid = _hidden_at_centre(tmp_path)
    with Store.open(lap, who="lap") as st:
        st.set_value(sid, OFFSET, 30.0)
        st.undo_last(sid)                            # an undo of a reading, not of a hide
    with Store.open(centre) as st:
        (r,) = merge_into(st, [lap])
        assert _counts(r) == (0, 0, 1, 0)
        row = st.survey_row(sid)
        assert row is not None and row.hidden
        assert [c.op for c in st.change_log(sid)][:2] == ["undo", "set"]   # the log taken in


def test_a_hide_made_on_both_sides_is_unchanged_at_the_centre(tmp_path: Path):
    lap, centre, sid = _hidden_at_centre(tmp_path)
    with Store.open(lap, who="lap") as st:
        st.hide_survey(sid)
    with Store.open(centre) as st:
        (r,) = merge_into(st, [lap])
        assert _counts(r) == (0, 0, 1, 0)          # the flag was set already: no update
        row = st.survey_row(sid)
        assert row is not None and row.hidden
        hides = [c.who for c in st.change_log(sid) if c.op == "hide"]
        assert len(hides) == 2 and hides[0] == "lap"   # the laptop's hide taken into the log


def test_the_conflict_id_is_uuid5_of_the_survey_and_the_texts_digest():
    sid = "5b0e6f9c-8d0a-4f57-9a39-3c1c1f0d2e11"
    one, other = conflict_id(sid, '{"a": 1}'), conflict_id(sid, '{"a": 2}')
    assert one == conflict_id(sid, '{"a": 1}') and one != other
    assert uuid.UUID(one).version == 5
    assert conflict_id(sid, "Kōwhai") != conflict_id(sid, "Kowhai")


def test_a_copy_coming_back_from_a_laptop_is_counted_unchanged(tmp_path: Path):
    lap, area = tmp_path / "lap.db", tmp_path / "area.db"
    (sid,) = laptop(lap, "Clinic")
    with Store.open(area) as st:
        merge_into(st, [lap])
        st.set_value(sid, OFFSET, 5.0)              # the area's edit
    with Store.open(lap, who="lap") as st:
        st.set_value(sid, OFFSET, 9.0)              # the laptop's edit
        (r,) = merge_into(st, [area])                # the laptop keeps the area's 5 mm copy
        assert _counts(r) == (0, 0, 0, 1)
    with Store.open(area) as st:
        (r,) = merge_into(st, [lap])                 # that copy is the area's own text
        assert _counts(r) == (0, 0, 1, 1)            # it counts as unchanged, not added
        (r,) = merge_into(st, [lap])
        assert _counts(r) == (0, 0, 2, 0)            # the original and the copy, both known
        assert len(st.list_surveys()) == 2


def test_the_same_text_from_a_second_laptop_joins_the_copy_kept_of_it(tmp_path: Path):
    a, b, centre = tmp_path / "ana.db", tmp_path / "ben.db", tmp_path / "centre.db"
    (sid,) = laptop(a, "Clinic")
    laptop(b, "Clinic")
    with Store.open(centre) as st:
        merge_into(st, [a])
        st.set_value(sid, "storeys[0].notes", "centre note")
    for lap in (a, b):
        with Store.open(lap, who=lap.stem) as st:
            st.set_value(sid, OFFSET, 30.0)          # both laptops type the same 30 mm
    with Store.open(centre) as st:
        ra, rb = merge_into(st, [a, b])
        assert (_counts(ra), _counts(rb)) == ((0, 0, 0, 1), (0, 0, 1, 0))
        (cid,) = [x.id for x in st.list_surveys() if x.id != sid]
        assert sorted(c.who for c in st.change_log(cid) if c.op == "set") == ["ana", "ben"]
        n = len(st.change_log(cid))
        assert [_counts(r) for r in merge_into(st, [a, b])] == [(0, 0, 1, 0)] * 2
        assert len(st.change_log(cid)) == n
