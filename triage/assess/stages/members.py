"""Stage 2, members: per storey, member classes, capacity, damage floors and collapse rule.

Capacity is R and the JBDPA grade; the collapse rule is the all-class-V one. With their reason
lines.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from triage.standards import CLASSES, LEVELS, Grade

from .. import damage as dmg
from ..capacity import StoreyCapacity, member_capacity, storey_capacity
from ..context import DIRS, JBDPA_SOURCE, Context
from ..floors import VERTICAL_KINDS, GroupFloor
from ..levels import Level
from ..result import MemberResult, trusted
from ..stats import sig6
from ..uncertainty import MemberModel
from ..wall_doubt import WallDoubt, wall_doubt
from ..wording import class_from_words, field_name, kind_words, level_words

# `capacity.member_capacity` of a group no FEMA 352 or FEMA 306 result names, after "inspected"
_NO_CAPACITY: dict[str, None] = {"connection_type": None, "connection_index": None, "mode": None,
                                 "severity": None, "lambda_q": None}


@dataclass(frozen=True)
class Capacity:
    """A storey's residual seismic capacity: the worse direction's R, grade and level."""

    dir: str
    r: float
    grade: Grade
    level: Level


@dataclass(frozen=True)
class Floor:
    """The damage floor a storey's members set at their point classes."""

    level: Level
    group: int | None  # the group that sets it (None: no class sets a floor)
    collapse: bool  # the all-class-V rule applies
    vertical_members: int  # members of column and wall groups logged


@dataclass(frozen=True)
class StoreyMembers:
    """One storey's member groups: classes, R, grade, floors and the component level."""

    storey: int
    classes: dmg.ClassTable
    floors: tuple[GroupFloor, ...]
    r_by_dir: dict[str, float | None]
    capacity: Capacity | None
    floor: Floor | None  # None: no member group logged
    model: MemberModel
    level: Level | None  # the member component's point level; None: no member group
    results: tuple[MemberResult, ...]
    defaulted: tuple[str, ...]
    beyond: StoreyCapacity  # FEMA 352 and FEMA 306 results (docs/method.md section 4a)
    walls_doubt: WallDoubt | None = None  # FEMA 306 severities a crack leaves in doubt


def member_stage(ctx: Context, si: int) -> StoreyMembers:
    """One storey's member classes, R, grade, damage floors and all-class-V collapse rule.

    A group's class is its override, else the worse of its crack class and its sign class.
    """
    std, a = ctx.std, ctx.a
    st = ctx.survey.storeys[si]
    table = dmg.member_classes(st.members, std, a)
    defaulted = tuple(
        f"storey {st.label}, {kind_words(m.kind)} group {gi + 1}{' ' + m.ref if m.ref else ''}: "
        f"{field_name('member_group', 'crack_sd_mm')} {a.sd_crack_mm:g} mm (instrument default, "
        "common practice)"
        for gi, m in enumerate(st.members) if table.sd_defaulted[gi])
    # Each group's eta table, floors (a few distinct ones: rows of `floor_table`) and whether
    # it is vertical (a column or wall), in one pass.
    etas: list[np.ndarray | None] = []
    floor_list: list[GroupFloor] = []
    floor_row: list[int] = []
    distinct: dict[int, int] = {}
    by_class: list[np.ndarray] = []
    vertical_list: list[bool] = []
    n_vertical = 0
    for m in st.members:
        etas.append(dmg.eta_table(m, std))
        f = ctx.group_floor(m)
        floor_list.append(f)
        k = distinct.get(id(f))
        if k is None:
            k = distinct[id(f)] = len(by_class)
            by_class.append(f.by_class)
        floor_row.append(k)
        v = m.kind in VERTICAL_KINDS
        vertical_list.append(v)
        if v:
            n_vertical += m.count
    terms = dmg.capacity_terms_all(st, etas, ctx.rc)
    r_by_dir: dict[str, float | None] = {}
    for d in ctx.rc:
        r_by_dir[d] = None
        if d in terms:
            t = terms[d]
            point = table.point[list(t.groups)]
            eta = t.etas[np.arange(len(point)), point]
            r_by_dir[d] = float(np.round((eta * t.weights).sum() / t.total, 9))
    capacity = None
    measured = [d for d in DIRS if r_by_dir.get(d) is not None]
    if measured:
        worst = min(measured, key=lambda d: (r_by_dir[d], d))
        r = r_by_dir[worst]
        assert r is not None
        grade = dmg.grade_of(r, std)
        capacity = Capacity(worst, r, grade, Level.of(a.grade_to_level[grade]))
    floors = tuple(floor_list)
    floor_table = (np.array(by_class, dtype=int)[floor_row] if floors
                   else np.zeros((0, len(CLASSES) + 1), dtype=int))
    vertical = np.array(vertical_list, dtype=bool)
    collapse_rule = bool(vertical.any()) and n_vertical >= a.collapse_min_vertical_members
    gb = std.capacity.grades
    beyond = storey_capacity(ctx.survey, si, std, a)
    fixed = beyond.level if beyond.level is not None else Level.IO
    model = MemberModel(
        probs=table.probs, point=table.point, terms=terms, floors=floor_table,
        grade_bounds=np.array([gb["slight"], gb["light"], gb["moderate"]]) / 100.0,
        level_of_grade=np.array([Level.of(a.grade_to_level[g])
                                 for g in ("slight", "light", "moderate", "severe")]),
        vertical=vertical, collapse_rule=collapse_rule, fixed=int(fixed))
    floor = None
    level = None
    if st.members:
        at_point = floor_table[np.arange(len(floors)), table.point]
        g = int(np.argmax(at_point))
        collapse = collapse_rule and bool((table.point[vertical] == 5).all())
        floor = Floor(Level(int(at_point[g])), g if at_point[g] > 0 else None, collapse,
                      n_vertical)
        # The same as model.level(point): the worst of the capacity levels, the floor and the
        # collapse rule (a test checks the two agree).
        level = (Level.BEYOND_CP if collapse else
                 max(floor.level, capacity.level if capacity is not None else Level.IO, fixed))
    counted = set().union(*(t.groups for t in terms.values())) if terms else set()
    point_l = table.point_list
    floor_l = floor_table[np.arange(len(floors)), table.point].tolist() if floors else []
    shown = _shown_etas(etas)
    # The values are the engine's own, of the fields' types: built without validating them.
    results = []
    beyond_groups = beyond.steel.keys() | beyond.walls.keys()
    for gi, (m, how, eta_t, p) in enumerate(zip(st.members, table.class_from, shown, point_l,
                                                 strict=True)):
        values = {"index": gi, "ref": m.ref, "kind": m.kind, "count": m.count,
                  "damage_class": CLASSES[p - 1] if p else None,
                  "floor": LEVELS[floor_l[gi]] if p else None,
                  "eta": eta_t[p] if gi in counted and eta_t is not None else None,
                  "class_from": how, "inspected": m.inspected}
        values.update(member_capacity(beyond, gi, m) if gi in beyond_groups else _NO_CAPACITY)
        results.append(trusted(MemberResult, values))
    return StoreyMembers(si, table, floors, r_by_dir, capacity, floor, model, level, tuple(results),
                         defaulted, beyond, wall_doubt(ctx.survey, si, beyond, std, a))


def _shown_etas(etas: list[np.ndarray | None]) -> list[list[float] | None]:
    """Each group's eta per class index as the assessment gives it (6 significant digits).

    Groups of one kind and ductility share one table, so each table is rounded once.
    """
    rounded: dict[int, list[float]] = {}
    out: list[list[float] | None] = []
    for t in etas:
        if t is None:
            out.append(None)
            continue
        if id(t) not in rounded:
            rounded[id(t)] = [sig6(v) for v in t.tolist()]
        out.append(rounded[id(t)])
    return out


def capacity_reason(ctx: Context, sm: StoreyMembers) -> str:
    """The reason line of a storey's R and grade."""
    c = sm.capacity
    assert c is not None
    st = ctx.survey.storeys[sm.storey]
    walls1 = any(m.kind == "wall" and m.weight == 1.0 for m in st.members)
    wall_note = ("; walls counted at weight 1 each, as a column (a wall is usually worth "
                 "several)") if walls1 else ""
    return (f"storey {st.label}, {c.dir}: residual seismic capacity ratio R = {c.r:.1%} is "
            f"damage grade {c.grade} ({JBDPA_SOURCE}), taken as {level_words(c.level.word)} "
            f"(our link of grade to level){wall_note}")


def floor_reason(ctx: Context, sm: StoreyMembers) -> str:
    """The reason line of a storey's damage floor (or of its collapse rule)."""
    f = sm.floor
    assert f is not None
    label = ctx.label(sm.storey)
    if f.collapse:
        return (f"storey {label}: every vertical member group is class V, all {f.vertical_members}"
                f" of the {f.vertical_members} vertical members logged: grade collapse, "
                f"{level_words(Level.BEYOND_CP.word)} (a rule of ours, not a JBDPA grade)")
    if f.group is None:
        return f"storey {label}: no member group's class sets a damage floor (a rule of ours)"
    m = ctx.survey.storeys[sm.storey].members[f.group]
    c = sm.classes.items[f.group]
    row = sm.floors[f.group].row_at(c.point, ctx.a)
    ref = f" {m.ref}" if m.ref else ""
    brittle = ", brittle" if m.ductility == "brittle" else ""
    text = (f"storey {label}: {kind_words(m.kind)} group{ref} ({m.count}{brittle}) is class "
            f"{dmg.class_name(c.point)} ({class_from_words(c.class_from)}), which holds the "
            f"structure to {level_words(f.level.word)} at best (damage floor of a {row.label}, "
            "a rule of ours)")
    if sm.capacity is not None and f.level > sm.capacity.level:
        text += (f"; the JBDPA grade alone is {sm.capacity.grade} (R = {sm.capacity.r:.1%}, "
                 f"so {level_words(sm.capacity.level.word)})")
    return text
