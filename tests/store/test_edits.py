"""Edits as the screens make them: each one transaction, validated, logged, undoable."""

from __future__ import annotations

import json

import pytest
from hypothesis import given
from hypothesis import strategies as st

from tests.store.conftest import sample, sample_dict
from triage.model import canonical_json, parse_survey
from triage.store import EditRefused, Store, StoreError, canonical, edits


def _doc(store: Store, sid: str) -> str:
    return store.conn.execute("SELECT doc FROM surveys WHERE id = ?", (sid,)).fetchone()[0]


def test_set_add_remove_are_logged_with_old_and_new(stored):
    store, sid = stored
    assert store.revision(sid) == 1
    assert store.set_value(sid, "storeys[1].readings[0].offset_mm", 7.5, "Ana") == 2
    assert store.add_item(sid, "storeys[0].readings", {"dir": "x", "tilt_deg": 0.1}, "Ana") == 3
    assert store.remove_item(sid, "storeys[2].members[1]", "Ana") == 4
    log = store.change_log(sid)
    assert [c.op for c in log] == ["remove", "add", "set", "import"]
    assert (log[2].path, log[2].old, log[2].new, log[2].who) == (
        "storeys[1].readings[0].offset_mm", 2.0, 7.5, "Ana")
    assert log[1].path == "storeys[0].readings[2]"
    assert log[0].old["ref"] == "W2" and log[0].new is None
    assert log[0].at == "2026-11-29T01:00:00.000+00:00"
    s = store.load_survey(sid)
    assert s.storeys[1].readings[0].offset_mm == 7.5
    assert s.storeys[0].readings[2].tilt_deg == 0.1
    assert [m.ref for m in s.storeys[2].members] == [None]


def test_removal_hides_and_indices_count_visible_items(stored):
    store, sid = stored
    store.add_item(sid, "storeys[0].readings", {"dir": "x", "offset_mm": 3.0, "gauge_mm": 1000,
                                                 "where": "third"})
    store.remove_item(sid, "storeys[0].readings[0]")
    s = store.load_survey(sid)
    # The list the survey shows has closed up: index 1 is now the third reading.
    assert [r.where for r in s.storeys[0].readings] == [None, "third"]
    store.set_value(sid, "storeys[0].readings[1].where", "third, moved")
    assert store.load_survey(sid).storeys[0].readings[1].where == "third, moved"
    hidden = store.hidden_items(sid)
    assert len(hidden) == 1 and hidden[0].old == {"dir": "x", "offset_mm": 1.0,
                                                  "gauge_mm": 2000.0, "sd_mm": 1.0}
    # Nothing is deleted: the row count of the log only grows.
    assert store.conn.execute("SELECT count(*) FROM changes").fetchone()[0] == 4


def test_undo_restores_the_value_before_the_last_change_and_keeps_both(stored):
    store, sid = stored
    store.set_value(sid, "building.name", "Harbour Flats (north block)")
    store.set_value(sid, "storeys[0].height_m", 4.2)
    undone = store.undo_last(sid, "Ana")
    assert undone is not None and undone.path == "storeys[0].height_m"
    s = store.load_survey(sid)
    assert s.storeys[0].height_m == 3.2
    assert s.building.name == "Harbour Flats (north block)"
    log = store.change_log(sid)
    assert (log[0].op, log[0].old, log[0].new, log[0].undoes) == ("undo", 4.2, 3.2, undone.uid)
    assert (log[1].op, log[1].old, log[1].new) == ("set", 3.2, 4.2)
    # A second undo reverts the change before; a third finds nothing left but the import.
    store.undo_last(sid)
    assert store.load_survey(sid).building.name == "Harbour Flats"
    assert store.undo_last(sid) is None
    assert store.revision(sid) == 5


def test_undo_brings_a_removed_item_back_at_its_place(stored):
    store, sid = stored
    before = store.load_survey(sid).storeys[1].members
    store.remove_item(sid, "storeys[1].members[0]")
    store.undo_last(sid)
    assert store.load_survey(sid).storeys[1].members == before
    assert store.hidden_items(sid) == []


def test_undo_of_an_add_and_of_a_hidden_survey(stored):
    store, sid = stored
    store.add_item(sid, "hazards", {"kind": "falling_hazard", "storey": "2",
                                    "height_above_ground_m": 9.0})
    store.undo_last(sid)
    assert store.load_survey(sid).hazards == ()
    store.hide_survey(sid)
    assert store.list_surveys() == []
    assert len(store.list_surveys(include_hidden=True)) == 1
    store.undo_last(sid)
    assert [r.id for r in store.list_surveys()] == [sid]


@pytest.mark.parametrize(("op", "path", "value", "message"), [
    ("set", "storeys[1].label", "G", "storeys[1].label: 'G' is used twice"),
    ("set", "storeys[0].readings[0].gauge_mm", -5, "storeys[0].readings[0].gauge_mm: must be"),
    ("set", "storeys[0].readings[0].tilt_deg", 0.2,
     "storeys[0].readings[0]: a reading has offset_mm with gauge_mm, or tilt_deg, never both"),
    ("set", "storeys[0].readings[0].offset_mm", 600.0,
     "storeys[0].readings[0]: drift ratio"),
    ("set", "storeys[0].members[0].signs", ["brace_buckled"],
     "storeys[0].members[0].signs: 'brace_buckled' is not a sign of a column"),
    ("set", "storeys[0].members[1].damage_class", "IV",
     "storeys[0].members[1]: damage_class set by hand needs an override_reason"),
    ("set", "storeys[0].colour", "blue", "storeys[0].colour: unknown key"),
    ("set", "building.system.x", "igloo", "building.system.x: 'igloo' is not a known"),
    ("set", "inspection.at", "yesterday", "inspection.at:"),
    ("set", "id", "00000000-0000-0000-0000-000000000000", "id: the survey's id is fixed"),
    ("add", "hazards", {"kind": "falling_hazard", "storey": "9"},
     "hazards[0].storey: '9' names no storey"),
    ("add", "storeys", {"label": "1", "height_m": 3.0}, "storeys[3].label: '1' is used twice"),
    ("add", "storeys[0].readings", {"dir": "z", "tilt_deg": 0.1},
     "storeys[0].readings[2].dir:"),
    ("remove", "storeys[0].readings[7]", None, "storeys[0].readings[7]: no such item"),
    ("set", "storeys[9].label", "X", "storeys[9]: no such item"),
    ("set", "storeys[0]..label", "X", "storeys[0]..label: not a field path"),
])
def test_refused_edit_names_the_field_and_changes_nothing(stored, op, path, value, message):
    store, sid = stored
    before = _doc(store, sid)
    with pytest.raises(EditRefused) as err:
        store.edit(sid, op, path, value)
    assert str(err.value).startswith(message), str(err.value)
    assert "\n" not in str(err.value)
    assert _doc(store, sid) == before
    assert store.revision(sid) == 1
    assert len(store.change_log(sid)) == 1


def test_refused_removals_of_what_others_rely_on(store):
    one = sample_dict(storeys=1, hazards=[{"kind": "falling_hazard", "storey": "G"}])
    s = parse_survey(one)
    store.add_survey(s)
    sid = str(s.survey_id)
    with pytest.raises(StoreError, match=r"hazards\[0\]\.storey: 'G' names no storey"):
        store.set_value(sid, "storeys[0].label", "Ground")
    store.remove_item(sid, "hazards[0]")
    with pytest.raises(StoreError, match="storeys: a survey keeps at least one storey"):
        store.remove_item(sid, "storeys[0]")
    store.set_value(sid, "storeys[0].label", "Ground")   # allowed once the hazard is gone


def test_edits_to_a_survey_not_stored_are_refused(store):
    with pytest.raises(StoreError, match="not in this database"):
        store.set_value("5f0d7b3c-0000-4000-8000-000000000000", "building.name", "X")


# Edits as the screens make them, in any order: the partial validation must leave exactly what
# validating the whole survey would give (normalised the same way), or refuse.
EDITS = st.sampled_from([
    ("set", "storeys[{s}].readings[0].offset_mm", st.floats(-60, 60, allow_nan=False)),
    ("set", "storeys[{s}].height_m", st.floats(0.5, 8.0)),
    ("set", "storeys[{s}].notes", st.text(max_size=20)),
    ("set", "storeys[{s}].access", st.sampled_from(["full", "partial", "none", "some"])),
    ("set", "storeys[{s}].members[0].count", st.integers(-1, 40)),
    ("set", "storeys[{s}].members[1].crack_mm", st.sampled_from([None, 0, 0.2, 1.5, 70])),
    ("set", "storeys[{s}].label", st.sampled_from(["G", "1", "2", "M", "R"])),
    ("set", "storeys[{s}].readings[1].tilt_deg", st.one_of(st.none(), st.floats(-1, 1))),
    ("set", "storeys[{s}].readings[0].gauge_mm", st.sampled_from([None, 0, 1000, 2500.5])),
    ("set", "storeys[{s}].members[1].damage_class", st.sampled_from([None, "IV", "VI"])),
    ("set", "storeys[{s}].members[0].dir", st.sampled_from([None, "x"])),
    ("set", "storeys[{s}].members[1].ref", st.one_of(st.none(), st.text(max_size=4))),
    ("set", "storeys[{s}].members[5].count", st.integers(1, 3)),
    ("add", "storeys[{s}].readings", st.fixed_dictionaries(
        {"dir": st.sampled_from(["x", "y"]), "tilt_deg": st.floats(-2, 2)})),
    ("add", "hazards", st.fixed_dictionaries(
        {"kind": st.sampled_from(["falling_hazard", "blocked_egress"]),
         "storey": st.sampled_from(["G", "1", "2", "M"])})),
    ("remove", "storeys[{s}].readings[0]", st.none()),
    ("remove", "hazards[0]", st.none()),
    ("set", "building.location", st.one_of(st.none(), st.fixed_dictionaries(
        {"lat": st.floats(-90, 90), "lon": st.floats(-200, 200)}))),
])


@given(st.lists(st.tuples(EDITS, st.integers(0, 2), st.data()), min_size=1, max_size=12))
def test_partial_validation_matches_full_validation(steps):
    doc = sample().to_json_dict()
    text = canonical.CanonicalText()
    for (op, path, values), s, data in steps:
        value = data.draw(values)
        p = path.format(s=s)
        # The short way for plain item fields and the general way agree, refusal included.
        try:
            general: edits.Applied | str = edits.apply(doc, op, p, value, direct=False)
        except EditRefused as err:
            general = str(err)
        try:
            applied = edits.apply(doc, op, p, value)
        except EditRefused as err:
            assert general == str(err)
            # Refused by the part: the whole survey with the raw edit applied is refused too.
            raw = {"set": edits.apply_set, "add": edits.apply_add,
                   "remove": lambda d, q, v: edits.apply_remove(d, q)}
            try:
                bad = raw[op](doc, p, value).doc
            except EditRefused:
                continue
            with pytest.raises(ValueError):
                parse_survey(json.loads(json.dumps(bad)))
            continue
        assert not isinstance(general, str), general
        assert (general.old, general.new, general.path) == (applied.old, applied.new,
                                                             applied.path)
        assert canonical_json(general.doc) == canonical_json(applied.doc)
        full = parse_survey(json.loads(json.dumps(applied.doc))).to_json_dict()
        assert canonical_json(applied.doc) == canonical_json(full)
        # The text kept between edits is the canonical text of the survey as it now is.
        assert text.text(applied.doc) == canonical_json(full)
        doc = applied.doc


def test_an_edit_is_judged_on_the_survey_as_another_process_left_it(db, stored):
    store, sid = stored
    store.set_value(sid, "storeys[0].notes", "this store now keeps the JSON between edits")
    with Store.open(db, refresh=False) as other:
        other.set_value(sid, "storeys[2].label", "R")
    # Against what this store saw last, '2' would be a duplicate label: now it is free.
    store.set_value(sid, "storeys[1].label", "2")
    assert [x.label for x in store.load_survey(sid).storeys] == ["G", "2", "R"]
    with Store.open(db, refresh=False) as other:
        other.add_item(sid, "hazards", {"kind": "falling_hazard", "storey": "2"})
    # Against what this store saw last, nothing names storey '2': now a hazard does.
    with pytest.raises(EditRefused, match=r"hazards\[0\]\.storey: '2' names no storey"):
        store.set_value(sid, "storeys[1].label", "Z")
    s = store.load_survey(sid)
    assert s.storeys[1].label == "2" and s.hazards[0].storey == "2"


def test_the_stored_json_stays_canonical_through_edits_of_every_kind(stored):
    store, sid = stored
    steps = [
        ("set", "storeys[1].readings[0].offset_mm", 4.5),
        ("set", "building.name", "Harbour Flats, Kōwhai Bay"),
        ("add", "storeys", {"label": "R", "height_m": 2.4}),
        ("set", "storeys[3].notes", "roof plant room: ōōō"),
        ("add", "hazards", {"kind": "falling_hazard", "storey": "R"}),
        ("set", "storeys[0].members[1].crack_mm", 0.9),
        ("remove", "storeys[0].readings[0]", None),
        ("set", "inspection.inspector.name", "Āni Tester"),
        ("set", "storeys[2].members[0].count", 9),
    ]
    for op, path, value in steps:
        store.edit(sid, op, path, value)
        doc = _doc(store, sid)
        assert doc == canonical_json(json.loads(doc))
        assert doc == canonical_json(store.load_survey(sid).to_json_dict())
    store.undo_last(sid)
    store.undo_last(sid)
    doc = _doc(store, sid)
    assert doc == canonical_json(store.load_survey(sid).to_json_dict())
