"""Residual capacity beyond reinforced concrete, per storey and direction.

Steel moment frames by FEMA 352 (`steel.py`), concrete and masonry walls by FEMA 306
(`walls.py`); reinforced concrete's JBDPA ratio R stays in the member stage (`damage.py`). Where
a storey direction has two (a concrete-wall storey with JBDPA's R and FEMA 306), the worse is
taken and both are shown. Each result is a point value: the inspector's types, modes and
severities are choices, not measurements, and enter the tier probabilities as certain; a
severity read from a crack width carries the crack's uncertainty (`wall_doubt.py`,
docs/method.md section 8).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from triage.model import MemberGroup, Survey
from triage.standards import Assumptions, Grade, Standards
from triage.standards.vocabulary import words

from . import steel, walls
from .levels import Level
from .walls import WallStorey
from .wording import connection_type_words, group_words, mode_words

DIRS = ("x", "y")


@dataclass(frozen=True)
class DirCapacity:
    """One method's residual capacity of one storey direction."""

    dir: str
    method: str  # "fema352", "fema306" (JBDPA's R is the member stage's)
    ratio: float | None  # None: not established (nothing inspected, too small a sample)
    level: Level | None
    grade: Grade | None
    index: float | None  # FEMA 352's floor damage index D
    inspected: int
    count: int
    sampled: bool  # only some members inspected
    reason: str


@dataclass(frozen=True)
class StoreyCapacity:
    """A storey's residual capacity results beyond concrete, and what they add to the notes."""

    storey: int
    results: tuple[DirCapacity, ...]
    notes: tuple[str, ...]
    steel: dict[int, steel.ConnectionIndex] = field(default_factory=dict)  # by group
    walls: dict[int, walls.WallState] = field(default_factory=dict)  # by group, the worst
    # `walls.walls_in` of each direction, as computed here (for `wall_doubt`); absent: not yet
    walls_by_dir: dict[str, WallStorey | None] | None = None

    @property
    def level(self) -> Level | None:
        """The worst level of the results (None: none sets a level)."""
        levels = [r.level for r in self.results if r.level is not None]
        return max(levels) if levels else None

    @property
    def open(self) -> bool:
        """Whether some result could not be established (the survey is then provisional)."""
        return any(r.ratio is None for r in self.results)

    def ratio(self, d: str) -> float | None:
        """The worse ratio of direction `d` over these methods (None: none)."""
        found = [r.ratio for r in self.results if r.dir == d and r.ratio is not None]
        return min(found) if found else None


def storey_capacity(survey: Survey, si: int, std: Standards, a: Assumptions) -> StoreyCapacity:
    """FEMA 352 and FEMA 306 results of storey `si` in each direction they cover."""
    st = survey.storeys[si]
    systems = survey.building.system
    out: list[DirCapacity] = []
    notes: list[str] = []
    by_steel: dict[int, steel.ConnectionIndex] = {}
    by_wall: dict[int, walls.WallState] = {}
    by_dir: dict[str, WallStorey | None] = {}
    for d in DIRS:
        f = steel.steel_floor(st, d, systems, std, a)
        if f is not None:
            by_steel.update({g.group: g for g in f.groups})
            out.append(DirCapacity(d, "fema352", f.ratio, f.level, None, f.index, f.inspected,
                                   f.count, f.sampled, steel.steel_reason(st.label, f, std)))
        w = by_dir[d] = walls.walls_in(st, d, systems, std, a)
        if w is not None:
            for ws in w.states:
                old = by_wall.get(ws.group)
                if old is None or ws.lambdas.q < old.lambdas.q:
                    by_wall[ws.group] = ws
            out.append(DirCapacity(d, "fema306", w.ratio, w.level, w.grade, None, w.inspected,
                                   w.count, w.inspected < w.count,
                                   walls.walls_reason(st.label, w, std)))
            for gi in w.not_kept:
                m = st.members[gi]
                comp = std.walls.component_of(m.kind, getattr(systems, d))
                assert comp is not None
                assert m.mode is not None
                notes.append(f"storey {st.label}, {group_words(m.kind, gi, m.ref)}: behaviour "
                             f"mode {mode_words(m.mode)} is not among the FEMA 306 modes the "
                             f"tool keeps for its component type ({comp[1].name}): taken as "
                             "not known (the worst of its type's modes)")
    for gi, m in enumerate(st.members):
        if m.connection_type is not None and not any(
                getattr(systems, d) == steel.SYSTEM for d in DIRS
                if m.dir is None or m.dir == d):
            notes.append(f"storey {st.label}, {group_words(m.kind, gi, m.ref)}: FEMA 352 "
                         f"damage type {connection_type_words(m.connection_type)} is read for "
                         "steel moment frames only; here it sets the group's damage class alone")
    return StoreyCapacity(si, tuple(out), tuple(notes), by_steel, by_wall, by_dir)


def member_capacity(sc: StoreyCapacity, gi: int, m: MemberGroup) -> dict[str, Any]:
    """A member group's keys of the assessment for these methods (null where none applies).

    In the order of `MemberResult`'s fields, floats as floats (the member stage builds the
    result from them without validation).
    """
    c = sc.steel.get(gi)
    w = sc.walls.get(gi)
    if c is None and w is None:
        return {"inspected": m.inspected, "connection_type": None, "connection_index": None,
                "mode": None, "severity": None, "lambda_q": None}
    return {"inspected": m.inspected,
            "connection_type": c.type if c is not None else None,
            "connection_index": float(c.index) if c is not None else None,
            "mode": w.mode if w is not None else None,
            "severity": w.severity if w is not None else None,
            "lambda_q": float(w.lambdas.q) if w is not None else None}


def partial_notes(survey: Survey) -> list[str]:
    """A note per member group of which only some members were inspected."""
    out = []
    for st in survey.storeys:
        for gi, m in enumerate(st.members):
            if m.seen < m.count:
                out.append(f"storey {st.label}, {group_words(m.kind, gi, m.ref)}: {m.seen} of "
                           f"{m.count} inspected; ratios are over the members seen, those not "
                           "seen never counted as undamaged; the survey is provisional")
    return out


def uncovered(survey: Survey, rc: tuple[str, ...], std: Standards) -> str | None:
    """The reason line naming the systems no residual capacity method in the tool covers."""
    covered = set(rc)
    for d in DIRS:
        system = getattr(survey.building.system, d)
        if system == steel.SYSTEM or any(system in c.systems
                                         for c in std.walls.components.values()):
            covered.add(d)
    left = sorted({getattr(survey.building.system, d) for d in DIRS if d not in covered})
    if not left:
        return None
    return ("residual capacity: not computed for " + " or ".join(words("systems", k) for k in left)
            + "; the tool's methods "
            "cover reinforced concrete (JBDPA), steel moment frames (FEMA 352) and concrete "
            "and masonry walls (FEMA 306)")
