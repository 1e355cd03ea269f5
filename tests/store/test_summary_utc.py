"""The latest survey of a building is the latest instant (UTC), not the latest local time text."""

from __future__ import annotations

from pathlib import Path

from tests.store.conftest import sample_dict
from triage.model import parse_survey
from triage.store import Store
from triage.store.area import building_rows


def test_latest_survey_is_chosen_by_utc_not_by_the_text(tmp_path: Path, cli):
    # Early at +13:00 reads later as text ("T10" > "T09") but is 2026-11-28T21:00Z; late at
    # +01:00 is 2026-11-29T08:30Z, eleven and a half hours after it. The late one is the latest.
    early = sample_dict("Tidewater Clinic")
    early["inspection"]["at"] = "2026-11-29T10:00:00+13:00"
    first = parse_survey(early)
    late = sample_dict("Tidewater Clinic")
    late["building"]["id"] = str(first.building_id)
    late["inspection"]["at"] = "2026-11-29T09:30:00+01:00"
    late["inspection"]["previous"] = str(first.survey_id)
    late["storeys"][1]["readings"][1]["offset_mm"] = 30.0    # 1.5%: evacuate, unlike the first
    second = parse_survey(late)
    assert early["inspection"]["at"] > late["inspection"]["at"]          # text order
    assert first.inspection.at < second.inspection.at                    # instant order
    db = tmp_path / "tz.db"
    with Store.open(db) as st:
        st.add_survey(second)   # stored in the opposite order, so the row id decides nothing
        st.add_survey(first)
        (row,) = building_rows(st)
        assert row.survey_id == str(second.survey_id) and row.surveys == 2
        assert row.at == "2026-11-29T09:30:00+01:00" and row.tier == "evacuate"
    code, out, _ = cli("--db", str(db), "summary")
    assert code == 0
    (line,) = [x for x in out.splitlines() if x.startswith("Tidewater")]
    assert "2026-11-29T09:30:00+01:00" in line and "evacuate" in line
