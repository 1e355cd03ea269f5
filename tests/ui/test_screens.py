"""The verdict beside the form on a wide terminal, the help screen, a refused database, and
the drift profile drawn in characters."""

from __future__ import annotations

from pathlib import Path

from conftest import SID
from drive import press, settle, started
from helpers import make, reading, storey

from triage.assess import CAUTION, assess
from triage.ui.screens.help import HelpScreen
from triage.ui.widgets.profile import drift_profile


async def test_wide_terminal_shows_full_verdict_beside(db: Path, make_app) -> None:
    app = make_app(db, open_survey=SID)
    async with started(app, (160, 40)) as pilot:
        side = app.screen.query_one("#side")
        assert side.display
        text = str(app.screen.query_one("#side-verdict").render())
        assert "Reasons" in text and "Drift profile" in text
        assert "from measurement uncertainty only" in text
        assert "Residual capacity R per storey" in text
        assert CAUTION.split(":")[0] in text
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        assert not app.screen.query_one("#side").display
        await press(pilot, "f2")
        assert "Drift profile" in str(app.screen.query_one("#verdict-text").render())


async def test_help_lists_the_keys_of_the_screen(db: Path, make_app) -> None:
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        await press(pilot, "f1")
        assert isinstance(app.screen, HelpScreen)
        text = str(app.screen.query_one("#help-text").render())
        for key in ("ctrl+z", "f2", "f4", "PgUp", "f6", "ctrl+q"):
            assert key in text
        await press(pilot, "escape")
        assert not isinstance(app.screen, HelpScreen)


async def test_plain_letters_do_not_act_in_a_text_field(db: Path, make_app) -> None:
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        scr = app.screen
        f = scr.query_one("#r-where")
        f.input.focus()
        await press(pilot, *"qnrz")
        assert app.screen is scr and f.text == "qnrz"


async def test_a_file_that_is_no_database_is_refused(tmp_path: Path, make_app) -> None:
    bad = tmp_path / "notes.db"
    bad.write_text("shopping list\n")
    app = make_app(bad)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
    assert app.return_code == 1
    assert app.refusal and "\n" not in app.refusal and str(bad) in app.refusal
    assert bad.read_text() == "shopping list\n"


def test_drift_profile_marks_and_bars() -> None:
    s = make([storey("G", [reading("x", 6.0), reading("y", 1.0)]),
              storey("1", [reading("x", 1.0)])])  # rc_frame both ways: IO 0.2 %, LS 1 %, CP 4 %
    lines = drift_profile(assess(s), width=72)
    assert lines[1].startswith("1 ") and lines[2].startswith("G ")  # top storey first
    g = lines[2]
    x_track, y_track = g[8:8 + 24], g[8 + 24 + 8:8 + 24 + 8 + 24]
    assert x_track.count("█") > y_track.count("█")  # 0.30% against 0.05%
    assert x_track.index("I") < x_track.index("L") < x_track.index("C")
    # 0.30% is over IO (0.20%) and under LS (1.0%): the bar runs past I, not to L
    assert x_track[x_track.index("I") + 1] == "█"
    assert x_track[x_track.index("L") - 1] == " "
    assert y_track[y_track.index("I") + 1] == " "
    assert "0.30%" in g and "0.05%" in g
    assert "—" in lines[1]  # storey 1 has no y reading
    assert "I 0.20% L 1.0% C 4.0%" in lines[3]


async def test_the_mouse_works(db: Path, make_app) -> None:
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        scr = app.screen
        await pilot.click("#--content-tab-members")
        await settle(pilot)
        assert scr.query_one("TabbedContent").active == "members"
        pane = scr.query_one("#members-pane")
        await pilot.click(pane.table, offset=(4, 1))  # the first group's row
        await settle(pilot)
        assert pane.editing == 0
        assert scr.query_one("#m-count").text == "12"
