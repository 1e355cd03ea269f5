"""What a field's text means (its value or the rule it breaks), one case each: numbers, whole
numbers, times with and without an offset, teams of people with their ids."""

from __future__ import annotations

from datetime import datetime, timedelta, timezone

import pytest

from triage.ui.widgets.field import (
    parse_team,
    parse_value,
    parse_when,
    show_text,
    team_text,
    when_text,
)

KOWHAI = timezone(timedelta(hours=13))


@pytest.mark.parametrize(("text", "kind", "unit", "required", "want"), [
    ("  ", "float", "", False, None),
    ("3,5", "float", "m", False, 3.5),          # a decimal comma as typed on many laptops
    ("12", "int", "", False, 12),
    ("12.0", "int", "", False, 12),
    (" Harbour ", "text", "", False, "Harbour"),
])
def test_values(text, kind, unit, required, want):
    assert parse_value(text, kind, unit, required) == want


@pytest.mark.parametrize(("text", "kind", "unit", "required", "rule"), [
    ("", "float", "", True, "required"),
    ("three", "float", "mm", False, "must be a number in mm, not 'three'"),
    ("three", "int", "", False, "must be a number, not 'three'"),
    ("inf", "float", "", False, "must be a finite number"),
    ("nan", "float", "", False, "must be a finite number"),
    ("2.5", "int", "", False, "must be a whole number"),
])
def test_rules(text, kind, unit, required, rule):
    with pytest.raises(ValueError) as err:
        parse_value(text, kind, unit, required)
    assert str(err.value) == rule


def test_shown_values():
    assert (show_text(None), show_text(3.20), show_text(12), show_text("G")) == (
        "", "3.2", "12", "G")


def test_times_as_shown_and_as_typed():
    at = datetime(2026, 11, 29, 14, 5, tzinfo=KOWHAI)
    assert when_text(at) == "2026-11-29 14:05 +13:00"
    assert when_text("2026-11-29T14:05:30+13:00") == "2026-11-29 14:05:30 +13:00"
    assert when_text(datetime(2026, 11, 29, 14, 5)) == "2026-11-29 14:05"
    assert when_text(None) == when_text("") == ""
    assert parse_when("2026-11-29 14:05 +1300", None) == "2026-11-29T14:05:00+13:00"
    assert parse_when("2026-11-29   14:05", KOWHAI) == "2026-11-29T14:05:00+13:00"
    assert parse_when("2026-11-29T14:05:09+05:30", None) == "2026-11-29T14:05:09+05:30"
    local = parse_when("2026-11-29 14:05", None)   # the laptop's own offset
    assert local.startswith("2026-11-29T14:05:00") and len(local) == 25
    for bad in ("", "   "):
        with pytest.raises(ValueError, match="required"):
            parse_when(bad, KOWHAI)
    with pytest.raises(ValueError) as err:
        parse_when("yesterday at noon", KOWHAI)
    assert str(err.value) == "a date and time such as 2026-11-29 14:05"


def test_teams_as_shown_and_as_typed():
    typed = "Ana Rewi (NZ-42);  Tom Hale ;; Mere ( )"
    team = parse_team(typed)
    assert team == [{"name": "Ana Rewi", "id": "NZ-42"}, {"name": "Tom Hale"},
                    {"name": "Mere"}]
    assert team_text(team) == "Ana Rewi (NZ-42); Tom Hale; Mere"
    assert team_text(None) == ""
    for bad in ("(NZ-42)", "Ana (NZ (42))"):
        with pytest.raises(ValueError) as err:
            parse_team(bad)
        assert str(err.value) == (f"{bad!r}: a name, then its id in brackets if there is one; "
                                  "people separated by ;")
