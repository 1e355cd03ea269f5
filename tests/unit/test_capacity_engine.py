"""Residual capacity of steel moment frames (FEMA 352) and walls (FEMA 306) in the engine:
worked storeys by hand, the survey keys' rules, and concrete left as it was.

The tables are from memory (tests/reference/test_fema352.py, test_fema306.py); the ratios,
links to levels and defaults here are ours (docs/method.md, section 4a). Tolerance 1e-6 on
ratios (the JSON keeps 6 significant digits).
"""

from __future__ import annotations

import json
import math
from pathlib import Path
from typing import Any

import pytest
from scipy import stats

from tests.helpers import make, reading, storey, survey_dict
from tests.unit import concrete_corpus
from triage import __version__
from triage.assess import assess
from triage.model import SurveyError, json_schema, parse_survey
from triage.standards import load

QUIET = [reading("x", 0.5), reading("y", 0.5)]


def _steel(members: list[dict[str, Any]], **kw: Any) -> Any:
    return assess(make([storey("1", QUIET, members)], sx="steel_moment_frame",
                       sy=kw.pop("sy", "steel_moment_frame"), **kw))


def _walls(members: list[dict[str, Any]], sx: str = "urm_wall", sy: str = "urm_wall") -> Any:
    return assess(make([storey("1", QUIET, members)], sx=sx, sy=sy))


def _cap(a: Any, d: str, method: str) -> Any:
    return next(c for c in a.residual_capacity if c.dir == d and c.method == method)


# --- steel ---------------------------------------------------------------------------------

def test_undamaged_connections_give_one_and_occupy() -> None:
    a = _steel([{"kind": "column", "count": 8}, {"kind": "connection", "count": 16}])
    c = _cap(a, "x", "fema352")
    assert (c.ratio, c.index, c.level, c.sampled, c.taken) == (1.0, 0.0, "IO", False, True)
    assert a.storeys[0].residual_capacity == 1.0
    assert a.tier == "occupy" and not a.provisional


def test_all_inspected_index_is_the_mean() -> None:
    # 2 of 10 connections G4 (index 8), 8 sound: D = 16 / 10 = 1.6 -> LS (ours: up to 4);
    # ratio 1 - 1.6/10 = 0.84.
    a = _steel([{"kind": "connection", "count": 8},
                {"kind": "connection", "count": 2, "connection_type": "G4", "ref": "J2"}])
    c = _cap(a, "x", "fema352")
    assert c.index == pytest.approx(1.6, abs=1e-9)
    assert c.ratio == pytest.approx(0.84, abs=1e-9)
    assert c.level == "LS" and not c.sampled
    assert a.tier in ("hold", "evacuate")   # G4 is class IV too: the lateral floor LS
    m = a.storeys[0].members[1]
    assert (m.connection_type, m.connection_index, m.damage_class, m.class_from) == (
        "G4", 8.0, "IV", "type")
    assert any("FEMA 352 floor damage index D = 1.60" in r and "from memory" in r
               and "(ours)" in r for r in a.reasons)


def test_a_broken_connection_without_a_type_takes_the_default() -> None:
    a = _steel([{"kind": "connection", "count": 3},
                {"kind": "connection", "count": 1, "signs": ["connection_fractured"]}])
    m = a.storeys[0].members[1]
    assert (m.connection_type, m.connection_index) == ("G4", 8.0)
    assert _cap(a, "x", "fema352").index == pytest.approx(2.0, abs=1e-9)
    # the default is a named assumption: another type changes the index
    std = load()
    w2 = assess(make([storey("1", QUIET, [
        {"kind": "connection", "count": 3},
        {"kind": "connection", "count": 1, "signs": ["connection_fractured"]}])],
        sx="steel_moment_frame", sy="steel_moment_frame"),
        assumptions=std.assumptions.with_overrides(fema352_fractured_type="W2"))
    assert w2.storeys[0].members[1].connection_type == "W2"
    assert _cap(w2, "x", "fema352").index == pytest.approx(1.5, abs=1e-9)


def test_a_sample_takes_the_upper_estimate_never_the_uninspected_as_sound() -> None:
    # 20 connections; 10 inspected: 2 at G4 (8), 8 sound: one index besides 0, so the layered
    # estimate is FEMA 352's form itself: D = mean + t(0.9, 9) s / sqrt(10) sqrt(1 - 10/20).
    a = _steel([{"kind": "connection", "count": 18, "inspected": 8},
                {"kind": "connection", "count": 2, "connection_type": "G4"}])
    vals = [8.0] * 2 + [0.0] * 8
    mean = sum(vals) / 10
    s = math.sqrt(sum((v - mean) ** 2 for v in vals) / 9)
    want = mean + stats.t.ppf(0.9, 9) * s / math.sqrt(10) * math.sqrt(0.5)
    c = _cap(a, "x", "fema352")
    assert c.index == pytest.approx(want, rel=1e-5)
    assert c.sampled and (c.inspected, c.count) == (10, 20)
    # the plain mean over all twenty (the uninspected as sound) would be 0.8: never taken
    assert c.index > 1.6 > 0.8
    assert a.provisional
    assert any("8 of 18 inspected" in n for n in a.notes)


def test_too_few_inspected_leave_the_capacity_open() -> None:
    a = _steel([{"kind": "connection", "count": 12, "inspected": 1}])
    c = _cap(a, "x", "fema352")
    assert c.ratio is None and c.level is None and c.index is None
    assert a.provisional
    assert any("too few to estimate" in r for r in a.reasons)
    none = _steel([{"kind": "connection", "count": 12, "inspected": 0}])
    assert _cap(none, "x", "fema352").ratio is None
    assert any("no connection inspected" in r for r in none.reasons)


def test_index_links_to_levels_at_each_step() -> None:
    # ours: D up to 1 IO, up to 4 LS, up to 7 CP, over 7 beyond CP (types of index 1, 4, 6, 8,
    # 10 on every connection)
    for code, level in (("W1b", "IO"), ("G1", "LS"), ("W2", "CP"), ("G4", "beyond-CP"),
                        ("G5", "beyond-CP"), ("W1a", "IO")):
        a = _steel([{"kind": "connection", "count": 4, "connection_type": code}])
        assert _cap(a, "x", "fema352").level == level, code


def test_type_only_in_a_steel_moment_frame_direction_and_a_note_elsewhere() -> None:
    a = _steel([{"kind": "connection", "count": 2, "dir": "y", "connection_type": "G1"},
                {"kind": "column", "count": 4}], sy="steel_braced_frame")
    assert not [c for c in a.residual_capacity if c.method == "fema352"]
    assert any("read for steel moment frames only" in n for n in a.notes)
    assert a.storeys[0].members[0].damage_class == "III"


# --- walls ---------------------------------------------------------------------------------

def test_undamaged_walls_give_one() -> None:
    a = _walls([{"kind": "wall", "count": 6}])
    for d in "xy":
        c = _cap(a, d, "fema306")
        assert (c.ratio, c.grade, c.level) == (1.0, "slight", "IO")
    assert a.storeys[0].members[0].severity is None


def test_wall_ratio_weighted_as_for_r() -> None:
    # x: 4 walls weight 2 rocking heavy (lambda Q 1.0), 2 walls weight 1 diagonal tension
    # heavy (0.4): (8 * 1.0 + 2 * 0.4) / 10 = 0.88 -> light -> IO (ours).
    a = _walls([{"kind": "wall", "count": 4, "weight": 2.0, "dir": "x", "mode": "rocking",
                 "severity": "heavy"},
                {"kind": "wall", "count": 2, "dir": "x", "mode": "diagonal_tension",
                 "severity": "heavy"},
                {"kind": "wall", "count": 3, "dir": "y"}])
    c = _cap(a, "x", "fema306")
    assert c.ratio == pytest.approx(0.88, abs=1e-9)
    assert c.grade == "light"
    assert _cap(a, "y", "fema306").ratio == 1.0
    assert a.storeys[0].residual_capacity_by_dir.x == pytest.approx(0.88, abs=1e-9)
    assert a.storeys[0].members[1].lambda_q == 0.4
    assert a.storeys[0].members[1].class_from == "severity"
    assert a.tier == "evacuate"   # heavy is class IV (ours): a brittle wall's floor is CP


def test_severity_from_the_modes_crack_bounds() -> None:
    # URM pier, bed-joint sliding bounds 1.5 / 3.1 / 6.3 mm; unknown takes 0.7 / 1.5 / 3.1.
    for crack, mode, sev in ((1.5, "bed_joint_sliding", "insignificant"),
                             (1.6, "bed_joint_sliding", "slight"),
                             (3.2, "bed_joint_sliding", "moderate"),
                             (6.4, "bed_joint_sliding", "heavy"),
                             (1.0, None, "slight"), (2.0, None, "moderate"),
                             (3.2, None, "heavy")):
        m: dict[str, Any] = {"kind": "wall", "count": 1, "crack_mm": crack}
        if mode:
            m["mode"] = mode
        got = _walls([m]).storeys[0].members[0]
        assert (got.severity, got.mode) == (sev, mode or "unknown"), (crack, mode)


def test_signs_and_hand_set_class_give_a_severity() -> None:
    a = _walls([{"kind": "wall", "count": 1, "signs": ["core_crushed"]},
                {"kind": "wall", "count": 1, "damage_class": "III",
                 "override_reason": "seen close"}])
    assert a.storeys[0].members[0].severity == "extreme"
    assert a.storeys[0].members[0].lambda_q == 0.0
    assert a.storeys[0].members[1].severity == "moderate"


def test_infill_panels_are_their_own_component() -> None:
    a = _walls([{"kind": "infill", "count": 2, "mode": "corner_crushing", "severity": "heavy"},
                {"kind": "column", "count": 6}], sx="urm_infill", sy="urm_infill")
    c = _cap(a, "x", "fema306")
    assert c.ratio == pytest.approx(0.5, abs=1e-9)   # corner crushing heavy: lambda Q 0.5
    assert a.storeys[0].members[0].mode == "corner_crushing"


def test_rc_wall_takes_the_worse_of_jbdpa_and_fema306_and_shows_both() -> None:
    # x: 10 columns sound, 2 walls weight 3 crack 0.5 mm (JBDPA class II, eta 0.6):
    # R = (10 + 6 * 0.6) / 16 = 0.85. FEMA 306 (mode recorded): diagonal tension, 0.5 mm is
    # insignificant -> 1.0. Worse: R. With severity heavy: lambda Q 0.4 < R.
    base = [{"kind": "column", "count": 10},
            {"kind": "wall", "count": 2, "dir": "x", "weight": 3.0, "crack_mm": 0.5}]
    plain = assess(make([storey("1", QUIET, base)], sx="rc_wall", sy="rc_wall"))
    assert [c.method for c in plain.residual_capacity] == ["jbdpa", "jbdpa"]
    both = assess(make([storey("1", QUIET, [base[0], {**base[1], "mode": "diagonal_tension"}])],
                       sx="rc_wall", sy="rc_wall"))
    j, f = _cap(both, "x", "jbdpa"), _cap(both, "x", "fema306")
    assert j.ratio == pytest.approx(0.85, abs=1e-9) and f.ratio == 1.0
    assert j.taken and not f.taken
    heavy = assess(make([storey("1", QUIET, [base[0], {**base[1], "mode": "diagonal_tension",
                                                       "severity": "heavy"}])],
                        sx="rc_wall", sy="rc_wall"))
    j, f = _cap(heavy, "x", "jbdpa"), _cap(heavy, "x", "fema306")
    assert f.ratio == pytest.approx(0.4, abs=1e-9) and f.taken and not j.taken
    assert heavy.storeys[0].residual_capacity_by_dir.x == pytest.approx(0.4, abs=1e-9)
    assert "JBDPA" in (heavy.residual_capacity_method or "")
    assert "FEMA 306" in (heavy.residual_capacity_method or "")


def test_a_mode_not_kept_for_the_type_is_taken_as_unknown() -> None:
    a = _walls([{"kind": "wall", "count": 1, "mode": "web_crushing", "severity": "heavy"}])
    assert a.storeys[0].members[0].mode == "unknown"
    assert any("behaviour mode web crushing is not among the FEMA 306 modes" in n for n in a.notes)


def test_braced_and_timber_keep_no_capacity_and_say_so() -> None:
    a = assess(make([storey("1", QUIET, [{"kind": "wall", "count": 3}])],
                    sx="wood_stud_wall", sy="steel_braced_frame"))
    assert a.residual_capacity == () and a.residual_capacity_method is None
    assert any("not computed for braced steel frame or timber stud walls" in r for r in a.reasons)


# --- the survey's keys ---------------------------------------------------------------------

def _refused(member: dict[str, Any], said: str, sx: str = "steel_moment_frame") -> None:
    with pytest.raises(SurveyError, match=said):
        parse_survey(survey_dict([storey("1", [], [member])], sx=sx, sy=sx))


@pytest.mark.parametrize(("member", "said"), [
    ({"kind": "column", "count": 2, "connection_type": "G1"},
     r"members\[0\]\.connection_type: a FEMA 352 damage type belongs on a connection group"),
    ({"kind": "connection", "count": 2, "connection_type": "G9"},
     r"connection_type: 'G9' is not a known FEMA 352 connection damage type"),
    ({"kind": "beam", "count": 2, "mode": "rocking"},
     r"members\[0\]\.mode: a FEMA 306 behaviour mode belongs on a wall or infill group"),
    ({"kind": "column", "count": 2, "severity": "heavy"},
     r"members\[0\]\.severity: a FEMA 306 severity belongs on a wall or infill group"),
    ({"kind": "infill", "count": 2, "mode": "rocking"},
     r"mode: 'rocking' is not a FEMA 306 mode of an infill panel; mode must be one of: "
     r"diagonal_tension \(diagonal tension\), bed_joint_sliding \(bed-joint sliding\), "
     r"corner_crushing \(corner crushing\), unknown \(not known\) \(storey 1, member "
     r"group 1, behaviour mode\)$"),
    ({"kind": "wall", "count": 2, "severity": "grave"}, r"members\[0\]\.severity"),
    ({"kind": "wall", "count": 2, "inspected": 3}, r"inspected: 3 inspected of a group of 2"),
    ({"kind": "wall", "count": 2, "inspected": -1}, r"inspected: must be greater than or equal"),
    ({"kind": "wall", "count": 2, "inspected": 0, "signs": ["core_crushed"]},
     r"inspected: none inspected, yet damage is recorded"),
])
def test_the_keys_refused_where_they_do_not_belong(member: dict[str, Any], said: str) -> None:
    _refused(member, said)


def test_the_keys_keep_derived_ids_and_round_trip() -> None:
    plain = survey_dict([storey("1", [], [{"kind": "connection", "count": 2}])],
                        sx="steel_moment_frame", sy="steel_moment_frame")
    before = parse_survey(plain).survey_id
    # absent keys leave the id as it was; present ones change it and come back out
    assert parse_survey(json.loads(json.dumps(plain))).survey_id == before
    with_keys = json.loads(json.dumps(plain))
    with_keys["storeys"][0]["members"][0].update({"connection_type": "C2", "inspected": 1})
    s = parse_survey(with_keys)
    assert s.survey_id != before
    out = s.to_json_dict()["storeys"][0]["members"][0]
    assert (out["connection_type"], out["inspected"]) == ("C2", 1)
    assert parse_survey(s.to_json_dict()) == s


def test_json_schema_names_the_keys_and_their_values() -> None:
    props = json_schema()["$defs"]["MemberGroup"]["properties"]
    for key in ("connection_type", "inspected", "mode", "severity"):
        assert key in props, key
    text = json.dumps(props)
    assert '"G4"' in text and '"bed_joint_sliding"' in text and '"extreme"' in text


# --- concrete unchanged, version bumped ----------------------------------------------------

def test_concrete_surveys_assess_as_before() -> None:
    """300 seeded concrete surveys without the new keys: the assessment (but for the engine's
    version, assumptions, sources and the keys added) is byte for byte engine 0.2.0's."""
    want = json.loads((Path(__file__).parent / "data" / "concrete_before_capacity.json")
                      .read_text(encoding="utf-8"))
    got = concrete_corpus.digests()
    changed = [i for i, (a, b) in enumerate(zip(want, got, strict=True)) if a != b]
    assert not changed, f"concrete surveys assessed differently: {changed[:10]}"


def test_engine_version_bumped() -> None:
    assert __version__ != "0.2.0"
    a = _walls([{"kind": "wall", "count": 1}])
    assert a.engine.version == __version__
    assert "fema306_grade_bounds" in a.engine.assumptions
