"""The screens' typed app: the database and the verdict thread are there once open, and
asked for before that they say so instead of handing out None."""

from __future__ import annotations

from pathlib import Path

import pytest
from conftest import SID
from drive import started

from triage.ui.app import TriageApp
from triage.ui.data import FieldData
from triage.ui.verdicts import VerdictThread


def test_before_the_database_is_open(db: Path, make_app) -> None:
    app = make_app(db)
    assert not app.is_open
    with pytest.raises(RuntimeError, match="not open yet"):
        _ = app.data
    with pytest.raises(RuntimeError, match="not open yet"):
        _ = app.verdicts


async def test_screens_and_panes_see_the_triage_app(db: Path, make_app) -> None:
    app = make_app(db, open_survey=SID)
    async with started(app):
        assert app.is_open
        assert isinstance(app.data, FieldData) and isinstance(app.verdicts, VerdictThread)
        scr = app.screen
        assert isinstance(scr.app, TriageApp) and scr.app is app
        pane = scr.query_one("#readings-pane")
        assert pane.app is app and pane.survey_screen is scr
