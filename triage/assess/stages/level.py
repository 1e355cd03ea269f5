"""Stages 3 and 4: what each hazard does to the tier, then the structure's level and the tier.

The structure's level is its worst component's; `tier_if` answers 'what if one component were
at another level'.
"""

from __future__ import annotations

from dataclasses import dataclass

from ..context import Component, Context
from ..levels import HAZARD_TIER, Level, Tier
from ..result import HazardResult
from ..stats import sig6
from ..wording import hazard_words
from .drift import DriftStage
from .members import StoreyMembers


@dataclass(frozen=True)
class HazardStage:
    """What the hazards do: the least tier each sets, and whether one is a collapse."""

    results: tuple[HazardResult, ...]
    tiers: tuple[Tier, ...]
    reasons: tuple[str, ...]
    collapse_storeys: frozenset[str]
    collapse: bool

    @property
    def tier(self) -> Tier:
        """The least tier the hazards set together (occupy when none)."""
        return max(self.tiers, default=Tier.OCCUPY)


def hazard_stage(ctx: Context) -> HazardStage:
    """Each hazard's effect (hazards.toml) and its keep-out distance."""
    results, tiers, reasons = [], [], []
    collapse_storeys: set[str] = set()
    collapse = False
    for hi, h in enumerate(ctx.survey.hazards):
        kind = ctx.std.hazards[h.kind]
        tier = HAZARD_TIER[kind.effect]
        keep = (sig6(ctx.a.keep_out_factor * h.height_above_ground_m)
                if h.height_above_ground_m is not None else None)
        results.append(HazardResult(index=hi, kind=h.kind, where=h.where, storey=h.storey,
                                    effect=kind.effect, tier=tier.word, keep_out_m=keep))
        if kind.effect == "beyond-CP":
            collapse = True
            if h.storey is not None:
                collapse_storeys.add(h.storey)
        where = f" at {h.where}" if h.where else ""
        on = f" (storey {h.storey})" if h.storey else ""
        keep_txt = f"; keep {keep:g} m clear around it" if keep is not None else ""
        effect = ("the structure is beyond CP" if kind.effect == "beyond-CP"
                  else f"at least {tier.word}")
        tiers.append(tier)
        reasons.append(f"hazard: {hazard_words(h.kind)}{where}{on}: {kind.description}; {effect}"
                       f"{keep_txt}")
    return HazardStage(tuple(results), tuple(tiers), tuple(reasons), frozenset(collapse_storeys),
                       collapse)


@dataclass(frozen=True)
class LevelStage:
    """The structure's level from its components, the tier, and how to ask 'what if'."""

    components: dict[Component, Level]
    structure: Level | None  # None: nothing logged
    level: Level | None  # with a collapse hazard: beyond-CP
    structure_tier: Tier
    tier: Tier
    hazard_tier: Tier
    collapse_hazard: bool
    # For O(1) 'what if one component were ...': the worst level, how many components hold
    # it, and the worst level under it.
    best: int
    n_best: int
    second: int

    def can_change(self, key: Component) -> bool:
        """Whether some level of this one component would give another tier."""
        return (self.tier_if({key: Level.IO}) != self.tier
                or self.tier_if({key: Level.BEYOND_CP}) != self.tier)

    def tier_if(self, changes: dict[Component, Level]) -> Tier:
        """The building's tier were some components at other levels, all else fixed."""
        if len(changes) == 1:
            (key, lv), = changes.items()
            old = self.components.get(key, Level.IO)
            others = self.best if (old < self.best or self.n_best > 1) else self.second
            structure = max(int(lv), others)
        else:
            merged = {**self.components, **changes}
            structure = max(merged.values(), default=0)
        tier = max(Level(structure).tier, self.hazard_tier)
        return Tier.EVACUATE if self.collapse_hazard else tier


def level_stage(drift: DriftStage, members: list[StoreyMembers],
                hazards: HazardStage) -> LevelStage:
    """The worst component sets the structure's level; hazards then raise the tier."""
    comps: dict[Component, Level] = {("drift", k[0], k[1]): dd.level
                                     for k, dd in drift.dirs.items()}
    for sm in members:
        if sm.level is not None:
            comps[("members", sm.storey, "")] = sm.level
    structure = max(comps.values()) if comps else None
    level = Level.BEYOND_CP if hazards.collapse else structure
    structure_tier = Tier.HOLD if structure is None else structure.tier
    tier = max(structure_tier, hazards.tier)
    values = sorted((int(v) for v in comps.values()), reverse=True)
    best = values[0] if values else 0
    n_best = values.count(best)
    second = next((v for v in values if v < best), 0)
    return LevelStage(comps, structure, level, structure_tier, tier, hazards.tier,
                      hazards.collapse, best, n_best, second)
