"""Hostile numbers in every numeric field: refused in one line naming the field, never a crash.

NaN, infinities, true/false, text and numbers of over 15 digits before the point, put in each
numeric field of the survey format, through `parse_survey`, through a file's text and through
the store's edit API (`triage.store.edits.apply`, what `Store.set_value` runs).
"""

from __future__ import annotations

import json
import math
import re
from typing import Any

from hypothesis import given
from hypothesis import strategies as st

from tests.helpers import reading, storey, survey_dict, tilt
from triage.model import SurveyError, json_schema, parse_survey, parse_survey_text
from triage.store import EditRefused, edits

# Each numeric field of the format, by the schema's definition it belongs to, at a path of
# `_survey()` where that field is in use.
NUMERIC = {
    ("Location", "lat"): "building.location.lat",
    ("Location", "lon"): "building.location.lon",
    ("Building", "year_built"): "building.year_built",
    ("Storey", "height_m"): "storeys[0].height_m",
    ("Reading", "offset_mm"): "storeys[0].readings[0].offset_mm",
    ("Reading", "gauge_mm"): "storeys[0].readings[0].gauge_mm",
    ("Reading", "sd_mm"): "storeys[0].readings[0].sd_mm",
    ("Reading", "baseline_mm"): "storeys[0].readings[0].baseline_mm",
    ("Reading", "baseline_sd_mm"): "storeys[0].readings[0].baseline_sd_mm",
    ("Reading", "tilt_deg"): "storeys[0].readings[1].tilt_deg",
    ("Reading", "sd_deg"): "storeys[0].readings[1].sd_deg",
    ("Reading", "baseline_deg"): "storeys[0].readings[1].baseline_deg",
    ("Reading", "baseline_sd_deg"): "storeys[0].readings[1].baseline_sd_deg",
    ("MemberGroup", "count"): "storeys[0].members[0].count",
    ("MemberGroup", "crack_mm"): "storeys[0].members[0].crack_mm",
    ("MemberGroup", "crack_sd_mm"): "storeys[0].members[0].crack_sd_mm",
    ("MemberGroup", "weight"): "storeys[0].members[0].weight",
    ("MemberGroup", "inspected"): "storeys[0].members[0].inspected",
    ("Hazard", "height_above_ground_m"): "hazards[0].height_above_ground_m",
}
PATHS = sorted(NUMERIC.values())


def _survey() -> dict[str, Any]:
    d = survey_dict([storey("G", [
        reading("x", 2.0, baseline_mm=0.5, baseline_sd_mm=0.2),
        tilt("y", 0.1, baseline_deg=0.02, baseline_sd_deg=0.01)],
        [{"kind": "wall", "count": 2, "crack_mm": 0.3, "crack_sd_mm": 0.1, "weight": 2.0}])],
        hazards=[{"kind": "falling_hazard", "storey": "G", "height_above_ground_m": 9.0}])
    d["format"] = "triage-survey/2"
    d["building"]["location"] = {"lat": -41.0, "lon": 174.0}
    d["building"]["year_built"] = 1975
    return d


def _set(d: dict[str, Any], path: str, value: Any) -> dict[str, Any]:
    return edits.apply_set(d, path, value).doc


HOSTILE = st.one_of(
    st.sampled_from([math.nan, math.inf, -math.inf, True, False, 1e300, -1e16, "2.0", "NaN"]),
    # a 5,001-digit integer (built, not listed: its repr is over Python's digit limit)
    st.builds(lambda: 10 ** 5000), st.builds(lambda: -(10 ** 5000)),
    st.integers(min_value=10 ** 15),
    st.integers(max_value=-(10 ** 15)),
    st.floats(allow_nan=True, allow_infinity=True).filter(
        lambda v: not math.isfinite(v) or abs(v) >= 1e15),
)


def _long_in_text(value: Any) -> bool:
    """Whether json.dumps writes `value` with over 15 digits before its point."""
    if isinstance(value, bool) or not isinstance(value, int | float):
        return False
    m = re.match(r"-?(\d+)", json.dumps(value))
    return m is not None and len(m.group(1)) > 15


def _one_line(msg: str, path: str) -> None:
    assert "\n" not in msg and msg.startswith(f"{path}: "), msg
    assert "internal error" not in msg
    msg.encode("utf-8")


def test_every_numeric_field_is_listed() -> None:
    found = set()
    for name, d in json_schema()["$defs"].items():
        for key, v in d.get("properties", {}).items():
            types = {v.get("type")} | {a.get("type") for a in v.get("anyOf", [])}
            if types & {"number", "integer"}:
                found.add((name, key))
    assert found == set(NUMERIC)


def test_the_survey_used_is_valid() -> None:
    parse_survey(_survey())


@given(st.sampled_from(PATHS), HOSTILE)
def test_hostile_number_refused_by_the_model(path: str, value: Any) -> None:
    try:
        parse_survey(_set(_survey(), path, value))
    except SurveyError as err:
        _one_line(str(err), path)
    else:
        raise AssertionError(f"{path} = {value!r} was accepted")


@given(st.sampled_from(PATHS), HOSTILE)
def test_hostile_number_refused_by_the_edit_api(path: str, value: Any) -> None:
    doc = parse_survey(_survey()).to_json_dict()
    try:
        edits.apply(doc, "set", path, value)
    except EditRefused as err:
        _one_line(str(err), path)
    else:
        raise AssertionError(f"{path} = {value!r} was accepted by the edit API")
    # The general path (not the keystroke short cut) refuses it the same way.
    try:
        edits.apply(doc, "set", path, value, direct=False)
    except EditRefused as err:
        _one_line(str(err), path)
    else:
        raise AssertionError(f"{path} = {value!r} was accepted by the edit API")


@given(st.sampled_from(PATHS), HOSTILE.filter(lambda v: not (isinstance(v, int) and abs(v)
                                                            >= 10 ** 4000)))
def test_hostile_number_in_a_file_refused_in_one_line(path: str, value: Any) -> None:
    text = json.dumps(_set(_survey(), path, value))   # writes NaN and Infinity as JS does
    try:
        parse_survey_text(text)
    except SurveyError as err:
        msg = str(err)
        assert "\n" not in msg, msg
        # A number written with over 15 digits before the point is refused by the text scan,
        # before parsing, naming line and column; anything else by the field it is in.
        if _long_in_text(value):
            assert msg.startswith("(file): line ") and "digits before the point" in msg, msg
        else:
            assert msg.startswith(f"{path}: "), msg
    else:
        raise AssertionError(f"{path} = {value!r} was accepted from a file")
