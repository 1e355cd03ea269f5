"""Residual drift: each reading's ratio and uncertainty, per storey and direction, and levels.

Levels follow FEMA 356 (2000) Table C1-3, permanent drift column (from memory): a value at or
under a level's figure meets that level; over the CP figure is beyond CP.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from triage.model import Reading, Survey
from triage.standards import Assumptions, Standards

from .result import Figures


@dataclass(frozen=True)
class ReadingValue:
    """A reading reduced to a signed drift ratio and its standard uncertainty (ratio units)."""

    storey: int
    dir: str
    index: int
    ratio: float
    sd: float
    defaulted: bool
    has_baseline: bool
    where: str | None


def reading_value(r: Reading, storey: int, index: int, a: Assumptions) -> ReadingValue:
    """The drift ratio of a reading and its uncertainty, linearised for a tilt."""
    ratio = r.drift_ratio()
    if r.tilt_deg is not None:
        sd_deg = r.sd_deg if r.sd_deg is not None else a.sd_tilt_deg
        angle = math.radians(r.tilt_deg - (r.baseline_deg or 0.0))
        sd = math.radians(sd_deg) / math.cos(angle) ** 2
        defaulted = r.sd_deg is None
        baseline = r.baseline_deg is not None
    else:
        assert r.gauge_mm is not None
        sd = (r.sd_mm if r.sd_mm is not None else a.sd_offset_mm) / r.gauge_mm
        defaulted = r.sd_mm is None
        baseline = r.baseline_mm is not None
    return ReadingValue(storey, r.dir, index, ratio, sd, defaulted, baseline, r.where)


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


def storey_readings(survey: Survey, a: Assumptions) -> list[ReadingValue]:
    """Every reading of the survey, reduced, in survey order."""
    out = []
    for si, st in enumerate(survey.storeys):
        for ri, r in enumerate(st.readings):
            out.append(reading_value(r, si, ri, a))
    return out


def pct(v: float) -> str:
    """A drift ratio as a percentage: two decimals under 1%, one from 1% up."""
    p = v * 100.0
    return f"{p:.2f}%" if abs(p) < 1.0 else f"{p:.1f}%"
