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

The rules are those of docs/method.md; every figure comes from `triage.standards`. Each stage
lives in its own module under `triage.assess.stages`; what they share (`Context`) in
`triage.assess.context`. This module runs them and builds the `Assessment`.
"""

from __future__ import annotations

from triage import __version__
from triage.model import Survey, gauge_notes, survey_warnings
from triage.standards import Assumptions, Standards, load
from triage.standards.vocabulary import words

from . import damage as dmg
from .capacity import partial_notes
from .capacity_out import capacity_method, capacity_results, worse_grade, worse_ratio
from .context import DIRS, Context, seed_of
from .drift import figures
from .levels import Level
from .repair import repairability
from .result import (
    FORMAT,
    Assessment,
    Engine,
    LevelPerDir,
    PerDir,
    PlumbnessSpot,
    SpotRef,
    SpotResult,
    StoreyResult,
    trusted,
)
from .stages.advice import AdviceStage, advice_stage, measure_next, plumbness_spots, settled_by
from .stages.drift import DirDrift, DriftStage, drift_reason, drift_stage
from .stages.governing import Candidate, GoverningStage, candidates, governing_stage
from .stages.level import HazardStage, LevelStage, hazard_stage, level_stage
from .stages.members import (
    Capacity,
    Floor,
    StoreyMembers,
    capacity_reason,
    floor_reason,
    member_stage,
)
from .stages.probability import ProbabilityStage, probability_stage
from .stats import sig6, sig6_opt
from .uncertainty import SAMPLES
from .wording import systems_words


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


def _provisional(ctx: Context, drift: DriftStage, lv: LevelStage,
                 members: list[StoreyMembers]) -> tuple[bool, list[str]]:
    provisional = lv.structure is None
    notes = []
    for si, st in enumerate(ctx.survey.storeys):
        if st.access != "full":
            provisional = True
            notes.append(f"storey {st.label}: {words('access', st.access)}; the survey is "
                         "provisional")
        elif not st.below_grade and (not st.members or any((si, d) not in drift.dirs
                                                               for d in DIRS)):
            provisional = True
    partial = partial_notes(ctx.survey)
    if partial or any(sm.beyond.open for sm in members):
        provisional = True
    notes += partial
    return provisional, notes


def _assessment(ctx: Context, drift: DriftStage, members: list[StoreyMembers],
                hazards: HazardStage, lv: LevelStage, gov: GoverningStage,
                prob: ProbabilityStage, advice: AdviceStage) -> Assessment:
    survey, std, a = ctx.survey, ctx.std, ctx.a
    provisional, notes = _provisional(ctx, drift, lv, members)
    notes = list(drift.notes) + notes + list(advice.notes)
    notes += [n for sm in members for n in sm.beyond.notes]
    notes += gauge_notes(survey)   # a gauge under a quarter storey (docs/formats.md)
    non_rc = sorted({getattr(survey.building.system, d) for d in DIRS}
                    - {getattr(survey.building.system, d) for d in ctx.rc})
    if non_rc and any(m.crack_mm and m.damage_class is None
                      for st in survey.storeys for m in st.members):
        notes.append("crack widths are classed by the JBDPA bounds for reinforced concrete "
                     "(0.2, 1 and 2 mm); on members of " + systems_words(non_rc, "and") +
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
        residual_capacity_method=capacity_method(ctx, members),
        residual_capacity=capacity_results(ctx, members))


def _storey_result(ctx: Context, si: int, drift: DriftStage, sm: StoreyMembers,
                   hazards: HazardStage) -> StoreyResult:
    # The result models are built from the engine's own values, each of its field's type,
    # without validating them (`result.trusted`; a test checks them against validation).
    st = ctx.survey.storeys[si]
    dirs = {d: drift.dirs.get((si, d)) for d in DIRS}
    levels = [dd.level for dd in dirs.values() if dd is not None]
    if sm.level is not None:
        levels.append(sm.level)
    level = max(levels) if levels else None
    grade = worse_grade([sm.capacity.grade if sm.capacity is not None else None]
                        + [c.grade for c in sm.beyond.results])
    if (sm.floor is not None and sm.floor.collapse) or st.label in hazards.collapse_storeys:
        grade, level = "collapse", Level.BEYOND_CP
    by_dir = {d: worse_ratio(sm.r_by_dir.get(d), sm.beyond.ratio(d)) for d in DIRS}
    r = [v for v in by_dir.values() if v is not None]
    dx, dy = dirs["x"], dirs["y"]
    return trusted(StoreyResult, {
        "label": st.label, "height_m": float(st.height_m), "below_grade": st.below_grade,
        "access": st.access,
        "drift_ratio": _per_dir(None if dx is None else sig6(abs(dx.top.value)),
                                None if dy is None else sig6(abs(dy.top.value))),
        "drift_mean": _per_dir(None if dx is None else sig6(dx.mean),
                               None if dy is None else sig6(dy.mean)),
        "drift_sd": _per_dir(None if dx is None else sig6(dx.top.u),
                             None if dy is None else sig6(dy.top.u)),
        "readings": {d: sum(r.dir == d for r in st.readings) for d in DIRS},
        "spots": tuple(trusted(SpotResult, {
            "dir": s.dir, "where": s.where, "value": sig6(s.value), "u": sig6(s.u),
            "readings": s.readings, "baseline": bool(s.has_baseline),
            "disagree": bool(s.disagree), "level": drift.spot_level(s, ctx).word})
            for dd in dirs.values() if dd is not None for s in dd.spots),
        "performance_level": trusted(LevelPerDir, {
            "x": None if dx is None else dx.level.word,
            "y": None if dy is None else dy.level.word}),
        "residual_capacity": sig6_opt(min(r) if r else None),
        "residual_capacity_by_dir": _per_dir(sig6_opt(by_dir["x"]), sig6_opt(by_dir["y"])),
        "damage_grade": grade,
        "damage_floor": sm.floor.level.word if sm.floor is not None else None,
        "level": level.word if level is not None else None,
        "members": sm.results})


def _per_dir(x: float | None, y: float | None) -> PerDir:
    return trusted(PerDir, {"x": x, "y": y})


__all__ = ["AdviceStage", "Candidate", "Capacity", "Context", "DirDrift", "DriftStage", "Floor",
           "GoverningStage", "HazardStage", "LevelStage", "ProbabilityStage", "StoreyMembers",
           "advice_stage", "assess", "candidates", "capacity_reason", "dmg", "drift_reason",
           "drift_stage", "figures", "floor_reason", "governing_stage", "hazard_stage",
           "level_stage", "load", "measure_next", "member_stage", "plumbness_spots",
           "probability_stage", "seed_of", "settled_by"]
