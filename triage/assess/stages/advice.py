"""Stage 7, advice: plumbness, borderline, what to measure next or what settles the tier."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from triage.model import Storey

from .. import damage as dmg
from ..context import DIRS, Component, Context, Plumbness
from ..drift import level_index, pct
from ..levels import Level, Tier
from ..result import MeasureNext
from ..spots import Spot
from ..stats import sig6
from ..wall_doubt import level_moved
from ..wording import kind_words
from .drift import DirDrift, DriftStage
from .governing import GoverningStage
from .level import LevelStage
from .members import StoreyMembers
from .probability import ProbabilityStage


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
            sign = dmg.recorded_class(m, ctx.std, ctx.a)[0]
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
        levels = sm.model.level(np.array(rows)).tolist() if rows else []
        what = ["class bound"] * len(rows)
        for gi, b, z, under_b, across in fema306_moves(sm, st, max_z):
            meta.append((gi, b, z, under_b))
            levels.append(across)
            what.append("FEMA 306 severity bound")
        for (gi, b, z, under_b), new, bound in zip(meta, levels, what, strict=True):
            if lv.tier_if({("members", sm.storey, ""): Level(new)}) == lv.tier:
                continue
            key = (round(z, 9), sm.storey, 2, gi)
            if best is None or key < best:
                best = key
                m = st.members[gi]
                side = "under" if under_b else "over"
                kind = kind_words(m.kind)
                name = f"{kind} group {m.ref}" if m.ref else f"{kind} group {gi + 1}"
                pick = MeasureNext(
                    storey=st.label, dir=None, what="crack", member=name, z=sig6(z),
                    why=f"crack {m.crack_mm:g} mm is {z:.1f} sd {side} the {bound} "
                        f"{b:g} mm; across it the tier would change")
    return pick


def fema306_moves(sm: StoreyMembers, st: Storey,
                  max_z: float) -> list[tuple[int, float, float, bool, int]]:
    """Each FEMA 306 crack bound near a wall's crack where the severity across it differs.

    (group, bound, z, under it, level across it), within `max_z` sd (`wall_doubt.py`).
    """
    wd = sm.walls_doubt
    out: list[tuple[int, float, float, bool, int]] = []
    if wd is None:
        return out
    for o in wd.groups:
        crack = float(st.members[o.group].crack_mm or 0.0)
        sd = sm.classes.items[o.group].crack_sd or 1.0
        for i, top in enumerate(o.tops[:-1].tolist()):
            z = abs(top - crack) / sd
            if top not in o.fema or z > max_z:
                continue
            under = o.point <= i
            out.append((o.group, top, z, under,
                        level_moved(sm.model, wd, o.group, i + 1 if under else i)))
    return out


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
