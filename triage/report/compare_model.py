"""The aftershock comparison as a working document: what it prints, as text. Pure: no reportlab.

`build_compare_model(comparison, old, new)` turns a `triage-comparison/2` comparison (with the
two surveys, for the building's name and the survey codes) into a `CompareModel`; the drawing
(`compare_draw.py`) only lays it out. Never signed: a comparison informs the engineer of
record's review of the later survey's report, which is the document that is signed.
"""

from __future__ import annotations

from dataclasses import dataclass

from triage.assess import CAUTION, tier_words
from triage.assess.compare import Comparison, SpotChange
from triage.model import Survey
from triage.standards.vocabulary import words

from .model import survey_digest
from .words import DASH, pct, when_iso_text

STATE = ("UNSIGNED WORKING DOCUMENT: a comparison for review, not a signed report; "
         "the engineer of record decides")
ALSO_INDICATIVE = ("This comparison is indicative too: it tells what the readings say moved, "
                   "not what a move means for the building; that is the engineer of record's "
                   "call.")


@dataclass(frozen=True)
class SpotLine:
    """One spot of the comparison, as the spot table prints it."""

    storey: str
    dir: str
    where: str
    before: str
    after: str
    change: str
    bound: str  # k times the combined standard uncertainty
    z: str
    verdict: str  # beyond the uncertainty, within it, new spot, not re-measured
    notes: str


@dataclass(frozen=True)
class CompareModel:
    """The comparison, ready to lay out."""

    caution: str
    title: str
    header: list[tuple[str, str]]
    summary: list[str]
    building_line: list[tuple[str, str]]
    beyond_chance: str
    warnings: list[str]
    spots: list[SpotLine]
    members: list[str]
    capacity: list[str]
    hazards: list[str]
    how_to_read: list[str]
    footer: str
    state: str = STATE
    flagged: int = 0
    bound_head: str = "2u"  # the spot table's heading of k times the combined uncertainty


def signed(v: float | None) -> str:
    """A signed drift ratio in percent ('+0.15%', '−0.05%'), a dash when absent."""
    if v is None:
        return DASH
    return ("+" if v >= 0 else "−") + pct(abs(v))


def _level(level: str | None) -> str:
    return DASH if level is None else words("levels", level)


def _code(survey_id: str) -> str:
    return survey_id[:8]


def _spot(label: str, c: SpotChange, k: float) -> SpotLine:
    where = c.where or "not given"
    if c.status == "new":
        return SpotLine(label, c.dir, where, DASH, signed(c.after), DASH, DASH, DASH,
                        "new spot: not measured before", "")
    if c.status == "not_remeasured":
        return SpotLine(label, c.dir, where, signed(c.before), DASH, DASH, DASH, DASH,
                        "not re-measured", "")
    notes = []
    if c.reversed:
        notes.append("the lean reversed")
    if c.method_changed:
        how = {"method": "tilt against offset", "gauge": "gauge more than 10% apart",
               "baseline": "another baseline"}
        notes.append("measured another way (" + ", ".join(how[m] for m in c.method_changed)
                     + f"): {pct(c.u_method or 0.0)} added to the uncertainty")
    elif not c.same_baseline:
        notes.append("baselines differ")
    if c.matched_by == "order":
        notes.append("matched by order (no place given)")
    u = c.u_combined or 0.0
    return SpotLine(label, c.dir, where, signed(c.before), signed(c.after), signed(c.change),
                    pct(k * u), DASH if c.z is None else f"{c.z:+.2f}",
                    "BEYOND the uncertainty" if c.significant else "within the uncertainty",
                    "; ".join(notes))


def _member(label: str, kind: str, ref: str | None, before: str | None, after: str | None,
            change: str) -> str:
    name = f"{words('member_kinds', kind)} {ref}" if ref else \
        f"a {words('member_kinds', kind)} group"

    def cls(c: str | None) -> str:
        return "undamaged" if c is None else f"class {c}"

    return {"worse": f"storey {label}: {name} worsened from {cls(before)} to {cls(after)}",
            "better": f"storey {label}: {name} logged better than before, {cls(before)} to "
                      f"{cls(after)} (a repair, or a different reading of the damage?)",
            "new": f"storey {label}: {name} of {cls(after)}, not logged before",
            }.get(change, f"storey {label}: {name} of {cls(before)}, not logged again")


def build_compare_model(c: Comparison, old: Survey, new: Survey) -> CompareModel:
    """Everything the comparison PDF prints."""
    o, n = c.old, c.new
    header = [("building", new.building.name), ("address", new.building.address),
              ("building id", c.building),
              ("earlier survey", f"{_code(o.survey)} ({o.survey}), inspected "
                                 f"{when_iso_text(o.at)} by {o.inspector}"),
              ("later survey", f"{_code(n.survey)} ({n.survey}), inspected "
                               f"{when_iso_text(n.at)} by {n.inspector}")]
    if not c.same_building:
        header.append(("note", "these are surveys of different buildings (compared on request)"))
    summary = [
        f"indicative tier: {tier_words(o.tier)} then, {tier_words(n.tier)} now"
        + ("" if c.tier_changed else " (unchanged)"),
        f"structural performance level: {_level(o.performance_level)} then, "
        f"{_level(n.performance_level)} now" + ("" if c.level_changed else " (unchanged)"),
    ]
    for side, s in (("earlier", o), ("later", n)):
        if s.provisional:
            summary.append(f"the {side} survey is provisional: its tier rests on the measured "
                           "parts only")
    b = c.building_line
    spots_word = "spot" if b.compared == 1 else "spots"
    line = [("spots compared", str(b.compared)),
            (f"flagged beyond {c.k:g} standard uncertainties", str(b.flagged)),
            ("expected flagged by chance alone",
             f"about {b.expected_by_chance:.2g} ({b.chance_rate:.2%} of each unmoved spot)"),
            ("Šidák bound at 95% for these spots", DASH if b.bound is None else f"{b.bound:.2f}"),
            ("largest |z|", DASH if b.largest_z is None else f"{b.largest_z:.2f}")]
    if b.compared == 0 or b.bound is None or b.largest_z is None:
        beyond = "No spot was measured in both surveys, so no movement can be told."
    elif b.beyond_chance:
        beyond = (f"MOVEMENT BEYOND CHANCE: the largest |z|, {b.largest_z:.2f}, is over "
                  f"{b.bound:.2f}, the bound no |z| of {b.compared} unmoved {spots_word} "
                  "exceeds with 95% confidence.")
    else:
        beyond = (f"No movement beyond chance: the largest |z|, {b.largest_z:.2f}, is within "
                  f"{b.bound:.2f}, the bound for {b.compared} unmoved {spots_word} at 95% "
                  "confidence.")
    warnings = []
    for d in c.all_reversed:
        dw = words("directions", d)
        warnings.append(f"WARNING: every spot compared in {dw} reversed its lean. Check that "
                        f"+{dw} means the same direction in both surveys before reading these "
                        "changes as movement.")
    spots: list[SpotLine] = []
    members: list[str] = []
    capacity: list[str] = []
    for st in c.storeys:
        if not st.in_old:
            members.append(f"storey {st.label}: not in the earlier survey")
        elif not st.in_new:
            members.append(f"storey {st.label}: not in the later survey")
        spots += [_spot(st.label, sc, c.k) for sc in st.spots]
        members += [_member(st.label, m.kind, m.ref, m.before, m.after, m.change)
                    for m in st.members]
        rb, ra = st.residual_capacity_before, st.residual_capacity_after
        if rb is not None and ra is not None and abs(ra - rb) > 1e-9:
            capacity.append(f"storey {st.label}: residual seismic capacity ratio R "
                            f"{rb:.1%} then, {ra:.1%} now")

    def hz(kind: str, where: str | None, storey: str | None) -> str:
        return words("hazards", kind) + (f" at {where}" if where else "") + (
            f" (storey {storey})" if storey else "")

    hazards = [f"new: {hz(h.kind, h.where, h.storey)}" for h in c.new_hazards]
    hazards += [f"no longer reported: {hz(h.kind, h.where, h.storey)}"
                for h in c.cleared_hazards]
    how = [
        "A drift is a signed ratio: + and − are the two senses of a direction. The change is "
        "the later value less the earlier one at the same spot.",
        f"A change is beyond the uncertainty where it exceeds {c.k:g} times the combined "
        f"standard uncertainty of the two measurements ({c.k:g}u); z is the change over that "
        "uncertainty. Where the same baseline was used both times it cancels and its "
        "uncertainty is left out; a spot measured another way carries "
        f"{pct(c.method_change_sd)} more (an assumption of ours).",
        f"Among m unmoved spots about m × {b.chance_rate:.2%} are flagged by chance alone; the "
        "building moved beyond chance only where some |z| exceeds Šidák's bound for m spots "
        "at 95%.",
    ]
    return CompareModel(
        caution=CAUTION,
        title=f"Aftershock comparison: {new.building.name}",
        header=header,
        summary=summary, building_line=line, beyond_chance=beyond, warnings=warnings,
        spots=spots, members=members, capacity=capacity, hazards=hazards, how_to_read=how,
        footer=(f"comparison of survey {_code(o.survey)} with {_code(n.survey)} · survey "
                f"digests {survey_digest(old)}, {survey_digest(new)}"),
        flagged=b.flagged, bound_head=f"{c.k:g}u")
