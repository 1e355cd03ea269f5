"""Stage 6: P(tier) from the measurement uncertainties alone."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..context import Context
from ..levels import Tier
from ..uncertainty import SAMPLES, drift_cdfs, member_cdf
from ..wall_doubt import wall_doubt_cdf
from .drift import DriftStage
from .level import LevelStage
from .members import StoreyMembers


@dataclass(frozen=True)
class ProbabilityStage:
    """P(tier) from the measurement uncertainties alone, with the standard error of sampling."""

    probability: dict[str, float]  # unrounded
    se: dict[str, float]
    sampled: bool


def probability_stage(ctx: Context, drift: DriftStage, members: list[StoreyMembers],
                      lv: LevelStage) -> ProbabilityStage:
    """P(tier) from the measurement uncertainties alone.

    Drift components exactly; member components exactly where their weights fit a grid, else
    sampled (seeded from the survey); the building's CDF is the product of its components'.
    """
    rng = np.random.default_rng(ctx.seed)
    keys = list(drift.dirs)
    index = {k: i for i, k in enumerate(keys)}
    cdf = np.ones(4)
    for row in drift_cdfs([s.value for s in drift.spots], [s.u for s in drift.spots],
                          [index[(s.storey, s.dir)] for s in drift.spots], len(keys),
                          [ctx.figs[s.dir] for s in drift.spots]):
        cdf *= row
    sampled = False
    for sm in members:
        if sm.level is None:
            continue
        row, was = (member_cdf(sm.model, rng) if sm.walls_doubt is None
                    else wall_doubt_cdf(sm.model, sm.walls_doubt, rng))
        sampled |= was
        cdf *= row
    if lv.collapse_hazard:
        cdf[:3] = 0.0
    if lv.structure is None:
        p_occ, p_le_hold = 0.0, (1.0 if lv.tier <= Tier.HOLD else 0.0)
    else:
        p_occ = float(cdf[0]) if lv.hazard_tier == Tier.OCCUPY else 0.0
        p_le_hold = float(cdf[1]) if lv.hazard_tier <= Tier.HOLD else 0.0
    probs = {"occupy": p_occ, "hold": max(p_le_hold - p_occ, 0.0),
             "evacuate": max(1.0 - p_le_hold, 0.0)}
    forced = {"occupy": lv.hazard_tier > Tier.OCCUPY or lv.collapse_hazard,
              "hold": lv.hazard_tier > Tier.HOLD or lv.collapse_hazard, "evacuate": False}
    se = {t: 0.0 for t in probs}
    if sampled:
        for t, p in probs.items():
            if forced[t]:
                continue
            hits = p * SAMPLES
            se[t] = 3.0 / SAMPLES if hits < 0.5 or SAMPLES - hits < 0.5 else math.sqrt(
                p * (1.0 - p) / SAMPLES)
    return ProbabilityStage(probs, se, sampled)
