"""Member groups: the class and eta shown once a group is saved; signs from the forms; an
override of the class needs its reason first."""

from __future__ import annotations

from pathlib import Path

from conftest import SID
from drive import pick, press, settle, started, type_in

from triage.store import Store


async def test_group_class_eta_signs_override(db: Path, make_app) -> None:
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        await press(pilot, "f7")
        scr = app.screen
        pane = scr.query_one("#members-pane")
        # the check list offers the concrete column signs of the rc_frame form
        offered = [str(o.value) for o in pane.signs.checks.options]
        assert "cover_spalling" in offered and "bar_buckled" in offered
        assert "brace_buckled" not in offered  # a steel sign is not on a concrete column
        await type_in(pilot, "m-crack", "1.4", enter=False)
        await type_in(pilot, "m-ref", "C3", enter=False)
        await type_in(pilot, "m-count", "1")
        assert len(scr.survey.storeys[0].members) == 2
        row = [str(c) for c in pane.table.get_row_at(1)]
        assert row[1] == "C3" and row[2] == "column" and row[6] == "III"
        assert row[7] == "crack width"  # how the class was set, in words
        # edit it: tick a sign, which is saved at once
        pane.table.move_cursor(row=1)
        pane.table.focus()
        await press(pilot, "enter")
        assert pane.editing == 1
        pane.signs.checks.select("bar_exposed")
        await settle(pilot)
        assert "✓ saved" in pane.signs.status_text
        assert str(pane.table.get_row_at(1)[6]) == "IV"
        assert "class IV (signs seen) · eta" in str(pane.class_line.render())
        # a class set by hand without a reason is refused, with the rule
        c = await pick(pilot, "m-class", "II")
        assert "override reason" in c.status_text and "✗" in c.status_text
        assert "_" not in c.status_text  # the rule in words, no key
        # the reason saved, the class waiting for it is saved too
        await type_in(pilot, "m-reason", "engineer's reading of the full panel")
        await settle(pilot)
        assert "✓ saved" in c.status_text
        assert str(pane.table.get_row_at(1)[6]) == "II"
        assert str(pane.table.get_row_at(1)[7]) == "set by hand"
    with Store.open(db, refresh=False) as st:
        m = st.load_survey(SID).storeys[0].members[1]
        assert m.signs == ("bar_exposed",) and m.damage_class == "II"
        assert m.override_reason == "engineer's reading of the full panel"
