"""Themes: dark, light and high contrast, switched with F12 and remembered outside the database;
and a snapshot at 80 x 24 of every screen in each theme."""

from __future__ import annotations

import json
import os
from pathlib import Path

import pytest
from conftest import SID
from drive import press, settle, started, type_in

from triage.ui.app import THEMES


async def test_f12_switches_and_remembers_the_theme(db: Path, make_app) -> None:
    home = Path(os.environ["TRIAGE_HOME"])
    app = make_app(db)
    async with started(app) as pilot:
        assert app.theme == "triage"
        await press(pilot, "f12")
        assert app.theme == "triage-light"
    assert json.loads((home / "settings.json").read_text())["theme"] == "triage-light"
    again = make_app(db)
    async with started(again) as pilot:
        assert again.theme == "triage-light"
        await press(pilot, "f12", "f12")
        assert again.theme == "triage"  # round: light, high contrast, dark


def _start(theme: str) -> None:
    home = Path(os.environ["TRIAGE_HOME"])
    home.mkdir(parents=True, exist_ok=True)
    (home / "settings.json").write_text(json.dumps({"theme": theme}))


async def _to_list(pilot) -> None:
    await settle(pilot)


async def _to_new(pilot) -> None:
    await settle(pilot)
    await press(pilot, "ctrl+n")


async def _to_logging(pilot) -> None:
    await settle(pilot)
    await type_in(pilot, "r-offset", "4.5", enter=False)


async def _to_members(pilot) -> None:
    await settle(pilot)
    await press(pilot, "f7")


async def _to_storey_tab(pilot) -> None:
    await settle(pilot)
    await press(pilot, "f5")


async def _to_hazards(pilot) -> None:
    await settle(pilot)
    await press(pilot, "f8")


async def _to_photos(pilot) -> None:
    await settle(pilot)
    await press(pilot, "f9")


async def _to_survey_tab(pilot) -> None:
    await settle(pilot)
    await press(pilot, "f10")


async def _to_verdict(pilot) -> None:
    await settle(pilot)
    await press(pilot, "f2")


async def _to_history(pilot) -> None:
    await settle(pilot)
    await press(pilot, "f3")


async def _to_report(pilot) -> None:
    await settle(pilot)
    await press(pilot, "f4")


async def _to_help(pilot) -> None:
    await settle(pilot)
    await press(pilot, "f1")


SCREENS = {"list": (_to_list, False), "new-survey": (_to_new, False),
           "storey-tab": (_to_storey_tab, True), "readings": (_to_logging, True),
           "members": (_to_members, True), "hazards": (_to_hazards, True),
           "photos": (_to_photos, True),
           "survey-tab": (_to_survey_tab, True), "verdict": (_to_verdict, True),
           "history": (_to_history, True), "report": (_to_report, True),
           "help": (_to_help, True)}


@pytest.mark.parametrize("theme", list(THEMES))
@pytest.mark.parametrize("screen", list(SCREENS))
def test_every_screen_in_each_theme(theme: str, screen: str, db: Path, make_app,
                                    snap_compare) -> None:
    _start(theme)
    before, opened = SCREENS[screen]
    kw = {"report_dir": Path("/srv/reports")}  # shown on the report screen, never written
    app = make_app(db, open_survey=SID, **kw) if opened else make_app(db, **kw)
    assert snap_compare(app, terminal_size=(80, 24), run_before=before)
