"""`triage summary`: one row per building, its latest survey, from the stored assessments.

The GeoJSON checks follow RFC 7946 (The GeoJSON Format, IETF, August 2016): a
FeatureCollection has a "features" array (section 3.3); a Feature has "type", "geometry" and
"properties" (3.2), an "id" that is a string or number; a Point's "coordinates" is one position
(3.1.2), longitude then latitude in decimal degrees of WGS 84 (4, 9), and there is no "crs"
member (4).
"""

from __future__ import annotations

import csv
import io
import json
from numbers import Real
from pathlib import Path
from typing import Any

from tests.store.conftest import sample_dict
from triage.assess import CAUTION
from triage.model import parse_survey
from triage.store import Store


def _area(db: Path) -> dict[str, str]:
    """Three buildings: one inspected twice, one unlocated; returns building name -> id."""
    with Store.open(db) as st:
        clinic = sample_dict("Tidewater Clinic")
        clinic["building"]["location"] = {"lat": -41.2861, "lon": 174.7762}
        first = parse_survey(clinic)
        st.add_survey(first)
        again = sample_dict("Tidewater Clinic")
        again["building"]["id"] = str(first.building_id)
        again["building"]["location"] = {"lat": -41.2861, "lon": 174.7762}
        again["inspection"]["at"] = "2026-11-29T16:30:00+13:00"   # after the aftershock
        again["inspection"]["previous"] = str(first.survey_id)
        again["storeys"][1]["readings"][1]["offset_mm"] = 30.0    # 1.5%: now evacuate
        st.add_survey(parse_survey(again))
        school = sample_dict("Saltmarsh School")
        school["building"]["location"] = {"lat": -41.29, "lon": 174.78}
        school["storeys"][0]["access"] = "partial"
        st.add_survey(parse_survey(school))
        shed = sample_dict("Anchor Quay Shed")   # no location
        shed["storeys"][2]["readings"][0]["offset_mm"] = 9.0     # 0.45% in x: hold
        st.add_survey(parse_survey(shed))
        return {r.building: r.building_id for r in st.list_surveys()}


def test_text_has_one_row_per_building_the_latest_survey_and_counts(tmp_path, cli):
    db = tmp_path / "area.db"
    _area(db)
    code, out, _ = cli("--db", str(db), "summary")
    assert code == 0
    lines = out.splitlines()
    assert lines[0] == f"CAUTION: {CAUTION}"
    rows = [line for line in lines if line.startswith(("Tidewater", "Saltmarsh", "Anchor"))]
    assert len(rows) == 3
    clinic = next(r for r in rows if r.startswith("Tidewater"))
    assert "● evacuate" in clinic and "2026-11-29T16:30:00+13:00" in clinic
    assert "-41.28610,174.77620" in clinic
    school = next(r for r in rows if r.startswith("Saltmarsh"))
    assert "○ occupy" in school and "yes" in school   # provisional: partial access
    shed = next(r for r in rows if r.startswith("Anchor"))
    assert "◐ hold" in shed
    assert "3 buildings: ○ occupy 1, ◐ hold 1, ● evacuate 1, not assessed 0" in out
    assert lines[-1].endswith(CAUTION)


def test_the_summary_reads_stored_assessments_and_never_re_assesses(tmp_path, cli):
    db = tmp_path / "area.db"
    _area(db)
    with Store.open(db) as st:
        # Mark what is stored, without touching the surveys: the summary must show it.
        st.conn.execute("UPDATE surveys SET level = 'CP', gov_storey = 'Z9' "
                        "WHERE building = 'Saltmarsh School'")
    _code, out, _ = cli("--db", str(db), "summary")
    school = next(r for r in out.splitlines() if r.startswith("Saltmarsh"))
    assert "CP" in school and "Z9" in school


def test_csv_rows_and_the_caution_in_every_row(tmp_path, cli):
    db = tmp_path / "area.db"
    ids = _area(db)
    code, out, _ = cli("--db", str(db), "summary", "--format", "csv")
    assert code == 0
    rows = list(csv.DictReader(io.StringIO(out)))
    assert len(rows) == 3
    by = {r["building"]: r for r in rows}
    assert by["Tidewater Clinic"]["tier"] == "evacuate"
    assert by["Tidewater Clinic"]["building_id"] == ids["Tidewater Clinic"]
    assert by["Tidewater Clinic"]["lon"] == "174.7762"
    assert by["Anchor Quay Shed"]["lat"] == ""
    assert by["Saltmarsh School"]["provisional"] == "true"
    assert all(r["caution"] == CAUTION for r in rows)


def _check_rfc7946(doc: Any) -> None:
    assert isinstance(doc, dict) and doc["type"] == "FeatureCollection"
    assert "crs" not in doc
    assert isinstance(doc["features"], list)
    for f in doc["features"]:
        assert f["type"] == "Feature"
        assert "crs" not in f
        assert isinstance(f.get("id"), str | int | float)
        assert isinstance(f["properties"], dict)
        g = f["geometry"]
        assert g["type"] == "Point"
        pos = g["coordinates"]
        assert isinstance(pos, list) and len(pos) == 2   # RFC 7946 allows 3; we write no height
        assert all(isinstance(v, Real) and not isinstance(v, bool) for v in pos)
        lon, lat = pos[0], pos[1]
        assert -180 <= lon <= 180 and -90 <= lat <= 90


def test_geojson_is_an_rfc7946_feature_collection_longitude_first(tmp_path, cli):
    db = tmp_path / "area.db"
    ids = _area(db)
    code, out, err = cli("--db", str(db), "summary", "--format", "geojson")
    assert code == 0
    doc = json.loads(out)
    _check_rfc7946(doc)
    assert len(doc["features"]) == 2
    clinic = next(f for f in doc["features"] if f["id"] == ids["Tidewater Clinic"])
    assert clinic["geometry"]["coordinates"] == [174.7762, -41.2861]   # lon, lat
    props = clinic["properties"]
    assert props["tier"] == "evacuate" and props["tier_words"] == "● evacuate"
    assert props["inspected_at"] == "2026-11-29T16:30:00+13:00"
    assert props["caution"] == CAUTION
    assert {"building", "address", "inspector", "performance_level", "governing_storey",
            "provisional", "conflict"} <= set(props)
    # The unlocated building is counted and named on standard error.
    assert err.count("\n") == 1
    assert "1 building without a location" in err and "Anchor Quay Shed" in err
    assert ids["Anchor Quay Shed"] in err


def test_an_empty_database_summarises_to_no_buildings(tmp_path, cli):
    db = tmp_path / "empty.db"
    Store.open(db).close()
    code, out, _ = cli("--db", str(db), "summary")
    assert code == 0 and "0 buildings" in out and out.startswith("CAUTION")
    code, out, _ = cli("--db", str(db), "summary", "--format", "geojson")
    assert json.loads(out) == {"type": "FeatureCollection", "caution": CAUTION, "features": []}
