"""Late messages: a list's message about a place in it, acted on after keys typed ahead have
changed the list, must not act on the wrong item (or past the end of the list).

Each test posts its keys in one burst (`drive.burst`): nothing runs between the keys but what
the app does as it takes each one off its queue, as when the keys come faster than the app.
"""

from __future__ import annotations

from pathlib import Path

from conftest import SID, URM
from drive import burst, settle, started

from triage.store import Store


async def _open_pick(pilot, select, index: int) -> None:
    """Open a pick list and highlight the choice at `index`."""
    select.focus()
    await settle(pilot)
    await burst(pilot, "<space>")
    assert select.expanded
    overlay = select.query_one("SelectOverlay")
    overlay.highlighted = index
    await settle(pilot)


async def test_a_pick_then_a_storey_key_picks_from_the_list_it_was_made_in(
        db: Path, make_app) -> None:
    with Store.open(db, refresh=False) as st:  # storey G: three owners; storey 1: two
        st.add_item(SID, "storeys[0].members", {"kind": "beam", "count": 4}, "Tess Tester")
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        await burst(pilot, "<f9>")
        pane = app.screen.query_one("#photos-pane")
        of = pane.of.select
        assert [v for _, v in of._options] == ["storey", "members[0]", "members[1]"]
        await _open_pick(pilot, of, 2)
        # Enter picks G's second member group; PgUp goes up a storey before the pick's
        # message (its place, 2, in G's list) would have come back: storey 1 lists two
        await burst(pilot, "<enter>", "<pageup>")
        assert app.is_running and app.screen.storey.label == "1"
        assert [v for _, v in of._options] == ["storey", "members[0]"]
        assert of.value == pane.target == "storey"  # G's group is not on storey 1
        assert not of.expanded and app.focused is of


async def test_a_kind_picked_with_enter_offers_its_signs_to_the_keys_typed_after(
        db: Path, make_app) -> None:
    app = make_app(db, open_survey=URM)   # masonry walls: a wall's signs differ
    async with started(app) as pilot:
        await burst(pilot, "<f7>")
        pane = app.screen.query_one("#members-pane")
        kind = pane.form["kind"].select
        assert kind.value == "column"
        await _open_pick(pilot, kind, [v for _, v in kind._options].index("wall"))
        # "out of plane" is a masonry wall's sign, not a column's: the letter o finds it only
        # in the wall's list, so that list must be there when the o is taken
        await burst(pilot, "<enter>", "<tab>", "2", "<tab>", "o", "<space>", "<enter>")
    with Store.open(db, refresh=False) as st:
        m = st.load_survey(URM).storeys[0].members[-1]
    assert (m.kind, m.count, list(m.signs)) == ("wall", 2, ["out_of_plane"])


async def test_a_change_undone_right_after_down_shows_the_highlighted_change(
        db: Path, make_app) -> None:
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        for offset in ("4.5", "5.5"):
            app.screen.query_one("#r-offset").focus_input()
            await settle(pilot)
            await burst(pilot, offset, "<tab>", "<tab>", "2000", "<enter>")
        await burst(pilot, "<f3>")
        log = app.screen.query_one("#log")
        # Down twice, then ctrl+z refills the log at once: the Down's messages arrive after
        await burst(pilot, "<down>", "<down>", "<ctrl+z>")
        row = [str(c) for c in log.get_row_at(log.cursor_row)]
        detail = str(app.screen.query_one("#history-detail").render())
        assert log.cursor_row == 0 and row[1].startswith("undone: removed reading")
        assert "undone: removed reading 4" in detail
