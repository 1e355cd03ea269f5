"""Residual drift: the level figures of a system and the level of a drift ratio.

Readings become drift ratios at spots in `spots.py`.

Levels follow FEMA 356 (2000) Table C1-3, permanent drift column (from memory): a value at or
under a level's figure meets that level; over the CP figure is beyond CP.
"""

from __future__ import annotations

from triage.standards import Assumptions, Standards

from .result import Figures


def figures(system: str, std: Standards, a: Assumptions) -> Figures:
    """The IO, LS and CP residual drift ratios of a system.

    FEMA 356 gives 'negligible' permanent drift at IO for most systems; we use the assumption
    `negligible_permanent_drift`, never more than the system's IO transient figure.
    """
    row = std.drift.systems[system]
    if row.io_permanent_pct == "negligible":
        io = min(a.negligible_permanent_drift, row.io_transient_pct / 100.0)
        negligible = True
    else:
        io = row.io_permanent_pct / 100.0
        negligible = False
    return Figures(system=system, system_name=row.name, IO=io, LS=row.ls_permanent_pct / 100.0,
                   CP=row.cp_pct / 100.0, io_negligible=negligible)


def level_index(drift: float, f: Figures) -> int:
    """0 IO, 1 LS, 2 CP, 3 beyond-CP: the first level whose figure the drift does not exceed."""
    if drift <= f.IO:
        return 0
    if drift <= f.LS:
        return 1
    if drift <= f.CP:
        return 2
    return 3


def pct(v: float) -> str:
    """A drift ratio as a percentage: two decimals under 1%, one from 1% up."""
    p = v * 100.0
    return f"{p:.2f}%" if abs(p) < 1.0 else f"{p:.1f}%"
