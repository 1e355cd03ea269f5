"""The assessment: a pure function of the survey, the tables and the named assumptions.

No clock, no I/O, no UI; the only randomness is seeded from the survey id. Structural level =
the worst over storeys, directions and bases of: drift level, capacity level (from the JBDPA
grade), and the member-damage floor; hazards then raise the tier (docs/method.md).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
from pydantic import TypeAdapter

from triage import __version__
from triage.model import Survey, survey_warnings
from triage.standards import LEVELS, Assumptions, Grade, Standards, load

from . import damage as dmg
from .drift import figures, level_index, pct
from .repair import repairability
from .result import (
    FORMAT,
    TIERS,
    Assessment,
    Engine,
    Figures,
    Governing,
    HazardResult,
    LevelPerDir,
    MeasureNext,
    MemberResult,
    PerDir,
    StoreyResult,
)
from .spots import Spot, spots_of_survey
from .stats import sig6, sig6_opt
from .uncertainty import SAMPLES, MemberModel, drift_cdfs, member_cdf

_MEMBERS = TypeAdapter(tuple[MemberResult, ...])
LEVEL_TIER = (0, 1, 2, 2)  # IO occupy, LS hold, CP and beyond-CP evacuate
HAZARD_TIER = {"beyond-CP": 2, "evacuate": 2, "hold": 1}
BASIS_ORDER = {"drift-x": 0, "drift-y": 1, "capacity": 2, "damage": 3}
DRIFT_SOURCE = "FEMA 356 Table C1-3, from memory"
JBDPA_SOURCE = "JBDPA 2001, from memory"


@dataclass
class _Candidate:
    """One basis of one storey that sets a level, for choosing what governs."""

    level: int
    storey: int
    basis: str  # drift-x, drift-y, capacity, damage
    dir: str | None
    reason: str


@dataclass
class _StoreyWork:
    label: str
    drift: dict[str, float | None] = field(default_factory=dict)
    mean: dict[str, float | None] = field(default_factory=dict)
    sd: dict[str, float | None] = field(default_factory=dict)
    nread: dict[str, int] = field(default_factory=dict)
    drift_level: dict[str, int | None] = field(default_factory=dict)
    r_by_dir: dict[str, float | None] = field(default_factory=dict)
    grade: str | None = None
    floor: int | None = None
    level: int | None = None
    members: list[dict[str, object]] = field(default_factory=list)  # MemberResult data


def seed_of(survey: Survey) -> int:
    """The seed of the assessment's sampling, from the survey id."""
    return int(survey.survey_id.hex[:8], 16)


def _drift_reason(label: str, d: str, v: float, f: Figures, lv: int) -> str:
    io = f"{pct(f.IO)} (our value for 'negligible', IO)" if f.io_negligible else f"{pct(f.IO)} (IO)"
    figs = {0: io, 1: f"{pct(f.LS)} (LS)", 2: f"{pct(f.CP)} (CP)"}
    if lv == 0:
        text = f"is within {figs[0]}"
    elif lv == 3:
        text = f"is over {figs[2]}: beyond CP"
    else:
        text = f"is over {figs[lv - 1]} and within {figs[lv]}"
    return (f"storey {label}, {d}: residual drift {pct(v)} {text} for {f.system_name} "
            f"({DRIFT_SOURCE})")


def assess(survey: Survey, assumptions: Assumptions | None = None,
           std: Standards | None = None) -> Assessment:
    """Assess a validated survey; docs/method.md states every rule applied."""
    std = std or load()
    a = assumptions or std.assumptions
    seed = seed_of(survey)
    rng = np.random.default_rng(seed)
    figs = {d: figures(getattr(survey.building.system, d), std, a) for d in ("x", "y")}
    rc = dmg.rc_dirs(survey, std)
    floor_map = {dmg.class_index(c): LEVELS.index(lv) for c, lv in a.member_damage_floor.items()}
    floor_of_class = np.array([floor_map.get(k, 0) for k in range(6)])
    grade_names: tuple[Grade, ...] = ("slight", "light", "moderate", "severe")
    level_of_grade = np.array([LEVELS.index(a.grade_to_level[g]) for g in grade_names])
    gb = std.capacity.grades
    grade_bounds = np.array([gb["slight"], gb["light"], gb["moderate"]]) / 100.0

    reasons_extra: list[str] = []
    notes: list[str] = []
    defaulted: list[str] = []
    candidates: list[_Candidate] = []
    work: list[_StoreyWork] = []

    # --- drift: readings to spots --------------------------------------------------------
    found = spots_of_survey(survey, a)
    values = list(found.spots)
    notes += found.notes
    by_sd: dict[tuple[int, str], list[Spot]] = {}
    for v in values:
        by_sd.setdefault((v.storey, v.dir), []).append(v)
    for st in survey.storeys:
        for ri, r in enumerate(st.readings):
            at = f" ({r.where})" if r.where else ""
            head = f"storey {st.label}, {r.dir}, reading {ri + 1}{at}"
            if r.by_tilt and r.sd_deg is None:
                defaulted.append(f"{head}: sd_deg {a.sd_tilt_deg:g}° (instrument default, "
                                 "common practice)")
            elif not r.by_tilt and r.sd_mm is None:
                defaulted.append(f"{head}: sd_mm {a.sd_offset_mm:g} mm (instrument default, "
                                 "common practice)")
    group_keys = list(by_sd)
    gindex = {k: i for i, k in enumerate(group_keys)}
    cdf_drift = drift_cdfs([v.value for v in values], [v.u for v in values],
                           [gindex[(v.storey, v.dir)] for v in values], len(group_keys),
                           [figs[v.dir] for v in values])

    member_cdfs: list[np.ndarray] = []
    any_sampled = False
    for si, st in enumerate(survey.storeys):
        w = _StoreyWork(label=st.label)
        for d in ("x", "y"):
            vals = by_sd.get((si, d), [])
            w.nread[d] = sum(len(v.readings) for v in vals)
            if not vals:
                w.drift[d] = w.mean[d] = w.sd[d] = None
                w.drift_level[d] = None
                continue
            top = max(vals, key=lambda v: abs(v.value))
            w.drift[d] = abs(top.value)
            w.mean[d] = sum(abs(v.value) for v in vals) / len(vals)
            w.sd[d] = top.u
            lv = level_index(abs(top.value), figs[d])
            w.drift_level[d] = lv
            candidates.append(_Candidate(lv, si, f"drift-{d}", d,
                                         _drift_reason(st.label, d, abs(top.value), figs[d], lv)))
            if abs(top.value) <= a.plumbness_band and not any(v.has_baseline for v in vals):
                notes.append(f"storey {st.label}, {d}: {pct(abs(top.value))} lies within the "
                             f"as-built plumbness band ({pct(a.plumbness_band)})")

        # --- members: class, eta, R, grade, floor -------------------------------------------
        table_of_classes = dmg.member_classes(st.members, std, a)
        classes = table_of_classes.items
        for gi, (m, c) in enumerate(zip(st.members, classes, strict=True)):
            if c.sd_defaulted:
                ref = f" {m.ref}" if m.ref else ""
                defaulted.append(f"storey {st.label}, {m.kind} group {gi + 1}{ref}: crack_sd_mm "
                                 f"{a.sd_crack_mm:g} mm (instrument default, common practice)")
        etas = [dmg.eta_table(m, std) for m in st.members]
        terms = dmg.capacity_terms_all(st, etas, rc)
        for d in rc:
            w.r_by_dir[d] = None
            if d in terms:
                t = terms[d]
                point = table_of_classes.point[list(t.groups)]
                eta = t.etas[np.arange(len(point)), point]
                w.r_by_dir[d] = float(np.round((eta * t.weights).sum() / t.total, 9))
        counted_groups = set().union(*(t.groups for t in terms.values())) if terms else set()
        for gi, (m, c, table) in enumerate(zip(st.members, classes, etas, strict=True)):
            w.members.append({
                "index": gi, "ref": m.ref, "kind": m.kind, "count": m.count,
                "damage_class": dmg.class_name(c.point),
                "eta": (sig6(float(table[c.point]))
                        if gi in counted_groups and table is not None else None),
                "class_from": c.class_from})
        vertical = [m.kind in a.vertical_kinds for m in st.members]
        rs = [r for r in w.r_by_dir.values() if r is not None]
        if rs:
            worst_dir = min((d for d in ("x", "y") if w.r_by_dir.get(d) is not None),
                            key=lambda d: (w.r_by_dir[d], d))
            r_worst = w.r_by_dir[worst_dir]
            assert r_worst is not None
            w.grade = dmg.grade_of(r_worst, std)
            cap_lv = LEVELS.index(a.grade_to_level[w.grade])
            walls1 = any(m.kind == "wall" and m.weight == 1.0 for m in st.members)
            wall_note = ("; walls counted at weight 1 each, as a column (a wall is usually "
                         "worth several)") if walls1 else ""
            candidates.append(_Candidate(
                cap_lv, si, "capacity", worst_dir,
                f"storey {st.label}, {worst_dir}: residual seismic capacity ratio R = "
                f"{r_worst:.1%} is damage grade {w.grade} ({JBDPA_SOURCE}), taken as "
                f"{LEVELS[cap_lv]} (our link of grade to level){wall_note}"))
        floor = 0
        floor_by: tuple[int, int] | None = None
        for gi, (c, vert) in enumerate(zip(classes, vertical, strict=True)):
            f = int(floor_of_class[c.point]) if vert else 0
            if f > floor:
                floor, floor_by = f, (gi, c.point)
        if st.members:
            w.floor = floor
        if floor_by is None and st.members:
            candidates.append(_Candidate(
                0, si, "damage", None,
                f"storey {st.label}: no vertical member group of class IV or V (member-damage "
                "floor, a rule of ours)"))
        if floor_by is not None:
            m = st.members[floor_by[0]]
            how = classes[floor_by[0]].class_from
            ref = f" {m.ref}" if m.ref else ""
            candidates.append(_Candidate(
                floor, si, "damage", None,
                f"storey {st.label}: {m.kind} group{ref} ({m.count}) is class "
                f"{dmg.class_name(floor_by[1])} (from {how}), which holds the structure to "
                f"{LEVELS[floor]} at best (member-damage floor, a rule of ours)"))
        mc, sampled = member_cdf(
            MemberModel(probs=table_of_classes.probs, point=table_of_classes.point,
                        terms=terms, vertical=np.array(vertical, dtype=bool),
                        floor_of_class=floor_of_class, grade_bounds=grade_bounds,
                        level_of_grade=level_of_grade),
            rng)
        any_sampled |= sampled
        if st.members:
            member_cdfs.append(mc)
        work.append(w)

    non_rc = sorted({getattr(survey.building.system, d) for d in ("x", "y")} - {
        getattr(survey.building.system, d) for d in rc})
    if survey.storeys and not rc:
        reasons_extra.append(
            "residual capacity R: not computed; the JBDPA method covers reinforced concrete "
            f"only, not {' or '.join(non_rc)}")
    if non_rc and any(m.crack_mm and m.damage_class is None
                      for st in survey.storeys for m in st.members):
        notes.append("crack widths are classed by the JBDPA bounds for reinforced concrete "
                     "(0.2, 1 and 2 mm); on members of " + " and ".join(non_rc) +
                     " that is an indication of ours, not a published rule")

    # --- hazards ---------------------------------------------------------------------------
    hazards: list[HazardResult] = []
    collapse = False
    hazard_reasons: list[tuple[int, str]] = []
    for hi, h in enumerate(survey.hazards):
        kind = std.hazards[h.kind]
        tier = HAZARD_TIER[kind.effect]
        keep = (sig6(a.keep_out_factor * h.height_above_ground_m)
                if h.height_above_ground_m is not None else None)
        hazards.append(HazardResult(index=hi, kind=h.kind, where=h.where, storey=h.storey,
                                    effect=kind.effect, tier=TIERS[tier], keep_out_m=keep))
        if kind.effect == "beyond-CP":
            collapse = True
            for w in work:
                if w.label == h.storey:
                    w.grade = "collapse"
        where = f" at {h.where}" if h.where else ""
        on = f" (storey {h.storey})" if h.storey else ""
        keep_txt = f"; keep {keep:g} m clear around it" if keep is not None else ""
        effect = ("the structure is beyond CP" if kind.effect == "beyond-CP"
                  else f"at least {TIERS[tier]}")
        hazard_reasons.append((tier, f"hazard {h.kind}{where}{on}: {kind.description}; "
                                     f"{effect}{keep_txt}"))

    # --- the structure's level and the tier ------------------------------------------------
    member_levels: dict[int, list[int]] = {}
    for cand in candidates:
        if cand.basis in ("capacity", "damage"):
            member_levels.setdefault(cand.storey, []).append(cand.level)
    for si, w in enumerate(work):
        levels = [lv for lv in w.drift_level.values() if lv is not None]
        levels += member_levels.get(si, [])
        w.level = max(levels) if levels else None
        if w.grade == "collapse":
            w.level = 3
    nothing = not values and not any(st.members for st in survey.storeys)
    struct_level = None if nothing else max((c.level for c in candidates), default=0)
    level: int | None = struct_level
    if collapse:
        level = 3
    struct_tier = 1 if struct_level is None else LEVEL_TIER[struct_level]
    hazard_tier = max((t for t, _ in hazard_reasons), default=0)
    tier = max(struct_tier, hazard_tier, 2 if collapse else 0)

    # --- what governs ----------------------------------------------------------------------
    if tier > struct_tier:
        first = next(i for i, (t, _) in enumerate(hazard_reasons) if t == tier)
        governing = Governing(storey=survey.hazards[first].storey, dir=None, basis="hazard")
        lead = [hazard_reasons[first][1]]
    elif struct_level is None:
        governing = Governing(storey=None, dir=None, basis="no-data")
        lead = ["no reading and no member group logged: nothing to assess yet; hold until the "
                "building has been surveyed"]
        first = -1
    else:
        gov = min((c for c in candidates if c.level == struct_level),
                  key=lambda c: (c.storey, BASIS_ORDER[c.basis]))
        governing = Governing.model_validate(
            {"storey": survey.storeys[gov.storey].label, "dir": gov.dir,
             "basis": gov.basis.split("-")[0]})
        lead = [gov.reason]
        first = -1
    others = sorted((c for c in candidates if c.level > 0 and c.reason not in lead),
                    key=lambda c: (-c.level, c.storey, BASIS_ORDER[c.basis]))
    reasons = lead + [c.reason for c in others]
    reasons += [r for i, (_, r) in enumerate(hazard_reasons) if i != first]
    reasons += reasons_extra

    # --- provisional -----------------------------------------------------------------------
    provisional = nothing
    for w, st in zip(work, survey.storeys, strict=True):
        if st.access != "full":
            provisional = True
            notes.append(f"storey {st.label}: access {st.access}; the survey is provisional")
        elif not st.below_grade and (not st.members or not all(w.nread.values())):
            provisional = True
    # --- probabilities ---------------------------------------------------------------------
    cdf = np.ones(4)
    for row in cdf_drift:
        cdf *= row
    for row in member_cdfs:
        cdf *= row
    if collapse:
        cdf[:3] = 0.0
    if nothing:
        p_occ, p_le_hold = 0.0, (1.0 if tier <= 1 else 0.0)
    else:
        p_occ = float(cdf[0]) if hazard_tier == 0 else 0.0
        p_le_hold = float(cdf[1]) if hazard_tier <= 1 else 0.0
    occ = sig6(p_occ)
    hold = sig6(max(p_le_hold - p_occ, 0.0))
    evac = sig6(max(1.0 - occ - hold, 0.0))
    probs = {"occupy": occ, "hold": hold, "evacuate": evac}
    borderline = probs[TIERS[tier]] < 0.5
    if any_sampled:
        notes.append("tier probabilities: members near a class bound were sampled "
                     f"({SAMPLES} draws, seed {seed})")

    measure_next = _measure_next(survey, work, by_sd, figs)
    for line in survey_warnings(survey):
        notes.append(line)

    storeys = tuple(
        StoreyResult(
            label=w.label, height_m=st.height_m, below_grade=st.below_grade, access=st.access,
            drift_ratio=PerDir(**{d: sig6_opt(w.drift[d]) for d in ("x", "y")}),
            drift_mean=PerDir(**{d: sig6_opt(w.mean[d]) for d in ("x", "y")}),
            drift_sd=PerDir(**{d: sig6_opt(w.sd[d]) for d in ("x", "y")}),
            readings=dict(w.nread),
            performance_level=LevelPerDir(**{
                d: (None if w.drift_level[d] is None else LEVELS[w.drift_level[d] or 0])
                for d in ("x", "y")}),
            residual_capacity=sig6_opt(min((r for r in w.r_by_dir.values() if r is not None),
                                           default=None)),
            residual_capacity_by_dir=PerDir(**{d: sig6_opt(w.r_by_dir.get(d))
                                               for d in ("x", "y")}),
            damage_grade=w.grade,
            damage_floor=LEVELS[w.floor] if w.floor is not None else None,
            level=LEVELS[w.level] if w.level is not None else None,
            members=_MEMBERS.validate_python(w.members))
        for w, st in zip(work, survey.storeys, strict=True))

    largest = max((abs(v.value) for v in values), default=None)
    if largest is None:
        notes.append("repairability: no residual drift measured, so no probability is given")
    return Assessment(
        format=FORMAT,
        survey=str(survey.survey_id), building=str(survey.building_id),
        tier=TIERS[tier], performance_level=LEVELS[level] if level is not None else None,
        governing=governing, provisional=provisional, borderline=borderline,
        tier_probability=probs,
        measure_next=measure_next, reasons=tuple(reasons), storeys=storeys,
        hazards=tuple(hazards), repairability=repairability(largest, std),
        defaulted=tuple(defaulted), notes=tuple(notes), drift_figures=figs,
        engine=Engine(version=__version__, seed=seed, assumptions=a.model_dump(mode="json")),
        sources=tuple(std.sources()))


def _measure_next(survey: Survey, work: list[_StoreyWork],
                  by_sd: dict[tuple[int, str], list[Spot]],
                  figs: dict[str, Figures]) -> MeasureNext | None:
    """The spot where one more reading helps most.

    First an above-grade, accessible storey direction with no reading at all (lowest first);
    else the spot nearest, in units of its own uncertainty, a level figure that it could
    cross to change its storey's level (a figure above the other spots of that storey and
    direction).
    """
    for w, st in zip(work, survey.storeys, strict=True):
        if st.below_grade or st.access == "none":
            continue
        for d in ("x", "y"):
            if not w.nread[d]:
                return MeasureNext(storey=st.label, dir=d,
                                   why=f"no reading yet in {d}; the level of this storey "
                                       "is unknown there")
    best: tuple[float, int, int, int] | None = None
    pick: MeasureNext | None = None
    for (si, d), vals in by_sd.items():
        f = figs[d]
        for v in vals:
            others = max((abs(o.value) for o in vals if o is not v), default=0.0)
            for name in ("IO", "LS", "CP"):
                t = getattr(f, name)
                if t <= others:
                    continue
                z = abs(t - abs(v.value)) / v.u
                key = (round(z, 9), si, 0 if d == "x" else 1, v.readings[0])
                if best is None or key < best:
                    best = key
                    side = "under" if abs(v.value) <= t else "over"
                    pick = MeasureNext(
                        storey=survey.storeys[si].label, dir=d,
                        why=f"{pct(abs(v.value))} is {z:.1f} sd {side} the {name} value "
                            f"{pct(t)}", where=v.where)
    return pick
