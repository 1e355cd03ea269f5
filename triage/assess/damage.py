"""Member damage class, reduction factor eta, and the residual seismic capacity ratio R.

JBDPA (2001) Guideline for Post-earthquake Damage Evaluation of RC Buildings, as described by
Nakano et al. (2004) and Maeda et al. (2017); from memory. Crack classes: under 0.2 mm I,
0.2-1.0 mm II, over 1.0-2.0 mm III, over 2.0 mm IV; class V from signs only.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from functools import cached_property
from typing import NamedTuple

import numpy as np

from triage.model import MemberGroup, Storey, Survey
from triage.standards import CLASSES, Assumptions, Grade, Standards

from .stats import norm_cdf

# Class indices: 0 undamaged, 1..5 classes I..V.
UNDAMAGED = 0
# Probabilities under this are treated as impossible when deciding what is uncertain.
EPS = 1e-9


def class_name(i: int) -> str | None:
    """'I'..'V', or None for undamaged."""
    return None if i == UNDAMAGED else CLASSES[i - 1]


def class_index(name: str | None) -> int:
    """The index of a class name (None: undamaged)."""
    return UNDAMAGED if name is None else CLASSES.index(name) + 1


def crack_bounds(std: Standards) -> tuple[float, float, float]:
    """The residual crack widths (mm) above which classes II, III and IV begin."""
    c = std.capacity.classes
    b2, b3, b4 = c["II"].crack_above_mm, c["III"].crack_above_mm, c["IV"].crack_above_mm
    assert b2 is not None and b3 is not None and b4 is not None
    return b2, b3, b4


def crack_class(crack_mm: float, std: Standards) -> int:
    """The class a residual crack width implies (1..4); 0 for no crack."""
    if not crack_mm:
        return UNDAMAGED
    b2, b3, b4 = crack_bounds(std)
    if crack_mm < b2:
        return 1
    if crack_mm <= b3:
        return 2
    if crack_mm <= b4:
        return 3
    return 4


def sign_class(m: MemberGroup, std: Standards) -> int:
    """The worst class the group's signs imply (0 when none)."""
    if not m.signs:
        return UNDAMAGED
    return max(class_index(std.signs[s].damage_class) for s in m.signs)


def recorded_class(m: MemberGroup, std: Standards, a: Assumptions) -> tuple[int, str | None]:
    """The worst class (0 none, 1..5) a group's signs, type or chosen severity imply.

    Signs by signs.toml, a FEMA 352 type and a chosen FEMA 306 severity by our links
    (docs/method.md section 4a); with which set it: "signs", "type" or "severity" (None when
    none does).
    """
    if not m.signs and m.connection_type is None and m.severity is None:
        return UNDAMAGED, None  # the common case, without the lookups
    best, by = sign_class(m, std), "signs"
    if m.connection_type is not None:
        c = steel_class_of_index(std.steel.types[m.connection_type].index, a)
        if c > best:
            best, by = c, "type"
    if m.severity is not None:
        c = class_index(a.fema306_severity_class[m.severity])
        if c > best:
            best, by = c, "severity"
    return best, (by if best else None)


def steel_class_of_index(index: float, a: Assumptions) -> int:
    """The damage class index (0 none, 1..5 I..V) a FEMA 352 connection index implies (ours)."""
    if index <= 0:
        return UNDAMAGED
    bounds = a.fema352_class_of_index
    return 1 + sum(index >= bounds[k] for k in ("II", "III", "IV", "V"))


class MemberClass(NamedTuple):
    """A member group's point class, how it was set, and its class distribution.

    A named tuple rather than a frozen dataclass: one is made per group of every storey, and a
    tuple is made in a third of the time.
    """

    point: int
    class_from: str | None
    probs: np.ndarray  # shape (6,), P(class index k) from the crack's uncertainty
    crack_sd: float | None
    sd_defaulted: bool


@dataclass(frozen=True)
class ClassTable:
    """The classes of a storey's member groups, one row per group.

    Kept as columns (lists and arrays); `items` gives a `MemberClass` per group on demand.
    """

    point: np.ndarray  # (n,) point class index
    probs: np.ndarray  # (n, 6) class distribution
    point_list: list[int]  # `point` as a list
    class_from: list[str | None]  # how each group's point class was set
    crack_sd: list[float | None]  # the crack's standard uncertainty (None: no crack read)
    sd_defaulted: list[bool]  # the instrument default was taken for it

    @cached_property
    def items(self) -> list[MemberClass]:
        """Each group's class as a `MemberClass`."""
        return [MemberClass(*row) for row in zip(self.point_list, self.class_from, self.probs,
                                                 self.crack_sd, self.sd_defaulted, strict=True)]


def member_classes(members: Sequence[MemberGroup], std: Standards,
                   a: Assumptions) -> ClassTable:
    """The class of each group: the override, else the worse of crack class and sign class.

    The crack's class distribution comes from its normal uncertainty; the crack was seen, so its
    class is at least I whatever the draw (I..IV by the bounds). Vectorised over the storey.
    """
    n = len(members)
    b2, b3, b4 = crack_bounds(std)
    probs = np.zeros((n, len(CLASSES) + 1))
    point = [UNDAMAGED] * n
    how: list[str | None] = [None] * n
    crack_sd: list[float | None] = [None] * n
    defaulted = [False] * n
    # Cracked groups (not overridden): their rows, widths, standard deviations, sign classes
    # and what set those (the sign class, type or severity: `recorded_class`).
    ci: list[int] = []
    widths: list[float] = []
    sds: list[float] = []
    signs: list[int] = []
    sign_by: list[str | None] = []
    for i, m in enumerate(members):
        if m.damage_class is not None:  # the inspector's class, certain
            point[i] = k = class_index(m.damage_class)
            probs[i, k] = 1.0
            how[i] = "override"
            continue
        if m.signs or m.connection_type is not None or m.severity is not None:
            rec, by = recorded_class(m, std, a)
        else:
            rec, by = UNDAMAGED, None  # the common case, without the call
        crack = m.crack_mm or 0.0
        if crack > 0:
            ci.append(i)
            widths.append(crack)
            if m.crack_sd_mm:
                sd = m.crack_sd_mm
            else:
                sd = a.sd_crack_mm
                defaulted[i] = m.crack_sd_mm is None
            sds.append(sd)
            crack_sd[i] = sd
            signs.append(rec)
            sign_by.append(by)
        else:  # no crack: the sign class (or undamaged), certain
            point[i] = rec
            probs[i, rec] = 1.0
            how[i] = by
    if ci:
        # Cracked: I..IV by the bounds, each raised to the sign class.
        c, sd_a, s = np.array(widths), np.array(sds), np.array(signs, dtype=int)
        f = norm_cdf((np.array([b2, b3, b4])[None, :] - c[:, None]) / sd_a[:, None])
        crack_p = np.column_stack([f[:, 0], f[:, 1] - f[:, 0], f[:, 2] - f[:, 1], 1.0 - f[:, 2]])
        rows = np.array(ci)
        for k in range(4):  # rows are distinct: classes raised to one sign class add in order
            probs[rows, np.maximum(k + 1, s)] += crack_p[:, k]
        cc = np.where(c < b2, 1, np.where(c <= b3, 2, np.where(c <= b4, 3, 4))).tolist()
        for i, cls, sign, by in zip(ci, cc, signs, sign_by, strict=True):
            if cls >= sign:
                point[i], how[i] = cls, "crack"
            else:
                point[i], how[i] = sign, by
    return ClassTable(np.array(point, dtype=int), probs, point, how, crack_sd, defaulted)


def eta_table(m: MemberGroup, std: Standards) -> np.ndarray | None:
    """Eta for class index 0..5 of a column or wall; None for kinds R does not count."""
    key = (id(std), m.kind, m.ductility)
    if key not in _ETA:
        _ETA[key] = (std, _eta_table(m.kind, m.ductility, std))
    return _ETA[key][1]


# eta tables per (standards object, kind, ductility); the object is kept so its id stays unique.
_ETA: dict[tuple[int, str, str], tuple[Standards, np.ndarray | None]] = {}


def _eta_table(kind: str, ductility: str, std: Standards) -> np.ndarray | None:
    if kind == "column":
        col = "eta_ductile_column" if ductility == "ductile" else "eta_brittle_column"
    elif kind == "wall":
        col = "eta_wall"
    else:
        return None
    rows = std.capacity.classes
    table = np.array([1.0] + [getattr(rows[c], col) for c in CLASSES])
    table.flags.writeable = False
    return table


def counts_in(m: MemberGroup, d: str) -> bool:
    """Whether a column or wall counts toward R in direction `d`."""
    return m.kind == "column" or (m.kind == "wall" and (m.dir is None or m.dir == d))


def rc_dirs(survey: Survey, std: Standards) -> list[str]:
    """The directions whose structural system the JBDPA method covers (reinforced concrete)."""
    return [d for d in ("x", "y")
            if std.systems[getattr(survey.building.system, d)].residual_capacity]


@dataclass(frozen=True)
class CapacityTerms:
    """R of a storey in one direction as sum(eta[class_g] * w_g) / sum(w_g) over its groups."""

    groups: tuple[int, ...]  # member group indices counted
    weights: np.ndarray  # count * weight per counted group
    etas: np.ndarray  # shape (n, 6)
    # Members of the groups of kinds R counts in this direction, inspected and in all (groups
    # with none inspected among them): what the assessment's JBDPA line reports.
    seen: int = 0
    count: int = 0

    @cached_property
    def total(self) -> float:
        """The summed weight of the counted groups."""
        return float(self.weights.sum())

    @cached_property
    def index(self) -> np.ndarray:
        """`groups` as an index array (for taking the counted groups' columns)."""
        return np.array(self.groups, dtype=int)

    @cached_property
    def rows(self) -> np.ndarray:
        """0..n-1 as a row (for taking each counted group's eta at its class)."""
        return np.arange(len(self.groups))[None, :]


def capacity_terms_all(storey: Storey, etas: Sequence[np.ndarray | None],
                       dirs: Sequence[str]) -> dict[str, CapacityTerms]:
    """The groups counted toward R per direction (directions with none are left out).

    `etas[g]` is group g's eta table (None: a kind R does not count).
    """
    out: dict[str, CapacityTerms] = {}
    # Groups with a table are columns and walls: a column counts in both directions, a wall in
    # its `dir` (both when it has none), as `counts_in` says. Each such group's index, members
    # seen, seen * weight, count, table (as a row of `table`) and direction (None: both).
    rows: list[tuple[int, int, float, int, int, str | None]] = []
    ids: dict[int, int] = {}
    uniq: list[np.ndarray] = []
    for g, (m, t) in enumerate(zip(storey.members, etas, strict=True)):
        if t is None:
            continue
        k = ids.get(id(t))
        if k is None:
            k = ids[id(t)] = len(uniq)
            uniq.append(t)
        seen = m.count if m.inspected is None else m.inspected
        rows.append((g, seen, seen * m.weight, m.count, k,
                     None if m.kind == "column" else m.dir))
    if not rows:
        return out
    group, seen_a, weight, count, row, acts = (np.array(c) for c in zip(*rows, strict=True))
    table = np.array(uniq)
    inspected = seen_a > 0  # members not inspected are left out of R, never counted undamaged
    both = acts == None  # noqa: E711 (elementwise)
    for d in dirs:
        of_kind = both | (acts == d)
        idx = np.flatnonzero(of_kind & inspected)
        if len(idx):
            out[d] = CapacityTerms(tuple(group[idx].tolist()), weight[idx], table[row[idx]],
                                   int(seen_a[idx].sum()), int(count[of_kind].sum()))
    return out


def grade_of(r: float, std: Standards) -> Grade:
    """JBDPA damage grade of a residual capacity ratio R (fraction): slight to severe."""
    g = std.capacity.grades
    pct = r * 100.0
    # Rounding guard: R is a ratio of sums and may land a hair under a bound it meets exactly.
    pct = round(pct, 9)
    if pct >= g["slight"]:
        return "slight"
    if pct >= g["light"]:
        return "light"
    if pct >= g["moderate"]:
        return "moderate"
    return "severe"
