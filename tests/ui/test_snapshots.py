"""Snapshots at 80×24 of the survey list, a storey being logged, its photos and the verdict.

Clock, cursor blink and seeds are fixed (conftest). Update with `pytest --snapshot-update`
after a deliberate change of layout, and look at the SVGs before committing them.
"""

from __future__ import annotations

import io
from pathlib import Path

from conftest import SID
from drive import press, settle, type_in
from PIL import Image

from triage.store import Store


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


def test_photos_listed(db: Path, make_app, snap_compare, tmp_path: Path) -> None:
    """Every column, "kept" the last, and the heading whole at 80 columns."""
    buf = io.BytesIO()
    Image.new("RGB", (40, 30), (120, 90, 60)).save(buf, format="PNG")
    with Store.open(db, refresh=False) as st:
        for name, where, caption in (
                ("stair-core.png", "storeys[0].photos", "stair core, east wall"),
                ("column-c3-north.png", "storeys[0].members[0].photos",
                 "spalled cover at the top of column C3")):
            (tmp_path / name).write_bytes(buf.getvalue())
            st.attach_photo(SID, where, tmp_path / name, caption, "Tess Tester")

    async def before(pilot) -> None:
        await settle(pilot)
        await press(pilot, "f9")

    assert snap_compare(make_app(db, open_survey=SID), terminal_size=(80, 24),
                        run_before=before)


def test_verdict(db: Path, make_app, snap_compare) -> None:
    async def before(pilot) -> None:
        await settle(pilot)
        await press(pilot, "f2")

    assert snap_compare(make_app(db, open_survey=SID), terminal_size=(80, 24),
                        run_before=before)
