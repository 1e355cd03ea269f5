"""The photos tab: every photo of the storey with what it belongs to, after a restart too;
attaching copies the image into the database; a refused file is one line, nothing saved."""

from __future__ import annotations

import io
from pathlib import Path

from conftest import SID
from drive import open_tab, pick, press, started, type_in
from PIL import Image

from triage.store import Store


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
    async with started(app) as pilot:
        await press(pilot, "f9")
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
    async with started(again) as pilot:
        await press(pilot, "f9")
        assert [r[1] for r in _rows(again)] == ["storey G", "member group 1: column"]
        # a listed photo's caption is edited in place, saved as accepted
        pane = again.screen.query_one("#photos-pane")
        pane.table.move_cursor(row=1)
        pane.table.focus()
        await press(pilot, "enter")
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
    async with started(app) as pilot:
        await press(pilot, "f9")
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


def _attach_many(db: Path, tmp_path: Path, n: int) -> None:
    """`n` photos on storey G: the storey's, then member group 1's (a long owner and caption)."""
    with Store.open(db, refresh=False) as st:
        for i in range(n):
            f = _image(tmp_path / f"photo-{i:02d}-of-the-north-face.png")
            where = "storeys[0].photos" if i % 2 else "storeys[0].members[0].photos"
            st.attach_photo(SID, where, f, "diagonal crack above the lintel, north face",
                            "Tess Tester")


async def test_the_photos_tab_reads_whole_at_80_columns(db: Path, make_app,
                                                        tmp_path: Path) -> None:
    _attach_many(db, tmp_path, 9)  # more rows than the table shows: the pane scrolls
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        pane = await open_tab(pilot, "f9", "photos-pane")
        assert pane.table.display and not pane.empty.display
        assert pane.table.row_count == 9
        # every column, "kept" the last, is inside the table: nothing to scroll sideways
        assert pane.table.virtual_size.width <= pane.table.scrollable_content_region.width
        assert pane.table.max_scroll_x == 0
        assert str(pane.table.get_row_at(0)[4]) == "stored"
        # the heading is whole on its one line
        head = str(pane.head.render())
        assert head == "Photos of storey G, its member groups and hazards"
        assert len(head) <= pane.head.content_region.width


async def test_an_empty_photos_table_says_how_to_attach_one(db: Path, make_app,
                                                           tmp_path: Path) -> None:
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        pane = await open_tab(pilot, "f9", "photos-pane")
        assert not pane.table.display  # no table, so no highlighted blank row
        said = str(pane.empty.render())
        assert pane.empty.display and said.startswith("No photos of storey G")
        assert "JPEG or PNG" in said and "Enter" in said
        await type_in(pilot, "p-path", str(_image(tmp_path / "stair.png")))
        assert pane.table.display and not pane.empty.display and pane.table.row_count == 1
        await press(pilot, "pageup")  # storey 1 has no photos: the sentence names it
        assert app.screen.storey.label == "1"
        assert not pane.table.display and str(pane.empty.render()).startswith(
            "No photos of storey 1")
