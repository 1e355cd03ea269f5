"""The whole path through the screens, as an inspector walks it: new survey, storeys,
readings, a member group, the tier moving from occupy to hold as a reading crosses the IO
figure, a hazard, the signed report written and verified."""

from __future__ import annotations

from pathlib import Path

from conftest import SID
from drive import open_tab, pick, press, started, type_in, verdict_text

from triage.report.keys import new_key
from triage.report.verify import verify_report
from triage.store import Store
from triage.ui.screens.new_survey import NewSurveyScreen
from triage.ui.screens.report import ReportScreen
from triage.ui.screens.survey import SurveyScreen


async def test_new_survey_to_signed_report(tmp_path: Path, make_app) -> None:
    db = tmp_path / "fresh.db"
    app = make_app(db)
    async with started(app) as pilot:
        await press(pilot, "ctrl+n")
        assert isinstance(app.screen, NewSurveyScreen)
        await type_in(pilot, "f-name", "Reef Street Library")
        await type_in(pilot, "f-address", "12 Reef Street, Kowhai Bay")
        await type_in(pilot, "f-above", "2")
        await type_in(pilot, "f-height", "3.4")
        await type_in(pilot, "f-inspector", "Tess Tester")
        await type_in(pilot, "f-inspector-id", "T-1")
        await press(pilot, "ctrl+s")
        scr = app.screen
        assert isinstance(scr, SurveyScreen)
        assert [s.label for s in scr.survey.storeys] == ["G", "1"]
        assert scr.storey.label == "G"
        assert "Reef Street Library" in str(scr.query_one("#survey-title").render())

        # storey G, a reading in x: 3 mm over 2 m is 0.15%, under the IO figure 0.20%
        await type_in(pilot, "r-offset", "3", enter=False)
        await type_in(pilot, "r-gauge", "2000", enter=False)
        assert "drift ratio 0.15% (x)" in str(scr.query_one("#readings-pane").drift_line.render())
        await press(pilot, "enter")
        assert scr.survey.storeys[0].readings[0].offset_mm == 3.0
        assert "✓ saved" in str(scr.query_one("#readings-pane").note.render())
        assert "0.15%" in str(scr.query_one("#readings-pane").table.get_row_at(0))
        # the gauge is remembered for the next reading
        assert scr.query_one("#r-gauge").text == "2000"
        assert verdict_text(pilot).startswith("○ occupy")
        assert "indicative" in verdict_text(pilot)
        assert "engineer of record" in verdict_text(pilot)

        # a member group: twelve sound columns
        await press(pilot, "f7")
        await type_in(pilot, "m-count", "12")
        assert scr.survey.storeys[0].members[0].count == 12
        assert "none" in str(scr.query_one("#members-pane").table.get_row_at(0))

        # edit the reading: 5 mm is 0.25%, over IO: the tier goes to hold on screen
        pane = await open_tab(pilot, "f6", "readings-pane")
        pane.table.focus()
        pane.table.move_cursor(row=0)
        await press(pilot, "enter")
        assert pane.editing == 0
        f = await type_in(pilot, "r-offset", "5")
        assert "✓ saved" in f.status_text
        assert verdict_text(pilot).startswith("◐ hold")
        assert "level LS" in verdict_text(pilot)
        with Store.open(db) as st:
            sid = scr.survey_id
            assert st.load_survey(sid).storeys[0].readings[0].offset_mm == 5.0
            assert st.load_assessment(sid).tier == "hold"

        # a hazard: a parapet 9 m up; its keep-out zone comes back from the engine
        await press(pilot, "f8")
        await pick(pilot, "h-kind", "falling_hazard")
        await type_in(pilot, "h-where", "north parapet", enter=False)
        await type_in(pilot, "h-height", "9")
        assert scr.survey.hazards[0].kind == "falling_hazard"
        row = scr.query_one("#hazards-pane").table.get_row_at(0)
        assert "9 m" in row[5]

        # issue the report, signed with a passphrase-protected key
        key, _ = new_key("Tess Tester", "T-1", tmp_path / "tess.key", "pass phrase 1")
        await press(pilot, "f4")
        assert isinstance(app.screen, ReportScreen)
        await type_in(pilot, "r-key", str(tmp_path / "tess.key"), enter=False)
        pw = await type_in(pilot, "r-pass", "pass phrase 1", enter=False)
        assert pw.input.password  # never echoed
        out = tmp_path / "library.pdf"
        await type_in(pilot, "r-out", str(out), enter=False)
        await press(pilot, "ctrl+s")
        result = str(app.screen.query_one("#report-result").render())
        assert str(out) in result
        assert key.fingerprint in result
        assert out.exists()
        v = verify_report(out, expect=key.fingerprint)
        assert v.code == 0, v.message
        await press(pilot, "escape")
        assert "report issued" in str(app.screen.query_one("#survey-title").render())

        # an edit after the report shows on screen
        await press(pilot, "f5")
        await type_in(pilot, "s-notes", "stair cracked at landing")
        assert "edited since its report" in str(app.screen.query_one("#survey-title").render())


async def test_unsigned_report_is_labelled(tmp_path: Path, db: Path, make_app) -> None:
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        await press(pilot, "f4")
        out = tmp_path / "plain.pdf"
        await type_in(pilot, "r-key", "", enter=False)
        await type_in(pilot, "r-out", str(out), enter=False)
        await press(pilot, "ctrl+s")
        result = str(app.screen.query_one("#report-result").render())
        assert "UNSIGNED" in result
        assert out.exists()
        assert verify_report(out).code == 3


async def test_wrong_passphrase_writes_nothing(tmp_path: Path, db: Path, make_app) -> None:
    new_key("Tess Tester", "T-1", tmp_path / "t.key", "right one")
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        await press(pilot, "f4")
        await type_in(pilot, "r-key", str(tmp_path / "t.key"), enter=False)
        pw = await type_in(pilot, "r-pass", "wrong one", enter=False)
        out = tmp_path / "never.pdf"
        await type_in(pilot, "r-out", str(out), enter=False)
        await press(pilot, "ctrl+s")
        assert "wrong passphrase" in pw.status_text
        assert "not written" in str(app.screen.query_one("#report-result").render())
        assert "wrong one" not in str(app.screen.query_one("#report-result").render())
    assert not out.exists()
    with Store.open(db, refresh=False) as st:
        assert st.survey_row(SID).reported_revision is None
