"""JBDPA (2001), Guideline for Post-earthquake Damage Evaluation and Rehabilitation of RC
Buildings, as described by Nakano, Maeda, Kuramoto & Murakami (13WCEE 2004, paper 124) and
Maeda et al. (16WCEE 2017).

Status: from memory, matching one secondary source (docs/references.md, JBDPA); these are the 2001
factors. Checked here: the crack-width bounds of the damage classes, the seismic capacity
reduction factors eta for ductile columns, brittle columns and walls, the damage-grade bounds of
R, and R = sum(eta_i w_i) / sum(w_i) on hand-worked storeys. Tolerance 1e-9 on R.
"""

from __future__ import annotations

import pytest

from tests.helpers import make, reading, storey
from triage.assess import assess
from triage.assess.damage import crack_class, grade_of
from triage.standards import load

# class: (eta ductile column, eta brittle column, eta wall), JBDPA 2001 (from memory).
ETA = {"I": (0.95, 0.95, 0.95), "II": (0.75, 0.6, 0.6), "III": (0.5, 0.3, 0.3),
       "IV": (0.1, 0.0, 0.0), "V": (0.0, 0.0, 0.0)}


@pytest.mark.parametrize("cls", list(ETA))
def test_eta_factors(cls):
    row = load().capacity.classes[cls]
    assert (row.eta_ductile_column, row.eta_brittle_column, row.eta_wall) == ETA[cls]


@pytest.mark.parametrize(("crack", "cls"), [
    (0.05, 1), (0.19, 1), (0.2, 2), (0.6, 2), (1.0, 2), (1.01, 3), (2.0, 3), (2.01, 4), (9.0, 4)])
def test_crack_width_bounds(crack, cls):
    # under 0.2 mm I; 0.2-1.0 II; over 1.0-2.0 III; over 2.0 IV
    assert crack_class(crack, load()) == cls


def test_no_crack_is_undamaged():
    assert crack_class(0.0, load()) == 0


@pytest.mark.parametrize(("r", "grade"), [
    (1.0, "slight"), (0.95, "slight"), (0.9499, "light"), (0.80, "light"), (0.7999, "moderate"),
    (0.60, "moderate"), (0.5999, "severe"), (0.0, "severe")])
def test_damage_grade_bounds(r, grade):
    # slight R >= 95%, light 80-95%, moderate 60-80%, severe < 60%
    assert grade_of(r, load()) == grade


def _r(members, sx="rc_frame", sy="rc_frame"):
    s = make([storey("1", [reading("x", 1.0), reading("y", 1.0)], members)], sx=sx, sy=sy)
    return assess(s).storeys[0]


def test_r_of_design_example_storey():
    # 19 sound ductile columns and one of class III (eta 0.5): R = (19 + 0.5) / 20 = 0.975.
    st = _r([{"kind": "column", "count": 19}, {"kind": "column", "count": 1, "crack_mm": 1.4}])
    assert st.residual_capacity == pytest.approx(0.975, abs=1e-9)
    assert st.damage_grade == "slight"


def test_r_brittle_columns_and_weighted_walls_by_direction():
    # x: 10 ductile columns sound, 4 brittle columns class II (0.6), wall W1 dir x weight 3 class
    # III (0.3). R_x = (10 + 4*0.6 + 3*0.3) / (10 + 4 + 3) = 13.3 / 17 = 0.782353 -> moderate.
    # y: the x wall does not count: R_y = (10 + 2.4) / 14 = 0.885714 -> light.
    st = _r([{"kind": "column", "count": 10},
             {"kind": "column", "count": 4, "ductility": "brittle", "crack_mm": 0.5},
             {"kind": "wall", "count": 1, "dir": "x", "weight": 3.0, "crack_mm": 1.5,
              "ref": "W1"}], sx="rc_wall", sy="rc_frame")
    assert st.residual_capacity_by_dir.x == pytest.approx(13.3 / 17, abs=1e-6)
    assert st.residual_capacity_by_dir.y == pytest.approx(12.4 / 14, abs=1e-6)
    assert st.residual_capacity == pytest.approx(13.3 / 17, abs=1e-6)
    assert st.damage_grade == "moderate"


def test_class_v_signs_give_eta_zero():
    st = _r([{"kind": "column", "count": 3}, {"kind": "column", "count": 1,
                                              "signs": ["bar_buckled"]}])
    assert st.members[1].damage_class == "V"
    assert st.members[1].eta == 0.0
    assert st.residual_capacity == pytest.approx(0.75)


def test_r_is_null_for_systems_the_method_does_not_cover():
    st = _r([{"kind": "column", "count": 8}], sx="steel_moment_frame", sy="steel_braced_frame")
    assert st.residual_capacity is None
    assert st.damage_grade is None
