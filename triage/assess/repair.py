"""Repairability: named alternatives applied to the building's largest residual storey drift.

The figures disagree (FEMA P-58 irreparable 1.0%, Ramirez & Miranda demolition 1.5%, the
Japanese 1/200 threshold), so each stays a named alternative, never one merged number.
"""

from __future__ import annotations

import math

from triage.standards import Standards

from .result import RepairResult
from .stats import norm_cdf1, sig6


def repairability(largest: float | None, std: Standards) -> tuple[RepairResult, ...]:
    """Each alternative's probability for the largest storey drift ratio (None: unmeasured)."""
    out = []
    for alt in std.repairability:
        p: float | None
        if largest is None:
            p = None
        elif alt.kind == "lognormal":
            assert alt.median_pct is not None and alt.beta is not None
            p = 0.0 if largest <= 0 else norm_cdf1(
                math.log(largest / (alt.median_pct / 100.0)) / alt.beta)
        else:
            assert alt.threshold_pct is not None
            p = 1.0 if largest > alt.threshold_pct / 100.0 else 0.0
        out.append(RepairResult(key=alt.key, name=alt.name, source=alt.label,
                                probability=None if p is None else sig6(p)))
    return tuple(out)
