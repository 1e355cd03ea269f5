"""What changed between two surveys of one building (after an aftershock, say). Pure: no I/O.

The rules are those of docs/method.md, "Comparing two inspections" (format
`triage-comparison/2`, docs/formats.md):

- Spots (`triage.assess.spots`) are matched by storey label, direction and normalised `where`
  (a sub-spot `where #2` with the other survey's `#2`); readings without `where` are matched in
  order, the i-th of that storey and direction with the i-th. On signed drift ratios the change
  is `new - old`, significant when `|change| > k * sqrt(u_old^2 + u_new^2 [+ sd_m^2])`, k = 2,
  with measurement uncertainties only. With the same baseline in both (or none in either) the
  baseline cancels in the change and its uncertainty is left out; a spot measured another way
  (tilt against offset, a gauge more than 10% apart, another baseline) adds `method_change_sd`
  (sd_m) in quadrature and is marked so.
- A reversal of lean is a change like any other; where every spot compared in a direction
  reversed, a warning asks whether +x (+y) means the same direction in both surveys.
- The building line: m spots compared, about `m * P(|Z| > k)` (0.0455 m) flagged by chance
  alone, F flagged; movement beyond chance when any |z| exceeds Sidak's bound
  `k_m = Phi^-1(1 - (1 - 0.95^(1/m)) / 2)`.
- Member groups are matched by `ref` within the storey; groups without `ref` as the i-th group
  without `ref` of the same kind, ductility and `dir` in that storey. Only a change of class is
  listed, so a group seen the same both times is never "new".
- Hazards are matched by kind, storey and place.

The comparison's models and words are in `triage.assess.comparison`.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Iterable, Sequence
from statistics import NormalDist
from typing import Literal

from triage.model import MemberGroup, Survey
from triage.standards import Assumptions, load

from .compare_capacity import capacity_changes
from .comparison import (
    BuildingLine,
    Comparison,
    Dir,
    HazardNote,
    MemberChange,
    MethodChange,
    Side,
    SpotChange,
    StoreyChange,
)
from .damage import class_index
from .result import Assessment, MemberResult
from .spots import GAUGE_TOLERANCE, Spot, spots_of_survey
from .stats import sig6

# Coverage factor of a significant change (the GUM's expanded uncertainty, k = 2).
COVERAGE = 2.0
# The building line's family-wise confidence (Sidak's bound).
FAMILY_CONFIDENCE = 0.95


def chance_rate(k: float = COVERAGE) -> float:
    """P(|Z| > k) for a standard normal Z: the share of unmoved spots flagged by chance.

    >>> round(chance_rate(2.0), 4)
    0.0455
    """
    return math.erfc(k / math.sqrt(2.0))


def sidak_bound(m: int, confidence: float = FAMILY_CONFIDENCE) -> float:
    """Sidak's bound k_m = Phi^-1(1 - (1 - confidence^(1/m)) / 2) for m spots.

    No |z| of m unmoved spots exceeds it with probability `confidence`. 1 - c^(1/m) is taken
    as -expm1(ln c / m), exact for large m.
    """
    if m < 1:
        raise ValueError("the Sidak bound needs at least one spot")
    tail = -math.expm1(math.log(confidence) / m) / 2.0
    return NormalDist().inv_cdf(1.0 - tail)


def _side(s: Survey, a: Assessment) -> Side:
    return Side(survey=str(s.survey_id), at=s.inspection.at.isoformat(),
                inspector=s.inspection.inspector.name, tier=a.tier,
                performance_level=a.performance_level, provisional=a.provisional)


# --- spots -------------------------------------------------------------------------------------

_SpotKey = tuple[str, Dir, str, int]  # storey label, direction, where key or "", sub or order


def _keyed(spots: Iterable[Spot]) -> dict[_SpotKey, Spot]:
    """Spots by their matching key: (label, dir, where key, sub-spot).

    A spot without `where` is keyed (label, dir, "", i), i its order among such spots of that
    storey and direction.
    """
    out: dict[_SpotKey, Spot] = {}
    order: dict[tuple[str, str], int] = {}
    for s in spots:
        if s.key is None:
            i = order.get((s.storey_label, s.dir), 0)
            order[(s.storey_label, s.dir)] = i + 1
            out[(s.storey_label, s.dir, "", i)] = s
        else:
            out[(s.storey_label, s.dir, s.key, s.sub)] = s
    return out


def method_changes(old: Spot, new: Spot) -> tuple[MethodChange, ...]:
    """How the spot was measured differently the second time (empty: the same way)."""
    out: list[MethodChange] = []
    if old.method != new.method:
        out.append("method")
    elif old.method == "offset" and old.gauge_mm is not None and new.gauge_mm is not None \
            and abs(new.gauge_mm - old.gauge_mm) > GAUGE_TOLERANCE * old.gauge_mm + 1e-12:
        out.append("gauge")
    if old.baseline != new.baseline or (old.method != new.method and old.baseline is not None):
        out.append("baseline")
    return tuple(out)


def spot_change(old: Spot, new: Spot, a: Assumptions, matched_by: Literal["where", "order"],
                k: float = COVERAGE) -> SpotChange:
    """The change at one spot measured in both surveys (rounded to 6 significant digits)."""
    return _spot_change(old, new, a, matched_by, k)[0]


def _spot_change(old: Spot, new: Spot, a: Assumptions, matched_by: Literal["where", "order"],
                 k: float) -> tuple[SpotChange, float]:
    """The change and its unrounded |z|."""
    changed = method_changes(old, new)
    same_baseline = "baseline" not in changed
    # The same baseline cancels in new - old: leave its uncertainty out (u_measure).
    u_old = old.u_measure if same_baseline else old.u
    u_new = new.u_measure if same_baseline else new.u
    u_m = a.method_change_sd if changed else 0.0
    u = math.sqrt(u_old * u_old + u_new * u_new + u_m * u_m)
    change = new.value - old.value
    z = change / u
    return SpotChange(
        dir=new.dir, where=new.where if new.where is not None else old.where, status="compared",
        matched_by=matched_by, before=sig6(old.value), after=sig6(new.value),
        change=sig6(change), u_before=sig6(u_old), u_after=sig6(u_new), u_method=sig6(u_m),
        u_combined=sig6(u), z=sig6(z), significant=abs(change) > k * u,
        reversed=old.value * new.value < 0, same_baseline=same_baseline,
        method_changed=changed), abs(z)


def _one_side(s: Spot, status: Literal["new", "not_remeasured"]) -> SpotChange:
    v = sig6(s.value)
    return SpotChange(dir=s.dir, where=s.where, status=status, matched_by=None,
                      before=v if status == "not_remeasured" else None,
                      after=v if status == "new" else None, change=None,
                      u_before=sig6(s.u) if status == "not_remeasured" else None,
                      u_after=sig6(s.u) if status == "new" else None, u_method=None,
                      u_combined=None, z=None, significant=False, reversed=False,
                      same_baseline=False, method_changed=())


def _spot_changes(old: Survey, new: Survey, a: Assumptions,
                  k: float) -> tuple[dict[str, list[SpotChange]], list[float]]:
    """Per storey label, the spot changes, and every compared spot's unrounded |z|.

    The new survey's spots come in its order, then the spots not re-measured.
    """
    olds = _keyed(spots_of_survey(old, a).spots)
    news = _keyed(spots_of_survey(new, a).spots)
    out: dict[str, list[SpotChange]] = {}
    zs: list[float] = []
    for key, sn in news.items():
        so = olds.get(key)
        if so is None:
            out.setdefault(key[0], []).append(_one_side(sn, "new"))
            continue
        c, z = _spot_change(so, sn, a, "where" if key[2] else "order", k)
        zs.append(z)
        out.setdefault(key[0], []).append(c)
    for key, so in olds.items():
        if key not in news:
            out.setdefault(key[0], []).append(_one_side(so, "not_remeasured"))
    return out, zs


def building_line(abs_z: Sequence[float], k: float = COVERAGE,
                  confidence: float = FAMILY_CONFIDENCE) -> BuildingLine:
    """The building line of the compared spots' |z|."""
    m = len(abs_z)
    rate = chance_rate(k)
    if m == 0:
        return BuildingLine(compared=0, flagged=0, chance_rate=sig6(rate), expected_by_chance=0.0,
                            bound=None, largest_z=None, beyond_chance=False)
    bound = sidak_bound(m, confidence)
    largest = max(abs_z)
    return BuildingLine(compared=m, flagged=sum(1 for z in abs_z if z > k),
                        chance_rate=sig6(rate), expected_by_chance=sig6(m * rate),
                        bound=sig6(bound), largest_z=sig6(largest), beyond_chance=largest > bound)


def all_reversed(spots: Iterable[SpotChange]) -> tuple[Dir, ...]:
    """Directions in which at least one spot was compared and every compared spot reversed."""
    out: list[Dir] = []
    for d in ("x", "y"):
        shared = [c for c in spots if c.dir == d and c.status == "compared"]
        if shared and all(c.reversed for c in shared):
            out.append(d)
    return tuple(out)


# --- member groups -----------------------------------------------------------------------------

def match_groups(old: Sequence[MemberGroup], new: Sequence[MemberGroup],
                 ) -> tuple[list[tuple[int, int, Literal["ref", "order"]]], list[int], list[int]]:
    """Pairs (old index, new index, how) of one storey's member groups; unmatched old and new.

    By `ref` first; a group without `ref` is the i-th without `ref` of its kind, ductility and
    `dir` in the storey, matched with the i-th such group of the other survey.
    """
    pairs: list[tuple[int, int, Literal["ref", "order"]]] = []
    old_refs = {g.ref: i for i, g in enumerate(old) if g.ref}
    used_old: set[int] = set()
    used_new: set[int] = set()
    for j, g in enumerate(new):
        if g.ref and g.ref in old_refs:
            pairs.append((old_refs[g.ref], j, "ref"))
            used_old.add(old_refs[g.ref])
            used_new.add(j)

    def order(groups: Sequence[MemberGroup]) -> dict[tuple[str, str, str | None, int], int]:
        seen: dict[tuple[str, str, str | None], int] = {}
        keyed: dict[tuple[str, str, str | None, int], int] = {}
        for i, g in enumerate(groups):
            if g.ref:
                continue
            kind = (g.kind, g.ductility, g.dir)
            n = seen.get(kind, 0)
            seen[kind] = n + 1
            keyed[(*kind, n)] = i
        return keyed

    old_order = order(old)
    for key, j in order(new).items():
        if key in old_order:
            pairs.append((old_order[key], j, "order"))
            used_old.add(old_order[key])
            used_new.add(j)
    pairs.sort(key=lambda p: p[1])
    return (pairs, [i for i in range(len(old)) if i not in used_old],
            [j for j in range(len(new)) if j not in used_new])


def _member_changes(old: Sequence[MemberGroup], old_r: Sequence[MemberResult],
                    new: Sequence[MemberGroup], new_r: Sequence[MemberResult],
                    ) -> list[MemberChange]:
    cls_old = {r.index: r.damage_class for r in old_r}
    cls_new = {r.index: r.damage_class for r in new_r}
    pairs, gone, fresh = match_groups(old, new)
    out: list[tuple[int, MemberChange]] = []
    for i, j, how in pairs:
        b, f = cls_old.get(i), cls_new.get(j)
        if b == f:
            continue
        worse = class_index(f) > class_index(b)
        g = new[j]
        out.append((j, MemberChange(ref=g.ref, kind=g.kind, ductility=g.ductility, dir=g.dir,
                                    before=b, after=f, change="worse" if worse else "better",
                                    matched_by=how)))
    for j in fresh:
        g = new[j]
        if cls_new.get(j) is not None:
            out.append((j, MemberChange(ref=g.ref, kind=g.kind, ductility=g.ductility, dir=g.dir,
                                        before=None, after=cls_new.get(j), change="new",
                                        matched_by=None)))
    for i in gone:
        g = old[i]
        if cls_old.get(i) is not None:
            out.append((len(new) + i, MemberChange(
                ref=g.ref, kind=g.kind, ductility=g.ductility, dir=g.dir, before=cls_old.get(i),
                after=None, change="gone", matched_by=None)))
    out.sort(key=lambda p: p[0])
    return [c for _, c in out]


# --- the comparison ----------------------------------------------------------------------------

def compare(old: Survey, old_a: Assessment, new: Survey, new_a: Assessment,
            assumptions: Assumptions | None = None) -> Comparison:
    """Compare two surveys of one building with their assessments (old first)."""
    a = assumptions or load().assumptions
    k = COVERAGE
    labels = [s.label for s in old.storeys]
    labels += [s.label for s in new.storeys if s.label not in labels]
    old_st = {s.label: s for s in old.storeys}
    new_st = {s.label: s for s in new.storeys}
    by_storey, zs = _spot_changes(old, new, a, k)
    storeys = []
    for label in labels:
        so, sn = old_st.get(label), new_st.get(label)
        ro = old_a.storey(label) if so else None
        rn = new_a.storey(label) if sn else None
        members: list[MemberChange] = []
        if so is not None or sn is not None:
            members = _member_changes(so.members if so else (), ro.members if ro else (),
                                      sn.members if sn else (), rn.members if rn else ())
        storeys.append(StoreyChange(
            label=label, in_old=so is not None, in_new=sn is not None,
            residual_capacity_before=ro.residual_capacity if ro else None,
            residual_capacity_after=rn.residual_capacity if rn else None,
            spots=tuple(by_storey.get(label, ())), members=tuple(members),
            capacity=capacity_changes(label, old_a if so else None, new_a if sn else None)))

    def key(h: object) -> tuple[str, str, str]:
        return (getattr(h, "kind", ""), (getattr(h, "where", None) or "").strip().lower(),
                getattr(h, "storey", None) or "")

    old_keys = {key(h) for h in old.hazards}
    new_keys = {key(h) for h in new.hazards}
    every = [c for s in storeys for c in s.spots]
    return Comparison(
        building=str(new.building_id), same_building=old.building_id == new.building_id,
        old=_side(old, old_a), new=_side(new, new_a),
        tier_changed=old_a.tier != new_a.tier,
        level_changed=old_a.performance_level != new_a.performance_level,
        k=k, method_change_sd=a.method_change_sd, building_line=building_line(zs, k),
        all_reversed=all_reversed(every), storeys=tuple(storeys),
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

__all__ = ["COVERAGE", "BuildingLine", "Comparison", "HazardNote", "MemberChange", "Side",
           "SpotChange", "StoreyChange", "all_reversed", "building_line", "chance_rate",
           "compare", "match_groups", "method_changes", "sidak_bound", "since_previous",
           "spot_change"]
