"""The comparison of two surveys (`triage-comparison/2`) as pydantic models, and its words.

`triage.assess.compare` computes it; this module holds the format (docs/formats.md) and
`Comparison.lines()`, the sentences the text output and the report print.
"""

from __future__ import annotations

from typing import Literal

from pydantic import BaseModel, ConfigDict

from triage.standards.vocabulary import words

from .compare_capacity import CapacityChange, capacity_change_words
from .drift import pct
from .result import tier_words

Dir = Literal["x", "y"]
MethodChange = Literal["method", "gauge", "baseline"]


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


class SpotChange(_Out):
    """One spot of one direction, in both surveys or in one only (drift ratios, signed)."""

    dir: Dir
    where: str | None  # as written in the new survey (else the old); None: no `where`
    status: Literal["compared", "new", "not_remeasured"]
    matched_by: Literal["where", "order"] | None  # None unless compared
    before: float | None
    after: float | None
    change: float | None  # after - before
    u_before: float | None  # the standard uncertainty used for each side
    u_after: float | None
    u_method: float | None  # method_change_sd when measured another way, else 0
    u_combined: float | None
    z: float | None  # change / u_combined
    significant: bool
    reversed: bool  # the lean changed sign
    same_baseline: bool  # the baseline (or its absence) is the same: it cancels
    method_changed: tuple[MethodChange, ...]  # what differs: method, gauge, baseline


class MemberChange(_Out):
    """A member group whose damage class differs, or that is in one survey only, damaged."""

    ref: str | None
    kind: str
    ductility: str
    dir: Dir | None
    before: str | None  # None: undamaged, or not logged
    after: str | None
    change: Literal["worse", "better", "new", "gone"]
    matched_by: Literal["ref", "order"] | None


class StoreyChange(_Out):
    """One storey's changes."""

    label: str
    in_old: bool
    in_new: bool
    residual_capacity_before: float | None
    residual_capacity_after: float | None
    spots: tuple[SpotChange, ...]
    members: tuple[MemberChange, ...]
    capacity: tuple[CapacityChange, ...] = ()  # per direction and method (added within /2)


class BuildingLine(_Out):
    """The whole building at once: how many spots moved, against what chance alone would flag."""

    compared: int  # m
    flagged: int  # F, spots with |z| > k
    chance_rate: float  # P(|Z| > k)
    expected_by_chance: float  # m * chance_rate
    bound: float | None  # Sidak's k_m; None when nothing was compared
    largest_z: float | None  # the largest |z|
    beyond_chance: bool  # any |z| > k_m


class HazardNote(_Out):
    """A hazard found in one survey and not the other."""

    kind: str
    where: str | None
    storey: str | None


class Comparison(_Out):
    """The comparison of two surveys of one building (`triage-comparison/2`)."""

    format: Literal["triage-comparison/2"] = "triage-comparison/2"
    building: str
    same_building: bool
    old: Side
    new: Side
    tier_changed: bool
    level_changed: bool
    k: float
    method_change_sd: float
    building_line: BuildingLine
    all_reversed: tuple[Dir, ...]  # directions where every compared spot reversed its lean
    storeys: tuple[StoreyChange, ...]
    new_hazards: tuple[HazardNote, ...]
    cleared_hazards: tuple[HazardNote, ...]

    def to_json(self) -> str:
        """The comparison as JSON text."""
        return self.model_dump_json(indent=2) + "\n"

    def lines(self) -> list[str]:
        """Plain sentences of what changed, for the text output and the report (words, not keys).

        Times are written as the rest of the text output writes them: ISO 8601 as recorded,
        with the zone offset (the report prints them in words). The text is not escaped: a
        terminal writer passes it through `triage.safetext.visible`.
        """
        o, n = self.old, self.new
        out = [f"tier: {tier_words(o.tier)} on {o.at} -> {tier_words(n.tier)} on "
               f"{n.at}" + ("" if self.tier_changed else " (unchanged)"),
               f"structural performance level: {_level(o.performance_level)} -> "
               f"{_level(n.performance_level)}" + ("" if self.level_changed else " (unchanged)")]
        out.append(self.building_words())
        for d in self.all_reversed:
            dw = words("directions", d)
            out.append(f"WARNING: every spot compared in {dw} reversed its lean: check that "
                       f"+{dw} means the same direction in both surveys before reading these "
                       "changes as movement")
        for s in self.storeys:
            if not s.in_old:
                out.append(f"storey {s.label}: not in the earlier survey")
            elif not s.in_new:
                out.append(f"storey {s.label}: not in the new survey")
            out += [_spot_words(s.label, c, self.k) for c in s.spots]
            rb, ra = s.residual_capacity_before, s.residual_capacity_after
            if rb is not None and ra is not None and abs(ra - rb) > 1e-9:
                out.append(f"storey {s.label}: residual capacity {rb:.1%} -> {ra:.1%}")
            out += [t for c in s.capacity
                    if (t := capacity_change_words(s.label, c)) is not None]
            out += [_member_words(s.label, m) for m in s.members]
        for h in self.new_hazards:
            out.append("new hazard: " + _hz(h))
        for h in self.cleared_hazards:
            out.append("no longer reported: " + _hz(h))
        return out

    def building_words(self) -> str:
        """The building line in words."""
        b = self.building_line
        if b.compared == 0 or b.bound is None or b.largest_z is None:
            return "building: no spot was measured in both surveys, so no movement can be told"
        spots = "spot" if b.compared == 1 else "spots"
        head = (f"building: {b.compared} {spots} compared, {b.flagged} flagged beyond "
                f"{self.k:g} standard uncertainties; about {b.expected_by_chance:.2g} would be "
                f"flagged by chance alone ({b.chance_rate:.2%} each)")
        if b.beyond_chance:
            return (head + f"; movement beyond chance: the largest |z|, {b.largest_z:.2f}, is "
                    f"over {b.bound:.2f}, the bound for {b.compared} {spots} at 95% (Šidák)")
        return (head + f"; no movement beyond chance: the largest |z|, {b.largest_z:.2f}, is "
                f"within {b.bound:.2f}, the bound for {b.compared} {spots} at 95% (Šidák)")


def _level(level: str | None) -> str:
    return "—" if level is None else words("levels", level)


def _p(v: float | None) -> str:
    return "—" if v is None else _signed(v)


def _signed(v: float) -> str:
    return ("+" if v >= 0 else "−") + pct(abs(v))


_METHOD_WORDS = {"method": "tilt against offset", "gauge": "gauge more than 10% apart",
                 "baseline": "another baseline"}


def _spot_words(label: str, c: SpotChange, k: float) -> str:
    head = f"storey {label}, {words('directions', c.dir)}" + (f", {c.where}" if c.where else "")
    if c.status == "new":
        return f"{head}: new spot, {_p(c.after)} (not measured before)"
    if c.status == "not_remeasured":
        return f"{head}: not re-measured (was {_p(c.before)})"
    assert c.change is not None and c.u_combined is not None and c.z is not None
    mark = "significant" if c.significant else "within the uncertainty"
    text = (f"{head}: drift {_p(c.before)} -> {_p(c.after)} (change {_signed(c.change)}, "
            f"{k:g}u = {pct(k * c.u_combined)}, z = {c.z:+.2f}; {mark})")
    if c.reversed:
        text += "; the lean reversed"
    if c.method_changed:
        what = ", ".join(_METHOD_WORDS[m] for m in c.method_changed)
        text += (f"; measured another way ({what}): {pct(c.u_method or 0.0)} added to the "
                 "uncertainty")
    elif not c.same_baseline:
        text += "; baselines differ"
    if c.matched_by == "order":
        text += "; matched by order (no place given)"
    return text


def _member_words(label: str, m: MemberChange) -> str:
    kind = words("member_kinds", m.kind)
    name = f"{kind} {m.ref}" if m.ref else f"a {words('ductility', m.ductility)} {kind} group" + (
        f" in {words('directions', m.dir)}" if m.dir else "")

    def cls(c: str | None) -> str:
        return "undamaged" if c is None else words("classes", c)

    if m.change == "worse":
        return f"storey {label}: {name} worsened from {cls(m.before)} to {cls(m.after)}"
    if m.change == "better":
        return (f"storey {label}: {name} logged better than before: {cls(m.before)} -> "
                f"{cls(m.after)} (a repair, or a different reading of the damage?)")
    if m.change == "new":
        return f"storey {label}: {name} of {cls(m.after)} not logged before"
    return f"storey {label}: {name} of {cls(m.before)} not logged again"


def _hz(h: HazardNote) -> str:
    return words("hazards", h.kind) + (f" at {h.where}" if h.where else "") + (
        f" (storey {h.storey})" if h.storey else "")


__all__ = ["BuildingLine", "Comparison", "Dir", "HazardNote", "MemberChange", "MethodChange",
           "Side", "SpotChange", "StoreyChange"]
