"""Tick boxes: empty when unticked, a tick when ticked, told apart by the mark, not by colour
(so in monochrome too: NO_COLOR)."""

from __future__ import annotations

from pathlib import Path

import pytest
from conftest import SID
from drive import open_tab, press, started

from triage.ui.focus import focus_now
from triage.ui.widgets.ticks import TICKED


def _box(tick) -> str:
    """The three cells of a check box as drawn: left side, inside, right side."""
    return tick.box.render().plain[:3]


def _signs(pane) -> list[str]:
    """What each line of the sign list shows inside its box."""
    checks = pane.signs.checks
    return [checks.render_line(y).text[1] for y in range(checks.option_count)]


@pytest.mark.parametrize("no_color", [False, True])
async def test_unticked_is_empty_and_ticked_shows_a_tick(db: Path, make_app, no_color: bool,
                                                         monkeypatch: pytest.MonkeyPatch) -> None:
    if no_color:
        monkeypatch.setenv("NO_COLOR", "1")
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        assert app.no_color is no_color
        below = await open_tab(pilot, "f5", "s-below")
        assert _box(below) == "▐ ▌"  # unticked: nothing inside the box
        focus_now(below.box)
        await press(pilot, "space")
        assert below.value() is True and _box(below) == f"▐{TICKED}▌"
        assert below.status_text.startswith("✓ saved")  # the tick still asks to be saved
        await press(pilot, "space")
        assert below.value() is False and _box(below) == "▐ ▌"

        pane = await open_tab(pilot, "f7", "members-pane")
        assert set(_signs(pane)) == {" "}
        focus_now(pane.signs.checks)
        await press(pilot, "down", "down", "space")
        i = pane.signs.checks.highlighted
        assert pane.signs.value() == [str(pane.signs.checks.get_option_at_index(i).value)]
        shown = _signs(pane)
        assert shown[i] == TICKED and set(shown[:i] + shown[i + 1:]) == {" "}
