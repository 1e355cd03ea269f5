"""Words for the keys of residual capacity beyond concrete: every one in the vocabulary, none
shown as a key; descriptions of the FEMA 352 types stay in their table."""

from __future__ import annotations

import tomllib
from typing import get_args

from triage.assess.result import CapacityResult
from triage.standards import HERE, SEVERITIES, WALL_MODES, load
from triage.standards import vocabulary as vocab


def test_every_connection_type_mode_severity_and_method_has_words() -> None:
    with open(HERE / "vocabulary.toml", "rb") as f:
        raw = tomllib.load(f)
    assert set(raw["connection_types"]) == set(load().steel.types)
    assert set(raw["wall_modes"]) == set(WALL_MODES)
    assert set(raw["severities"]) == set(SEVERITIES)
    methods = get_args(CapacityResult.model_fields["method"].annotation)
    assert set(raw["capacity_methods"]) == set(methods)
    for section in ("connection_types", "wall_modes", "severities", "capacity_methods"):
        for key in raw[section]:
            assert "_" not in vocab.words(section, key), (section, key)


def test_type_descriptions_come_from_the_table() -> None:
    for code, t in load().steel.types.items():
        assert vocab.describe("connection_types", code) == t.description
        assert code in vocab.words("connection_types", code)
    assert vocab.describe("connection_types", "Z9") == ""


def test_fields_read_in_words_and_severity_is_never_a_bare_grade() -> None:
    assert vocab.field_words("storeys[0].members[1].connection_type") == (
        "1st storey from the bottom, member group 2, FEMA 352 damage type")
    assert vocab.field_words("storeys[0].members[0].severity").endswith("FEMA 306 severity")
    assert vocab.value_words("storeys[0].members[0].mode", "bed_joint_sliding") == (
        "bed-joint sliding")
    assert vocab.value_words("storeys[0].members[0].connection_type", "G4") == "G4 (girder)"
    assert vocab.plain_text("mode diagonal_tension at FEMA 306 severity heavy") == (
        "mode diagonal tension at FEMA 306 severity heavy")
    assert vocab.words("class_from", "type") == "FEMA 352 damage type"
    assert vocab.words("class_from", "severity") == "FEMA 306 severity"
