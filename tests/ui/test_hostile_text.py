"""Survey text on the screens goes through triage.safetext.visible: a name carrying a
clear-screen sequence, a window-title sequence, a bidi override or markup is shown as visible
escapes and plain text, on every screen, and nothing of it reaches the terminal raw."""

from __future__ import annotations

import html
import re
import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from drive import open_tab, press, started, type_in
from helpers import reading, storey, survey_dict

from triage.model import parse_survey
from triage.store import Store

SID = "33333333-3333-4333-8333-333333333333"
ESC = "\x1b[2J\x1b]0;owned\x07"
RAW = ("\x1b", "\x07", "\u202e")


def _hostile(path: Path) -> Path:
    d = survey_dict(
        [storey("G", [reading("x", 2.0, where=f"grid {ESC}B2"), reading("y", 3.0)],
                members=[{"kind": "column", "count": 4, "ref": f"C{ESC}"}],
                notes=f"note {ESC}", photos=[{"path": f"img/{ESC}.jpg",
                                              "caption": f"cap {ESC}"}]),
         storey(f"1{ESC}", [reading("x", 1.0)])],
        name=f"Bakery {ESC}\u202eyppucco [bold]x[/]",
        hazards=[{"kind": "falling_hazard", "where": f"parapet {ESC}",
                  "height_above_ground_m": 6.0}])
    d["id"] = SID
    d["building"]["address"] = f"5 Quay {ESC} Road"
    d["inspection"]["inspector"]["name"] = f"Tess {ESC}"
    with Store.open(path) as st:
        st.add_survey(parse_survey(d), f"who {ESC}", "test")
    return path


def _clean(app, where: str) -> str:
    """The screen's text, after checking that no raw control or bidi character is in it."""
    svg = app.export_screenshot()
    for ch in RAW:
        assert ch not in svg, (where, repr(ch))
    return html.unescape(re.sub(r"<[^>]+>", "", svg)).replace("\xa0", " ")


async def test_hostile_names_are_shown_as_escapes_on_every_screen(tmp_path: Path,
                                                                  make_app) -> None:
    db = _hostile(tmp_path / "hostile.db")
    app = make_app(db)
    async with started(app, (160, 50)) as pilot:
        svg = _clean(app, "list")
        assert "Bakery \\u001b[2J" in svg   # the column cuts the rest
        await press(pilot, "enter")
        svg = _clean(app, "survey")
        # the override and the markup shown, not applied
        assert "\\u0007\\u202eyppucco [bold]x[/]" in svg
        for key in ("f5", "f6", "f7", "f8", "f9", "f10"):
            await press(pilot, key)
            svg = _clean(app, key)
        await press(pilot, "f2")
        _clean(app, "verdict")
        await press(pilot, "escape")
        await press(pilot, "pageup")  # storey 1<ESC>...: its label in headings and lists
        svg = _clean(app, "storey 1")
        assert "1\\u001b[2J" in svg
        await press(pilot, "f3")
        _clean(app, "history")
        await press(pilot, "escape")
        await press(pilot, "f4")
        _clean(app, "report")
        await press(pilot, "f1")
        _clean(app, "help")


async def test_an_unchanged_hostile_field_is_not_saved_over(tmp_path: Path, make_app) -> None:
    db = _hostile(tmp_path / "hostile.db")
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        name = await open_tab(pilot, "f10", "v-name")
        assert name.text.startswith("Bakery \\u001b[2J")
        name.focus_input()
        await press(pilot, "tab")  # leave the field unchanged: nothing is saved
        await type_in(pilot, "v-use", "bakery")  # another field saved
    with Store.open(db) as st:
        s = st.load_survey(SID)
        assert s.building.name == f"Bakery {ESC}\u202eyppucco [bold]x[/]"
        assert s.building.use == "bakery"
