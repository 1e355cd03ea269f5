"""Bad input: one test per rule of the survey format, each asserting the message names the field."""

from __future__ import annotations

import pytest

from tests.helpers import clone, reading, storey, survey_dict
from triage.model import SurveyError, parse_survey, parse_survey_text


def base():
    return survey_dict([storey("G", [reading("x", 2.0), reading("y", 1.0)],
                               [{"kind": "column", "count": 1, "crack_mm": 0.4}])])


def refused(mutate) -> str:
    d = clone(base())
    mutate(d)
    with pytest.raises(SurveyError) as e:
        parse_survey(d)
    msg = str(e.value)
    assert "\n" not in msg
    return msg


def test_base_is_valid():
    assert parse_survey(base()).storeys[0].label == "G"


def test_unknown_key_named():
    msg = refused(lambda d: d["building"].update(colour="blue"))
    assert msg.startswith("building.colour") and "unknown key 'colour'" in msg


def test_unknown_key_deep():
    msg = refused(lambda d: d["storeys"][0]["readings"][0].update(angle=3))
    assert "storeys[0].readings[0].angle" in msg


def test_required_building_name():
    assert refused(lambda d: d["building"].pop("name")).startswith("building.name: required")


def test_required_inspector_name():
    msg = refused(lambda d: d["inspection"]["inspector"].pop("name"))
    assert "inspection.inspector.name" in msg


def test_time_needs_offset():
    msg = refused(lambda d: d["inspection"].update(at="2026-11-29T09:00:00"))
    assert msg.startswith("inspection.at") and "timezone" in msg


@pytest.mark.parametrize("h", [0, -3.0, 20.5])
def test_height_range(h):
    assert refused(lambda d: d["storeys"][0].update(height_m=h)).startswith("storeys[0].height_m")


def test_gauge_positive():
    msg = refused(lambda d: d["storeys"][0]["readings"][0].update(gauge_mm=0))
    assert msg.startswith("storeys[0].readings[0].gauge_mm") and "greater than 0" in msg


def test_offset_and_tilt_never_both():
    msg = refused(lambda d: d["storeys"][0]["readings"][0].update(tilt_deg=0.1))
    assert msg.startswith("storeys[0].readings[0]") and "never both" in msg


def test_reading_needs_one_kind():
    msg = refused(lambda d: d["storeys"][0]["readings"][0].pop("offset_mm"))
    assert msg.startswith("storeys[0].readings[0]") and "go together" in msg


def test_drift_of_25_percent_refused():
    msg = refused(lambda d: d["storeys"][0]["readings"][0].update(offset_mm=500.0))
    assert msg.startswith("storeys[0].readings[0]") and "mis-entry" in msg


def test_drift_over_5_percent_kept():
    d = clone(base())
    d["storeys"][0]["readings"][0]["offset_mm"] = 200.0  # 10%
    assert parse_survey(d).storeys[0].readings[0].drift_ratio() == pytest.approx(0.1)


@pytest.mark.parametrize("c", [-0.1, 50.5, 500])
def test_crack_range(c):
    msg = refused(lambda d: d["storeys"][0]["members"][0].update(crack_mm=c))
    assert msg.startswith("storeys[0].members[0].crack_mm")


@pytest.mark.parametrize(("where", "key"), [("readings", "sd_mm"), ("members", "crack_sd_mm")])
def test_uncertainty_positive(where, key):
    msg = refused(lambda d: d["storeys"][0][where][0].update({key: 0}))
    assert msg.startswith(f"storeys[0].{where}[0].{key}")


def test_tilt_uncertainty_positive():
    def m(d):
        d["storeys"][0]["readings"][0] = {"dir": "x", "tilt_deg": 0.1, "sd_deg": -1}
    assert refused(m).startswith("storeys[0].readings[0].sd_deg")


def test_hazard_storey_must_exist():
    msg = refused(lambda d: d.update(hazards=[{"kind": "falling_hazard", "storey": "7"}]))
    assert msg.startswith("hazards[0].storey") and "'7'" in msg


def test_count_at_least_one():
    assert refused(lambda d: d["storeys"][0]["members"][0].update(count=0)).startswith(
        "storeys[0].members[0].count")


def test_override_needs_reason():
    msg = refused(lambda d: d["storeys"][0]["members"][0].update(damage_class="III"))
    assert msg.startswith("storeys[0].members[0]") and "override_reason" in msg


def test_labels_unique():
    msg = refused(lambda d: d["storeys"].append(clone(d["storeys"][0])))
    assert msg.startswith("storeys[1].label") and "unique" in msg


def test_at_least_one_storey():
    assert refused(lambda d: d.update(storeys=[])).startswith("storeys")


def test_system_key_from_table():
    msg = refused(lambda d: d["building"]["system"].update(y="igloo"))
    assert msg.startswith("building.system.y") and "igloo" in msg


def test_sign_key_from_table():
    msg = refused(lambda d: d["storeys"][0]["members"][0].update(signs=["dragons"]))
    assert msg.startswith("storeys[0].members[0].signs[0]") and "dragons" in msg


def test_sign_must_fit_the_member_kind():
    msg = refused(lambda d: d["storeys"][0]["members"][0].update(signs=["brace_buckled"]))
    assert msg.startswith("storeys[0].members[0].signs") and "column" in msg


def test_hazard_key_from_table():
    msg = refused(lambda d: d.update(hazards=[{"kind": "dragons"}]))
    assert msg.startswith("hazards[0].kind") and "dragons" in msg


def test_member_kind_from_list():
    assert refused(lambda d: d["storeys"][0]["members"][0].update(kind="pillar")).startswith(
        "storeys[0].members[0].kind")


def test_access_values():
    assert refused(lambda d: d["storeys"][0].update(access="some")).startswith(
        "storeys[0].access")


def test_wrong_format():
    assert refused(lambda d: d.update(format="triage-survey/9")).startswith("format")


def test_not_json():
    with pytest.raises(SurveyError) as e:
        parse_survey_text("{not json")
    assert "not JSON" in str(e.value)


def test_ids_derived_deterministically_and_building_id_kept():
    a, b = parse_survey(base()), parse_survey(base())
    assert a.id == b.id and a.building.id == b.building.id
    d = clone(base())
    d["storeys"][0]["readings"][0]["offset_mm"] = 3.0
    c = parse_survey(d)
    assert c.id != a.id and c.building.id == a.building.id


def test_explicit_ids_kept():
    d = clone(base())
    d["id"] = "11111111-2222-4333-8444-555555555555"
    d["building"]["id"] = "aaaaaaaa-2222-4333-8444-555555555555"
    s = parse_survey(d)
    assert str(s.id) == d["id"] and str(s.building.id) == d["building"]["id"]


def test_export_reimports_to_the_same_survey():
    s = parse_survey(base())
    assert parse_survey(s.to_json_dict()) == s
