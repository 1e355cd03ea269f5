"""The one vocabulary: every key a person can meet has words, written once."""

from __future__ import annotations

import re
import tomllib
import types
import typing
from typing import Any, Literal, get_args, get_origin

import pytest
from pydantic import BaseModel

from triage import model, standards
from triage.assess import result
from triage.standards import vocabulary as vocab
from triage.standards.vocabulary import (
    field_entry,
    field_words,
    has_words,
    message_words,
    value_words,
    words,
)


def _snake(name: str) -> str:
    return re.sub(r"(?<!^)(?=[A-Z])", "_", name).lower()


def _literal_values(annotation: Any) -> set[str]:
    """Every value of the Literals inside an annotation (through unions, tuples, Annotated)."""
    if get_origin(annotation) is Literal:
        return {str(a) for a in get_args(annotation)}
    out: set[str] = set()
    for arg in get_args(annotation):
        out |= _literal_values(arg)
    return out


def _models(annotation: Any) -> list[type[BaseModel]]:
    if isinstance(annotation, type) and issubclass(annotation, BaseModel):
        return [annotation]
    out: list[type[BaseModel]] = []
    for arg in get_args(annotation):
        out += _models(arg)
    return out


def _is_list(annotation: Any) -> bool:
    if get_origin(annotation) in (tuple, list):
        return True
    if get_origin(annotation) in (typing.Union, types.UnionType):
        return any(_is_list(a) for a in get_args(annotation))
    return False


def _survey_models() -> list[type[BaseModel]]:
    seen: list[type[BaseModel]] = []
    todo: list[type[BaseModel]] = [model.Survey]
    while todo:
        m = todo.pop()
        if m in seen:
            continue
        seen.append(m)
        for f in m.model_fields.values():
            todo += _models(f.annotation)
    return seen


def test_every_field_of_the_survey_format_has_words() -> None:
    models = _survey_models()
    assert {m.__name__ for m in models} >= {"Survey", "Building", "Reading", "MemberGroup",
                                            "Hazard", "Photo", "Storey", "Inspector"}
    for m in models:
        section = f"fields.{_snake(m.__name__)}"
        for key, f in m.model_fields.items():
            e = vocab.entry(section, key)
            assert e is not None, f"{section}.{key} has no words in vocabulary.toml"
            assert "_" not in e.words, f"{section}.{key}: words look like a key: {e.words!r}"
            inner = _models(f.annotation)
            if inner:
                target = _snake(inner[0].__name__)
                if _is_list(f.annotation):
                    assert e.item == target, f"{section}.{key}: item should be {target}"
                    assert e.noun, f"{section}.{key}: a list needs the noun of one item"
                else:
                    assert e.block == target, f"{section}.{key}: block should be {target}"


def test_every_value_of_every_literal_of_the_survey_has_words() -> None:
    checked = 0
    for m in _survey_models():
        section = f"fields.{_snake(m.__name__)}"
        for key, f in m.model_fields.items():
            values = _literal_values(f.annotation)
            if not values or key == "format":
                continue
            e = vocab.entry(section, key)
            assert e is not None and e.values, f"{section}.{key}: names no section of words"
            for v in values:
                assert has_words(e.values, v), f"{e.values}.{v} has no words"
                checked += 1
    assert checked >= 20  # kinds, ductility, access, directions, classes at least


def test_table_keys_each_have_words() -> None:
    t = standards.load()
    groups: dict[str, Any] = {
        "systems": t.systems, "signs": t.signs, "hazards": t.hazards,
        "assumptions": t.assumption_notes, "levels": standards.LEVELS,
        "classes": standards.CLASSES, "grades": standards.GRADES, "directions": standards.DIRS,
        "member_kinds": model.MEMBER_KINDS, "tiers": result.TIERS,
        "basis": get_args(result.Basis), "hazard_effects": {h.effect for h in t.hazards.values()},
        "class_from": _literal_values(result.MemberResult.model_fields["class_from"].annotation),
        "statuses": get_args(standards.Status),
        "assumption_statuses": {a.status for a in t.assumption_notes.values()},
        "repairability": [r.key for r in t.repairability],
        "damage_states": t.damage_states.damage_states,
    }
    for section, keys in groups.items():
        assert keys, section
        for k in keys:
            assert has_words(section, k), f"{section}.{k} has no words"
            assert "_" not in words(section, k), f"{section}.{k}: {words(section, k)!r}"


def test_sign_hazard_and_system_keys_checked_by_the_model_have_words() -> None:
    # SystemKey, SignKey and HazardKey are checked against the tables, not Literals.
    assert vocab.entry("fields.systems", "x").values == "systems"
    assert vocab.entry("fields.member_group", "signs").values == "signs"
    assert vocab.entry("fields.hazard", "kind").values == "hazards"
    for k in standards.sign_keys():
        assert has_words("signs", k)


def test_each_key_is_worded_once() -> None:
    """Descriptions stay in their tables; the vocabulary holds none of theirs."""
    with open(standards.HERE / "vocabulary.toml", "rb") as f:
        raw = tomllib.load(f)
    for section in vocab.TABLE_SECTIONS:
        assert section not in raw, f"{section} is worded in its own table"
    t = standards.load()
    for section, table, attr in (("signs", t.signs, "description"),
                                 ("hazards", t.hazards, "description"),
                                 ("systems", t.systems, "description"),
                                 ("assumptions", t.assumption_notes, "why")):
        for k, item in table.items():
            e = vocab.entry(section, k)
            assert e is not None and not e.meaning, f"{section}.{k}: meaning lives in the table"
            assert vocab.describe(section, k) == getattr(item, attr)
    # and the other way: no section of words holds a key no table or model knows
    for section, keys in (("signs", t.signs), ("hazards", t.hazards), ("systems", t.systems)):
        assert set(raw[section]) == set(keys), section


def test_loaded_once() -> None:
    assert vocab.vocabulary() is vocab.vocabulary()


SURVEY = {
    "format": "triage-survey/1",
    "building": {"name": "Harbour Bakery", "address": "5 Quay Road, Kōwhai Bay",
                 "system": {"x": "rc_wall", "y": "rc_frame"}},
    "inspection": {"inspector": {"name": "Tess Tester"}, "at": "2026-11-29T10:30:00+13:00"},
    "storeys": [{"label": "G", "height_m": 3.6,
                 "members": [{"kind": "column", "count": 1, "ref": "C3"}]},
                {"label": "1", "height_m": 3.2}],
    "hazards": [{"kind": "falling_hazard"}],
}


@pytest.mark.parametrize(("path", "said"), [
    ("storeys[0].readings[5].gauge_mm", "storey G, reading 6, gauge (mm)"),
    ("storeys[1].height_m", "storey 1, height (m)"),
    ("storeys[0].members[0].signs", "storey G, member group 1 (C3), signs seen"),
    ("storeys[0].members[0].signs[1]", "storey G, member group 1 (C3), sign 2"),
    ("hazards[0].height_above_ground_m", "hazard 1 (falling hazard), height above ground (m)"),
    ("building.system.x", "building, structural system, x direction"),
    ("inspection.inspector.name", "inspection, inspector, name"),
    ("storeys[0]", "storey G"),
])
def test_field_words_with_the_survey(path: str, said: str) -> None:
    assert field_words(path, SURVEY) == said
    assert field_words(path, model.parse_survey(SURVEY)) == said


def test_field_words_without_the_survey_count_from_the_bottom() -> None:
    assert field_words("storeys[0].readings[5].gauge_mm") == (
        "1st storey from the bottom, reading 6, gauge (mm)")
    assert field_words("storeys[11].label") == "12th storey from the bottom, label"
    assert field_words("storeys[22].label").startswith("23rd storey")
    # a path the vocabulary cannot read comes back as it was
    assert field_words("storeys[0].nonsense") == "storeys[0].nonsense"
    assert field_words("storeys[0].height_m.more") == "storeys[0].height_m.more"
    assert field_entry("storeys[2].readings[0].tilt_deg").unit == "°"


def test_values_in_words() -> None:
    assert value_words("hazards[0].kind", "falling_hazard") == "falling hazard"
    assert value_words("storeys[0].members[1].signs",
                       ["cover_spalling", "bar_exposed"]) == "cover spalled, bars exposed"
    assert value_words("storeys[0].readings[0].gauge_mm", 1500.0) == "1500 mm"
    assert value_words("storeys[0].readings[0].tilt_deg", -0.12) == "-0.12°"
    assert value_words("storeys[0].below_grade", True) == "yes"
    assert value_words("storeys[0].access", "none") == "not entered"
    assert value_words("storeys[0].readings", {"dir": "x", "offset_mm": 7.0,
                                                "gauge_mm": 2000}) == (
        "direction x, offset 7 mm, gauge 2000 mm")
    assert value_words("storeys[0].label", None) == "—"


def test_messages_name_the_field_in_words() -> None:
    assert message_words("storeys[0].readings[5].gauge_mm: must be at least 100", SURVEY) == (
        "storey G, reading 6, gauge (mm): must be at least 100")
    assert message_words("no path here: just a rule") == "no path here: just a rule"


def test_unknown_keys_read_plainly_never_fail() -> None:
    assert words("signs", "some_new_sign") == "some new sign"
    assert vocab.many("member_kinds", "slab") == "floor slabs"


def test_running_text_reads_in_words() -> None:
    from triage.standards.vocabulary import plain_text

    assert plain_text("offset_mm and gauge_mm go together") == (
        "offset (mm) and gauge (mm) go together")
    assert plain_text("signs: 'cover_spalling' is not a sign of a brace") == (
        "signs: cover spalled is not a sign of a brace")
    assert plain_text("damage_class set by hand needs an override_reason") == (
        "damage class set by hand needs an override reason")
    # the model's refusal names the field in words at its end: said once
    assert plain_text("storeys[0].readings[5].gauge_mm: must be at least 100 (1st storey from "
                      "the bottom, reading 6, gauge (mm))", SURVEY) == (
        "storey G, reading 6, gauge (mm): must be at least 100")
    assert plain_text("a falling_hazard above storeys[1]", SURVEY) == (
        "a falling hazard above storey 1")
    assert plain_text("no key here: 0.2% is fine.") == "no key here: 0.2% is fine."
