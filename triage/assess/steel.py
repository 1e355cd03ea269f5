"""Steel moment frames: FEMA 352 (2000) chapter 4, from memory, and our links to it.

Each connection group of a storey direction whose system is a steel moment frame gives every
connection it holds a damage index d (0 to 10) by its FEMA 352 damage type: `connection_type`
when recorded, else the type of the assumption `fema352_fractured_type` when the group carries
the sign `connection_fractured`, else 0 (inspected, no damage). The floor's index D in that
direction is over the connections inspected (`inspected`, all of the group when absent): their
mean when every connection was inspected, else the document's upper estimate of the mean
(`SteelTable.sample`), taken layer by layer of the index (ours, `layered_estimate`: the
document's form where one damage index was found, and it never falls when an index rises).
Connections not inspected are never counted, as undamaged or otherwise.

Ours, not the document's: the residual capacity ratio 1 - D / 10, the level of D
(`fema352_index_levels`) and the damage class a type implies for the damage floors
(`fema352_class_of_index`, in `damage.recorded_class`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from triage.model import MemberGroup, Storey, Systems
from triage.standards import Assumptions, Standards

from .levels import Level
from .stats import t_quantile
from .wording import level_words

SYSTEM = "steel_moment_frame"
FRACTURED = "connection_fractured"


def source(std: Standards) -> str:
    """The short citation used in reason lines."""
    return f"FEMA 352 ({std.steel.source.edition}) chapter 4, from memory"


@dataclass(frozen=True)
class ConnectionIndex:
    """The damage index of each connection of one group, and how it was set."""

    group: int
    type: str | None  # the FEMA 352 type taken; None: no damage recorded
    index: float
    by: str  # "type" (recorded), "default" (the sign, our default type), "none"
    seen: int  # connections inspected
    count: int


def connection_index(m: MemberGroup, std: Standards, a: Assumptions) -> tuple[str | None,
                                                                                float, str]:
    """(type, index, how) of one connection group's connections."""
    if m.connection_type is not None:
        return m.connection_type, std.steel.types[m.connection_type].index, "type"
    if FRACTURED in m.signs:
        t = a.fema352_fractured_type
        return t, std.steel.types[t].index, "default"
    return None, 0.0, "none"


def level_of_index(index: float, a: Assumptions) -> Level:
    """Our link of a floor's index to a level (`fema352_index_levels`)."""
    d = round(index, 9)
    steps = a.fema352_index_levels
    if d <= steps["IO"]:
        return Level.IO
    if d <= steps["LS"]:
        return Level.LS
    if d <= steps["CP"]:
        return Level.CP
    return Level.BEYOND_CP


@dataclass(frozen=True)
class SteelFloor:
    """One storey direction's FEMA 352 floor index, our ratio and our level."""

    dir: str
    groups: tuple[ConnectionIndex, ...]
    inspected: int
    count: int
    mean: float | None
    sd: float | None
    index: float | None  # D: the mean, or the upper estimate; None: no index
    sampled: bool  # only some connections inspected: the upper estimate
    ratio: float | None
    level: Level | None
    why_none: str | None  # why there is no index


def acts_in(m: MemberGroup, d: str) -> bool:
    """Whether a group acts in direction `d` (its `dir`, or both when it has none)."""
    return m.dir is None or m.dir == d


def steel_floor(st: Storey, d: str, systems: Systems, std: Standards,
                a: Assumptions) -> SteelFloor | None:
    """The floor's index in direction `d`.

    None when `d` is no steel moment frame or the storey logged no connection group acting in
    it.
    """
    if getattr(systems, d) != SYSTEM:
        return None
    groups = []
    for gi, m in enumerate(st.members):
        if m.kind != "connection" or not acts_in(m, d):
            continue
        t, idx, how = connection_index(m, std, a)
        groups.append(ConnectionIndex(gi, t, idx, how, m.seen, m.count))
    if not groups:
        return None
    n = sum(g.seen for g in groups)
    total = sum(g.count for g in groups)
    sampled = n < total
    if n == 0:
        return SteelFloor(d, tuple(groups), 0, total, None, None, None, sampled, None, None,
                          "no connection inspected")
    mean = sum(g.index * g.seen for g in groups) / n
    sd = (math.sqrt(sum(g.seen * (g.index - mean) ** 2 for g in groups) / (n - 1))
          if n > 1 else None)
    if not sampled:
        index = mean
    elif n < a.fema352_min_sample or sd is None:
        return SteelFloor(d, tuple(groups), n, total, mean, sd, None, sampled, None, None,
                          f"{n} of {total} connections inspected: too few to estimate the "
                          f"rest (at least {a.fema352_min_sample}, ours)")
    else:
        index = layered_estimate(groups, n, total, std)
    index = round(index, 9)
    ratio = min(max(1.0 - index / std.steel.scale_max, 0.0), 1.0)
    return SteelFloor(d, tuple(groups), n, total, mean, sd, index, sampled, ratio,
                      level_of_index(index, a), None)


def layered_estimate(groups: tuple[ConnectionIndex, ...] | list[ConnectionIndex], n: int,
                     total: int, std: Standards) -> float:
    """The upper estimate of a floor's mean index from a sample, taken layer by layer (ours).

    FEMA 352's form, mean + t * s / sqrt(n) * sqrt(1 - n / N) (from memory), applied to each
    layer of the index: for each level l the fraction p(l) of connections inspected with an
    index of at least l gets its upper estimate, p + t * sqrt(p (1 - p) n / (n - 1)) / sqrt(n)
    * sqrt(1 - n / N), at most 1, and D is their sum over the layers (the mean is the same sum
    of the plain fractions). Where the sample holds one index besides 0 this is the document's
    form, at most that index; unlike it, it never falls when an index rises (with s itself,
    raising a low index towards the others shrinks the spread and lowers the estimate).
    """
    tq = t_quantile(std.steel.sample.confidence, n - 1)
    scale = tq / math.sqrt(n) * math.sqrt(1.0 - n / total) * math.sqrt(n / (n - 1))
    levels = sorted({g.index for g in groups if g.seen > 0 and g.index > 0})
    out, below = 0.0, 0.0
    for lv in levels:
        p = sum(g.seen for g in groups if g.index >= lv) / n
        out += (lv - below) * min(1.0, p + scale * math.sqrt(p * (1.0 - p)))
        below = lv
    return min(out, std.steel.scale_max)


def steel_reason(label: str, f: SteelFloor, std: Standards) -> str:
    """The reason line of a storey direction's FEMA 352 index."""
    head = f"storey {label}, {f.dir}: steel connections"
    if f.index is None:
        return (f"{head}: no FEMA 352 floor index ({f.why_none}); residual capacity not "
                "established there, the survey is provisional")
    assert f.mean is not None and f.ratio is not None and f.level is not None
    if f.sampled:
        assert f.sd is not None
        how = (f"upper estimate {f.index:.2f} from {f.inspected} of {f.count} connections "
               f"inspected (mean {f.mean:.2f}, sd {f.sd:.2f}, "
               f"{std.steel.sample.confidence:.0%} one-sided, layer by layer, ours); those "
               "not inspected are never counted as undamaged")
    else:
        how = f"mean {f.index:.2f} of all {f.count} connections inspected"
    return (f"{head}: FEMA 352 floor damage index D = {f.index:.2f} of "
            f"{std.steel.scale_max:g}, {how} ({source(std)}); residual capacity ratio "
            f"1 - D/{std.steel.scale_max:g} = {f.ratio:.1%} (ours), taken as "
            f"{level_words(f.level.word)} (our link of index to level)")
