"""A value that breaks a rule shows the rule beside the field and leaves the database as it
was; what was already saved stays."""

from __future__ import annotations

from pathlib import Path

from conftest import SID
from drive import open_tab, press, started, type_in

from triage.store import Store


def snapshot_db(db: Path) -> tuple[int, str, int]:
    with Store.open(db, refresh=False) as st:
        return (st.revision(SID), st.load_survey(SID).canonical(), len(st.change_log(SID)))


async def test_negative_height_is_refused(db: Path, make_app) -> None:
    before = snapshot_db(db)
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        await press(pilot, "f5")
        f = await type_in(pilot, "s-height", "-3")
        assert f.status_text.startswith("✗ not saved")
        assert "greater than 0" in f.status_text
        assert f.text == "-3"  # what was typed stays, to be corrected
    assert snapshot_db(db) == before


async def test_crack_of_500_mm_is_refused(db: Path, make_app) -> None:
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        pane = await open_tab(pilot, "f7", "members-pane")
        pane.table.focus()
        await press(pilot, "enter")  # edit the storey's group of 12 columns
        assert pane.editing == 0
        before = snapshot_db(db)
        f = await type_in(pilot, "m-crack", "500")
        assert "✗ not saved" in f.status_text
        assert "less than or equal to 50" in f.status_text
        assert snapshot_db(db) == before
        # a good value in the same field is then saved
        f = await type_in(pilot, "m-crack", "0.4")
        assert "✓ saved" in f.status_text
    with Store.open(db, refresh=False) as st:
        assert st.load_survey(SID).storeys[0].members[0].crack_mm == 0.4


async def test_letters_in_a_number_field(db: Path, make_app) -> None:
    before = snapshot_db(db)
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        f = await type_in(pilot, "r-offset", "abc", enter=False)
        await type_in(pilot, "r-gauge", "2000")
        pane = app.screen.query_one("#readings-pane")
        assert "must be a number" in f.status_text
        assert len(pane.items()) == 2  # no reading added
        # in an existing reading, too
        pane.table.focus()
        await press(pilot, "enter")
        f = await type_in(pilot, "r-offset", "2,5x")
        assert "✗ not saved: must be a number in mm" in f.status_text
    assert snapshot_db(db) == before


async def test_new_survey_with_no_storeys_is_not_created(db: Path, make_app) -> None:
    before = snapshot_db(db)
    app = make_app(db)
    async with started(app) as pilot:
        await press(pilot, "ctrl+n")
        await type_in(pilot, "f-name", "Tide Gauge Hut")
        await type_in(pilot, "f-address", "Breakwater, Kowhai Bay")
        f = await type_in(pilot, "f-above", "0")
        await type_in(pilot, "f-height", "-2")
        await press(pilot, "ctrl+s")
        assert "at least one storey above ground" in f.status_text
        assert "not created" in str(app.screen.query_one("#new-status").render())
    with Store.open(db, refresh=False) as st:
        assert len(st.list_surveys()) == 2
    assert snapshot_db(db) == before
