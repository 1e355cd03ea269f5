"""What changed between two surveys of one building (after an aftershock, say). Pure.

Residual drift per storey and direction, before and after, with the change marked significant
only where it exceeds twice the combined standard uncertainty of the two values (coverage
factor k = 2, as the GUM's expanded uncertainty): |after - before| > 2 * sqrt(u_before^2 +
u_after^2), u being the standard uncertainty of each storey's governing reading. Member groups
are matched by their `ref`; a group whose class worsened, or a damaged group logged only in the
new survey, is listed. Hazards are matched by kind, storey and place.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from typing import Literal

from pydantic import BaseModel, ConfigDict

from triage.model import Survey

from .damage import class_index
from .drift import pct
from .result import Assessment, tier_words

COVERAGE = 2.0


class _Out(BaseModel):
    model_config = ConfigDict(frozen=True, extra="forbid")


class Side(_Out):
    """One of the two surveys."""

    survey: str
    at: str
    inspector: str
    tier: str
    performance_level: str | None
    provisional: bool


class DriftChange(_Out):
    """A storey's residual drift in one direction, before and after."""

    before: float | None
    after: float | None
    change: float | None
    u_combined: float | None  # combined standard uncertainty of the two values
    significant: bool


class MemberChange(_Out):
    """A member group whose damage class worsened, or that is newly damaged."""

    ref: str | None
    kind: str
    before: str | None  # None: undamaged, or not logged before
    after: str | None
    logged_before: bool


class StoreyChange(_Out):
    """One storey's changes."""

    label: str
    drift: dict[Literal["x", "y"], DriftChange]
    residual_capacity_before: float | None
    residual_capacity_after: float | None
    worsened: tuple[MemberChange, ...]
    in_old: bool
    in_new: bool


class HazardNote(_Out):
    """A hazard found in one survey and not the other."""

    kind: str
    where: str | None
    storey: str | None


class Comparison(_Out):
    """The comparison of two surveys of one building (`triage-comparison/1`)."""

    format: Literal["triage-comparison/1"] = "triage-comparison/1"
    building: str
    same_building: bool
    old: Side
    new: Side
    tier_changed: bool
    level_changed: bool
    storeys: tuple[StoreyChange, ...]
    new_hazards: tuple[HazardNote, ...]
    cleared_hazards: tuple[HazardNote, ...]

    def to_json(self) -> str:
        """The comparison as JSON text."""
        return self.model_dump_json(indent=2) + "\n"

    def lines(self) -> list[str]:
        """Plain sentences of what changed, for the text output and the report."""
        o, n = self.old, self.new
        out = [f"tier: {tier_words(o.tier)} on {o.at[:16]} -> {tier_words(n.tier)} on "
               f"{n.at[:16]}" + ("" if self.tier_changed else " (unchanged)"),
               f"structural performance level: {o.performance_level or '—'} -> "
               f"{n.performance_level or '—'}" + ("" if self.level_changed else " (unchanged)")]
        for s in self.storeys:
            if not s.in_old:
                out.append(f"storey {s.label}: not in the earlier survey")
                continue
            if not s.in_new:
                out.append(f"storey {s.label}: not in the new survey")
                continue
            for d, c in s.drift.items():
                if c.before is None or c.after is None or c.change is None:
                    if c.after is not None or c.before is not None:
                        out.append(f"storey {s.label}, {d}: drift {_p(c.before)} -> "
                                   f"{_p(c.after)} (measured in one survey only)")
                    continue
                mark = "significant" if c.significant else "within the uncertainty"
                u = c.u_combined or 0.0
                out.append(f"storey {s.label}, {d}: residual drift {pct(c.before)} -> "
                           f"{pct(c.after)} ({_signed(c.change)}; {mark}, "
                           f"2u = {pct(COVERAGE * u)})")
            rb, ra = s.residual_capacity_before, s.residual_capacity_after
            if rb is not None and ra is not None and abs(ra - rb) > 1e-9:
                out.append(f"storey {s.label}: residual capacity R {rb:.1%} -> {ra:.1%}")
            for m in s.worsened:
                name = f"{m.kind} {m.ref}" if m.ref else f"a {m.kind} group"
                if m.logged_before:
                    out.append(f"storey {s.label}: {name} worsened from class "
                               f"{m.before or 'undamaged'} to {m.after}")
                else:
                    out.append(f"storey {s.label}: {name} of class {m.after} not logged before")
        for h in self.new_hazards:
            out.append("new hazard: " + _hz(h))
        for h in self.cleared_hazards:
            out.append("no longer reported: " + _hz(h))
        return out


def _p(v: float | None) -> str:
    return "—" if v is None else pct(v)


def _signed(v: float) -> str:
    return ("+" if v >= 0 else "−") + pct(abs(v))


def _hz(h: HazardNote) -> str:
    return h.kind + (f" at {h.where}" if h.where else "") + (
        f" (storey {h.storey})" if h.storey else "")


def _side(s: Survey, a: Assessment) -> Side:
    return Side(survey=str(s.survey_id), at=s.inspection.at.isoformat(),
                inspector=s.inspection.inspector.name, tier=a.tier,
                performance_level=a.performance_level, provisional=a.provisional)


def compare(old: Survey, old_a: Assessment, new: Survey, new_a: Assessment) -> Comparison:
    """Compare two surveys of one building with their assessments (old first)."""
    labels = [s.label for s in old.storeys]
    labels += [s.label for s in new.storeys if s.label not in labels]
    old_st = {s.label: s for s in old.storeys}
    new_st = {s.label: s for s in new.storeys}
    storeys = []
    for label in labels:
        so, sn = old_st.get(label), new_st.get(label)
        ro = old_a.storey(label) if so else None
        rn = new_a.storey(label) if sn else None
        drift: dict[Literal["x", "y"], DriftChange] = {}
        for d in ("x", "y"):
            b = ro.drift_ratio.get(d) if ro else None
            f = rn.drift_ratio.get(d) if rn else None
            if b is None or f is None:
                drift[d] = DriftChange(before=b, after=f, change=None, u_combined=None,
                                       significant=False)
                continue
            ub = (ro.drift_sd.get(d) if ro else None) or 0.0
            uf = (rn.drift_sd.get(d) if rn else None) or 0.0
            u = math.hypot(ub, uf)
            change = f - b
            drift[d] = DriftChange(before=b, after=f, change=round(change, 9),
                                   u_combined=round(u, 9),
                                   significant=abs(change) > COVERAGE * u)
        worsened: list[MemberChange] = []
        if so and sn and ro and rn:
            before = {m.ref: r.damage_class for m, r in zip(so.members, ro.members, strict=True)
                      if m.ref}
            for m, r in zip(sn.members, rn.members, strict=True):
                if r.damage_class is None:
                    continue
                if m.ref and m.ref in before:
                    if class_index(r.damage_class) > class_index(before[m.ref]):
                        worsened.append(MemberChange(ref=m.ref, kind=m.kind,
                                                     before=before[m.ref], after=r.damage_class,
                                                     logged_before=True))
                else:
                    worsened.append(MemberChange(ref=m.ref, kind=m.kind, before=None,
                                                 after=r.damage_class, logged_before=False))
        storeys.append(StoreyChange(
            label=label, drift=drift,
            residual_capacity_before=ro.residual_capacity if ro else None,
            residual_capacity_after=rn.residual_capacity if rn else None,
            worsened=tuple(worsened), in_old=so is not None, in_new=sn is not None))

    def key(h: object) -> tuple[str, str, str]:
        return (getattr(h, "kind", ""), (getattr(h, "where", None) or "").strip().lower(),
                getattr(h, "storey", None) or "")

    old_keys = {key(h) for h in old.hazards}
    new_keys = {key(h) for h in new.hazards}
    return Comparison(
        building=str(new.building_id), same_building=old.building_id == new.building_id,
        old=_side(old, old_a), new=_side(new, new_a),
        tier_changed=old_a.tier != new_a.tier,
        level_changed=old_a.performance_level != new_a.performance_level,
        storeys=tuple(storeys),
        new_hazards=tuple(HazardNote(kind=h.kind, where=h.where, storey=h.storey)
                          for h in new.hazards if key(h) not in old_keys),
        cleared_hazards=tuple(HazardNote(kind=h.kind, where=h.where, storey=h.storey)
                              for h in old.hazards if key(h) not in new_keys))


def since_previous(survey: Survey, assessment: Assessment,
                   load_previous: Callable[[str], tuple[Survey, Assessment] | None],
                   ) -> Comparison | None:
    """The comparison with the survey's `previous` one, when it names one that can be found.

    `load_previous(id)` returns the earlier survey with its assessment, or None. A previous
    survey of another building is not compared (None).
    """
    prev_id = survey.inspection.previous
    if prev_id is None:
        return None
    found = load_previous(str(prev_id))
    if found is None:
        return None
    old, old_a = found
    if old.building_id != survey.building_id:
        return None
    return compare(old, old_a, survey, assessment)
