"""The area picture's rows field by field: which survey stands for a building, its columns, the
conflict flag (two visible versions of one survey) and provisional (yes, no, not yet known)."""

from __future__ import annotations

from pathlib import Path

from tests.helpers import make, storey
from tests.store.conftest import sample
from triage.store import Store
from triage.store.area import building_rows
from triage.store.merge import merge_into


def _two_laptops_in_conflict(tmp_path: Path) -> tuple[Path, str]:
    a, b, area = tmp_path / "a.db", tmp_path / "b.db", tmp_path / "area.db"
    s = sample("Harbour Flats")
    sid = str(s.survey_id)
    for path, offset in ((a, 3.0), (b, 30.0)):
        with Store.open(path) as st:
            st.add_survey(s)
            st.set_value(sid, "storeys[0].readings[0].offset_mm", offset)
    with Store.open(area) as st:
        merge_into(st, [a, b])
    return area, sid


def test_every_column_of_a_row(tmp_path: Path):
    area, sid = _two_laptops_in_conflict(tmp_path)
    empty = make([storey("G", [], [])], name="Quay Stores")   # nothing logged: provisional
    with Store.open(area) as st:
        st.add_survey(empty)
        rows = {r.building: r for r in building_rows(st)}
        assert sorted(rows) == ["Harbour Flats", "Quay Stores"]
        flats, quay = rows["Harbour Flats"], rows["Quay Stores"]
        # the conflict: both versions visible, the original stands for the building
        assert flats.conflict is True and flats.surveys == 2 and flats.survey_id == sid
        assert quay.conflict is False and quay.surveys == 1
        assert quay.survey_id == str(empty.survey_id)
        assert quay.building_id == str(empty.building_id) != flats.building_id
        # the columns, each from its own field (no two alike here)
        assert (quay.building, quay.address, quay.inspector, quay.at) == (
            "Quay Stores", "1 Test Lane, Kōwhai Bay", "Tess Tester", "2026-11-29T09:00:00+13:00")
        assert (quay.lat, quay.lon, quay.located) == (None, None, False)
        assert (quay.provisional, quay.tier, quay.level, quay.governing_storey) == (
            True, "hold", None, None)
        assert (flats.provisional, flats.tier, flats.level, flats.governing_storey) == (
            False, "occupy", "IO", "2")
        # a survey whose assessment is not stored yet: provisional is not known
        st.conn.execute("UPDATE surveys SET provisional = NULL WHERE id = ?",
                        (str(empty.survey_id),))
        (quay,) = [r for r in building_rows(st) if r.building == "Quay Stores"]
        assert quay.provisional is None
        # hiding the copy resolves the conflict
        copy = next(r.id for r in st.list_surveys() if r.id != sid and r.building ==
                    "Harbour Flats")
        st.hide_survey(copy)
        flats = next(r for r in building_rows(st) if r.building == "Harbour Flats")
        assert flats.conflict is False and flats.surveys == 1


def test_a_hidden_original_leaves_no_conflict(tmp_path: Path):
    area, sid = _two_laptops_in_conflict(tmp_path)
    with Store.open(area) as st:
        st.hide_survey(sid)
        (row,) = building_rows(st)
        assert row.conflict is False and row.survey_id != sid and row.surveys == 1
