"""The edit API's refusals of malformed edits, each one line naming the path and the rule, the
survey left as it was (`triage.store.edits.apply` is what `Store.set_value`, `add_item` and
`remove_item` run)."""

from __future__ import annotations

import copy
import json

import pytest

from tests.store.conftest import sample_dict
from triage.store import EditRefused, Store, edits

CASES = [
    # (op, path, value) -> the one line
    ("set", "", 1, "(path): an edit names a field, e.g. storeys[0].label"),
    ("set", "storeys[0]..label", 1,
     "storeys[0]..label: not a field path (e.g. storeys[0].readings[1].offset_mm)"),
    ("set", "format", "triage-survey/1", "format: the survey's format is fixed once it is stored"),
    ("set", "id", "x", "id: the survey's id is fixed once it is stored"),
    ("set", "storeys[9].label", "Z", "storeys[9]: no such item (there are 3)"),
    ("set", "building.name.first", "A", "building.name: is a value, not a block or a list"),
    ("set", "storeys[0].readings[7]", {"dir": "x", "tilt_deg": 0.1},
     "storeys[0].readings[7]: no such item"),
    ("set", "storeys[0].readings[0]", None,
     "storeys[0].readings[0]: remove an item with remove, not by setting it to null"),
    ("set", "storeys.label", "Z", "storeys.label: no such field"),
    ("set", "storeys", [], "storeys: change the items one by one (add, set, remove)"),
    ("set", "hazards", [], "hazards: change the items one by one (add, set, remove)"),
    ("set", "storeys[0].readings[0]", "not an object",
     "storeys[0].readings[0]: must be a JSON object"),
    ("set", "engine", 1, "engine: not an editable part of a survey"),
    ("add", "storeys[0].readings[0].dir", {"dir": "x"},
     "storeys[0].readings[0].dir: is a value, not a block or a list"),
    ("add", "building", {"dir": "x"}, "building: is not a list"),
    ("add", "storeys[0].readings[5]", {"dir": "x", "tilt_deg": 0.1},
     "storeys[0].readings: index 5 is outside 0..2"),
    ("add", "storeys[0].readings", None, "storeys[0].readings: an added item cannot be null"),
    ("add", "storeys[0].readings", [1, 2], "storeys[0].readings[2]: must be a JSON object"),
    ("remove", "storeys[0].notes", None,
     "storeys[0].notes: name an item to remove, e.g. storeys[0].readings[1]"),
    ("remove", "storeys[0].readings[4]", None, "storeys[0].readings[4]: no such item"),
    ("rename", "storeys[0].label", "Z", "rename: not an edit (set, add, remove)"),
]


@pytest.mark.parametrize(("op", "path", "value", "line"), CASES,
                         ids=[f"{c[0]} {c[1] or '(empty)'}" for c in CASES])
def test_a_malformed_edit_is_refused_in_one_line(op, path, value, line):
    doc = json.loads(json.dumps(sample_dict()))
    before = copy.deepcopy(doc)
    with pytest.raises(EditRefused) as err:
        edits.apply(doc, op, path, value, direct=False)
    assert str(err.value) == line
    assert doc == before


def test_through_the_store_nothing_is_saved(tmp_path):
    from tests.store.conftest import sample

    with Store.open(tmp_path / "f.db") as st:
        s = sample()
        st.add_survey(s)
        sid = str(s.survey_id)
        before, log = st.survey_json(sid), len(st.change_log(sid))
        for call in (lambda: st.set_value(sid, "storeys[9].label", "Z"),
                     lambda: st.add_item(sid, "storeys[0].readings", None),
                     lambda: st.remove_item(sid, "storeys[0].notes")):
            with pytest.raises(EditRefused):
                call()
        assert st.survey_json(sid) == before and len(st.change_log(sid)) == log


def test_an_absent_optional_block_is_made_on_write():
    doc = json.loads(json.dumps(sample_dict()))
    assert "location" not in doc["building"]
    out = edits.apply(doc, "set", "building.location", {"lat": -41.2, "lon": 174.1},
                      direct=False)
    assert out.doc["building"]["location"] == {"lat": -41.2, "lon": 174.1}
    assert out.new == {"lat": -41.2, "lon": 174.1} and out.old is None
    photos = edits.apply(doc, "add", "storeys[1].photos", {"path": "img/a.jpg"}, direct=False)
    assert photos.path == "storeys[1].photos[0]"
    assert photos.doc["storeys"][1]["photos"] == [{"path": "img/a.jpg", "caption": ""}]
    assert "photos" not in doc["storeys"][1]   # the input was not changed


@pytest.mark.parametrize("direct", [True, False])
def test_an_item_set_whole_is_refused_by_its_first_rule_and_keeps_every_line(direct):
    # a reading replaced by one with no direction and an unknown key: two rules broken by one
    # edit; the refusal is the first as one clean line, the rest kept in `all_messages`
    doc = json.loads(json.dumps(sample_dict()))
    before = copy.deepcopy(doc)
    with pytest.raises(EditRefused) as err:
        edits.apply(doc, "set", "storeys[0].readings[0]", {"tilt_deg": 0.1, "colour": "red"},
                    direct=direct)
    line = str(err.value)
    assert line.startswith("storeys[0].readings[0].dir: required field is missing (")
    assert "\n" not in line and "more)" not in line
    assert err.value.all_messages[0] == line
    assert len(err.value.all_messages) == 2
    assert err.value.all_messages[1].startswith(
        "storeys[0].readings[0].colour: unknown key 'colour'")
    assert doc == before


def test_a_single_rule_broken_is_its_only_line():
    doc = json.loads(json.dumps(sample_dict()))
    with pytest.raises(EditRefused) as err:
        edits.apply(doc, "set", "storeys[0].readings[0].gauge_mm", -5)
    assert err.value.all_messages == [str(err.value)]
    assert str(err.value).startswith("storeys[0].readings[0].gauge_mm: must be greater than 0")
