"""Comparing the residual capacity of two inspections, per storey, direction and method.

Each method's ratio (JBDPA's R; ours of FEMA 352 and FEMA 306, on tables from memory) is matched
by storey label, direction and method; a drop is `worse`, a rise `better` (a repair, or a
different reading of the damage), one side only `new` or `not_reassessed`.
"""

from __future__ import annotations

from typing import Literal

from pydantic import BaseModel, ConfigDict

from triage.standards.vocabulary import words

from .result import Assessment, CapacityResult, Dir

# A ratio moving by less than this is the same (the JSON keeps 6 significant digits).
SAME = 1e-6


class CapacityChange(BaseModel):
    """One storey direction's residual capacity by one method, before and after."""

    model_config = ConfigDict(frozen=True, extra="forbid")

    dir: Dir
    method: Literal["jbdpa", "fema352", "fema306"]
    before: float | None
    after: float | None
    level_before: str | None
    level_after: str | None
    index_before: float | None  # FEMA 352's floor index D
    index_after: float | None
    change: Literal["worse", "better", "same", "new", "not_reassessed", "open"]


def capacity_changes(label: str, old: Assessment | None,
                     new: Assessment | None) -> tuple[CapacityChange, ...]:
    """The capacity changes of storey `label` (either assessment may lack the storey)."""
    def by_key(a: Assessment | None) -> dict[tuple[str, str], CapacityResult]:
        if a is None:
            return {}
        return {(c.dir, c.method): c for c in a.residual_capacity if c.storey == label}

    o, n = by_key(old), by_key(new)
    out = []
    for key in sorted(set(o) | set(n), key=lambda k: (k[0], ("jbdpa", "fema352",
                                                            "fema306").index(k[1]))):
        co, cn = o.get(key), n.get(key)
        before = co.ratio if co is not None else None
        after = cn.ratio if cn is not None else None
        change: Literal["worse", "better", "same", "new", "not_reassessed", "open"]
        if co is None:
            change = "new"
        elif cn is None:
            change = "not_reassessed"
        elif before is None or after is None:
            change = "open"
        elif after < before - SAME:
            change = "worse"
        elif after > before + SAME:
            change = "better"
        else:
            change = "same"
        out.append(CapacityChange(
            dir=(co or cn).dir, method=(co or cn).method,  # type: ignore[union-attr]
            before=before, after=after, level_before=co.level if co else None,
            level_after=cn.level if cn else None, index_before=co.index if co else None,
            index_after=cn.index if cn else None, change=change))
    return tuple(out)


def _r(v: float | None) -> str:
    return "not established" if v is None else f"{v:.1%}"


def capacity_change_words(label: str, c: CapacityChange) -> str | None:
    """A sentence for a capacity that changed (None when it did not)."""
    head = (f"storey {label}, {words('directions', c.dir)}: "
            f"{words('capacity_methods', c.method)}")
    if c.change == "same":
        return None
    if c.change == "new":
        return f"{head} {_r(c.after)} (not assessed before)"
    if c.change == "not_reassessed":
        return f"{head} was {_r(c.before)}; not assessed again"
    text = f"{head} {_r(c.before)} -> {_r(c.after)}"
    if c.index_before is not None and c.index_after is not None:
        text += f" (D {c.index_before:.2f} -> {c.index_after:.2f})"
    if c.change == "worse":
        text += "; worse"
    elif c.change == "better":
        text += "; better than before (a repair, or a different reading of the damage?)"
    return text
