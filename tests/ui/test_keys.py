"""No key is lost or misplaced: bursts of keys, posted all at once, land in order.

`pilot.press` waits for idle after each key, so it cannot show a key landing in the wrong
field; these tests post every key of a burst before the app takes the first off its queue.
"""

from __future__ import annotations

from pathlib import Path

from conftest import SID
from drive import burst, field, press, settle, started

from triage.store import Store


async def test_name_tab_id_typed_without_pause(db: Path, make_app) -> None:
    app = make_app(db)
    async with started(app) as pilot:
        await press(pilot, "ctrl+n")
        field(pilot, "f-inspector").input.value = ""
        field(pilot, "f-inspector-id").input.value = ""
        field(pilot, "f-inspector").focus_input()
        await settle(pilot)
        await burst(pilot, "Ana Rewi", "<tab>", "NZ-42", "<tab>")
        assert field(pilot, "f-inspector").text == "Ana Rewi"
        assert field(pilot, "f-inspector-id").text == "NZ-42"


async def test_readings_typed_ahead_each_land_in_their_field(db: Path, make_app) -> None:
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        scr = app.screen
        before = len(scr.survey.storeys[0].readings)
        field(pilot, "r-offset").focus_input()
        await settle(pilot)
        # offset, Tab, where, Tab, gauge, Enter adds; the next reading follows at once
        await burst(pilot, "4.5", "<tab>", "C1", "<tab>", "1500", "<enter>",
                    "6", "<tab>", "C2", "<enter>")
    with Store.open(db, refresh=False) as st:
        rs = st.load_survey(SID).storeys[0].readings
    new = rs[before:]
    assert [(r.offset_mm, r.where, r.gauge_mm) for r in new] == [
        (4.5, "C1", 1500.0), (6.0, "C2", 1500.0)]  # the gauge kept for the next reading


async def test_down_after_ticking_a_sign_moves_on(db: Path, make_app) -> None:
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        await burst(pilot, "<f7>")
        pane = app.screen.query_one("#members-pane")
        # edit the group in the table (Enter on its row), then go to the sign list
        pane.table.focus()
        await settle(pilot)
        await burst(pilot, "<enter>")
        assert pane.editing == 0
        pane.signs.checks.focus()
        await settle(pilot)
        pane.signs.checks.highlighted = 0
        first = [str(o.value) for o in pane.signs.checks.options][:2]
        await burst(pilot, "<space>", "<down>", "<space>")
        assert pane.signs.value() == first
        assert pane.signs.checks.highlighted == 1
    with Store.open(db, refresh=False) as st:
        assert list(st.load_survey(SID).storeys[0].members[0].signs) == first


async def test_enter_on_a_row_then_typing_goes_to_its_form(db: Path, make_app) -> None:
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        pane = app.screen.query_one("#readings-pane")
        pane.table.focus()
        pane.table.move_cursor(row=0)
        await settle(pilot)
        # Down to the second reading, Enter edits it, then the offset is typed over
        await burst(pilot, "<down>", "<enter>", "9", "<tab>")
        assert pane.editing == 1
    with Store.open(db, refresh=False) as st:
        rs = st.load_survey(SID).storeys[0].readings
    assert rs[1].offset_mm == 9.0 and rs[0].offset_mm == 2.0


async def test_f_key_then_typing_goes_to_the_new_tab(db: Path, make_app) -> None:
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        # the cursor on the kind: a letter picks it, Tab goes on to the count
        await burst(pilot, "<f7>", "w", "<tab>", "3", "<enter>")
        pane = app.screen.query_one("#members-pane")
        assert pane.form["count"].text == "1"  # ready for the next group, at its default count
        assert app.focused is pane.form["kind"].select  # on the kind again, for the next
    with Store.open(db, refresh=False) as st:
        ms = st.load_survey(SID).storeys[0].members
    assert (ms[-1].kind, ms[-1].count) == ("wall", 3)


async def test_open_from_the_list_then_typing(db: Path, make_app) -> None:
    app = make_app(db)
    async with started(app) as pilot:
        # the list starts on the newest survey; Down to the other, open, type a reading
        await burst(pilot, "Bakery", "<enter>", "5", "<tab>", "<tab>", "2000", "<enter>")
        assert app.screen.survey_id == SID
    with Store.open(db, refresh=False) as st:
        r = st.load_survey(SID).storeys[0].readings[-1]
    assert (r.offset_mm, r.gauge_mm) == (5.0, 2000.0)


async def test_paste_lands_in_order(db: Path, make_app) -> None:
    from textual import events

    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        before = len(app.screen.survey.storeys[0].readings)
        field(pilot, "r-offset").focus_input()
        await settle(pilot)
        for ev in (events.Paste("12.5"), "tab", events.Paste("north-west corner"), "tab",
                   events.Paste("2500"), "enter"):
            if isinstance(ev, str):
                from drive import key_event

                ev = key_event(ev)
            ev.set_sender(app)
            app.post_message(ev)
        await settle(pilot)
    with Store.open(db, refresh=False) as st:
        r = st.load_survey(SID).storeys[0].readings
    assert len(r) == before + 1
    assert (r[-1].offset_mm, r[-1].gauge_mm, r[-1].where) == (12.5, 2500.0, "north-west corner")
