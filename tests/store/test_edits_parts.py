"""The edit functions one by one (`triage.store.edits`), on survey data without a database.

Each refusal is one exact line naming the path and the rule; each applied edit says what it
changed (op, path, old, new) and leaves the data it was given as it was. `stored` is the data
as the store keeps it (every default written out); `raw` is a survey file as an inspector
writes it, with optional blocks and lists left out.
"""

from __future__ import annotations

import copy
from typing import Any

import pytest

from tests.store.conftest import sample, sample_dict
from triage.store import EditRefused, edits


@pytest.fixture
def stored() -> dict[str, Any]:
    """Three storeys G, 1, 2, each with two offset readings and two member groups; no hazard."""
    return sample().to_json_dict()


def refusal(call: Any, *args: Any, **kw: Any) -> str:
    with pytest.raises(EditRefused) as err:
        call(*args, **kw)
    return str(err.value)


@pytest.mark.parametrize(("path", "message"), [
    ("", "(path): an edit names a field, e.g. storeys[0].label"),
    (None, "(path): an edit names a field, e.g. storeys[0].label"),
    ("storeys[0]..label", "storeys[0]..label: not a field path (e.g. "
                          "storeys[0].readings[1].offset_mm)"),
])
def test_a_path_that_names_no_field_is_refused_in_one_exact_line(path, message):
    assert refusal(edits.parse_path, path) == message


def test_a_path_is_split_into_names_and_indices_and_joined_back():
    tokens = edits.parse_path("storeys[2].readings[1].offset_mm")
    assert tokens == ["storeys", 2, "readings", 1, "offset_mm"]
    assert edits.format_path(tokens) == "storeys[2].readings[1].offset_mm"


# --- set ----------------------------------------------------------------------------------

@pytest.mark.parametrize(("path", "value", "message"), [
    ("format", "triage-survey/9", "format: the survey's format is fixed once it is stored"),
    ("id", "x", "id: the survey's id is fixed once it is stored"),
    ("storeys[3]", {"label": "R", "height_m": 3.0}, "storeys[3]: no such item"),
    ("building[0]", {"name": "x"}, "building[0]: no such item"),
    ("storeys[0]", None, "storeys[0]: remove an item with remove, not by setting it to null"),
    ("storeys.label", "G", "storeys.label: no such field"),
    ("storeys[3].label", "R", "storeys[3]: no such item (there are 3)"),
    ("building[0].name", "x", "building[0]: no such item (there are 0)"),
    ("storeys.x.label", "G", "storeys.x: no such field"),
    ("storeys[0].label.text", "G", "storeys[0].label: is a value, not a block or a list"),
])
def test_a_set_that_cannot_be_made_is_refused_naming_the_path(stored, path, value, message):
    before = copy.deepcopy(stored)
    assert refusal(edits.apply_set, stored, path, value) == message
    assert stored == before


def test_setting_a_whole_item_replaces_it_and_keeps_the_old_one(stored):
    new = {"label": "G", "height_m": 2.9, "readings": [{"dir": "x", "tilt_deg": 0.1}]}
    for index in (0, 2):   # the first and the last item of the list
        applied = edits.apply_set(stored, f"storeys[{index}]", new)
        assert (applied.op, applied.path, applied.new) == ("set", f"storeys[{index}]", new)
        assert applied.old == stored["storeys"][index] and applied.old["height_m"] == 3.2
        assert applied.doc["storeys"][index] == new
        assert applied.doc["storeys"][1 - index // 2] == stored["storeys"][1 - index // 2]


def test_a_set_value_is_copied_so_later_changes_to_it_do_not_reach_the_data(stored):
    item = {"label": "G", "height_m": 2.9, "readings": [{"dir": "x", "tilt_deg": 0.1}]}
    readings = [{"dir": "y", "tilt_deg": 0.2}]
    by_item = edits.apply_set(stored, "storeys[0]", item)
    by_field = edits.apply_set(stored, "storeys[1].readings", readings)
    item["readings"][0]["tilt_deg"] = 9.0
    readings[0]["tilt_deg"] = 9.0
    assert by_item.doc["storeys"][0]["readings"] == [{"dir": "x", "tilt_deg": 0.1}]
    assert by_field.doc["storeys"][1]["readings"] == [{"dir": "y", "tilt_deg": 0.2}]


def test_setting_a_field_to_null_makes_it_absent_and_leaves_the_given_data_alone(stored):
    before = copy.deepcopy(stored)
    applied = edits.apply_set(stored, "storeys[0].members[1].ref", None)
    assert (applied.op, applied.old, applied.new) == ("set", "W0", None)
    assert "ref" not in applied.doc["storeys"][0]["members"][1]
    assert stored == before


# --- add and remove -----------------------------------------------------------------------

@pytest.mark.parametrize(("path", "item", "index", "message"), [
    ("storeys[0]", {"label": "R"}, None, "storeys[0]: add to a list, e.g. storeys[0].readings"),
    ("building", {"name": "x"}, None, "building: is not a list"),
    ("storeys", {"label": "R", "height_m": 3.0}, 4, "storeys: index 4 is outside 0..3"),
    ("storeys[0].readings", None, None, "storeys[0].readings: an added item cannot be null"),
])
def test_an_add_that_cannot_be_made_is_refused_naming_the_path(stored, path, item, index,
                                                               message):
    assert refusal(edits.apply_add, stored, path, item, index) == message


def test_an_added_item_says_where_it_went_and_is_a_copy(stored):
    reading = {"dir": "x", "tilt_deg": 0.1, "where": "stair"}
    at_end = edits.apply_add(stored, "storeys[1].readings", reading)
    first = edits.apply_add(stored, "storeys[1].readings", reading, 0)
    reading["where"] = "changed after"
    assert (at_end.op, at_end.path, at_end.old) == ("add", "storeys[1].readings[2]", None)
    assert at_end.new == reading and first.path == "storeys[1].readings[0]"
    assert at_end.doc["storeys"][1]["readings"][2]["where"] == "stair"
    assert first.doc["storeys"][1]["readings"][0]["where"] == "stair"
    assert len(stored["storeys"][1]["readings"]) == 2
    roof = {"label": "R", "height_m": 2.4, "readings": [{"dir": "x", "tilt_deg": 0.1}]}
    added = edits.apply_add(stored, "storeys", roof)
    roof["readings"][0]["tilt_deg"] = 9.0
    assert added.doc["storeys"][3]["readings"] == [{"dir": "x", "tilt_deg": 0.1}]


def test_a_remove_names_an_item_not_a_list(stored):
    assert refusal(edits.apply_remove, stored, "storeys[0].readings") == (
        "storeys[0].readings: name an item to remove, e.g. storeys[0].readings[1]")


def test_a_list_left_out_of_the_file_is_made_by_the_first_add():
    raw = sample_dict()
    del raw["hazards"]
    assert "team" not in raw["inspection"]
    applied = edits.apply(raw, "add", "hazards", {"kind": "falling_hazard", "storey": "1"})
    assert applied.doc["hazards"] == [{"kind": "falling_hazard", "storey": "1", "photos": []}]
    applied = edits.apply(raw, "add", "inspection.team", {"name": "Rangi Tester"})
    assert applied.doc["inspection"]["team"] == [{"name": "Rangi Tester"}]
    assert "hazards" not in raw and "team" not in raw["inspection"]


def test_a_block_left_out_is_made_by_setting_a_field_in_it(stored):
    assert "location" not in stored["building"]
    # A location needs both numbers: setting one makes the block, and the block is refused.
    assert refusal(edits.apply, stored, "set", "building.location.lat", -41.3) == (
        "building.location.lon: required field is missing (building, location, longitude (°))")
    applied = edits.apply_set(stored, "building.location.lat", -41.3)
    assert applied.doc["building"]["location"] == {"lat": -41.3}


def test_a_block_of_a_storey_the_format_does_not_know_is_refused_as_an_unknown_key(stored):
    assert refusal(edits.apply, stored, "set", "storeys[0].extra.note", "x").startswith(
        "storeys[0].extra: unknown key 'extra'")


# --- what an edit validates -----------------------------------------------------------------

@pytest.mark.parametrize("path", ["storeys", "hazards"])
def test_a_whole_list_of_storeys_or_hazards_is_not_set_at_once(stored, path):
    same = copy.deepcopy(stored[path])
    assert refusal(edits.apply, stored, "set", path, same) == (
        f"{path}: change the items one by one (add, set, remove)")


def test_a_part_the_format_does_not_know_is_not_editable(stored):
    assert refusal(edits.apply, stored, "set", "colour", "blue") == (
        "colour: not an editable part of a survey")


def test_an_added_storey_is_validated_with_its_readings_and_members(stored):
    bad_reading = {"label": "R", "height_m": 3.0, "readings": [{"dir": "z", "tilt_deg": 0.1}]}
    assert refusal(edits.apply, stored, "add", "storeys", bad_reading) == (
        "storeys[3].readings[0].dir: must be 'x' or 'y' (storey R, reading 1, direction)")
    too_tall = {"label": "R", "height_m": 30}
    assert refusal(edits.apply, stored, "add", "storeys", too_tall) == (
        "storeys[3].height_m: must be less than or equal to 20 (storey R, height (m))")


@pytest.mark.parametrize(("path", "items", "message"), [
    ("storeys[1].readings", [{"dir": "z", "tilt_deg": 0.1}],
     "storeys[1].readings[0].dir: must be 'x' or 'y' (storey 1, reading 1, direction)"),
    ("storeys[1].members", [{"kind": "igloo", "count": 1}],
     "storeys[1].members[0].kind: "),
])
def test_a_storey_list_set_at_once_is_validated_item_by_item(stored, path, items, message):
    assert refusal(edits.apply, stored, "set", path, items).startswith(message)


def test_a_storey_field_edit_leaves_its_readings_and_members_as_they_were(stored):
    """Only the storey's own fields are validated: its items are neither checked again nor
    rebuilt (the same lists come back), so an edit costs the same however many there are."""
    st = stored["storeys"][1]
    applied = edits.apply(stored, "set", "storeys[1].notes", "north bay shored")
    out = applied.doc["storeys"][1]
    assert out["notes"] == "north bay shored"
    assert out["readings"] is st["readings"] and out["members"] is st["members"]
    # Not checked again: an item no edit touched is left alone, whatever it holds.
    odd = copy.deepcopy(stored)
    odd["storeys"][1]["readings"][0]["dir"] = "z"
    odd["storeys"][1]["members"][0]["kind"] = "igloo"
    applied = edits.apply(odd, "set", "storeys[1].height_m", 3.3)
    assert applied.doc["storeys"][1]["readings"][0]["dir"] == "z"
    assert applied.doc["storeys"][1]["members"][0]["kind"] == "igloo"


def test_a_storey_of_a_file_without_item_lists_gets_empty_ones_on_an_edit():
    raw = sample_dict(storeys=2)
    raw["storeys"][1] = {"label": "1", "height_m": 3.0}
    applied = edits.apply(raw, "set", "storeys[1].notes", "empty floor")
    assert applied.doc["storeys"][1]["readings"] == []
    assert applied.doc["storeys"][1]["members"] == []


def test_removing_a_storey_photo_normalises_the_storey_it_left():
    raw = sample_dict(storeys=1)
    raw["storeys"][0]["photos"] = [{"path": "a.jpg"}, {"path": "b.jpg"}]
    applied = edits.apply(raw, "remove", "storeys[0].photos[0]", None)
    st = applied.doc["storeys"][0]
    assert st["photos"] == [{"path": "b.jpg", "caption": ""}]
    assert (st["access"], st["below_grade"]) == ("full", False)   # defaults written out


def test_an_edit_that_cannot_be_undone_is_named():
    assert refusal(edits.inverse, "import", "storeys[0]", None, None) == (
        "import: this change cannot be undone")
    assert edits.inverse("set", "storeys[0].label", "G", "B") == ("set", "storeys[0].label", "G")
    assert edits.inverse("add", "hazards[0]", None, {"k": 1}) == ("remove", "hazards[0]", None)
    assert edits.inverse("remove", "hazards[0]", {"k": 1}, None) == ("add", "hazards[0]",
                                                                     {"k": 1})


# --- the short way of a keystroke -----------------------------------------------------------

def test_a_plain_field_of_a_reading_or_member_takes_the_short_way(stored):
    before = copy.deepcopy(stored)
    got = edits.apply_field(stored, "storeys[1].readings[0].gauge_mm", 1000)
    assert got is not None
    assert (got.op, got.path, got.old, got.new) == ("set", "storeys[1].readings[0].gauge_mm",
                                                    2000.0, 1000.0)
    assert isinstance(got.new, float)   # the value as validated, not as typed
    assert got.doc["storeys"][1]["readings"][0]["gauge_mm"] == 1000.0
    assert got.doc["storeys"][0] == stored["storeys"][0] and stored == before
    gone = edits.apply_field(stored, "storeys[2].members[1].ref", None)
    assert gone is not None and (gone.old, gone.new) == ("W2", None)
    assert "ref" not in gone.doc["storeys"][2]["members"][1]


@pytest.mark.parametrize(("path", "value"), [
    ("storeys[0]..where", "x"),                 # not a path
    ("storeys[0].label", "B"),                  # a storey's own field
    ("storeys[0].readings[0]", {"dir": "x"}),   # a whole item
    ("hazards[0].readings[0].where", "x"),      # not under a storey
    ("storeys.x.readings[0].where", "x"),       # no storey index
    ("storeys[0].readings.x.where", "x"),       # no item index
    ("storeys[0].readings[0][1]", "x"),         # no field name
    ("storeys[0].photos[0].path", "a.jpg"),     # a list of another kind
    ("storeys[0].members[0].signs", ["cover_spalling"]),   # not a plain value
    ("storeys[3].readings[0].where", "x"),      # no such storey
    ("storeys[0].readings[2].where", "x"),      # no such item
])
def test_what_is_not_a_plain_item_field_goes_the_general_way(stored, path, value):
    assert edits.apply_field(stored, path, value) is None


def test_the_short_way_needs_storeys_and_items_as_stored():
    assert edits.apply_field({"storeys": {"0": {}}}, "storeys[0].readings[0].where", "x") is None
    assert edits.apply_field({}, "storeys[0].readings[0].where", "x") is None
    odd = {"storeys": [{"readings": {"0": {}}}, ["not a storey"], {"readings": ["x"]}]}
    for i in range(3):
        assert edits.apply_field(odd, f"storeys[{i}].readings[0].where", "x") is None


@pytest.mark.parametrize(("path", "value", "message"), [
    ("storeys[0].readings[0].dir", "z",
     "storeys[0].readings[0].dir: must be 'x' or 'y' (storey G, reading 1, direction)"),
    ("storeys[0].readings[0].gauge_mm", 5000,
     "storeys[0].readings[0].gauge_mm: 5000 mm is longer than the storey (3.2 m) plus 5%, "
     "3,360 mm (storey G, reading 1, gauge (mm))"),
])
def test_the_short_way_refuses_in_the_words_of_the_general_way(stored, path, value, message):
    assert refusal(edits.apply_field, stored, path, value) == message
    assert refusal(edits.apply, stored, "set", path, value) == message


# --- apply: what the change log is given ----------------------------------------------------

@pytest.mark.parametrize("direct", [True, False])
def test_each_edit_reports_its_kind_and_the_value_as_validated(stored, direct):
    got = edits.apply(stored, "set", "storeys[1].readings[0].gauge_mm", 1000, direct=direct)
    assert (got.op, got.old, got.new) == ("set", 2000.0, 1000.0)
    assert isinstance(got.new, float)
    added = edits.apply(stored, "add", "storeys[1].members", {"kind": "column", "count": 2},
                        direct=direct)
    assert (added.op, added.path, added.old) == ("add", "storeys[1].members[2]", None)
    assert added.new == {"kind": "column", "count": 2, "ductility": "ductile", "signs": [],
                         "weight": 1.0, "photos": []}
    removed = edits.apply(stored, "remove", "storeys[1].readings[0]", None, direct=direct)
    assert (removed.op, removed.new) == ("remove", None)   # not the reading that moved up
    assert removed.old == stored["storeys"][1]["readings"][0]


@pytest.mark.parametrize("direct", [True, False])
@pytest.mark.parametrize(("path", "old", "new"), [
    ("storeys[0].members[0].weight", 1.0, 1.0),     # back to its default
    ("storeys[0].members[1].ref", "W0", None),       # no default: absent
    ("storeys[0].access", "full", "full"),
    ("storeys[0].notes", None, None),
])
def test_a_field_set_to_null_logs_what_it_holds_now_both_ways(stored, direct, path, old, new):
    got = edits.apply(stored, "set", path, None, direct=direct)
    assert (got.old, got.new) == (old, new)
    assert edits._get(got.doc, edits.parse_path(path)[:-1]).get(path.rpartition(".")[2]) == new


def test_an_unknown_kind_of_edit_is_refused():
    assert refusal(edits.apply, {}, "rename", "storeys[0].label", "B") == (
        "rename: not an edit (set, add, remove)")


def test_an_add_to_a_plain_field_is_refused_not_taken_as_a_set(stored):
    with pytest.raises(EditRefused):
        edits.apply(stored, "add", "storeys[0].readings[0].where", "stair")


def test_the_keystroke_way_runs_only_its_item_and_storey_rules(stored):
    """apply() takes the short way for a plain item field (and only then): the rules of the
    rest of the survey are not run again, which the general way does."""
    twice = copy.deepcopy(stored)
    twice["storeys"][2]["label"] = "G"   # a label used twice: a rule of the whole survey
    path = "storeys[1].readings[0].where"
    assert edits.apply(twice, "set", path, "stair").new == "stair"
    assert refusal(edits.apply, twice, "set", path, "stair", direct=False) == (
        "storeys[2].label: 'G' is used twice; labels are unique (storey G, label)")
    assert refusal(edits.apply, twice, "set", "storeys[1].notes", "x").startswith(
        "storeys[2].label: 'G' is used twice")


def test_an_item_set_to_something_not_an_object_is_refused(stored):
    assert refusal(edits.apply, stored, "set", "storeys[0].readings[0]", "3 mm") == (
        "storeys[0].readings[0]: must be a JSON object")


def test_removing_a_reading_leaves_its_storeys_own_fields_as_they_were():
    """An item left a storey's list: the storey itself is not validated again (a storey of a
    file that leaves out its defaults keeps them left out)."""
    raw = sample_dict(storeys=1)
    assert "access" not in raw["storeys"][0]
    for path in ("storeys[0].readings[0]", "storeys[0].members[1]"):
        applied = edits.apply(raw, "remove", path, None)
        assert set(applied.doc["storeys"][0]) == set(raw["storeys"][0])
