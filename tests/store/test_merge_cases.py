"""Merge, case by case: an identical edit on two sides, a report of another version, a conflict
whose original was hidden at the centre."""

from __future__ import annotations

from pathlib import Path

from tests.store.conftest import fetch, laptop
from triage.store import Store
from triage.store.area import building_rows
from triage.store.merge import merge_into

OFFSET = "storeys[0].readings[0].offset_mm"


def test_the_same_edit_on_two_laptops_is_no_conflict(tmp_path: Path):
    a, b, centre = tmp_path / "ana.db", tmp_path / "ben.db", tmp_path / "centre.db"
    (sid,) = laptop(a, "Clinic")
    laptop(b, "Clinic")   # the same survey file imported on both laptops
    for lap in (a, b):
        with Store.open(lap, who=lap.stem) as st:
            st.set_value(sid, OFFSET, 12.0)   # the same value, typed twice: two log entries
    with Store.open(centre) as st:
        ra, rb = merge_into(st, [a, b])
        assert (ra.added, rb.added, rb.conflicts, rb.unchanged) == (1, 0, 0, 1)
        (row,) = st.list_surveys(include_hidden=True)   # no second version kept
        assert row.id == sid and row.conflict_of is None and not row.conflict
        assert st.load_survey(sid).storeys[0].readings[0].offset_mm == 12.0
        (b_row,) = building_rows(st)
        assert not b_row.conflict and b_row.surveys == 1
        # both laptops' edits are in the log, so merging either again changes nothing
        assert sorted(c.who for c in st.change_log(sid) if c.op == "set") == ["ana", "ben"]
        again = merge_into(st, [a, b])
        assert [(r.added, r.updated, r.conflicts) for r in again] == [(0, 0, 0), (0, 0, 0)]
    assert fetch(centre, "SELECT count(*) FROM surveys") == [(1,)]


def test_a_report_of_another_version_is_not_attached(tmp_path: Path):
    lap, centre = tmp_path / "lap.db", tmp_path / "centre.db"
    clinic, school = laptop(lap, "Clinic", "School")
    with Store.open(centre) as st:
        merge_into(st, [lap])
        st.set_value(clinic, OFFSET, 3.0)                       # the centre's version 2
    with Store.open(lap, who="lap") as st:
        st.set_value(clinic, OFFSET, 30.0)                      # the laptop's version 2
        st.record_report(clinic, 2, "clinic-30mm.pdf", "aa")    # a report of the 30 mm text
        st.record_report(school, 1, "school.pdf", "bb")          # the text both sides hold
    with Store.open(centre) as st:
        (r,) = merge_into(st, [lap])
        assert r.conflicts == 1
        rows = {x.id: x for x in st.list_surveys()}
        assert rows[clinic].reported_revision is None           # the 3 mm text: no report
        assert rows[school].reported_revision == 1
    assert fetch(centre, "SELECT survey_id, path FROM reports ORDER BY path") == [
        (school, "school.pdf")]


def test_a_conflict_whose_original_was_hidden_keeps_it_hidden(tmp_path: Path):
    lap, centre = tmp_path / "lap.db", tmp_path / "centre.db"
    (sid,) = laptop(lap, "Clinic")
    with Store.open(centre) as st:
        merge_into(st, [lap])
        st.hide_survey(sid)                                     # withdrawn at the centre
    with Store.open(lap, who="lap") as st:
        st.set_value(sid, OFFSET, 30.0)                         # edited on the laptop meanwhile
    with Store.open(centre) as st:
        (r,) = merge_into(st, [lap])
        assert r.conflicts == 1
        every = {x.id: x for x in st.list_surveys(include_hidden=True)}
        assert len(every) == 2 and every[sid].hidden            # the original stays hidden
        (copy,) = [x for x in every.values() if x.id != sid]
        assert copy.conflict_of == sid and not copy.hidden
        # a hidden original is no conflict to resolve: nothing is flagged
        assert [(x.id, x.conflict) for x in st.list_surveys()] == [(copy.id, False)]
        (b_row,) = building_rows(st)
        assert b_row.survey_id == copy.id and not b_row.conflict
    assert fetch(centre, "SELECT hidden FROM surveys WHERE id = ?", sid) == [(1,)]
