"""The assessment: a pure function of the survey, the tables and the named assumptions.

No clock, no I/O, no UI; the only randomness is seeded from the survey id. `assess` runs named
stages, each returning a typed result:

1. `drift_stage`: readings to spots, each spot's level, each storey direction's largest spot;
2. `member_stage`: per storey, member classes, R and the JBDPA grade (capacity), the damage
   floors and the all-class-V collapse rule;
3. `hazard_stage`: what each hazard does to the tier;
4. `level_stage`: the structure's level (the worst component) and the tier;
5. `governing_stage`: what sets the tier, and the reasons in order;
6. `probability_stage`: what the measurement uncertainties alone allow;
7. `advice_stage`: plumbness, borderline, what to measure next or what settles the tier.

The rules are those of docs/method.md; every figure comes from `triage.standards`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
from pydantic import TypeAdapter

from triage import __version__
from triage.model import MemberGroup, Survey, gauge_notes, survey_warnings
from triage.standards import CLASSES, LEVELS, Assumptions, Grade, Standards, load

from . import damage as dmg
from .drift import figures, level_index, pct
from .floors import VERTICAL_KINDS, GroupFloor, group_floor
from .levels import HAZARD_TIER, Level, Tier
from .repair import repairability
from .result import (
    FORMAT,
    Assessment,
    Engine,
    Figures,
    Governing,
    HazardResult,
    LevelPerDir,
    MeasureNext,
    MemberResult,
    PerDir,
    PlumbnessSpot,
    SpotRef,
    SpotResult,
    StoreyResult,
)
from .spots import Spot, spots_of_survey
from .stats import sig6, sig6_opt
from .uncertainty import SAMPLES, MemberModel, drift_cdfs, member_cdf

_MEMBERS = TypeAdapter(tuple[MemberResult, ...])
DIRS: tuple[str, str] = ("x", "y")
DRIFT_SOURCE = "FEMA 356 Table C1-3, from memory"
JBDPA_SOURCE = "JBDPA 2001, from memory"
# Between bases of one storey at one level, for the order of the reasons.
BASIS_ORDER = {"drift": 0, "capacity": 1, "damage": 2}
URM_SYSTEMS = ("urm_infill", "urm_wall")
SETTLE_PLUMBNESS = ("an as-built baseline at that spot (drawings, a lift shaft, facade lines) "
                    "or a second method")


def seed_of(survey: Survey) -> int:
    """The seed of the assessment's sampling, from the survey id."""
    return int(survey.survey_id.hex[:8], 16)


@dataclass(frozen=True)
class Context:
    """What every stage reads: the survey, the tables, the assumptions, the drift figures."""

    survey: Survey
    std: Standards
    a: Assumptions
    figs: dict[str, Figures]
    rc: tuple[str, ...]  # directions whose system the JBDPA method covers
    seed: int
    floor_cache: dict[tuple[str, str, str | None], GroupFloor] = field(default_factory=dict)

    def group_floor(self, m: MemberGroup) -> GroupFloor:
        """A group's floors (kind, ductility and direction decide them: computed once each)."""
        key = (m.kind, m.ductility, m.dir)
        found = self.floor_cache.get(key)
        if found is None:
            found = self.floor_cache[key] = group_floor(m, self.survey.building.system,
                                                        self.std, self.a)
        return found

    def label(self, si: int) -> str:
        """The label of storey index `si`."""
        return self.survey.storeys[si].label

    def material(self, d: str) -> str:
        """The material of direction `d`'s system."""
        return self.std.systems[getattr(self.survey.building.system, d)].material


# --- 1. drift ----------------------------------------------------------------------------------

@dataclass(frozen=True)
class DirDrift:
    """One storey and direction: its spots, the largest, and the level it sets."""

    storey: int
    dir: str
    spots: tuple[Spot, ...]
    top: Spot  # the largest absolute value (the first listed among equals)
    level: Level
    mean: float  # mean of the absolute spot values


@dataclass(frozen=True)
class DriftStage:
    """Every spot, and per storey and direction the drift that sets a level."""

    spots: tuple[Spot, ...]
    dirs: dict[tuple[int, str], DirDrift]
    notes: tuple[str, ...]
    defaulted: tuple[str, ...]

    def spot_level(self, s: Spot, ctx: Context) -> Level:
        """The level of one spot's value on its direction's figures."""
        return Level(level_index(abs(s.value), ctx.figs[s.dir]))


def drift_stage(ctx: Context) -> DriftStage:
    """Readings to spots (spots.py), and the largest spot of each storey and direction."""
    found = spots_of_survey(ctx.survey, ctx.a)
    grouped: dict[tuple[int, str], list[Spot]] = {}
    for s in found.spots:
        grouped.setdefault((s.storey, s.dir), []).append(s)
    dirs = {}
    for key, spots in grouped.items():
        top = max(spots, key=lambda s: abs(s.value))
        dirs[key] = DirDrift(key[0], key[1], tuple(spots), top,
                             Level(level_index(abs(top.value), ctx.figs[key[1]])),
                             sum(abs(s.value) for s in spots) / len(spots))
    a = ctx.a
    defaulted = []
    for st in ctx.survey.storeys:
        for ri, r in enumerate(st.readings):
            at = f" ({r.where})" if r.where else ""
            head = f"storey {st.label}, {r.dir}, reading {ri + 1}{at}"
            if r.by_tilt and r.sd_deg is None:
                defaulted.append(f"{head}: sd_deg {a.sd_tilt_deg:g}° (instrument default, "
                                 "common practice)")
            elif not r.by_tilt and r.sd_mm is None:
                defaulted.append(f"{head}: sd_mm {a.sd_offset_mm:g} mm (instrument default, "
                                 "common practice)")
            if r.baseline_deg is not None and r.baseline_sd_deg is None:
                defaulted.append(f"{head}: baseline_sd_deg {a.sd_tilt_deg:g}° (instrument "
                                 "default, common practice)")
            if r.baseline_mm is not None and r.baseline_sd_mm is None:
                defaulted.append(f"{head}: baseline_sd_mm {a.sd_offset_mm:g} mm (instrument "
                                 "default, common practice)")
    return DriftStage(found.spots, dirs, found.notes, tuple(defaulted))


def drift_reason(ctx: Context, dd: DirDrift, plumb: Plumbness = ()) -> str:
    """The reason line of a storey direction's drift, naming its largest spot.

    Where a spot of the direction is listed under plumbness, the line says so.
    """
    f = ctx.figs[dd.dir]
    v = abs(dd.top.value)
    io = f"{pct(f.IO)} (our value for 'negligible', IO)" if f.io_negligible else f"{pct(f.IO)} (IO)"
    figs = {0: io, 1: f"{pct(f.LS)} (LS)", 2: f"{pct(f.CP)} (CP)"}
    lv = dd.level
    if lv == Level.IO:
        text = f"is within {figs[0]}"
    elif lv == Level.BEYOND_CP:
        text = f"is over {figs[2]}: beyond CP"
    else:
        text = f"is over {figs[lv - 1]} and within {figs[lv]}"
    at = f" at {dd.top.where}" if dd.top.where else ""
    line = (f"storey {ctx.label(dd.storey)}, {dd.dir}: residual drift {pct(v)}{at} {text} for "
            f"{f.system_name} ({DRIFT_SOURCE})")
    for s, band in plumb:
        if s.storey == dd.storey and s.dir == dd.dir:
            material = ctx.material(s.dir)
            line += (f"; with no as-built baseline at {s.name()}, {pct(abs(s.value))} lies within "
                     f"the plumbness band of {material} ({pct(band)}, "
                     f"{ctx.std.plumbness_sources.get(material, 'ours')}) and cannot be told "
                     "from construction lean")
            break
    return line


# Spots in their plumbness band that set or raise the tier, with the band (see advice).
Plumbness = tuple[tuple[Spot, float], ...]


# --- 2. members: classes, capacity, floors -----------------------------------------------------

@dataclass(frozen=True)
class Capacity:
    """A storey's residual seismic capacity: the worse direction's R, grade and level."""

    dir: str
    r: float
    grade: Grade
    level: Level


@dataclass(frozen=True)
class Floor:
    """The damage floor a storey's members set at their point classes."""

    level: Level
    group: int | None  # the group that sets it (None: no class sets a floor)
    collapse: bool  # the all-class-V rule applies
    vertical_members: int  # members of column and wall groups logged


@dataclass(frozen=True)
class StoreyMembers:
    """One storey's member groups: classes, R, grade, floors and the component level."""

    storey: int
    classes: dmg.ClassTable
    floors: tuple[GroupFloor, ...]
    r_by_dir: dict[str, float | None]
    capacity: Capacity | None
    floor: Floor | None  # None: no member group logged
    model: MemberModel
    level: Level | None  # the member component's point level; None: no member group
    results: tuple[MemberResult, ...]
    defaulted: tuple[str, ...]


def member_stage(ctx: Context, si: int) -> StoreyMembers:
    """One storey's member classes, R, grade, damage floors and all-class-V collapse rule.

    A group's class is its override, else the worse of its crack class and its sign class.
    """
    std, a = ctx.std, ctx.a
    st = ctx.survey.storeys[si]
    table = dmg.member_classes(st.members, std, a)
    defaulted = tuple(
        f"storey {st.label}, {m.kind} group {gi + 1}{' ' + m.ref if m.ref else ''}: crack_sd_mm "
        f"{a.sd_crack_mm:g} mm (instrument default, common practice)"
        for gi, (m, c) in enumerate(zip(st.members, table.items, strict=True)) if c.sd_defaulted)
    etas = [dmg.eta_table(m, std) for m in st.members]
    terms = dmg.capacity_terms_all(st, etas, ctx.rc)
    r_by_dir: dict[str, float | None] = {}
    for d in ctx.rc:
        r_by_dir[d] = None
        if d in terms:
            t = terms[d]
            point = table.point[list(t.groups)]
            eta = t.etas[np.arange(len(point)), point]
            r_by_dir[d] = float(np.round((eta * t.weights).sum() / t.total, 9))
    capacity = None
    measured = [d for d in DIRS if r_by_dir.get(d) is not None]
    if measured:
        worst = min(measured, key=lambda d: (r_by_dir[d], d))
        r = r_by_dir[worst]
        assert r is not None
        grade = dmg.grade_of(r, std)
        capacity = Capacity(worst, r, grade, Level.of(a.grade_to_level[grade]))
    floors = tuple(ctx.group_floor(m) for m in st.members)
    floor_table = (np.array([f.by_class for f in floors], dtype=int) if floors
                   else np.zeros((0, len(CLASSES) + 1), dtype=int))
    vertical = np.array([m.kind in VERTICAL_KINDS for m in st.members], dtype=bool)
    n_vertical = sum(m.count for m in st.members if m.kind in VERTICAL_KINDS)
    collapse_rule = bool(vertical.any()) and n_vertical >= a.collapse_min_vertical_members
    gb = std.capacity.grades
    model = MemberModel(
        probs=table.probs, point=table.point, terms=terms, floors=floor_table,
        grade_bounds=np.array([gb["slight"], gb["light"], gb["moderate"]]) / 100.0,
        level_of_grade=np.array([Level.of(a.grade_to_level[g])
                                 for g in ("slight", "light", "moderate", "severe")]),
        vertical=vertical, collapse_rule=collapse_rule)
    floor = None
    level = None
    if st.members:
        at_point = floor_table[np.arange(len(floors)), table.point]
        g = int(np.argmax(at_point))
        collapse = collapse_rule and bool((table.point[vertical] == 5).all())
        floor = Floor(Level(int(at_point[g])), g if at_point[g] > 0 else None, collapse,
                      n_vertical)
        # The same as model.level(point): the worst of the capacity level, the floor and the
        # collapse rule (a test checks the two agree).
        level = (Level.BEYOND_CP if collapse else
                 max(floor.level, capacity.level if capacity is not None else Level.IO))
    counted = set().union(*(t.groups for t in terms.values())) if terms else set()
    point_l = table.point.tolist()
    floor_l = floor_table[np.arange(len(floors)), table.point].tolist() if floors else []
    results = _MEMBERS.validate_python([
        {"index": gi, "ref": m.ref, "kind": m.kind, "count": m.count,
         "damage_class": CLASSES[point_l[gi] - 1] if point_l[gi] else None,
         "floor": LEVELS[floor_l[gi]] if point_l[gi] else None,
         "eta": (sig6(float(eta_t[point_l[gi]])) if gi in counted and eta_t is not None
                 else None),
         "class_from": c.class_from}
        for gi, (m, c, eta_t) in enumerate(zip(st.members, table.items, etas, strict=True))])
    return StoreyMembers(si, table, floors, r_by_dir, capacity, floor, model, level, results,
                         defaulted)


def capacity_reason(ctx: Context, sm: StoreyMembers) -> str:
    """The reason line of a storey's R and grade."""
    c = sm.capacity
    assert c is not None
    st = ctx.survey.storeys[sm.storey]
    walls1 = any(m.kind == "wall" and m.weight == 1.0 for m in st.members)
    wall_note = ("; walls counted at weight 1 each, as a column (a wall is usually worth "
                 "several)") if walls1 else ""
    return (f"storey {st.label}, {c.dir}: residual seismic capacity ratio R = {c.r:.1%} is "
            f"damage grade {c.grade} ({JBDPA_SOURCE}), taken as {c.level.word} (our link of "
            f"grade to level){wall_note}")


def floor_reason(ctx: Context, sm: StoreyMembers) -> str:
    """The reason line of a storey's damage floor (or of its collapse rule)."""
    f = sm.floor
    assert f is not None
    label = ctx.label(sm.storey)
    if f.collapse:
        return (f"storey {label}: every vertical member group is class V, all {f.vertical_members}"
                f" of the {f.vertical_members} vertical members logged: grade collapse, beyond "
                "CP (a rule of ours, not a JBDPA grade)")
    if f.group is None:
        return f"storey {label}: no member group's class sets a damage floor (a rule of ours)"
    m = ctx.survey.storeys[sm.storey].members[f.group]
    c = sm.classes.items[f.group]
    row = sm.floors[f.group].row_at(c.point, ctx.a)
    ref = f" {m.ref}" if m.ref else ""
    brittle = ", brittle" if m.ductility == "brittle" else ""
    text = (f"storey {label}: {m.kind} group{ref} ({m.count}{brittle}) is class "
            f"{dmg.class_name(c.point)} (from {c.class_from}), which holds the structure to "
            f"{f.level.word} at best (damage floor of a {row.label}, a rule of ours)")
    if sm.capacity is not None and f.level > sm.capacity.level:
        text += (f"; the JBDPA grade alone is {sm.capacity.grade} (R = {sm.capacity.r:.1%}, "
                 f"{sm.capacity.level.word})")
    return text


# --- 3. hazards --------------------------------------------------------------------------------

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
        reasons.append(f"hazard {h.kind}{where}{on}: {kind.description}; {effect}{keep_txt}")
    return HazardStage(tuple(results), tuple(tiers), tuple(reasons), frozenset(collapse_storeys),
                       collapse)


# --- 4. the structure's level and the tier ----------------------------------------------------

# A component of the structure's level: ("drift", storey, dir) or ("members", storey, "").
Component = tuple[str, int, str]


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


# --- 5. governing and reasons -----------------------------------------------------------------

@dataclass(frozen=True)
class Candidate:
    """One basis of one storey that sets a level, with its reason line."""

    level: Level
    storey: int
    basis: str  # drift, capacity, damage
    dir: str | None
    reason: str


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
                                 capacity_reason(ctx, sm)))
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
                lead = min(caps, key=lambda c: (round(_r_of(members, c), 9), c.storey,
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
    if ctx.survey.storeys and not ctx.rc:
        non_rc = sorted({getattr(ctx.survey.building.system, d) for d in DIRS})
        reasons.append("residual capacity R: not computed; the JBDPA method covers reinforced "
                       f"concrete only, not {' or '.join(non_rc)}")
    return GoverningStage(governing, spot, lead, tuple(reasons))


def _r_of(members: list[StoreyMembers], c: Candidate) -> float:
    cap = members[c.storey].capacity
    assert cap is not None
    return cap.r


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


# --- 6. probabilities --------------------------------------------------------------------------

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
        row, was = member_cdf(sm.model, rng)
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


# --- 7. advice: plumbness, borderline, measure next, settled by ------------------------------

@dataclass(frozen=True)
class AdviceStage:
    """What the verdict says about itself."""

    plumbness: Plumbness
    borderline: bool | None
    measure_next: MeasureNext | None
    settled_by: str | None
    notes: tuple[str, ...]


def _dir_level_if(ctx: Context, dd: DirDrift, spot: Spot, value: float) -> Level:
    """A storey direction's level were one of its spots at `value`, the others as they are."""
    rest = max((abs(s.value) for s in dd.spots if s is not spot), default=0.0)
    return Level(level_index(max(abs(value), rest), ctx.figs[dd.dir]))


def _band(ctx: Context, d: str) -> float:
    return ctx.a.plumbness_bands.get(ctx.material(d), 0.0)


def plumbness_spots(ctx: Context, drift: DriftStage, lv: LevelStage) -> Plumbness:
    """Spots without a baseline, within their material's band, that set or raise the tier.

    A spot sets or raises the tier when setting its value to 0 would lower the building's tier.
    Where no single spot does but the in-band spots together do (two of them, say), each of
    those that reaches the tier is listed too: a tier resting on construction tolerance alone.
    """
    band = {d: _band(ctx, d) + 1e-12 for d in DIRS}
    inband = [s for s in drift.spots if abs(s.value) <= band[s.dir] and not s.has_baseline]
    out = []
    for s in inband:
        dd = drift.dirs[(s.storey, s.dir)]
        if lv.tier_if({("drift", s.storey, s.dir): _dir_level_if(ctx, dd, s, 0.0)}) < lv.tier:
            out.append((s, _band(ctx, s.dir)))
    if out or not inband:
        return tuple(out)
    changes: dict[Component, Level] = {}
    ids = {id(s) for s in inband}
    for (si, d), dd in drift.dirs.items():
        rest = max((abs(s.value) for s in dd.spots if id(s) not in ids), default=0.0)
        changes[("drift", si, d)] = Level(level_index(rest, ctx.figs[d]))
    if lv.tier_if(changes) < lv.tier:
        out = [(s, _band(ctx, s.dir)) for s in inband
               if max(drift.spot_level(s, ctx).tier, lv.hazard_tier) == lv.tier]
    return tuple(out)


def advice_stage(ctx: Context, drift: DriftStage, members: list[StoreyMembers],
                 lv: LevelStage, gov: GoverningStage, prob: ProbabilityStage,
                 plumb: Plumbness) -> AdviceStage:
    """Plumbness, borderline, and what to measure next (or what settles the tier)."""
    notes: list[str] = []
    borderline = (None if lv.level is None
                  else prob.probability[lv.tier.word] < ctx.a.borderline_below)
    nxt = measure_next(ctx, drift, members, lv)
    settled = settled_by(ctx, gov) if nxt is None else None
    return AdviceStage(tuple(plumb), borderline, nxt, settled, tuple(notes))


def measure_next(ctx: Context, drift: DriftStage, members: list[StoreyMembers],
                 lv: LevelStage) -> MeasureNext | None:
    """The one measurement that could change the tier.

    (a) Below evacuate, an unmeasured accessible above-grade storey direction (lowest storey, x
    first); else the least z of (b) a spot and (c) a crack width whose value set just across a
    threshold (IO or LS figure; a class bound) changes the tier. Ties: lowest storey, x, first
    listed. None when nothing qualifies or the least z is over `measure_next_max_z`.
    """
    survey = ctx.survey
    if lv.tier < Tier.EVACUATE:
        for si, st in enumerate(survey.storeys):
            if st.below_grade or st.access == "none":
                continue
            for d in DIRS:
                if (si, d) not in drift.dirs:
                    return MeasureNext(storey=st.label, dir=d, what="reading",
                                       why=f"no reading yet in {d}; the level of this storey "
                                           "is unknown there")
    max_z = ctx.a.measure_next_max_z
    best: tuple[float, int, int, int] | None = None
    pick: MeasureNext | None = None
    movable = {k for k in drift.dirs if lv.can_change(("drift", k[0], k[1]))}
    for s in drift.spots:
        if (s.storey, s.dir) not in movable:
            continue
        dd = drift.dirs[(s.storey, s.dir)]
        f = ctx.figs[s.dir]
        for name, t, over in (("IO", f.IO, Level.LS), ("LS", f.LS, Level.CP)):
            z = abs(t - abs(s.value)) / s.u
            if z > max_z:
                continue
            under = abs(s.value) <= t
            rest = max((abs(o.value) for o in dd.spots if o is not s), default=0.0)
            moved = over if under else Level(level_index(t, f))
            new = max(moved, Level(level_index(rest, f)))
            if lv.tier_if({("drift", s.storey, s.dir): new}) == lv.tier:
                continue
            key = (round(z, 9), s.storey, DIRS.index(s.dir), s.readings[0])
            if best is None or key < best:
                best = key
                side = "under" if under else "over"
                pick = MeasureNext(
                    storey=ctx.label(s.storey), dir=s.dir, where=s.where,
                    what="spot", z=sig6(z),
                    why=f"{pct(abs(s.value))} is {z:.1f} sd {side} the {name} value {pct(t)}; "
                        "across it the tier would change")
    b2, b3, b4 = dmg.crack_bounds(ctx.std)
    for sm in members:
        st = survey.storeys[sm.storey]
        if not lv.can_change(("members", sm.storey, "")):
            continue
        rows, meta = [], []
        for gi, (m, c) in enumerate(zip(st.members, sm.classes.items, strict=True)):
            if c.class_from == "override" or not m.crack_mm or c.crack_sd is None:
                continue
            sign = dmg.sign_class(m, ctx.std)
            cm = m.crack_mm
            # (bound, class under it, class over it, whether the crack is under it): under 0.2
            # mm is I; 0.2 to 1.0 mm II; over 1.0 to 2.0 mm III; over 2.0 mm IV.
            for b, lo, hi, under_b in ((b2, 1, 2, cm < b2), (b3, 2, 3, cm <= b3),
                                       (b4, 3, 4, cm <= b4)):
                z = abs(b - cm) / c.crack_sd
                if z > max_z:
                    continue
                crossed = hi if under_b else lo
                k = sm.classes.point.copy()
                k[gi] = max(crossed, sign)
                if k[gi] == sm.classes.point[gi]:
                    continue
                rows.append(k)
                meta.append((gi, b, z, under_b))
        if not rows:
            continue
        levels = sm.model.level(np.array(rows))
        for (gi, b, z, under_b), new in zip(meta, levels.tolist(), strict=True):
            if lv.tier_if({("members", sm.storey, ""): Level(new)}) == lv.tier:
                continue
            key = (round(z, 9), sm.storey, 2, gi)
            if best is None or key < best:
                best = key
                m = st.members[gi]
                side = "under" if under_b else "over"
                name = f"{m.kind} group {m.ref}" if m.ref else f"{m.kind} group {gi + 1}"
                pick = MeasureNext(
                    storey=st.label, dir=None, what="crack", member=name, z=sig6(z),
                    why=f"crack {m.crack_mm:g} mm is {z:.1f} sd {side} the class bound "
                        f"{b:g} mm; across it the tier would change")
    return pick


def settled_by(ctx: Context, gov: GoverningStage) -> str:
    """In words, what sets the tier when nothing measurable could change it."""
    if gov.governing.basis == "no-data":
        head = "nothing logged yet"
    elif gov.lead is not None:
        head = gov.lead.reason
    else:
        head = gov.reasons[0]
    return (f"no spot or crack width within {ctx.a.measure_next_max_z:g} sd of a threshold "
            "could change the tier; it rests on: " + head)


# --- the whole ---------------------------------------------------------------------------------

def assess(survey: Survey, assumptions: Assumptions | None = None,
           std: Standards | None = None) -> Assessment:
    """Assess a validated survey; see docs/method.md for every rule applied."""
    std = std or load()
    a = assumptions or std.assumptions
    ctx = Context(survey, std, a, {d: figures(getattr(survey.building.system, d), std, a)
                                   for d in DIRS},
                  tuple(dmg.rc_dirs(survey, std)), seed_of(survey))
    drift = drift_stage(ctx)
    members = [member_stage(ctx, si) for si in range(len(survey.storeys))]
    hazards = hazard_stage(ctx)
    lv = level_stage(drift, members, hazards)
    plumb = plumbness_spots(ctx, drift, lv)
    gov = governing_stage(ctx, drift, members, hazards, lv, plumb)
    prob = probability_stage(ctx, drift, members, lv)
    advice = advice_stage(ctx, drift, members, lv, gov, prob, plumb)
    return _assessment(ctx, drift, members, hazards, lv, gov, prob, advice)


def _provisional(ctx: Context, drift: DriftStage, lv: LevelStage) -> tuple[bool, list[str]]:
    provisional = lv.structure is None
    notes = []
    for si, st in enumerate(ctx.survey.storeys):
        if st.access != "full":
            provisional = True
            notes.append(f"storey {st.label}: access {st.access}; the survey is provisional")
        elif not st.below_grade and (not st.members or any((si, d) not in drift.dirs
                                                               for d in DIRS)):
            provisional = True
    return provisional, notes


def _assessment(ctx: Context, drift: DriftStage, members: list[StoreyMembers],
                hazards: HazardStage, lv: LevelStage, gov: GoverningStage,
                prob: ProbabilityStage, advice: AdviceStage) -> Assessment:
    survey, std, a = ctx.survey, ctx.std, ctx.a
    provisional, notes = _provisional(ctx, drift, lv)
    notes = list(drift.notes) + notes + list(advice.notes)
    notes += gauge_notes(survey)   # a gauge under a quarter storey (docs/formats.md)
    non_rc = sorted({getattr(survey.building.system, d) for d in DIRS}
                    - {getattr(survey.building.system, d) for d in ctx.rc})
    if non_rc and any(m.crack_mm and m.damage_class is None
                      for st in survey.storeys for m in st.members):
        notes.append("crack widths are classed by the JBDPA bounds for reinforced concrete "
                     "(0.2, 1 and 2 mm); on members of " + " and ".join(non_rc) +
                     " that is an indication of ours, not a published rule")
    if len(drift.spots) > 1:
        notes.append("tier probabilities: each spot taken as a separate place (independent "
                     "readings), so more spots can lower P(occupy)")
    if prob.sampled:
        notes.append("tier probabilities: members near a class bound were sampled "
                     f"({SAMPLES} draws, seed {ctx.seed}); each carries its standard error")
    if provisional and lv.structure is not None:
        notes.append("tier probabilities: measured parts only (unmeasured parts count as IO)")
    notes += survey_warnings(survey)
    largest = max((abs(s.value) for s in drift.spots), default=None)
    if largest is None:
        notes.append("repairability: no residual drift measured, so no probability is given")
    storeys = tuple(_storey_result(ctx, si, drift, members[si], hazards)
                    for si in range(len(survey.storeys)))
    gs = gov.spot
    return Assessment(
        format=FORMAT, survey=str(survey.survey_id), building=str(survey.building_id),
        tier=lv.tier.word, performance_level=lv.level.word if lv.level is not None else None,
        governing=gov.governing, provisional=provisional, borderline=advice.borderline,
        tier_probability={t: sig6(p) for t, p in prob.probability.items()},
        measure_next=advice.measure_next, reasons=gov.reasons, storeys=storeys,
        hazards=hazards.results, repairability=repairability(largest, std),
        defaulted=drift.defaulted + tuple(d for sm in members for d in sm.defaulted),
        notes=tuple(notes), drift_figures=ctx.figs,
        engine=Engine(version=__version__, seed=ctx.seed, assumptions=a.model_dump(mode="json")),
        sources=tuple(std.sources()),
        plumbness=tuple(PlumbnessSpot(storey=ctx.label(s.storey), dir=s.dir,
                                      where=s.where, drift=sig6(abs(s.value)), band=sig6(band))
                        for s, band in advice.plumbness),
        governing_spot=(None if gs is None else SpotRef(
            storey=ctx.label(gs.storey), dir=gs.dir, where=gs.where,
            reading=gs.readings[0])),
        settled_by=advice.settled_by,
        tier_probability_se={t: sig6(v) for t, v in prob.se.items()},
        residual_capacity_method=std.capacity.source.cite() if ctx.rc else None)


def _storey_result(ctx: Context, si: int, drift: DriftStage, sm: StoreyMembers,
                   hazards: HazardStage) -> StoreyResult:
    st = ctx.survey.storeys[si]
    dirs = {d: drift.dirs.get((si, d)) for d in DIRS}
    levels = [dd.level for dd in dirs.values() if dd is not None]
    if sm.level is not None:
        levels.append(sm.level)
    level = max(levels) if levels else None
    grade: Grade | None = sm.capacity.grade if sm.capacity is not None else None
    if (sm.floor is not None and sm.floor.collapse) or st.label in hazards.collapse_storeys:
        grade, level = "collapse", Level.BEYOND_CP
    r = [v for v in sm.r_by_dir.values() if v is not None]
    return StoreyResult(
        label=st.label, height_m=st.height_m, below_grade=st.below_grade, access=st.access,
        drift_ratio=PerDir(**{d: sig6_opt(abs(dd.top.value)) if dd else None
                              for d, dd in dirs.items()}),
        drift_mean=PerDir(**{d: sig6_opt(dd.mean) if dd else None for d, dd in dirs.items()}),
        drift_sd=PerDir(**{d: sig6_opt(dd.top.u) if dd else None for d, dd in dirs.items()}),
        readings={d: sum(r.dir == d for r in st.readings) for d in DIRS},
        spots=tuple(SpotResult(dir=s.dir, where=s.where, value=sig6(s.value), u=sig6(s.u),
                               readings=s.readings, baseline=s.has_baseline,
                               disagree=s.disagree, level=drift.spot_level(s, ctx).word)
                    for dd in dirs.values() if dd is not None for s in dd.spots),
        performance_level=LevelPerDir(**{d: dd.level.word if dd else None
                                         for d, dd in dirs.items()}),
        residual_capacity=sig6_opt(min(r) if r else None),
        residual_capacity_by_dir=PerDir(**{d: sig6_opt(sm.r_by_dir.get(d)) for d in DIRS}),
        damage_grade=grade,
        damage_floor=sm.floor.level.word if sm.floor is not None else None,
        level=level.word if level is not None else None,
        members=sm.results)
