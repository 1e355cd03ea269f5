"""Worked examples, computed by hand in the comments, one per structural system or rule."""

from __future__ import annotations

import pytest

from tests.helpers import make, reading, storey, tilt, two_storey_frame
from triage.assess import assess
from triage.model import parse_survey


def test_concrete_frame_governed_by_drift():
    # docs/method.md's worked example. Storey 2 y: 12/2000 = 0.60% > 0.20% (negligible, IO) and <= 1.0% (LS)
    # for concrete frames -> LS -> hold. Storey 2 R = (19 + 0.5)/20 = 0.975 -> slight -> IO.
    a = assess(parse_survey(two_storey_frame()))
    assert (a.tier, a.performance_level) == ("hold", "LS")
    assert a.governing.model_dump() == {"storey": "2", "dir": "y", "basis": "drift"}
    assert a.storey("2").drift_ratio.y == 0.006
    assert a.storey("2").residual_capacity == 0.975
    assert a.reasons[0].startswith("storey 2, y: residual drift 0.60% is over 0.20%")
    assert "FEMA 356 Table C1-3, from memory" in a.reasons[0]
    # Nothing measurable could change hold within 3 sd: to occupy, storey 2 y must fall under
    # 0.20%, (0.60 - 0.20)/0.05 = 8 sd away; to evacuate, over LS 1.0%, 8 sd; storey 2 x set
    # over IO (2.0 sd) leaves the tier at hold; C3's 1.4 mm crack is (1.4 - 1.0)/0.05 = 8 sd
    # from its class bound. So measure_next is null and settled_by names the drift.
    assert a.measure_next is None
    assert a.settled_by is not None and "storey 2, y: residual drift 0.60%" in a.settled_by
    assert a.governing_spot is not None and (a.governing_spot.storey, a.governing_spot.dir) == (
        "2", "y")
    # P(hold) = P(|y2| in (0.2%, 1.0%]) times the other parts: 1 - 2 Phi(-8) = 1 - 1.2e-15,
    # so hold is not borderline.
    assert not a.provisional and a.borderline is False


def test_braced_steel_governed_by_member_damage_floor():
    # Drifts 2/2000 = 0.10% <= 0.20% IO. One buckled brace: class IV (rule of ours: a load path
    # gone) -> member-damage floor LS -> hold, basis damage, storey 1, no direction.
    # No residual capacity: no method in the tool covers braced steel frames.
    s = make([storey("1", [reading("x", 2.0), reading("y", -1.0)],
                     [{"kind": "column", "count": 12}, {"kind": "brace", "count": 7},
                      {"kind": "brace", "count": 1, "dir": "x", "signs": ["brace_buckled"],
                       "ref": "BR-2"}], height_m=5.5),
              storey("2", [reading("x", 1.0), reading("y", 1.0)],
                     [{"kind": "column", "count": 12}, {"kind": "brace", "count": 8}])],
             sx="steel_braced_frame", sy="steel_braced_frame")
    a = assess(s)
    assert (a.tier, a.performance_level) == ("hold", "LS")
    assert a.governing.model_dump() == {"storey": "1", "dir": None, "basis": "damage"}
    assert a.storey("1").members[2].damage_class == "IV"
    assert a.storey("1").members[2].class_from == "signs"
    assert a.storey("1").residual_capacity is None
    assert any("residual capacity: not computed for braced steel frame" in r for r in a.reasons)


def test_timber_house_governed_by_a_hazard():
    # Drifts 1/2000 = 0.05% < 0.25% (wood stud walls, IO): the structure alone would be occupy.
    # A visible lean makes it evacuate; the hazard governs as it raises the tier. The falling
    # chimney 6.5 m up keeps 1.0 x 6.5 = 6.5 m clear (common practice).
    s = make([storey("G", [reading("x", 1.0), reading("y", 1.0)], [{"kind": "wall", "count": 6}],
                     height_m=2.7)],
             sx="wood_stud_wall", sy="wood_stud_wall",
             hazards=[{"kind": "falling_hazard", "where": "chimney", "height_above_ground_m": 6.5},
                      {"kind": "visible_lean", "where": "whole house toward the street"}])
    a = assess(s)
    assert (a.tier, a.performance_level) == ("evacuate", "IO")
    assert a.governing.model_dump() == {"storey": None, "dir": None, "basis": "hazard"}
    assert a.hazards[0].keep_out_m == 6.5
    assert a.reasons[0].startswith("hazard: visible lean")


def test_masonry_wall_beyond_ls_by_drift():
    # Unreinforced masonry walls: IO 0.3% p, LS 0.6% p, CP 1.0%. Tilt 0.46 deg = 0.00802851 rad;
    # tan = x + x^3/3 = 0.00802869 (0.80%) ->
    # over 0.60% and within 1.0% -> CP -> evacuate.
    s = make([storey("G", [tilt("x", 0.46), tilt("y", 0.1)], [{"kind": "wall", "count": 8}],
                     height_m=3.8),
              storey("1", [reading("x", 2.0), reading("y", 2.0)], [{"kind": "wall", "count": 8}])],
             sx="urm_wall", sy="urm_wall")
    a = assess(s)
    assert a.storey("G").drift_ratio.x == pytest.approx(0.00802869, rel=1e-6)
    assert (a.tier, a.performance_level) == ("evacuate", "CP")
    assert a.governing.model_dump() == {"storey": "G", "dir": "x", "basis": "drift"}


def test_concrete_walls_governed_by_residual_capacity():
    # rc_wall in x, rc_frame in y. 10 sound columns; four walls along x at weight 3 each, three
    # of them cracked 1.5 mm (class III, eta 0.3). R_x = (10 + 3 + 3*3*0.3)/(10 + 12)
    # = 15.7/22 = 0.713636 -> moderate -> LS -> hold; R_y = 10/10 = 1 (walls act in x only).
    s = make([storey("1", [reading("x", 1.0), reading("y", 1.0)],
                     [{"kind": "column", "count": 10},
                      {"kind": "wall", "count": 1, "dir": "x", "weight": 3.0, "ref": "W4"},
                      {"kind": "wall", "count": 3, "dir": "x", "weight": 3.0, "crack_mm": 1.5,
                       "crack_sd_mm": 0.05, "ref": "W1-W3"}])],
             sx="rc_wall", sy="rc_frame")
    a = assess(s)
    st = a.storey("1")
    assert st.residual_capacity_by_dir.x == pytest.approx(15.7 / 22, abs=1e-6)
    assert st.residual_capacity_by_dir.y == 1.0
    assert st.damage_grade == "moderate"
    assert (a.tier, a.performance_level) == ("hold", "LS")
    assert a.governing.model_dump() == {"storey": "1", "dir": "x", "basis": "capacity"}


def test_partial_collapse_is_beyond_cp():
    s = make([storey("G", [reading("x", 1.0), reading("y", 1.0)]),
              storey("1", [reading("x", 1.0), reading("y", 1.0)])],
             hazards=[{"kind": "partial_collapse", "storey": "1", "where": "north bay roof"}])
    a = assess(s)
    assert (a.tier, a.performance_level) == ("evacuate", "beyond-CP")
    assert a.governing.model_dump() == {"storey": "1", "dir": None, "basis": "hazard"}
    assert a.storey("1").damage_grade == "collapse"
    assert a.tier_probability == {"occupy": 0.0, "hold": 0.0, "evacuate": 1.0}


def test_nothing_logged_is_provisional_hold():
    s = make([storey("G", [], members=[]), storey("1", [], members=[])])
    a = assess(s)
    assert (a.tier, a.performance_level, a.provisional) == ("hold", None, True)
    assert a.governing.basis == "no-data"
    assert a.tier_probability == {"occupy": 0.0, "hold": 1.0, "evacuate": 0.0}
    # A hazard that does not raise the tier above hold does not govern.
    s2 = make([storey("G", [], members=[])], hazards=[{"kind": "blocked_egress"}])
    assert assess(s2).governing.basis == "no-data"
    s3 = make([storey("G", [], members=[])], hazards=[{"kind": "ground_failure"}])
    a3 = assess(s3)
    assert (a3.tier, a3.governing.basis) == ("evacuate", "hazard")


def test_governing_is_the_largest_ratio_to_the_level_figure():
    # All four at LS in a concrete frame (LS figure 1.0%): storey 1 x 8/2000 = 0.40%, y 0.45%;
    # storey 2 x 0.45%, y 0.40%. |d|/F_LS: 0.40, 0.45, 0.45, 0.40: storey 1 y and storey 2 x
    # tie at 0.45; ties go to the lowest storey: 1, y.
    s = make([storey("1", [reading("x", 8.0), reading("y", 9.0)]),
              storey("2", [reading("x", 9.0), reading("y", 8.0)])])
    a = assess(s)
    assert a.governing.model_dump() == {"storey": "1", "dir": "y", "basis": "drift"}
    # In a tie of storey and ratio, x comes first: storey 1 x 9 mm as well.
    s2 = make([storey("1", [reading("x", 9.0), reading("y", 9.0)])])
    assert assess(s2).governing.model_dump() == {"storey": "1", "dir": "x", "basis": "drift"}


def test_governing_compares_each_direction_against_its_own_figure():
    # x: concrete walls, LS 0.5%; y: concrete frame, LS 1.0%. Storey 1 x 0.30% (8 - 2 = 6 mm,
    # 6/2000), y 0.90% (18 mm): both LS. x: 0.30/0.5 = 0.60; y: 0.90/1.0 = 0.90 -> y governs,
    # although the rule "lowest storey, x first" would have picked x.
    s = make([storey("1", [reading("x", 6.0), reading("y", 18.0)])], sx="rc_wall", sy="rc_frame")
    a = assess(s)
    assert a.performance_level == "LS"
    assert a.governing.model_dump() == {"storey": "1", "dir": "y", "basis": "drift"}
    # Storey 2 x at 0.45% (9 mm): 0.45/0.5 = 0.90 ties y's 0.90 -> lowest storey (1, y) wins.
    s2 = make([storey("1", [reading("x", 6.0), reading("y", 18.0)]),
               storey("2", [reading("x", 9.0), reading("y", 1.0)])], sx="rc_wall", sy="rc_frame")
    a2 = assess(s2)
    assert a2.governing.model_dump() == {"storey": "1", "dir": "y", "basis": "drift"}
    assert a2.governing_spot is not None and a2.governing_spot.reading == 1


def test_drift_before_damage_in_a_tie_and_class_iv_crack():
    # Storey 1 x drift LS (0.40%) and a column crack 2.5 mm: class IV -> floor LS. Same level:
    # drift x comes before damage.
    s = make([storey("1", [reading("x", 8.0), reading("y", 1.0)],
                     [{"kind": "column", "count": 20},
                      {"kind": "column", "count": 1, "crack_mm": 2.5}])])
    a = assess(s)
    assert a.governing.model_dump() == {"storey": "1", "dir": "x", "basis": "drift"}
    assert a.storey("1").damage_floor == "LS"


def test_provisional_when_a_direction_is_unmeasured_or_access_partial():
    s = make([storey("1", [reading("x", 1.0)])])
    assert assess(s).provisional
    assert assess(s).measure_next.why.startswith("no reading yet in y")
    s2 = make([storey("1", [reading("x", 1.0), reading("y", 1.0)], access="partial")])
    assert assess(s2).provisional
    s3 = make([storey("B1", [], members=[], below_grade=True),
               storey("1", [reading("x", 1.0), reading("y", 1.0)])])
    assert not assess(s3).provisional


def test_override_sets_the_class():
    s = make([storey("1", [reading("x", 1.0), reading("y", 1.0)],
                     [{"kind": "column", "count": 9},
                      {"kind": "column", "count": 1, "crack_mm": 0.1, "damage_class": "V",
                       "override_reason": "column visibly shorter at its head"}])])
    a = assess(s)
    m = a.storey("1").members[1]
    assert (m.damage_class, m.class_from, m.eta) == ("V", "override", 0.0)
    assert (a.tier, a.performance_level) == ("evacuate", "CP")


def test_defaults_are_listed():
    s = make([storey("1", [reading("x", 1.0, sd_mm=None), tilt("y", 0.01, sd_deg=None)],
                     [{"kind": "column", "count": 1, "crack_mm": 0.3}])])
    d = assess(s).defaulted
    # the fields in the vocabulary's words (sd_mm, sd_deg, crack_sd_mm), the defaults' values
    assert any("reading 1: uncertainty 1 mm (instrument default" in x for x in d)
    assert any("reading 2: uncertainty 0.05° (instrument default" in x for x in d)
    assert any("column group 1: crack uncertainty 0.05 mm (instrument default" in x for x in d)


def test_large_drift_kept_and_warned():
    s = make([storey("1", [reading("x", 130.0), reading("y", 1.0)])])
    a = assess(s)
    assert a.performance_level == "beyond-CP"
    assert any("over 5%" in n for n in a.notes)
