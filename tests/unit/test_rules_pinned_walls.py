"""FEMA 306 walls pinned at their edges: outcomes merged, the grade of a ratio in doubt at each
bound, and the walls' reason line word for word.

The crack bounds and factors are FEMA 306's (from memory: tests/reference/test_fema306.py); the
ratio's grade bounds (0.95, 0.8, 0.6) and the grade's level are ours (docs/method.md, 4a and 8).
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy import stats

from tests.helpers import make, reading, storey
from triage.assess import assess, walls
from triage.assess.wall_doubt import DirSum, Outcomes, WallDoubt, _merged
from triage.model import MemberGroup
from triage.standards import load

STD = load()


def test_neighbouring_pieces_alike_merge_into_one_outcome():
    # Pieces of a crack cut at 0.2, 1.0 and 2.0 mm: classes I, I, II, II and lambda Q 1, 1, 0.8,
    # 0.5. The first two give the same class and factor: one outcome of chance 0.1 + 0.2, whose
    # widest crack is the second piece's top (1.0 mm). The crack as read, 0.5 mm, is in it. The
    # chances kept (0.8 in all, the rest dropped as under 1e-9) are scaled to sum to 1.
    o = _merged(3, np.array([1, 1, 2, 2]), {"x": np.array([1.0, 1.0, 0.8, 0.5])},
                np.array([0.1, 0.2, 0.3, 0.2]), np.array([0.2, 1.0, 2.0, np.inf]), 0.5,
                {1.0, 2.0})
    assert o.group == 3
    assert o.cls.tolist() == [1, 2, 2]
    assert o.lam_q["x"].tolist() == [1.0, 0.8, 0.5]
    assert o.probs.tolist() == pytest.approx([0.375, 0.375, 0.25])
    assert o.tops.tolist() == [1.0, 2.0, np.inf]
    assert o.point == 0
    assert o.fema == frozenset({1.0, 2.0})


def test_pieces_that_differ_stay_apart():
    o = _merged(0, np.array([1, 2, 2]), {"x": np.array([1.0, 1.0, 0.8])},
                np.array([0.5, 0.25, 0.25]), np.array([0.2, 1.0, np.inf]), 1.5, {1.0})
    assert o.cls.tolist() == [1, 2, 2] and o.probs.tolist() == [0.5, 0.25, 0.25]
    assert o.point == 2   # 1.5 mm is over the 1.0 mm top
    assert o.fema == frozenset({1.0})


# The ratio of one wall group carrying all the weight is its outcome's lambda Q. Graded by the
# bounds (slight from 0.95, light from 0.8, moderate from 0.6, severe under), each grade given
# its own level here (0 to 3) so that every bound shows. A ratio a hair under a bound (a ratio of
# sums) is rounded onto it (9 decimals).
Q = [1.0, 0.95, 0.9499, 0.8, 0.7999, 0.6, 0.5999, 0.0, 0.8 - 1e-12]
GRADE = [0, 0, 1, 1, 2, 2, 3, 3, 1]


def test_a_ratio_in_doubt_takes_its_grade_at_each_bound():
    n = len(Q)
    o = Outcomes(0, np.arange(n), {"x": np.array(Q)}, np.full(n, 1.0 / n),
                 np.append(np.arange(1.0, n), np.inf), 0, frozenset())
    doubt = WallDoubt((o,), (DirSum("x", 0.0, 2.0, {0: 2.0}),), 0, np.array([0, 1, 2, 3]),
                      np.array([0.95, 0.8, 0.6]))
    assert doubt.fema_level({0: np.arange(n)}, n).tolist() == GRADE


def test_the_certain_walls_part_counts_in_the_ratio():
    # A certain wall of weight 1 at lambda Q 1 beside the wall in doubt (weight 1): the ratio is
    # (1 + q) / 2, so q = 0.6 gives 0.8 (light), q = 0.58 gives 0.79 (moderate).
    o = Outcomes(0, np.array([3, 4]), {"x": np.array([0.6, 0.58])}, np.array([0.5, 0.5]),
                 np.array([2.0, np.inf]), 0, frozenset())
    doubt = WallDoubt((o,), (DirSum("x", 1.0, 2.0, {0: 1.0}),), 0, np.array([0, 1, 2, 3]),
                      np.array([0.95, 0.8, 0.6]))
    assert doubt.fema_level({0: np.array([0, 1])}, 2).tolist() == [1, 2]


def test_another_groups_class_in_doubt_multiplies_with_the_walls():
    # Ten infill panels in corner crushing at 6.2 mm, sd 0.2: moderate (lambda Q 0.8, light, IO)
    # up to 6.3 mm, heavy (0.5, severe, CP) over it; class IV either way (a floor of LS). Beside
    # them four brittle columns at 1.9 mm, sd 0.1: class III (a floor of LS) up to 2.0 mm, IV
    # (CP) over it. Hold needs both under their bound, independent draws:
    # Phi((6.3 - 6.2) / 0.2) * Phi((2.0 - 1.9) / 0.1) = Phi(0.5) * Phi(1) = 0.691462 * 0.841345
    # = 0.581758; the columns' doubt alone taken out would leave Phi(0.5).
    members = [{"kind": "infill", "count": 10, "crack_mm": 6.2, "crack_sd_mm": 0.2,
                "mode": "corner_crushing"},
               {"kind": "column", "count": 4, "ductility": "brittle", "crack_mm": 1.9,
                "crack_sd_mm": 0.1}]
    a = assess(make([storey("G", [reading("x", 0.5), reading("y", 0.5)], members)],
                    sx="urm_infill", sy="urm_infill"))
    hold = stats.norm.cdf(0.5) * stats.norm.cdf(1.0)
    assert a.tier == "hold"
    assert a.tier_probability["hold"] == pytest.approx(hold, abs=1e-6)
    assert a.tier_probability["evacuate"] == pytest.approx(1.0 - hold, abs=1e-6)
    assert a.tier_probability_se["hold"] == 0.0   # enumerated, not sampled


def _infill_and_columns(columns: list[dict]) -> object:
    members = [{"kind": "infill", "count": 10, "crack_mm": 6.2, "crack_sd_mm": 0.2,
                "mode": "corner_crushing"}, *columns]
    return assess(make([storey("G", [reading("x", 0.5), reading("y", 0.5)], members)],
                       sx="urm_infill", sy="urm_infill"))


SAMPLED = "tier probabilities: members near a class bound were sampled"


@pytest.mark.parametrize(("columns", "sampled"), [(11, False), (12, True)])
def test_outcomes_are_enumerated_up_to_4096_combinations(columns, sampled):
    # The panels' two outcomes times two classes (II or III at 1.0 mm, sd 0.1) of each column
    # group: 2 * 2^11 = 4096 combinations are enumerated (exact: Phi(0.5) = 0.691462, the
    # columns' class III sets no floor), 2 * 2^12 = 8192 are sampled (40,000 draws, each
    # probability with its standard error).
    a = _infill_and_columns([{"kind": "column", "count": 1, "crack_mm": 1.0, "crack_sd_mm": 0.1}
                             for _ in range(columns)])
    assert any(n.startswith(SAMPLED) for n in a.notes) is sampled
    assert (a.tier_probability_se["hold"] > 0.0) is sampled
    assert a.tier_probability["hold"] == pytest.approx(stats.norm.cdf(0.5),
                                                       abs=0.01 if sampled else 1e-6)


def test_a_doubt_that_moves_no_level_is_certain():
    # Four brittle columns set by hand to class IV hold the storey at CP whichever severity the
    # panels' crack reaches (IO or CP by FEMA 306): evacuate for certain, nothing sampled.
    a = _infill_and_columns([{"kind": "column", "count": 4, "ductility": "brittle",
                              "damage_class": "IV", "override_reason": "seen"}])
    assert a.tier_probability == {"occupy": 0.0, "hold": 0.0, "evacuate": 1.0}
    assert not any(n.startswith(SAMPLED) for n in a.notes)


def test_the_lowest_piece_of_a_crack_keeps_class_i():
    # Four concrete walls in diagonal tension (FEMA 306 insignificant up to 0.7 mm) at 0.5 mm,
    # sd 0.3: JBDPA class I under 0.2 mm (R = 0.95, slight, IO), II to 1.0 mm (R = 0.6,
    # moderate, LS), III over it (0.3, severe, CP). P(occupy) = Phi((0.2 - 0.5) / 0.3)
    # = Phi(-1) = 0.158655 (times about 0.9995 for the drift readings), P(evacuate)
    # = 1 - Phi((1.0 - 0.5) / 0.3) = 0.047790.
    a = assess(make([storey("G", [reading("x", 0.5), reading("y", 0.5)],
                            [{"kind": "wall", "count": 4, "crack_mm": 0.5, "crack_sd_mm": 0.3,
                              "mode": "diagonal_tension"}])], sx="rc_wall", sy="rc_wall"))
    assert a.tier == "hold"
    assert a.tier_probability["occupy"] == pytest.approx(stats.norm.cdf(-1.0), rel=1e-3)
    assert a.tier_probability["evacuate"] == pytest.approx(1 - stats.norm.cdf(5 / 3), rel=1e-4)


@pytest.mark.parametrize(("a", "b", "worse"), [
    ("heavy", "slight", "heavy"), ("slight", "heavy", "heavy"), ("moderate", "moderate", "moderate"),
    (None, "slight", "slight"), ("insignificant", None, "insignificant"), (None, None, None)])
def test_the_worse_of_two_severities_either_way_round(a, b, worse):
    assert walls.worse_severity(a, b) == worse


@pytest.mark.parametrize(("cls", "severity"), [
    (0, None), (1, "insignificant"), (2, "slight"), (3, "moderate"), (4, "heavy"), (5, "extreme")])
def test_a_class_index_reads_as_the_severity_of_that_class(cls, severity):
    # fema306_severity_class (ours): insignificant I, slight II, moderate III, heavy IV, extreme V
    assert walls.severity_of_class(cls, STD.assumptions) == severity


@pytest.mark.parametrize(("signs", "severity"), [
    ([], None), (["cover_spalling"], "moderate"), (["out_of_plane"], "heavy"),
    (["cover_spalling", "core_crushed"], "extreme")])
def test_a_walls_worst_sign_sets_its_severity(signs, severity):
    # signs.toml: cover spalling class III, out of plane IV, core crushed V
    m = MemberGroup.model_validate({"kind": "wall", "count": 2, "signs": signs})
    assert walls.sign_severity(m, STD, STD.assumptions) == severity


@pytest.mark.parametrize(("extra", "severity", "by"), [
    ({"severity": "heavy", "crack_mm": 0.5}, "heavy", "chosen"),     # the inspector's, first
    ({"damage_class": "III", "override_reason": "seen", "crack_mm": 0.5}, "moderate", "class"),
    ({"crack_mm": 1.0}, "slight", "crack"),       # diagonal tension: slight over 0.7 to 1.5 mm
    ({"crack_mm": 0.5, "signs": ["out_of_plane"]}, "heavy", "signs"),   # class IV: heavy
    ({}, None, None),
])
def test_a_walls_severity_and_what_set_it(extra, severity, by):
    m = MemberGroup.model_validate({"kind": "wall", "count": 2, "mode": "diagonal_tension",
                                    **extra})
    ws = walls.wall_state(0, m, "urm_pier", STD, STD.assumptions)
    assert (ws.severity, ws.by) == (severity, by)


@pytest.mark.parametrize(("members", "system", "reason"), [
    # 6 of 10 panels seen at 7.0 mm (heavy, lambda Q 0.5) and 4 sound (1): (3 + 4) / 10 = 70.0%
    ([{"kind": "infill", "count": 10, "crack_mm": 7.0, "crack_sd_mm": 0.05,
       "mode": "corner_crushing", "inspected": 6}, {"kind": "infill", "count": 4}], "urm_infill",
     "storey G, x: walls: FEMA 306 residual strength ratio 70.0% (lambda Q weighted as for R, "
     "ours) over the 10 of 14 seen (those not inspected are not counted); the worst, infill "
     "panel group 1, behaviour mode corner crushing at FEMA 306 severity heavy (lambda Q 0.5, "
     "FEMA 306 (1998), from memory); grade moderate and Life Safety (LS) by our link of ratio "
     "to grade and level"),
    # all ten seen at 7.0 mm: 50.0%, severe (under 0.6), CP; no "seen" clause
    ([{"kind": "infill", "count": 10, "crack_mm": 7.0, "crack_sd_mm": 0.05,
       "mode": "corner_crushing", "ref": "P1"}], "urm_infill",
     "storey G, x: walls: FEMA 306 residual strength ratio 50.0% (lambda Q weighted as for R, "
     "ours); the worst, infill panel group 1, behaviour mode corner crushing at FEMA 306 "
     "severity heavy (lambda Q 0.5, FEMA 306 (1998), from memory); grade severe and Collapse "
     "Prevention (CP) by our link of ratio to grade and level"),
    ([{"kind": "wall", "count": 3, "inspected": 0}], "urm_wall",
     "storey G, x: walls: no wall inspected; FEMA 306 residual strength ratio not established "
     "there, the survey is provisional"),
])
def test_the_walls_reason_line_in_full(members, system, reason):
    a = assess(make([storey("G", [reading("x", 0.5), reading("y", 0.5)], members)],
                    sx=system, sy="rc_frame"))
    assert reason in a.reasons


@pytest.mark.parametrize(("ratio", "grade"), [
    (1.0, "slight"), (0.95, "slight"), (0.9499, "light"), (0.8, "light"), (0.7999, "moderate"),
    (0.6, "moderate"), (0.5999, "severe"), (0.0, "severe"),
    (0.8 - 1e-12, "light"),   # a hair under a bound it meets (a ratio of sums): rounded onto it
])
def test_a_fema306_ratio_takes_its_grade_at_each_bound(ratio, grade):
    # fema306_grade_bounds (ours): slight from 0.95, light from 0.8, moderate from 0.6
    assert walls.grade_of_ratio(ratio, STD.assumptions) == grade
