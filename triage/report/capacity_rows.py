"""What the report says of residual capacity, by each method: JBDPA, FEMA 352, FEMA 306.

The storey table's capacity cell with the method that gave it and the caption naming each
method; the member table's words for a group's FEMA 352 type or FEMA 306 mode and severity,
and the method page's rows for both tables (from memory, unchecked). Pure: no reportlab.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from triage.standards import Standards
from triage.standards.vocabulary import words

from .words import DASH

if TYPE_CHECKING:   # the report model imports this module; only the row types are needed here
    from triage.assess.result import Assessment, MemberResult, StoreyResult

UNCHECKED = ("unchecked: every value from memory, nobody here has read a copy; the tests type "
             "them in again, which catches typos only")


# Each method as the storey table names it under a figure, and as its caption explains it.
METHOD_NAMES = {"jbdpa": "JBDPA", "fema352": "FEMA 352", "fema306": "FEMA 306"}
METHOD_CAPTIONS = {
    "jbdpa": "JBDPA: the residual seismic capacity ratio R of the storey's concrete columns and "
             "walls, Σ(η·w)/Σw (JBDPA 2001, from memory)",
    "fema352": "FEMA 352: 1 − D/10, D the floor's connection damage index (FEMA 352 chapter 4; "
               "the ratio is ours, the table from memory)",
    "fema306": "FEMA 306: the walls' residual strength ratio, Σ(λQ·w)/Σw (FEMA 306; the ratio "
               "is ours, the table from memory)",
}


def storey_methods(a: Assessment, s: StoreyResult) -> list[str]:
    """The methods (keys, in `METHOD_NAMES` order) whose figure is the storey's capacity.

    The storey's `residual_capacity` is the worse direction of the worse method there; two
    methods can give the same figure (both are named then).
    """
    if s.residual_capacity is None:
        return []
    found = {c.method for c in a.residual_capacity
             if c.storey == s.label and c.taken and c.ratio is not None
             and abs(c.ratio - s.residual_capacity) <= 1e-9}
    return [m for m in METHOD_NAMES if m in found]


def capacity_cell(a: Assessment, s: StoreyResult) -> str:
    """The storey table's capacity cell: the figure, then the method that gave it.

    E.g. "62.0%" over "FEMA 306"; a dash where no published method covers the storey.
    """
    if s.residual_capacity is None:
        return DASH
    names = " / ".join(METHOD_NAMES[m] for m in storey_methods(a, s))
    return f"{s.residual_capacity:.1%}" + (f"\n{names}" if names else "")


def capacity_caption(a: Assessment) -> str:
    """The caption on the capacity and grade columns: each method this report shows, in words."""
    used = {m for s in a.storeys for m in storey_methods(a, s)}
    if not used:
        head = ("capacity: residual capacity ratio where a published method covers the system "
                "(none here)")
    else:
        said = "; ".join(METHOD_CAPTIONS[m] for m in METHOD_NAMES if m in used)
        head = (f"capacity: the storey's residual capacity ratio, its worse direction, with the "
                f"method that gave it: {said}")
    return f"{head}; {_grade_caption(a)}"


def _grade_caption(a: Assessment) -> str:
    """Where the grade column's grades come from, for the methods of this building."""
    graded = {c.method for c in a.residual_capacity if c.grade is not None}
    if {"jbdpa", "fema306"} <= graded:
        said = "grade: the worse of JBDPA's, from R, and ours, from the FEMA 306 ratio"
    elif "jbdpa" in graded:
        said = "grade: JBDPA's, from R"
    elif "fema306" in graded:
        said = "grade: ours, from the FEMA 306 ratio (JBDPA's bounds read onto it)"
    else:
        said = "grade: none, as no method here gives one" + (
            " (FEMA 352 gives a level, not a grade)"
            if any(c.method == "fema352" for c in a.residual_capacity) else "")
    if any(s.damage_grade == "collapse" for s in a.storeys):
        said += ("; collapse: every vertical member of the storey logged at class V (two or "
                 "more), or a collapse hazard there (rules of ours, not JBDPA grades)")
    return said


def capacity_seen(mr: MemberResult) -> list[str]:
    """A member group's residual capacity words for the member table's 'seen' column."""
    out = []
    if mr.inspected is not None and mr.inspected < mr.count:
        out.append(f"{mr.inspected} of {mr.count} inspected")
    if mr.connection_type is not None and mr.connection_index is not None:
        out.append(f"FEMA 352 type {words('connection_types', mr.connection_type)}, index "
                   f"{mr.connection_index:g} (from memory)")
    if mr.mode is not None:
        sev = mr.severity or "none (undamaged)"
        out.append(f"FEMA 306 mode {words('wall_modes', mr.mode)}, FEMA 306 severity "
                   f"{words('severities', sev) if mr.severity else sev}, lambda Q "
                   f"{mr.lambda_q:g} (from memory)")
    return out


def capacity_note(std: Standards, key: str) -> str:
    """The method page's note on the FEMA 352 or FEMA 306 table: unchecked, from memory."""
    rule = std.steel.range_rule if key == "fema352" else std.walls.range_rule
    return f"{UNCHECKED}; {rule}"
