"""The survey list: filter by typing, open, re-inspect, hide; the history screen's undo."""

from __future__ import annotations

from pathlib import Path

import pytest
from conftest import SID, URM
from drive import press, started, type_in, verdict_text

from triage.store import Store
from triage.ui.screens.history import HistoryScreen, describe_change, storey_labels
from triage.ui.screens.survey import SurveyScreen
from triage.ui.screens.survey_list import SurveyListScreen, _when


async def test_filter_by_typing_and_open(db: Path, make_app) -> None:
    app = make_app(db)
    async with started(app) as pilot:
        scr = app.screen
        assert isinstance(scr, SurveyListScreen)
        table = scr.query_one("#surveys")
        assert table.row_count == 2
        await press(pilot, *"post")
        assert table.row_count == 1
        assert "Old Post Office" in table.get_row_at(0)[0]
        await press(pilot, "enter")
        assert isinstance(app.screen, SurveyScreen)
        assert app.screen.survey.building.name == "Old Post Office"
        # nothing logged: hold, provisional, and the caution
        assert verdict_text(pilot).startswith("◐ hold")
        assert "provisional" in verdict_text(pilot)
        assert "indicative" in verdict_text(pilot)


async def test_times_are_shown_whole_with_their_offset(db: Path, make_app) -> None:
    # as recorded, to the minute, with the zone offset (never cut to 16 characters)
    app = make_app(db)
    async with started(app):
        table = app.screen.query_one("#surveys")
        times = sorted(str(table.get_row_at(i)[2]) for i in range(table.row_count))
        assert times == ["2026-11-29 08:15 +13:00", "2026-11-29 09:00 +13:00"]
    assert _when("2026-03-01T23:30:15-05:00") == "2026-03-01 23:30:15 -05:00"
    assert _when("2026-06-01T10:00:00Z") == "2026-06-01 10:00 +00:00"


async def test_the_short_code_of_a_paper_form_finds_the_earlier_survey(db: Path,
                                                                      make_app) -> None:
    app = make_app(db)
    async with started(app) as pilot:
        table = app.screen.query_one("#surveys")
        assert table.row_count == 2
        await press(pilot, *SID[:8])
        assert table.row_count == 1
        assert "Bakery" in table.get_row_at(0)[0]


async def test_reinspection_copies_storeys_clears_readings(db: Path, make_app) -> None:
    app = make_app(db)
    async with started(app) as pilot:
        await press(pilot, *"bakery")
        await press(pilot, "ctrl+r")
        scr = app.screen
        assert isinstance(scr, SurveyScreen)
        new = scr.survey
        assert str(new.inspection.previous) == SID
        assert [s.label for s in new.storeys] == ["G", "1"]
        assert all(not s.readings and not s.members for s in new.storeys)
        assert str(new.survey_id) != SID
        with Store.open(db, refresh=False) as st:
            old = st.load_survey(SID)
            assert new.building_id == old.building_id
            assert len(old.storeys[0].readings) == 2  # the earlier survey is untouched
            assert len(st.list_surveys()) == 3


async def test_hide_keeps_the_survey(db: Path, make_app) -> None:
    app = make_app(db)
    async with started(app) as pilot:
        await pilot.press(*"bakery")
        await press(pilot, "ctrl+t")
        table = app.screen.query_one("#surveys")
        assert table.row_count == 0
        await press(pilot, "ctrl+l")  # hidden ones too
        assert table.row_count == 1
        assert "h" in table.get_row_at(0)[4]
    with Store.open(db, refresh=False) as st:
        assert st.load_survey(SID).building.name == "Harbour Bakery"
        assert [r.id for r in st.list_surveys()] == [URM]


async def test_history_lists_changes_and_undoes(db: Path, make_app) -> None:
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        await press(pilot, "f5")
        await type_in(pilot, "s-height", "4.1")
        await press(pilot, "f3")
        assert isinstance(app.screen, HistoryScreen)
        log = app.screen.query_one("#log")
        newest = log.get_row_at(0)
        assert str(newest[1]) == "height (m), storey G"
        assert str(newest[2]) == "3.2 m" and str(newest[3]) == "4.1 m"
        detail = str(app.screen.query_one("#history-detail").render())
        assert "revision 2" in detail and "height (m), storey G: 3.2 m → 4.1 m" in detail
        await press(pilot, "ctrl+z")
        status = str(app.screen.query_one("#history-status").render())
        assert "undone height (m), storey G" in status
        assert str(log.get_row_at(0)[1]) == "undone: height (m), storey G"
        await press(pilot, "escape")
        assert app.screen.query_one("#s-height").text == "3.2"
    with Store.open(db, refresh=False) as st:
        assert st.load_survey(SID).storeys[0].height_m == 3.2


async def test_storey_walk_and_add(db: Path, make_app) -> None:
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        scr = app.screen
        assert scr.storey.label == "G"
        await press(pilot, "pageup")
        assert scr.storey.label == "1"
        assert len(scr.query_one("#readings-pane").items()) == 1
        await press(pilot, "f5", "ctrl+n")
        assert [s.label for s in scr.survey.storeys] == ["G", "1", "2"]
        assert scr.storey.label == "2"
        await press(pilot, "ctrl+z")
        assert [s.label for s in scr.survey.storeys] == ["G", "1"]
        title = str(scr.query_one("#survey-title").render())
        assert title.endswith("undone: added storey 2"), title


async def test_moving_away_saves_what_was_typed(db: Path, make_app) -> None:
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        scr = app.screen
        await type_in(pilot, "r-offset", "7", enter=False)  # a new reading, half typed
        await press(pilot, "f5")
        await type_in(pilot, "s-height", "4.4", enter=False)  # typed, not yet accepted
        await press(pilot, "pageup")
        assert scr.storey.label == "1"
        with Store.open(db, refresh=False) as st:
            assert st.load_survey(SID).storeys[0].height_m == 4.4
        assert scr.query_one("#s-height").text == "3.2"  # storey 1's own height
        assert scr.query_one("#r-offset").text == "7"  # the half-typed reading is kept
        # a value that breaks its rule holds the move until it is put right
        await type_in(pilot, "s-height", "-1", enter=False)
        await press(pilot, "pagedown")
        assert scr.storey.label == "1"
        assert "greater than 0" in scr.query_one("#s-height").status_text


LABELS = ["G", "1", "2"]


@pytest.mark.parametrize(("op", "path", "new", "words"), [
    ("set", "storeys[1].readings[0].offset_mm", 7.5, "offset (mm), storey 1, reading 1"),
    ("add", "storeys[0].readings[2]", {"dir": "x"}, "added reading 3, storey G"),
    ("remove", "storeys[2].members[1]", None, "removed member group 2, storey 2"),
    ("undo", "storeys[0].readings[2]", None, "undone: removed reading 3, storey G"),
    ("undo", "storeys[2].members[1]", {"kind": "wall"},
     "undone: put back member group 2, storey 2"),
    ("set", "building.location.lat", -41.2, "latitude (°), building, location"),
    ("set", "hazards[0]", {"kind": "collapse"}, "replaced hazard 1"),
    ("add", "storeys[0].members[1].photos[0]", {"path": "a.jpg"},
     "added photo 1, storey G, member group 2"),
    ("hide", "hidden", True, "survey hidden"),
    ("undo", "hidden", False, "survey shown again"),
    ("import", "", "{}", "survey imported"),
])
def test_changes_are_told_in_words_field_first(op, path, new, words) -> None:
    told = describe_change(op, path, new, LABELS)
    assert told == words
    assert "#" not in told and "_" not in told


def test_storeys_are_named_by_the_labels_they_had_then() -> None:
    from triage.store.rows import Change

    def ch(seq: int, op: str, path: str, old, new) -> Change:
        return Change(seq, f"u{seq}", "s", seq, op, path, old, new, "", "t", None)

    # newest first: a basement added under G (so G moved up), G relabelled from "0",
    # a storey "3" removed, a reading added on the then-lowest storey
    log = [ch(5, "add", "storeys[0]", None, {"label": "B1"}),
           ch(4, "set", "storeys[0].label", "0", "G"),
           ch(3, "remove", "storeys[2]", {"label": "3"}, None),
           ch(2, "add", "storeys[0].readings[0]", None, {"dir": "x"}),
           ch(1, "import", "", None, "{}")]
    labels = storey_labels(log, ["B1", "G", "1"])
    assert labels[5] == ["B1", "G", "1"]
    assert labels[4] == ["G", "1"]
    assert labels[3] == ["0", "1", "3"]   # told before it was removed
    assert labels[2] == ["0", "1", "3"]
    told = [describe_change(c.op, c.path, c.new, labels[c.seq]) for c in log[:4]]
    assert told == ["added storey B1", "label, storey G", "removed storey 3",
                    "added reading 1, storey 0"]
