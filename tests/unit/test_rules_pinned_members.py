"""Member classes, damage floors and the member stage pinned at their edges.

The JBDPA crack bounds and eta are from memory (tests/reference/test_jbdpa_residual_capacity.py);
the floors per class and the collapse rule are ours (docs/method.md).
"""

from __future__ import annotations

import pytest

from tests.helpers import make, reading, storey
from triage.assess import assess, damage
from triage.standards import load

STD = load()


@pytest.mark.parametrize(("name", "index"), [(None, 0), ("I", 1), ("III", 3), ("V", 5)])
def test_a_class_name_and_its_index_both_ways(name, index):
    assert damage.class_index(name) == index
    assert damage.class_name(index) == name


@pytest.mark.parametrize(("r", "grade"), [
    (1.0, "slight"), (0.95, "slight"), (0.9499, "light"), (0.8, "light"), (0.7999, "moderate"),
    (0.6, "moderate"), (0.5999, "severe"), (0.0, "severe"),
    (0.8 - 1e-12, "light"),   # a hair under a bound it meets (a ratio of sums): rounded onto it
])
def test_r_takes_its_jbdpa_grade_at_each_bound(r, grade):
    # JBDPA grades by R (tests/reference/test_jbdpa_residual_capacity.py): slight from 95%,
    # light from 80%, moderate from 60%, severe under
    assert damage.grade_of(r, STD) == grade


@pytest.mark.parametrize(("sx", "sy", "cls", "row"), [
    # a wall acting both ways: concrete in one direction (brittle vertical: IV CP, V CP), timber
    # in the other (vertical: IV LS, V CP). The worse floor's row is named; at equal floors x's.
    ("rc_wall", "wood_stud_wall", "V", "brittle vertical member"),
    ("wood_stud_wall", "rc_wall", "V", "vertical member"),
    ("wood_stud_wall", "rc_wall", "IV", "brittle vertical member"),
])
def test_the_floor_reason_names_the_row_of_the_worse_direction(sx, sy, cls, row):
    a = assess(make([storey("1", [reading("x", 0.2), reading("y", 0.2)],
                            [{"kind": "column", "count": 6},
                             {"kind": "wall", "count": 2, "damage_class": cls,
                              "override_reason": "seen", "ref": "W2"}])], sx=sx, sy=sy))
    floor = next(r for r in a.reasons if "damage floor" in r)
    assert floor.startswith(f"storey 1: wall group W2 (2) is class {cls} (set by hand), which "
                            "holds the structure to Collapse Prevention (CP) at best (damage "
                            f"floor of a {row}, a rule of ours)")
