"""Snapshot at 80×24 of a masonry wall group being logged with its FEMA 306 mode and severity.

The state the capacity fields add to the member form: the fields in words and what the picks
mean under the class line. Clock, blink and seeds fixed (conftest); update with
`pytest --snapshot-update` after a deliberate change and look at the SVG first.
"""

from __future__ import annotations

from pathlib import Path

from conftest import URM
from drive import pick, press, settle, type_in


def test_wall_group_with_mode_and_severity(db: Path, make_app, snap_compare) -> None:
    async def before(pilot) -> None:
        await settle(pilot)
        await press(pilot, "f7")
        await pick(pilot, "m-kind", "wall")
        await type_in(pilot, "m-count", "4", enter=False)
        await pick(pilot, "m-mode", "diagonal_tension")
        sev = await pick(pilot, "m-severity", "moderate")
        sev.select.focus()   # the form scrolled to the fields and the line saying what they mean
        await settle(pilot)

    assert snap_compare(make_app(db, open_survey=URM), terminal_size=(80, 24),
                        run_before=before)
