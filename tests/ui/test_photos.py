"""The photos tab: every photo of the storey with what it belongs to, after a restart too;
attaching copies the image into the database; a refused file is one line, nothing saved."""

from __future__ import annotations

import io
from pathlib import Path

from drive import pick, settle, type_in
from PIL import Image

from triage.store import Store

SID = "11111111-1111-4111-8111-111111111111"


def _image(path: Path, fmt: str = "PNG", size: tuple[int, int] = (40, 30)) -> Path:
    buf = io.BytesIO()
    Image.new("RGB", size, (120, 90, 60)).save(buf, format=fmt)
    path.write_bytes(buf.getvalue())
    return path


def _rows(app) -> list[list[str]]:
    pane = app.screen.query_one("#photos-pane")
    return [[str(c) for c in pane.table.get_row_at(i)] for i in range(pane.table.row_count)]


async def test_attached_photos_are_listed_with_their_owner_after_a_restart(
        db: Path, make_app, tmp_path: Path) -> None:
    first = _image(tmp_path / "stair.png")
    second = _image(tmp_path / "c1.jpg", "JPEG")
    app = make_app(db, open_survey=SID)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("f9")
        await settle(pilot)
        await type_in(pilot, "p-caption", "stair core", enter=False)
        await type_in(pilot, "p-path", str(first))
        await pick(pilot, "p-of", "members[0]")
        await type_in(pilot, "p-path", str(second))
        rows = _rows(app)
        assert [r[1] for r in rows] == ["storey G", "member group 1: column"]
        assert [r[2] for r in rows] == ["img/stair.png", "img/c1.jpg"]
        assert rows[0][3] == "stair core" and rows[0][4] == rows[1][4] == "stored"
    first.unlink()
    second.unlink()  # the files are no longer needed: the images are in the database
    with Store.open(db, refresh=False) as st:
        g = st.load_survey(SID).storeys[0]
        shas = [g.photos[0].sha256, g.members[0].photos[0].sha256]
        assert all(sha and st.photo_bytes(sha) for sha in shas)
    again = make_app(db, open_survey=SID)
    async with again.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("f9")
        await settle(pilot)
        assert [r[1] for r in _rows(again)] == ["storey G", "member group 1: column"]
        # a listed photo's caption is edited in place, saved as accepted
        pane = again.screen.query_one("#photos-pane")
        pane.table.move_cursor(row=1)
        pane.table.focus()
        await pilot.press("enter")
        await settle(pilot)
        await type_in(pilot, "p-caption", "column C1 spalled")
        assert pane.form["path"].input.disabled
    with Store.open(db, refresh=False) as st:
        assert st.load_survey(SID).storeys[0].members[0].photos[0].caption == \
            "column C1 spalled"


async def test_a_refused_file_is_one_line_and_nothing_is_saved(db: Path, make_app,
                                                              tmp_path: Path) -> None:
    gif = _image(tmp_path / "crack.gif", "GIF")
    big = tmp_path / "huge.png"
    big.write_bytes(b"\x89PNG\r\n\x1a\n" + b"\0" * 20_000_000)
    with Store.open(db, refresh=False) as st:
        before = st.revision(SID)
    app = make_app(db, open_survey=SID)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("f9")
        await settle(pilot)
        f = await type_in(pilot, "p-path", str(gif))
        assert f.status_text.startswith("✗ not saved: ")
        assert "not a JPEG or PNG" in f.status_text and "\n" not in f.status_text
        f = await type_in(pilot, "p-path", str(big))
        assert "20,000,000-byte" in f.status_text and "\n" not in f.status_text
        f = await type_in(pilot, "p-path", str(tmp_path / "none.jpg"))
        assert "no such file" in f.status_text
        assert _rows(app) == []
    with Store.open(db, refresh=False) as st:
        assert st.revision(SID) == before
        assert st.load_survey(SID).storeys[0].photos == ()
