"""Screens edits no other test reaches: a storey added below (ctrl+b), a reading and a member
group removed (ctrl+r, kept in the log, ctrl+z brings them back), and the new-survey form's
refusals (nothing stored)."""

from __future__ import annotations

from pathlib import Path

from conftest import SID
from drive import open_tab, press, started, type_in

from triage.store import Store
from triage.ui.screens.new_survey import NewSurveyScreen


def _saved(db: Path):
    with Store.open(db, refresh=False) as st:
        return st.load_survey(SID), st.hidden_items(SID)


def _note(pane) -> str:
    return str(pane.note.render())


async def test_storeys_added_below_are_basements_under_the_lowest(db: Path, make_app) -> None:
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        scr = app.screen
        await press(pilot, "ctrl+b")
        assert [s.label for s in scr.survey.storeys] == ["B1", "G", "1"]
        assert scr.storey_index == 0 and scr.storey.label == "B1"
        await press(pilot, "ctrl+b")
        assert scr.storey.label == "B2"
        # the storey list, top first, ends with the new lowest storey highlighted
        ol = scr.query_one("#storeys")
        assert ol.highlighted == ol.option_count - 1
    s, _ = _saved(db)
    assert [(st.label, st.below_grade, st.height_m) for st in s.storeys] == [
        ("B2", True, 3.2), ("B1", True, 3.2), ("G", False, 3.2), ("1", False, 3.2)]


async def test_a_reading_removed_is_kept_in_the_log_and_undone(db: Path, make_app) -> None:
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        pane = await open_tab(pilot, "f6", "readings-pane")
        await press(pilot, "ctrl+r")  # nothing picked yet: says how, removes nothing
        assert _note(pane) == "pick a reading in the table first (Enter or a click)"
        pane.table.move_cursor(row=1)
        pane.table.focus()
        await press(pilot, "enter")
        assert pane.editing == 1
        await press(pilot, "ctrl+r")
        assert _note(pane) == "✓ saved: reading 2 removed (ctrl+z undoes it)"
        assert pane.editing is None and pane.table.row_count == 1
        s, hidden = _saved(db)
        assert [(r.dir, r.offset_mm) for r in s.storeys[0].readings] == [("x", 2.0)]
        assert [(c.path, c.old["dir"], c.old["offset_mm"]) for c in hidden] == [
            ("storeys[0].readings[1]", "y", 3.0)]
        await press(pilot, "ctrl+z")
        assert pane.table.row_count == 2
    s, hidden = _saved(db)
    assert [(r.dir, r.offset_mm) for r in s.storeys[0].readings] == [("x", 2.0), ("y", 3.0)]
    assert hidden == []


async def test_a_member_group_removed_is_kept_in_the_log(db: Path, make_app) -> None:
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        pane = await open_tab(pilot, "f7", "members-pane")
        await type_in(pilot, "m-crack", "1.4", enter=False)
        await type_in(pilot, "m-count", "2")
        assert pane.table.row_count == 2
        pane.table.move_cursor(row=0)
        pane.table.focus()
        await press(pilot, "enter")
        await press(pilot, "ctrl+r")
        assert _note(pane) == "✓ saved: member group 1 removed (ctrl+z undoes it)"
        assert pane.table.row_count == 1
    s, hidden = _saved(db)
    assert [(m.count, m.crack_mm) for m in s.storeys[0].members] == [(2, 1.4)]
    assert [(c.path, c.old["count"]) for c in hidden] == [("storeys[0].members[0]", 12)]


def _count(db: Path) -> int:
    with Store.open(db, refresh=False) as st:
        return len(st.list_surveys())


async def test_the_new_survey_form_refuses_and_stores_nothing(db: Path, make_app) -> None:
    app = make_app(db)
    async with started(app) as pilot:
        await press(pilot, "ctrl+n")
        scr = app.screen
        assert isinstance(scr, NewSurveyScreen)
        status = scr.query_one("#new-status")

        def f(fid: str) -> str:
            return scr.query_one(f"#{fid}").status_text

        # a required field left empty
        await press(pilot, "ctrl+s")
        assert str(status.render()) == "not created: a field breaks its rule (shown beside it)"
        assert "✗" in f("f-name")
        await type_in(pilot, "f-name", "Reef Street Library")
        await type_in(pilot, "f-address", "12 Reef Street, Kōwhai Bay")
        # no storey above ground; a negative count below
        await type_in(pilot, "f-above", "0")
        await type_in(pilot, "f-below", "-1")
        await press(pilot, "ctrl+s")
        assert "at least one storey above ground" in f("f-above")
        assert "must not be negative" in f("f-below")
        assert isinstance(app.screen, NewSurveyScreen)
        # the counts put right, a latitude the survey format refuses: the store's rule,
        # beside the latitude
        await type_in(pilot, "f-above", "2")
        await type_in(pilot, "f-below", "0")
        await type_in(pilot, "f-lat", "95")
        await type_in(pilot, "f-lon", "174.1")
        await press(pilot, "ctrl+s")
        assert str(status.render()).startswith("not created: ")
        assert "90" in f("f-lat") and "✗" in f("f-lat")
        assert isinstance(app.screen, NewSurveyScreen)
        assert _count(db) == 2
        # Escape gives up: back to the list, still nothing stored
        await press(pilot, "escape")
        assert not isinstance(app.screen, NewSurveyScreen)
    assert _count(db) == 2
