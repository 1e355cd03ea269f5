"""The report screen before anything is written: the inspector confirmed there is saved to the
survey (and remembered), a refused inspector field shows its rule, a key path that is no file
and an output that is no PDF name are refused beside their fields, and nothing is written; a
survey edited since its report says so."""

from __future__ import annotations

from pathlib import Path

from conftest import SID
from drive import press, started, type_in

from triage.store import Store


async def test_inspector_confirmed_here_is_saved_to_the_survey(db: Path, make_app) -> None:
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        await press(pilot, "f4")
        name = await type_in(pilot, "r-inspector", "Aroha Ngāti")
        assert name.status_text.startswith("✓ saved")
        ident = await type_in(pilot, "r-inspector-id", "R-77")
        assert ident.status_text.startswith("✓ saved")
        # a name over its limit is refused beside the field, nothing saved
        long = await type_in(pilot, "r-inspector", "N" * 2001)
        assert "✗" in long.status_text and "2,000" in long.status_text
    with Store.open(db, refresh=False) as st:
        s = st.load_survey(SID)
        assert (s.inspection.inspector.name, s.inspection.inspector.id) == ("Aroha Ngāti",
                                                                            "R-77")
        assert st.settings_get("last_inspector_name") == "Aroha Ngāti"


async def test_no_key_file_and_no_pdf_name_are_refused_beside_the_field(tmp_path: Path,
                                                                       db: Path,
                                                                       make_app) -> None:
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        await press(pilot, "f4")
        scr = app.screen
        key = await type_in(pilot, "r-key", str(tmp_path / "no-such.key"), enter=False)
        await type_in(pilot, "r-out", str(tmp_path / "r.pdf"), enter=False)
        await press(pilot, "ctrl+s")
        assert "no key file there" in key.status_text
        await type_in(pilot, "r-key", "", enter=False)
        out = await type_in(pilot, "r-out", str(tmp_path / "report.txt"), enter=False)
        await press(pilot, "ctrl+s")
        assert "a file name ending .pdf" in out.status_text
        assert str(scr.query_one("#report-result").render()) == ""
    assert list(tmp_path.glob("*.pdf")) == [] and not (tmp_path / "report.txt").exists()
    with Store.open(db, refresh=False) as st:
        assert st.survey_row(SID).reported_revision is None


async def test_a_survey_edited_since_its_report_says_so(tmp_path: Path, db: Path,
                                                        make_app) -> None:
    with Store.open(db, refresh=False) as st:
        st.record_report(SID, st.revision(SID), str(tmp_path / "old.pdf"), None)
        st.set_value(SID, "storeys[0].notes", "cracks re-measured")
        rev = st.revision(SID)
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        await press(pilot, "f4")
        note = str(app.screen.query_one("#edited-note").render())
        assert note == (f"This survey was edited since its last report (revision {rev - 1}); "
                        f"a new report covers revision {rev}.")
