"""Snapshots at 80×24 of the survey list, a storey being logged and the verdict.

Clock, cursor blink and seeds are fixed (conftest). Update with `pytest --snapshot-update`
after a deliberate change of layout, and look at the SVGs before committing them.
"""

from __future__ import annotations

from pathlib import Path

from drive import settle, type_in

SID = "11111111-1111-4111-8111-111111111111"


def test_survey_list(db: Path, make_app, snap_compare) -> None:
    async def before(pilot) -> None:
        await settle(pilot)

    assert snap_compare(make_app(db), terminal_size=(80, 24), run_before=before)


def test_storey_being_logged(db: Path, make_app, snap_compare) -> None:
    async def before(pilot) -> None:
        await settle(pilot)
        await type_in(pilot, "r-where", "stair core", enter=False)
        await type_in(pilot, "r-offset", "4.5", enter=False)
        await type_in(pilot, "r-gauge", "1500", enter=False)

    assert snap_compare(make_app(db, open_survey=SID), terminal_size=(80, 24),
                        run_before=before)


def test_verdict(db: Path, make_app, snap_compare) -> None:
    async def before(pilot) -> None:
        await settle(pilot)
        await pilot.press("f2")
        await settle(pilot)

    assert snap_compare(make_app(db, open_survey=SID), terminal_size=(80, 24),
                        run_before=before)
