"""Stage 5: what sets the tier (the governing basis and spot), and the reasons in order."""

from __future__ import annotations

from dataclasses import dataclass

from ..capacity import uncovered
from ..context import BASIS_ORDER, DIRS, URM_SYSTEMS, Context, Plumbness
from ..levels import Level, Tier
from ..result import Governing
from ..spots import Spot
from .drift import DriftStage, drift_reason
from .level import HazardStage, LevelStage
from .members import StoreyMembers, capacity_reason, floor_reason


@dataclass(frozen=True)
class Candidate:
    """One basis of one storey that sets a level, with its reason line."""

    level: Level
    storey: int
    basis: str  # drift, capacity, damage
    dir: str | None
    reason: str
    ratio: float | None = None  # a capacity's ratio (R, or ours of FEMA 352 or FEMA 306)


@dataclass(frozen=True)
class GoverningStage:
    """What sets the tier, its spot, and the reasons, the governing one first."""

    governing: Governing
    spot: Spot | None
    lead: Candidate | None
    reasons: tuple[str, ...]


def candidates(ctx: Context, drift: DriftStage, members: list[StoreyMembers],
               plumb: Plumbness) -> list[Candidate]:
    """Every storey's bases: drift per direction, capacity, damage floor."""
    out = [Candidate(dd.level, si, "drift", d, drift_reason(ctx, dd, plumb))
           for (si, d), dd in sorted(drift.dirs.items(), key=lambda kv: (kv[0][0], kv[0][1]))]
    for sm in members:
        if sm.capacity is not None:
            out.append(Candidate(sm.capacity.level, sm.storey, "capacity", sm.capacity.dir,
                                 capacity_reason(ctx, sm), sm.capacity.r))
        for r in sm.beyond.results:
            if r.level is not None:
                out.append(Candidate(r.level, sm.storey, "capacity", r.dir, r.reason, r.ratio))
        if sm.floor is not None:
            lv = Level.BEYOND_CP if sm.floor.collapse else sm.floor.level
            out.append(Candidate(lv, sm.storey, "damage", None, floor_reason(ctx, sm)))
    return out


def governing_stage(ctx: Context, drift: DriftStage, members: list[StoreyMembers],
                    hazards: HazardStage, lv: LevelStage, plumb: Plumbness) -> GoverningStage:
    """What sets the tier, and the reasons with the governing one first.

    A hazard governs when it raises the tier above the structure's; else, among spots at the
    structure's level L, the largest |d| / F_L (rounded to 9 digits; ties to the lowest storey,
    x, the first listed); else capacity (lowest R), then damage (lowest storey).
    """
    cands = candidates(ctx, drift, members, plumb)
    spot = None
    lead: Candidate | None = None
    first_hazard = -1
    if lv.tier > lv.structure_tier:
        first_hazard = hazards.tiers.index(lv.tier)
        governing = Governing(storey=ctx.survey.hazards[first_hazard].storey, dir=None,
                              basis="hazard")
        lead_lines = [hazards.reasons[first_hazard]]
    elif lv.structure is None:
        governing = Governing(storey=None, dir=None, basis="no-data")
        lead_lines = ["no reading and no member group logged: nothing to assess yet; hold "
                      "until the building has been surveyed"]
    else:
        level = lv.structure
        at_level = [s for s in drift.spots if drift.spot_level(s, ctx) == level]
        if at_level:
            figure_of = {Level.IO: "IO", Level.LS: "LS", Level.CP: "CP", Level.BEYOND_CP: "CP"}
            spot = min(at_level, key=lambda s: (
                -round(abs(s.value) / getattr(ctx.figs[s.dir], figure_of[level]), 9),
                s.storey, s.dir, s.readings[0]))
            lead = next(c for c in cands if c.basis == "drift" and c.storey == spot.storey
                        and c.dir == spot.dir)
        else:
            caps = [c for c in cands if c.basis == "capacity" and c.level == level]
            if caps:
                lead = min(caps, key=lambda c: (round(c.ratio or 0.0, 9), c.storey,
                                                c.dir or ""))
            else:
                lead = min((c for c in cands if c.basis == "damage" and c.level == level),
                           key=lambda c: c.storey)
        governing = Governing.model_validate(
            {"storey": ctx.label(lead.storey), "dir": lead.dir, "basis": lead.basis})
        lead_lines = [lead.reason]
        if lv.tier == Tier.OCCUPY:
            lead_lines = [_occupy_reason(ctx, drift, lead)]
    others = sorted((c for c in cands if c.level > Level.IO and c is not lead),
                    key=lambda c: (-c.level, c.storey, BASIS_ORDER[c.basis], c.dir or ""))
    reasons = lead_lines + [c.reason for c in others]
    reasons += [r for i, r in enumerate(hazards.reasons) if i != first_hazard]
    reasons += [r.reason for sm in members for r in sm.beyond.results if r.ratio is None]
    left = uncovered(ctx.survey, ctx.rc, ctx.std) if ctx.survey.storeys else None
    if left is not None:
        reasons.append(left)
    return GoverningStage(governing, spot, lead, tuple(reasons))


def _occupy_reason(ctx: Context, drift: DriftStage, lead: Candidate) -> str:
    """At occupy: no drift told from construction tolerance; never IO by drift alone for URM."""
    if not drift.spots:
        return lead.reason
    text = "no permanent drift distinguishable from construction tolerance: " + lead.reason
    urm = sorted({getattr(ctx.survey.building.system, d) for d in DIRS} & set(URM_SYSTEMS))
    if urm:
        text += (f"; for {' and '.join(ctx.std.drift.systems[s].name for s in urm)} drift alone "
                 "cannot establish IO: the cracking and out-of-plane state of the masonry "
                 "decide")
    return text
