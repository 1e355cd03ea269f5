"""Residual capacity pinned at its edges: eta tables per kind, FEMA 352's links at their bounds,
the layered upper estimate worked layer by layer, and the steel reason line word for word.

The FEMA 352 indices are from memory (tests/reference/test_fema352.py checks them); the links of
index to class and level and the layered estimate are ours (docs/method.md, section 4a).
"""

from __future__ import annotations

import math
from typing import Any

import pytest
from scipy.stats import t as student_t

from tests.helpers import make, reading, storey
from triage.assess import assess, damage
from triage.assess.steel import ConnectionIndex, connection_index, layered_estimate
from triage.model import MemberGroup
from triage.standards import CLASSES, load

STD = load()
QUIET = [reading("x", 0.5), reading("y", 0.5)]


def _steel_x(members: list[dict[str, Any]]) -> Any:
    """A one-storey building, steel moment frame in x only (concrete frame in y)."""
    return assess(make([storey("1", QUIET, members)], sx="steel_moment_frame", sy="rc_frame"))


def _fema352_x(a: Any) -> Any:
    return next(c for c in a.residual_capacity if c.dir == "x" and c.method == "fema352")


# --- eta tables (damage.py) ---------------------------------------------------------------------

@pytest.mark.parametrize(("kind", "ductility", "column"), [
    ("column", "ductile", "eta_ductile_column"),
    ("column", "brittle", "eta_brittle_column"),
    ("wall", "ductile", "eta_wall"),
    ("wall", "brittle", "eta_wall"),
    ("beam", "ductile", None),
    ("brace", "brittle", None),
    ("infill", "ductile", None),
])
def test_eta_table_takes_the_kinds_column(kind, ductility, column):
    # Called directly: eta_table keeps its tables per standards object, so a table made once
    # stays; this reads the rows every time. Undamaged (index 0) is 1.
    got = damage._eta_table(kind, ductility, STD)
    if column is None:
        assert got is None
        return
    want = [1.0] + [getattr(STD.capacity.classes[c], column) for c in CLASSES]
    assert got.tolist() == want
    assert not got.flags.writeable


def test_ductile_and_brittle_columns_differ_at_class_ii():
    # JBDPA (tests/reference/test_jbdpa_residual_capacity.py): class II 0.75 ductile, 0.6 brittle
    assert damage._eta_table("column", "ductile", STD)[2] == pytest.approx(0.75)
    assert damage._eta_table("column", "brittle", STD)[2] == pytest.approx(0.6)


# --- FEMA 352: the type's class and the index's level at their bounds -----------------------------

@pytest.mark.parametrize(("code", "cls"), [
    ("W1a", None),   # index 0: no damage, so no class (not class I)
    ("W1b", "II"),   # index 1: class II from 1 (ours)
    ("G1", "III"),   # index 4: class III from 4
    ("W2", "IV"),    # index 6: class IV from 6
    ("G5", "V"),     # index 10: class V
])
def test_a_types_index_sets_the_class_at_each_bound(code, cls):
    a = _steel_x([{"kind": "connection", "count": 3, "connection_type": code}])
    m = a.storeys[0].members[0]
    assert m.damage_class == cls
    assert m.class_from == (None if cls is None else "type")


@pytest.mark.parametrize(("members", "index", "level"), [
    # 2 at W2 (6) and 2 at G4 (8), all inspected: D = 7.00 exactly, the CP bound: CP
    ([("W2", 2), ("G4", 2)], 7.0, "CP"),
    # 1 at W2 and 2 at G4: D = 22 / 3 = 7.33, over 7: beyond CP (whole numbers would round it to 7)
    ([("W2", 1), ("G4", 2)], 7.33333, "beyond-CP"),
])
def test_the_floor_index_at_the_cp_bound(members, index, level):
    c = _fema352_x(_steel_x([{"kind": "connection", "count": n, "connection_type": code}
                             for code, n in members]))
    assert c.index == pytest.approx(index, rel=1e-6)
    assert c.level == level


@pytest.mark.parametrize(("member", "how"), [
    ({"kind": "connection", "count": 2, "connection_type": "G2"}, ("G2", 1.0, "type")),
    ({"kind": "connection", "count": 2, "signs": ["connection_fractured"]}, ("G4", 8.0, "default")),
    ({"kind": "connection", "count": 2}, (None, 0.0, "none")),
])
def test_connection_index_says_how_it_was_set(member, how):
    assert connection_index(MemberGroup.model_validate(member), STD, STD.assumptions) == how


# --- the layered upper estimate (steel.py, ours) ------------------------------------------------

def test_layered_estimate_sums_each_layers_upper_fraction():
    # 20 connections, 6 inspected: 1 at G5 (10), 4 at G2 (1), 1 sound. Layers 1 and 10.
    # scale = t(0.9, 5) / sqrt(6) * sqrt(1 - 6/20) * sqrt(6/5) = 1.475884 * 0.374166 = 0.552225.
    # Layer 1: p = 5/6, 5/6 + 0.552225 * sqrt(5/36) = 1.039136: capped at 1, times (1 - 0).
    # Layer 10: p = 1/6, 1/6 + 0.552225 * sqrt(5/36) = 0.372469, times (10 - 1).
    # D = 1 + 9 * 0.372469 = 4.352220 (the G5 layer rests on one connection seen).
    groups = [ConnectionIndex(0, "G5", 10.0, "type", 1, 1),
              ConnectionIndex(1, "G2", 1.0, "type", 4, 5),
              ConnectionIndex(2, None, 0.0, "none", 1, 14)]
    scale = (student_t.ppf(0.9, 5) / math.sqrt(6) * math.sqrt(1 - 6 / 20)
             * math.sqrt(6 / 5))
    upper = 1 / 6 + scale * math.sqrt(5 / 36)
    assert 5 / 6 + scale * math.sqrt(5 / 36) > 1.0   # the first layer is capped
    assert layered_estimate(groups, 6, 20, STD) == pytest.approx(1.0 + 9.0 * upper, rel=1e-9)


def test_layered_estimate_ignores_groups_not_seen():
    # A group of index 8 with none inspected adds no layer and no weight: the same as without it.
    seen = [ConnectionIndex(0, "G2", 1.0, "type", 3, 3), ConnectionIndex(1, None, 0.0, "none", 3, 3)]
    unseen = ConnectionIndex(2, "G4", 8.0, "type", 0, 4)
    assert layered_estimate([*seen, unseen], 6, 10, STD) == pytest.approx(
        layered_estimate(seen, 6, 10, STD), rel=1e-12)


# --- the steel reason line, word for word ---------------------------------------------------------

@pytest.mark.parametrize(("members", "reason"), [
    ([{"kind": "connection", "count": 2, "connection_type": "W2"},
      {"kind": "connection", "count": 2, "connection_type": "G4"}],
     "storey 1, x: steel connections: FEMA 352 floor damage index D = 7.00 of 10, mean 7.00 of "
     "all 4 connections inspected (FEMA 352 (2000) chapter 4, from memory); residual capacity "
     "ratio 1 - D/10 = 30.0% (ours), taken as Collapse Prevention (CP) (our link of index to "
     "level)"),
    ([{"kind": "connection", "count": 18, "inspected": 8},
      {"kind": "connection", "count": 2, "connection_type": "G4"}],
     "storey 1, x: steel connections: FEMA 352 floor damage index D = 2.64 of 10, upper estimate "
     "2.64 from 10 of 20 connections inspected (mean 1.60, sd 3.37, 90% one-sided, layer by "
     "layer, ours); those not inspected are never counted as undamaged (FEMA 352 (2000) chapter "
     "4, from memory); residual capacity ratio 1 - D/10 = 73.6% (ours), taken as Life Safety "
     "(LS) (our link of index to level)"),
    ([{"kind": "connection", "count": 12, "inspected": 1}],
     "storey 1, x: steel connections: no FEMA 352 floor index (1 of 12 connections inspected: "
     "too few to estimate the rest (at least 2, ours)); residual capacity not established "
     "there, the survey is provisional"),
])
def test_the_steel_reason_line_in_full(members, reason):
    assert reason in _steel_x(members).reasons
