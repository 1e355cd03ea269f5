"""The second-round rules, each with a value worked by hand in its comment.

Damage floors (a table of ours), borderline, measure next, settled by, the probability print.
Offsets are over a 2000 mm gauge (1 mm = 0.05%) unless stated.
"""

from __future__ import annotations

import math

import pytest

from tests.helpers import make, reading, storey
from triage.assess import assess
from triage.assess.result import probability_text

SOUND = {"kind": "column", "count": 20}
SMALL = [reading("x", 1.0), reading("y", 1.0)]  # 0.05%: IO everywhere, 3 sd clear of it


def one_storey(members, sx="rc_frame", sy="rc_frame", readings=None):
    return assess(make([storey("1", SMALL if readings is None else readings, members)],
                       sx=sx, sy=sy))


# --- damage floors -----------------------------------------------------------------------------

def test_a_fractured_beam_holds_the_building():
    # A beam group with fractured bars (sign class V): the "other" row floors class V at LS,
    # so hold (before the table it left the building at occupy with no reason).
    a = one_storey([SOUND, {"kind": "beam", "count": 1, "signs": ["bar_fractured"],
                            "ref": "B7"}])
    assert (a.tier, a.performance_level) == ("hold", "LS")
    assert a.governing.model_dump() == {"storey": "1", "dir": None, "basis": "damage"}
    assert "beam group B7 (1) is class V" in a.reasons[0]
    assert "member outside the vertical and lateral system" in a.reasons[0]


def test_three_brittle_columns_at_class_iii():
    # 3 of 20 shear-critical (brittle) columns at 1.8 mm, sd 0.05: class III (1.0-2.0 mm).
    # R = (17 + 3 * 0.3) / 20 = 17.9 / 20 = 0.895: JBDPA grade light, IO. The brittle-vertical
    # floor holds class III at LS: hold, and the reason shows both (the floor departs from the
    # grade).
    a = one_storey([{"kind": "column", "count": 17},
                    {"kind": "column", "count": 3, "ductility": "brittle", "crack_mm": 1.8,
                     "crack_sd_mm": 0.05, "ref": "C1-C3"}])
    st = a.storey("1")
    assert st.residual_capacity == pytest.approx(0.895)
    assert (st.damage_grade, st.damage_floor) == ("light", "LS")
    assert (a.tier, a.performance_level) == ("hold", "LS")
    assert "column group C1-C3 (3, brittle) is class III" in a.reasons[0]
    assert "the JBDPA grade alone is light (R = 89.5%, so Immediate Occupancy (IO))" in a.reasons[0]
    assert st.members[1].floor == "LS"
    # P(hold): the crack must stay over 1.0 mm, (1.8 - 1.0) / 0.05 = 16 sd: 1 - 1e-57; and
    # under 2.0 mm (class IV would floor at CP), (2.0 - 1.8) / 0.05 = 4 sd: Phi(4) = 0.9999683.
    assert a.tier_probability["hold"] == pytest.approx(0.9999683, abs=1e-6)  # 6 digits kept


@pytest.mark.parametrize(("kind", "extra", "sx", "cls", "level"), [
    # brace in its lateral system (steel braced frame): IV -> LS, V -> CP
    ("brace", {"signs": ["brace_buckled"]}, "steel_braced_frame", "IV", "LS"),
    ("brace", {"damage_class": "V"}, "steel_braced_frame", "V", "CP"),
    # brace outside it (a concrete frame): "other", V -> LS
    ("brace", {"damage_class": "V"}, "rc_frame", "V", "LS"),
    # connection in a steel system or wood stud walls: lateral; elsewhere other
    ("connection", {"damage_class": "V"}, "steel_moment_frame", "V", "CP"),
    ("connection", {"damage_class": "V"}, "wood_stud_wall", "V", "CP"),
    ("connection", {"damage_class": "V"}, "rc_frame", "V", "LS"),
    # infill in urm_infill: lateral (V -> CP); in a concrete frame: other (V -> LS)
    ("infill", {"damage_class": "V"}, "urm_infill", "V", "CP"),
    ("infill", {"damage_class": "IV"}, "rc_frame", "IV", "LS"),
    # a wall in a concrete or masonry system is brittle vertical: III -> LS, IV -> CP
    ("wall", {"damage_class": "III"}, "rc_wall", "III", "LS"),
    ("wall", {"damage_class": "IV"}, "urm_wall", "IV", "CP"),
    # a wall in timber is plain vertical: III -> none, IV -> LS
    ("wall", {"damage_class": "III"}, "wood_stud_wall", "III", "IO"),
    ("wall", {"damage_class": "IV"}, "wood_stud_wall", "IV", "LS"),
    # a ductile column: IV -> LS, V -> CP
    ("column", {"damage_class": "IV"}, "rc_frame", "IV", "LS"),
])
def test_floor_table(kind, extra, sx, cls, level):
    if "damage_class" in extra:
        extra = {**extra, "override_reason": "seen on site"}
    a = one_storey([{"kind": "column", "count": 20}, {"kind": kind, "count": 1, **extra}],
                   sx=sx, sy=sx)
    assert a.storey("1").members[1].damage_class == cls
    assert a.storey("1").damage_floor == level


def test_a_wall_with_a_direction_takes_that_directions_system():
    # x concrete walls (brittle vertical), y timber (plain vertical): a class III wall along y
    # sets no floor, along x LS; without dir it takes the worse, LS.
    def floor(d):
        w = {"kind": "wall", "count": 1, "damage_class": "III", "override_reason": "seen"}
        if d:
            w["dir"] = d
        return one_storey([SOUND, w], sx="rc_wall", sy="wood_stud_wall").storey("1").damage_floor
    assert (floor("x"), floor("y"), floor(None)) == ("LS", "IO", "LS")


def test_every_vertical_group_class_v_is_collapse():
    # Two column groups (1 + 2 members), both class V: all 3 of the 3 vertical members logged:
    # grade collapse, beyond-CP (a rule of ours, not a JBDPA grade).
    v = {"damage_class": "V", "override_reason": "crushed"}
    a = one_storey([{"kind": "column", "count": 1, **v}, {"kind": "column", "count": 2, **v},
                    {"kind": "beam", "count": 4}])
    st = a.storey("1")
    assert (st.damage_grade, st.level) == ("collapse", "beyond-CP")
    assert (a.tier, a.performance_level) == ("evacuate", "beyond-CP")
    assert "all 3 of the 3 vertical members logged" in a.reasons[0]
    assert "a rule of ours, not a JBDPA grade" in a.reasons[0]
    assert a.tier_probability == {"occupy": 0.0, "hold": 0.0, "evacuate": 1.0}
    # One vertical member alone is not enough (at least 2 logged): class V floors at CP.
    b = one_storey([{"kind": "column", "count": 1, **v}])
    assert (b.performance_level, b.storey("1").damage_grade) == ("CP", "severe")
    # One sound column group among them: no collapse rule.
    c = one_storey([{"kind": "column", "count": 2, **v}, {"kind": "column", "count": 1}])
    assert c.performance_level == "CP"


# --- borderline ---------------------------------------------------------------------------------

def _one_reading(offset):
    return assess(make([storey("1", [reading("x", offset)], members=[])],
                       sx="steel_moment_frame", sy="steel_moment_frame"))


def test_borderline_below_0_8():
    # Steel moment frame, IO 0.2% = 4 mm. 3.0 mm, sd 1: P(occupy) = Phi(1) - Phi(-7)
    # = 0.841345: not borderline. 3.2 mm: Phi(0.8) - Phi(-7.2) = 0.788145 < 0.8: borderline.
    a, b = _one_reading(3.0), _one_reading(3.2)
    assert a.tier == b.tier == "occupy"
    assert a.tier_probability["occupy"] == pytest.approx(0.841345, abs=1e-6)
    assert b.tier_probability["occupy"] == pytest.approx(0.788145, abs=1e-6)
    assert (a.borderline, b.borderline) == (False, True)


def test_borderline_is_null_without_a_level():
    a = assess(make([storey("1", [], members=[])]))
    assert (a.performance_level, a.borderline) == (None, None)


# --- measure next and settled by -------------------------------------------------------------

def test_measure_next_an_unmeasured_direction_first():
    a = assess(make([storey("1", [reading("x", 1.0)]), storey("2", [])]))
    m = a.measure_next
    assert m is not None and (m.storey, m.dir, m.what) == ("1", "y", "reading")


def test_measure_next_a_spot_that_could_change_the_tier():
    # Steel moment frame: x 3.0 mm (0.15%): (0.20 - 0.15)/0.05 = 1.0 sd under IO; over it the
    # storey is LS and the tier hold. y 1.0 mm: 3.0 sd under; x is nearer.
    a = assess(make([storey("1", [reading("x", 3.0, where="grid A"), reading("y", 1.0)],
                            members=[])], sx="steel_moment_frame", sy="steel_moment_frame"))
    m = a.measure_next
    assert m is not None and (m.storey, m.dir, m.where, m.what) == ("1", "x", "grid A", "spot")
    assert m.z == pytest.approx(1.0)
    assert m.why.startswith("0.15% is 1.0 sd under the IO value 0.20%")
    assert a.settled_by is None


def test_measure_next_a_crack_width():
    # A brittle column cracked 0.9 mm, sd 0.05: class II (no floor); over 1.0 mm it would be
    # class III, floor LS, tier hold: z = (1.0 - 0.9)/0.05 = 2.0. The readings are 3 sd away.
    a = one_storey([SOUND, {"kind": "column", "count": 1, "ductility": "brittle",
                            "crack_mm": 0.9, "crack_sd_mm": 0.05, "ref": "C9"}])
    m = a.measure_next
    assert a.tier == "occupy"
    assert m is not None and (m.storey, m.dir, m.what, m.member) == (
        "1", None, "crack", "column group C9")
    assert m.z == pytest.approx(2.0)
    assert m.text().startswith("storey 1, column group C9: crack 0.9 mm is 2.0 sd under")


def test_nothing_to_measure_when_a_class_v_column_sets_evacuate():
    # A class V column (CP, evacuate); a reading at 0.15%, 1 sd under IO, cannot change
    # evacuate: measure_next is null and settled_by names the column.
    a = one_storey([SOUND, {"kind": "column", "count": 1, "damage_class": "V",
                            "override_reason": "bars buckled", "ref": "C3"}],
                   readings=[reading("x", 3.0), reading("y", 1.0)])
    assert a.tier == "evacuate"
    assert a.measure_next is None
    assert a.settled_by is not None and "column group C3 (1) is class V" in a.settled_by


def test_measure_next_max_z():
    # Steel moment frame, x 2.9 mm with sd 0.3: (4 - 2.9)/0.3 = 3.67 sd > 3: nothing to
    # measure; with sd 0.4: 2.75 sd, suggested.
    def run(sd):
        return assess(make([storey("1", [reading("x", 2.9, sd_mm=sd), reading("y", 0.1)],
                                   members=[])], sx="steel_moment_frame",
                           sy="steel_moment_frame"))
    far, near = run(0.3), run(0.4)
    assert far.measure_next is None and far.settled_by is not None
    assert "within 3 sd" in far.settled_by
    assert near.measure_next is not None and near.measure_next.z == pytest.approx(2.75)


# --- probabilities as printed ---------------------------------------------------------------

@pytest.mark.parametrize(("p", "se", "text"), [
    (0.841345, 0.0, "0.841"),          # exact: three decimals
    (0.841345, 0.0023, "0.841"),       # error's first digit at the third decimal
    (0.841345, 0.04, "0.84"),          # at the second
    (0.5, 0.2, "0.5"),                 # at the first
    (2.58701e-47, 0.0, "< 0.001"),     # never printed past its meaning
    (0.99951, 0.0, "> 0.999"),
    (0.0, 0.0, "< 0.001"), (1.0, 0.0, "> 0.999"),  # a float's 0 may be a tiny tail
    (0.0, 7.5e-5, "< 0.001"),          # sampled, no hits
])
def test_probability_text(p, se, text):
    assert probability_text(p, se) == text


def test_sampled_probabilities_carry_their_error():
    # 14 brittle column groups each near the II/III bound with a weight off every grid: sampled
    # (40,000 draws); se = sqrt(p (1 - p) / N) for each tier, 3/N where a tier has no hits.
    cols = [{"kind": "column", "count": 1, "crack_mm": 1.0 + 0.01 * (i % 3 - 1),
             "crack_sd_mm": 0.05, "ductility": "brittle", "weight": 4 / 3} for i in range(14)]
    a = one_storey([{"kind": "column", "count": 6}, *cols])
    assert any("sampled" in n for n in a.notes)
    for t, p in a.tier_probability.items():
        want = 3 / 40_000 if p in (0.0, 1.0) else math.sqrt(p * (1 - p) / 40_000)
        assert a.tier_probability_se[t] == pytest.approx(want, rel=1e-4), t
    exact = one_storey([SOUND])
    assert exact.tier_probability_se == {"occupy": 0.0, "hold": 0.0, "evacuate": 0.0}
