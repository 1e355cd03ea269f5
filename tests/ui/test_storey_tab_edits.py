"""The storey tab's own keys: ctrl+n adds a storey on top (named after the one below), ctrl+r
removes the storey in view (never the last one), ctrl+z undoes, with nothing to undo said."""

from __future__ import annotations

from pathlib import Path

from conftest import SID
from drive import press, started

from triage.store import Store


def _said(app) -> list[str]:
    return app.said


def _listening(app):
    """Record every notification the app shows (they fade; the record stays)."""
    app.said = []
    real = app.notify

    def notify(message, *args, **kw):
        app.said.append(message)
        return real(message, *args, **kw)

    app.notify = notify
    return app


def _labels(db: Path) -> list[str]:
    with Store.open(db, refresh=False) as st:
        return [s.label for s in st.load_survey(SID).storeys]


async def test_a_storey_on_top_then_removed_then_undone(db: Path, make_app) -> None:
    app = _listening(make_app(db, open_survey=SID))
    async with started(app) as pilot:
        scr = app.screen
        await press(pilot, "f5")
        await press(pilot, "ctrl+n")
        assert [s.label for s in scr.survey.storeys] == ["G", "1", "2"]
        assert scr.storey.label == "2" and scr.storey.height_m == 3.2
        assert _labels(db) == ["G", "1", "2"]
        # the storey in view (storey 1, one down) removed
        await press(pilot, "pagedown")
        assert scr.storey.label == "1"
        await press(pilot, "ctrl+r")
        assert _labels(db) == ["G", "2"]
        assert "storey removed (ctrl+z undoes it)" in _said(app)
        await press(pilot, "ctrl+z")
        assert _labels(db) == ["G", "1", "2"]
        assert "undone: removed storey 2" in str(scr.query_one("#survey-title").render())


async def test_the_last_storey_stays_and_nothing_to_undo_is_said(tmp_path: Path,
                                                                make_app) -> None:
    import json

    from helpers import survey_dict

    from triage.model import parse_survey

    db = tmp_path / "one.db"
    d = survey_dict([{"label": "G", "height_m": 3.0, "readings": [], "members": []}],
                    name="Boat Shed")
    d["id"] = SID
    with Store.open(db) as st:
        st.add_survey(parse_survey(json.loads(json.dumps(d))))
    app = _listening(make_app(db, open_survey=SID))
    async with started(app) as pilot:
        await press(pilot, "ctrl+z")
        assert "nothing to undo" in _said(app)
        await press(pilot, "f5")
        await press(pilot, "ctrl+r")
        assert "a survey keeps at least one storey" in _said(app)
    assert _labels(db) == ["G"]
