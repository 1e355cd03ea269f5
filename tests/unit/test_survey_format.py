"""The survey formats: `/1` files still read, `/2` keys accepted, every survey written as `/2`."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from tests.helpers import clone, reading, storey, survey_dict, tilt
from triage.model import FORMAT, SurveyError, json_schema, parse_survey

SAMPLES = Path(__file__).resolve().parents[2] / "sample_surveys"

# Ids derived by the code before `/2` existed, for each sample file with its `id` removed: the
# derivation must not change with the format (the store and signed reports hold these ids).
DERIVED_BEFORE_V2 = {
    "clinic_tidewater_medical.json": "eef19298-a86d-5a7e-9bab-483dce46c0ef",
    "flats_mariner_court_1.json": "46175694-a1ca-5674-865b-43550809ec30",
    "flats_mariner_court_2.json": "b40c1e9e-2ef3-576e-a568-0571624c8f98",
    "house_driftwood_crescent.json": "c179ec35-40e1-57b8-8a5e-f0829f1fc987",
    "house_kelp_street.json": "0f9265f4-9fcf-5d88-80e2-f7c651f87ecf",
    "school_saltmarsh_road.json": "bfd754cb-6182-504f-b9fd-714beebc2c36",
    "shops_wharf_street.json": "35ea99d1-cedf-53a3-a90b-3d33731ae19c",
    "warehouse_anchor_quay.json": "9fb76dd8-9166-52e7-8a42-73028a3b8382",
}


def v2() -> dict:
    d = survey_dict([storey("G", [
        reading("x", 3.0, baseline_mm=1.0, baseline_sd_mm=0.5),
        tilt("y", 0.1, baseline_deg=0.02, baseline_sd_deg=0.01)],
        [{"kind": "column", "count": 4,
          "photos": [{"path": "img/c.jpg", "sha256": "ab" * 32}]}])])
    d["format"] = "triage-survey/2"
    d["building"]["year_built"] = 1978
    d["inspection"].update(team=[{"name": "Ari Second", "id": "T-2"}, {"name": "Bo Third"}],
                           event="Kōwhai Bay main shock", not_inspected="roof space: no ladder",
                           weather="light rain")
    return d


def test_written_as_v2():
    assert FORMAT == "triage-survey/2"
    s = parse_survey(survey_dict([storey("G")]))
    assert s.format == "triage-survey/2"
    assert s.to_json_dict()["format"] == "triage-survey/2"


def test_v2_keys_read_and_kept():
    s = parse_survey(v2())
    assert s.building.year_built == 1978
    assert [m.name for m in s.inspection.team] == ["Ari Second", "Bo Third"]
    assert s.inspection.event == "Kōwhai Bay main shock"
    assert s.storeys[0].readings[0].baseline_sd_mm == 0.5
    assert s.storeys[0].readings[1].baseline_sd_deg == 0.01
    assert s.storeys[0].members[0].photos[0].sha256 == "ab" * 32
    again = parse_survey(json.loads(json.dumps(s.to_json_dict())))
    assert again == s


@pytest.mark.parametrize("fmt", ["triage-survey/3", "triage-survey", "survey/2", 2])
def test_unknown_format_refused(fmt):
    d = survey_dict([storey("G")])
    d["format"] = fmt
    with pytest.raises(SurveyError) as e:
        parse_survey(d)
    msg = str(e.value)
    assert msg.startswith("format:") and "not a survey format this version reads" in msg
    assert "triage-survey/1, triage-survey/2" in msg and "\n" not in msg


@pytest.mark.parametrize("name", sorted(DERIVED_BEFORE_V2))
def test_derived_ids_unchanged(name):
    d = json.loads((SAMPLES / name).read_text(encoding="utf-8"))
    d.pop("id")
    assert str(parse_survey(d).id) == DERIVED_BEFORE_V2[name]
    d["format"] = "triage-survey/2"   # the version label does not change the id either
    assert str(parse_survey(d).id) == DERIVED_BEFORE_V2[name]


def test_v2_keys_change_the_derived_id():
    d = survey_dict([storey("G")])
    plain = parse_survey(d).id
    d2 = clone(d)
    d2["inspection"]["weather"] = "fine"
    assert parse_survey(d2).id != plain


@pytest.mark.parametrize("where,key,value,words", [
    (lambda d: d["storeys"][0]["readings"][0], "baseline_sd_deg", 0.1, "tilt reading"),
    (lambda d: d["storeys"][0]["readings"][1], "baseline_sd_mm", 0.1, "offset reading"),
    (lambda d: d["storeys"][0]["members"][0]["photos"][0], "sha256", "ABC", "pattern"),
    (lambda d: d["building"], "year_built", 12, "greater than or equal to 1000"),
])
def test_v2_key_rules(where, key, value, words):
    d = v2()
    where(d)[key] = value
    with pytest.raises(SurveyError) as e:
        parse_survey(d)
    assert words in str(e.value)


def test_baseline_sd_needs_its_baseline():
    d = v2()
    del d["storeys"][0]["readings"][0]["baseline_mm"]
    with pytest.raises(SurveyError, match="baseline_sd_mm is the uncertainty of baseline_mm"):
        parse_survey(d)


def test_schema_lists_v2_keys_with_descriptions():
    schema = json_schema()
    assert schema["title"] == "triage-survey/2"
    defs = schema["$defs"]
    for model, key in [("Building", "year_built"), ("Inspection", "team"),
                       ("Inspection", "event"), ("Inspection", "not_inspected"),
                       ("Inspection", "weather"), ("Reading", "baseline_sd_mm"),
                       ("Reading", "baseline_sd_deg"), ("Photo", "sha256")]:
        assert defs[model]["properties"][key]["description"], (model, key)
    assert set(schema["properties"]["format"]["enum"]) == {"triage-survey/1", "triage-survey/2"}


def test_schema_bounds_are_json_schema_keywords():
    schema = json_schema()
    text = json.dumps(schema)
    for raw in ('"gt":', '"ge":', '"lt":', '"le":'):
        assert raw not in text
    gauge = schema["$defs"]["Reading"]["properties"]["gauge_mm"]["anyOf"][0]
    assert gauge == {"type": "number", "exclusiveMinimum": 0}
    sd_deg = schema["$defs"]["Reading"]["properties"]["sd_deg"]["anyOf"][0]
    assert (sd_deg["exclusiveMinimum"], sd_deg["maximum"]) == (0, 5.0)
    assert schema["$defs"]["Location"]["properties"]["lat"]["minimum"] == -90
