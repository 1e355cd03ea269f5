"""Properties of our residual capacity logic for steel moment frames and walls (hypothesis).

Undamaged gives 1.0; more damage never raises a capacity, lowers a level or a tier; half the
connections fractured, or every wall at the worst severity, never gives occupy. (Concrete left
as it was: tests/unit/test_capacity_engine.py, on a seeded corpus.)
"""

from __future__ import annotations

from typing import Any

from hypothesis import given
from hypothesis import strategies as st

from tests.helpers import make, reading, storey
from triage.assess import assess
from triage.standards import SEVERITIES, load, wall_modes_of

TYPES = sorted(load().steel.types, key=lambda k: (load().steel.types[k].index, k))
FRACTURES = [k for k in TYPES if load().steel.types[k].index >= 6]
WALL_SYSTEMS = ["urm_wall", "urm_infill", "reinforced_masonry_wall", "rc_wall"]
QUIET = [reading("x", 0.4), reading("y", -0.3)]
SIGNS = {"wall": ["core_crushed", "out_of_plane"], "infill": ["out_of_plane"]}


@st.composite
def connection(draw: Any, damaged: bool = True) -> dict[str, Any]:
    count = draw(st.integers(1, 30))
    m: dict[str, Any] = {"kind": "connection", "count": count}
    if draw(st.booleans()):
        m["inspected"] = draw(st.integers(2 if count >= 2 else 1, count))
    if damaged and draw(st.booleans()):
        m["connection_type"] = draw(st.sampled_from(TYPES))
    elif damaged and draw(st.integers(0, 3)) == 0:
        m["signs"] = ["connection_fractured"]
    if draw(st.integers(0, 3)) == 0:
        m["dir"] = draw(st.sampled_from(["x", "y"]))
    return m


@st.composite
def wall(draw: Any, kind: str = "wall", damaged: bool = True) -> dict[str, Any]:
    count = draw(st.integers(1, 12))
    m: dict[str, Any] = {"kind": kind, "count": count,
                         "weight": draw(st.sampled_from([1.0, 2.0, 3.5]))}
    if draw(st.booleans()):
        m["mode"] = draw(st.sampled_from(wall_modes_of(kind)))
    if draw(st.integers(0, 3)) == 0:
        m["inspected"] = draw(st.integers(1, count))
    if damaged:
        pick = draw(st.integers(0, 3))
        if pick == 1:
            m["severity"] = draw(st.sampled_from(SEVERITIES))
        elif pick == 2:
            m["crack_mm"] = draw(st.floats(0.05, 15).map(lambda v: round(v, 2)))
        elif pick == 3:
            m["signs"] = [draw(st.sampled_from(SIGNS[kind]))]
    if draw(st.booleans()):
        m["dir"] = draw(st.sampled_from(["x", "y"]))
    return m


def _steel(groups: list[dict[str, Any]]) -> Any:
    return assess(make([storey("1", QUIET, [{"kind": "column", "count": 6}, *groups])],
                       sx="steel_moment_frame", sy="steel_moment_frame"))


def _walls(groups: list[dict[str, Any]], system: str) -> Any:
    return assess(make([storey("1", QUIET, groups)], sx=system, sy=system))


def _ratios(a: Any) -> dict[tuple[str, str], float | None]:
    return {(c.dir, c.method): c.ratio for c in a.residual_capacity}


@given(st.lists(connection(damaged=False), min_size=1, max_size=5))
def test_undamaged_connections_give_one(groups: list[dict[str, Any]]) -> None:
    a = _steel(groups)
    for c in a.residual_capacity:
        assert c.ratio in (1.0, None)
        assert c.level in ("IO", None)
        if c.ratio is not None:
            assert c.index == 0.0


@given(st.sampled_from(WALL_SYSTEMS), st.data())
def test_undamaged_walls_give_one(system: str, data: st.DataObject) -> None:
    kind = "infill" if system == "urm_infill" and data.draw(st.booleans()) else "wall"
    groups = data.draw(st.lists(wall(kind, damaged=False), min_size=1, max_size=4))
    a = _walls(groups, system)
    for c in a.residual_capacity:
        assert c.ratio == 1.0 and c.level == "IO", c


def _worse_connection(m: dict[str, Any], data: st.DataObject) -> dict[str, Any]:
    out = dict(m)
    now = load().steel.types[m["connection_type"]].index if "connection_type" in m else (
        load().steel.types[load().assumptions.fema352_fractured_type].index
        if m.get("signs") else 0.0)
    worse = [k for k in TYPES if load().steel.types[k].index >= now]
    out["connection_type"] = data.draw(st.sampled_from(worse))
    return out


def _worse_wall(m: dict[str, Any], data: st.DataObject) -> dict[str, Any]:
    out = dict(m)
    if "severity" in m:
        out["severity"] = data.draw(st.sampled_from(
            SEVERITIES[SEVERITIES.index(m["severity"]):]))
    elif "crack_mm" in m:
        out["crack_mm"] = round(m["crack_mm"] + data.draw(st.floats(0, 10)), 2)
    else:
        out["signs"] = [SIGNS[m["kind"]][0]]
    return out


def _no_better(before: Any, after: Any) -> None:
    levels = ("IO", "LS", "CP", "beyond-CP")
    tiers = ("occupy", "hold", "evacuate")
    old, new = _ratios(before), _ratios(after)
    for key, r in new.items():
        if r is not None and old.get(key) is not None:
            assert r <= old[key] + 1e-9, (key, old[key], r)
    s0, s1 = before.storeys[0], after.storeys[0]
    if s0.residual_capacity is not None and s1.residual_capacity is not None:
        assert s1.residual_capacity <= s0.residual_capacity + 1e-9
    assert levels.index(after.performance_level) >= levels.index(before.performance_level)
    assert tiers.index(after.tier) >= tiers.index(before.tier)


@given(st.lists(connection(), min_size=1, max_size=5), st.data())
def test_more_connection_damage_never_raises_capacity(groups: list[dict[str, Any]],
                                                      data: st.DataObject) -> None:
    i = data.draw(st.integers(0, len(groups) - 1))
    worse = [*groups[:i], _worse_connection(groups[i], data), *groups[i + 1:]]
    _no_better(_steel(groups), _steel(worse))


@given(st.sampled_from(WALL_SYSTEMS), st.data())
def test_more_wall_damage_never_raises_capacity(system: str, data: st.DataObject) -> None:
    kind = "infill" if system == "urm_infill" and data.draw(st.booleans()) else "wall"
    groups = data.draw(st.lists(wall(kind), min_size=1, max_size=4))
    i = data.draw(st.integers(0, len(groups) - 1))
    worse = [*groups[:i], _worse_wall(groups[i], data), *groups[i + 1:]]
    _no_better(_walls(groups, system), _walls(worse, system))


@given(st.integers(1, 40), st.data())
def test_half_the_connections_fractured_never_occupy(half: int, data: st.DataObject) -> None:
    broken: dict[str, Any] = {"kind": "connection", "count": half + data.draw(st.integers(0, 3))}
    if data.draw(st.booleans()):
        broken["connection_type"] = data.draw(st.sampled_from(FRACTURES))
    else:
        broken["signs"] = ["connection_fractured"]
    sound = {"kind": "connection", "count": half}
    a = _steel([broken, sound])
    assert a.tier != "occupy"
    assert all(c.level != "IO" for c in a.residual_capacity if c.method == "fema352")


@given(st.sampled_from(WALL_SYSTEMS), st.data())
def test_every_wall_at_the_worst_severity_never_occupy(system: str, data: st.DataObject) -> None:
    kind = "infill" if system == "urm_infill" and data.draw(st.booleans()) else "wall"
    groups = data.draw(st.lists(wall(kind, damaged=False), min_size=1, max_size=4))
    groups = [{**g, "severity": "extreme"} for g in groups]
    a = _walls(groups, system)
    assert a.tier != "occupy"
    assert all(c.ratio == 0.0 for c in a.residual_capacity if c.method == "fema306")


@given(st.lists(st.tuples(st.sampled_from([0.0, 1.0, 2.0, 4.0, 6.0, 8.0, 10.0]),
                          st.integers(1, 6)), min_size=1, max_size=6),
       st.integers(0, 30), st.data())
def test_layered_estimate_never_falls_as_an_index_rises(vals: list[tuple[float, int]],
                                                        extra: int, data: st.DataObject) -> None:
    from triage.assess.steel import ConnectionIndex, layered_estimate

    def groups(v: list[tuple[float, int]]) -> list[ConnectionIndex]:
        return [ConnectionIndex(i, None, d, "type", k, k) for i, (d, k) in enumerate(v)]

    n = sum(k for _, k in vals)
    if n < 2:
        return
    total = n + extra + 1
    std = load()
    before = layered_estimate(groups(vals), n, total, std)
    i = data.draw(st.integers(0, len(vals) - 1))
    up = data.draw(st.sampled_from([d for d in (0.0, 1.0, 2.0, 4.0, 6.0, 8.0, 10.0)
                                    if d >= vals[i][0]]))
    raised = [*vals[:i], (up, vals[i][1]), *vals[i + 1:]]
    assert layered_estimate(groups(raised), n, total, std) >= before - 1e-12
    mean = sum(d * k for d, k in vals) / n
    assert mean - 1e-12 <= before <= 10.0
    assert before <= max(d for d, _ in vals) + 1e-12   # never over the highest index found
    found = {d for d, _ in vals} - {0.0}
    if len(found) == 1:   # one index besides 0: the document's form, at most that index
        import math

        from triage.assess.stats import t_quantile
        s = math.sqrt(sum(k * (d - mean) ** 2 for d, k in vals) / (n - 1))
        doc = mean + t_quantile(0.9, n - 1) * s / math.sqrt(n) * math.sqrt(1 - n / total)
        assert abs(before - min(doc, max(found))) < 1e-9
