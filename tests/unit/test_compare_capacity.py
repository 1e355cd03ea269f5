"""The comparison of two inspections compares residual capacity per storey, direction and
method (docs/method.md section 11; our FEMA 352 and FEMA 306 ratios on tables from memory)."""

from __future__ import annotations

import json
from typing import Any

from tests.helpers import make, reading, storey
from triage.assess import assess
from triage.assess.compare import compare
from triage.assess.compare_capacity import capacity_change_words, capacity_changes

QUIET = [reading("x", 0.4), reading("y", 0.3)]


def _pair(old: list[dict[str, Any]], new: list[dict[str, Any]], sx: str, sy: str) -> Any:
    so = make([storey("1", QUIET, old)], sx=sx, sy=sy)
    sn = make([storey("1", QUIET, new)], sx=sx, sy=sy)
    return compare(so, assess(so), sn, assess(sn))


def test_steel_connections_worse_after_an_aftershock() -> None:
    c = _pair([{"kind": "connection", "count": 10}],
              [{"kind": "connection", "count": 8},
               {"kind": "connection", "count": 2, "connection_type": "G4"}],
              "steel_moment_frame", "rc_frame")
    caps = c.storeys[0].capacity
    steel = next(x for x in caps if x.method == "fema352")
    assert (steel.dir, steel.before, steel.after, steel.change) == ("x", 1.0, 0.84, "worse")
    assert (steel.index_before, steel.index_after) == (0.0, 1.6)
    lines = c.lines()
    assert any("FEMA 352 floor damage index, our ratio 100.0% -> 84.0% (D 0.00 -> 1.60); worse"
               in line for line in lines)
    assert json.loads(c.to_json())["storeys"][0]["capacity"][0]["method"] in (
        "fema352", "jbdpa")


def test_walls_better_new_and_unchanged() -> None:
    c = _pair([{"kind": "wall", "count": 4, "severity": "heavy", "mode": "rocking"},
               {"kind": "column", "count": 4}],
              [{"kind": "wall", "count": 4, "severity": "slight", "mode": "rocking"},
               {"kind": "column", "count": 4}],
              "urm_wall", "urm_wall")
    by = {(x.dir, x.method): x for x in c.storeys[0].capacity}
    # rocking keeps strength at every severity: lambda Q 1.0 before and after -> same
    assert by[("x", "fema306")].change == "same"
    assert capacity_change_words("1", by[("x", "fema306")]) is None
    d = _pair([{"kind": "wall", "count": 2, "severity": "heavy", "mode": "diagonal_tension"}],
              [{"kind": "wall", "count": 2, "severity": "slight", "mode": "diagonal_tension"}],
              "urm_wall", "urm_wall")
    ch = next(x for x in d.storeys[0].capacity if x.dir == "x")
    assert (ch.before, ch.after, ch.change) == (0.4, 0.9, "better")
    assert "a repair, or a different reading" in (capacity_change_words("1", ch) or "")


def test_a_method_on_one_side_only_and_one_not_established() -> None:
    so = make([storey("1", QUIET, [{"kind": "connection", "count": 4}])],
              sx="steel_moment_frame", sy="steel_moment_frame")
    sn = make([storey("1", QUIET, [{"kind": "connection", "count": 4, "inspected": 1}])],
              sx="steel_moment_frame", sy="steel_moment_frame")
    out = capacity_changes("1", assess(so), assess(sn))
    assert {x.change for x in out} == {"open"}
    assert "not established" in (capacity_change_words("1", out[0]) or "")
    only_new = capacity_changes("1", None, assess(sn))
    assert {x.change for x in only_new} == {"new"}
    only_old = capacity_changes("1", assess(so), None)
    assert {x.change for x in only_old} == {"not_reassessed"}
    assert "not assessed again" in (capacity_change_words("1", only_old[0]) or "")
    assert "not assessed before" in (capacity_change_words("1", only_new[0]) or "")
