"""What the report says of residual capacity beyond concrete.

The member table's words for a group's FEMA 352 type or FEMA 306 mode and severity, and the
method page's rows for both tables (from memory, unchecked). Pure: no reportlab.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from triage.standards import Standards
from triage.standards.vocabulary import words

if TYPE_CHECKING:   # the report model imports this module; only the row type is needed here
    from triage.assess.result import MemberResult

UNCHECKED = ("unchecked: every value from memory, nobody here has read a copy; the tests type "
             "them in again, which catches typos only")


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
