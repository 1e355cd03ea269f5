"""Damage floors (rules of ours): the least level a member group's class holds the structure to.

A group takes the first row of `standards/damage_floors.toml` that it matches, in the system of
each direction it acts in (a wall, brace or infill with `dir`: that direction; any other group:
both); acting in both, each class takes the worse floor of the two. The floors per row are the
assumption `damage_floors`. A class with no floor in its row holds the structure to nothing
(IO).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from triage.model import MemberGroup, Systems
from triage.standards import CLASSES, Assumptions, FloorRow, Standards

from .levels import Level

VERTICAL_KINDS = ("column", "wall")


@dataclass(frozen=True)
class GroupFloor:
    """A group's floor per class index 0 (undamaged) .. 5 (V), and the row of each direction."""

    by_class: np.ndarray  # (6,) Level values
    rows: dict[str, FloorRow]  # direction -> row taken there

    def row_at(self, cls: int, a: Assumptions) -> FloorRow:
        """The row that sets the floor at class index `cls` (x first among equals)."""
        best = max(self.rows.items(),
                   key=lambda kv: (_floor(a, kv[1], cls), kv[0] == "x"))
        return best[1]


def _floor(a: Assumptions, row: FloorRow, cls: int) -> int:
    if cls == 0:
        return Level.IO
    floors = a.damage_floors.get(row.key)
    if floors is None:
        raise ValueError(f"damage_floors: no floors for the row {row.key!r} of damage_floors.toml")
    word = floors.get(CLASSES[cls - 1])
    return Level.IO if word is None else Level.of(word)


def acts_in(m: MemberGroup) -> tuple[str, ...]:
    """The directions a group acts in: its `dir` when set, else both."""
    return (m.dir,) if m.dir is not None else ("x", "y")


def row_of(m: MemberGroup, system: str, std: Standards) -> FloorRow:
    """The first row of the floor table that a group acting in `system` matches."""
    material = std.systems[system].material
    for row in std.floor_rows:
        if any(x.matches(m.kind, m.ductility, system, material) for x in row.match):
            return row
    raise ValueError(f"damage_floors.toml: no row matches a {m.kind} in {system}; "
                     "the last row must match every group")


def group_floor(m: MemberGroup, systems: Systems, std: Standards, a: Assumptions) -> GroupFloor:
    """The floor of each class of a group (the worse over the directions it acts in)."""
    rows = {d: row_of(m, getattr(systems, d), std) for d in acts_in(m)}
    by_class = np.array([max(_floor(a, r, k) for r in rows.values())
                         for k in range(len(CLASSES) + 1)], dtype=int)
    by_class.flags.writeable = False
    return GroupFloor(by_class, rows)
