"""Concrete and masonry walls: FEMA 306 (1998) component damage classification, from memory.

A wall (or, in a frame with masonry infill, an infill panel) acting in a direction whose system
FEMA 306 covers is a component of the type `fema306_walls.toml` gives its kind and system. Its
behaviour mode is the inspector's (`mode`; absent, or not one kept for its type: "unknown",
which takes the worst of the type's modes). Its severity is the inspector's (`severity`), else
the one its hand-set class implies, else the worse of the severity its widest crack reaches on
the mode's bounds and the one its signs' class implies (`fema306_severity_class`, ours); with
none of these it is undamaged (every factor 1).

Ours, not the document's: the storey's residual strength ratio in each direction,
sum(lambda_Q * w) / sum(w) over the walls seen acting in it, weighted as for R (count seen times
weight); its grade (`fema306_grade_bounds`) and the grade's level (`grade_to_level`); the factors
at extreme severity (`fema306_extreme_lambda`). Concrete-wall storeys (`rc_wall`) are classed by
FEMA 306 in a direction only where some wall acting there has a mode or severity recorded; the
JBDPA ratio R covers them otherwise, as before.
"""

from __future__ import annotations

from dataclasses import dataclass

from triage.model import MemberGroup, Storey, Systems
from triage.standards import CLASSES, Assumptions, Grade, Standards
from triage.standards.capacity_tables import SEVERITIES, Lambdas, ModeRow
from triage.standards.vocabulary import words

from .levels import Level
from .wording import group_words, level_words, mode_words, severity_words

WALL_KINDS = ("wall", "infill")
OPT_IN = ("rc_wall",)  # systems FEMA 306 covers only where a mode or severity was recorded


def source(std: Standards) -> str:
    """The short citation used in reason lines."""
    return f"FEMA 306 ({std.walls.source.edition}), from memory"


def severity_of_class(cls: int, a: Assumptions) -> str | None:
    """The worst severity whose class (ours) is at most class index `cls` (None for 0)."""
    if cls <= 0:
        return None
    found = None
    for s in SEVERITIES:
        if CLASSES.index(a.fema306_severity_class[s]) + 1 <= cls:
            found = s
    return found


def crack_severity(crack_mm: float | None, row: ModeRow) -> str | None:
    """The severity a residual crack reaches on a mode's bounds (None: no crack)."""
    if not crack_mm:
        return None
    for bound, sev in zip(row.crack_mm, SEVERITIES, strict=False):
        if crack_mm <= bound:
            return sev
    return "heavy"


def worse_severity(a: str | None, b: str | None) -> str | None:
    """The worse of two severities, either possibly absent."""
    if a is None or b is None:
        return a or b
    return a if SEVERITIES.index(a) >= SEVERITIES.index(b) else b


def sign_severity(m: MemberGroup, std: Standards, a: Assumptions) -> str | None:
    """The severity the group's worst sign implies through its class (ours)."""
    cls = max((CLASSES.index(std.signs[s].damage_class) + 1 for s in m.signs), default=0)
    return severity_of_class(cls, a)


@dataclass(frozen=True)
class WallState:
    """One wall group's FEMA 306 classification in one direction."""

    group: int
    kind: str  # the member kind: wall or infill
    component: str
    mode: str  # the mode taken ("unknown": the worst of its type's)
    severity: str | None  # None: no damage recorded
    by: str | None  # "chosen", "class", "crack", "signs" (the worse of crack and signs)
    lambdas: Lambdas
    seen: int
    weight: float  # seen * weight per member


def wall_state(gi: int, m: MemberGroup, comp_key: str, std: Standards,
               a: Assumptions) -> WallState:
    """The mode, severity and factors of one wall group of a component type."""
    comp = std.walls.components[comp_key]
    mode, row = comp.mode(m.mode)
    sev: str | None
    by: str | None
    if m.severity is not None:
        sev, by = m.severity, "chosen"
    elif m.damage_class is not None:
        sev, by = severity_of_class(CLASSES.index(m.damage_class) + 1, a), "class"
    else:
        by_crack = crack_severity(m.crack_mm, row)
        by_sign = sign_severity(m, std, a)
        sev = worse_severity(by_crack, by_sign)
        by = None if sev is None else ("crack" if sev == by_crack else "signs")
    return WallState(gi, m.kind, comp_key, mode, sev, by, lambdas_of(sev, row, a), m.seen,
                     m.seen * m.weight)


def lambdas_of(sev: str | None, row: ModeRow, a: Assumptions) -> Lambdas:
    """The factors of a mode's row at a severity (None: undamaged, every factor 1)."""
    if sev is None:
        return Lambdas(k=1.0, q=1.0, d=1.0)
    if sev == "extreme":
        x = a.fema306_extreme_lambda
        return Lambdas(k=x["k"], q=x["q"], d=x["d"])
    return row.factors(sev)


def grade_of_ratio(ratio: float, a: Assumptions) -> Grade:
    """Our grade of a FEMA 306 residual strength ratio (`fema306_grade_bounds`)."""
    g = a.fema306_grade_bounds
    r = round(ratio, 9)
    if r >= g["slight"]:
        return "slight"
    if r >= g["light"]:
        return "light"
    if r >= g["moderate"]:
        return "moderate"
    return "severe"


@dataclass(frozen=True)
class WallStorey:
    """One storey direction's walls under FEMA 306: states, our ratio, grade and level."""

    dir: str
    states: tuple[WallState, ...]
    inspected: int
    count: int
    ratio: float | None  # None: no wall seen
    grade: Grade | None
    level: Level | None
    not_kept: tuple[int, ...]  # groups whose recorded mode is not kept for their type


def walls_in(st: Storey, d: str, systems: Systems, std: Standards,
             a: Assumptions) -> WallStorey | None:
    """The storey's walls acting in `d` classed by FEMA 306; None where it does not apply."""
    system = getattr(systems, d)
    if system in OPT_IN and not any(m.mode is not None or m.severity is not None
                                    for m in st.members if m.kind in WALL_KINDS):
        return None  # the test below, before the component types are looked up
    found = []
    for gi, m in enumerate(st.members):
        if m.kind not in WALL_KINDS or not (m.dir is None or m.dir == d):
            continue
        comp = std.walls.component_of(m.kind, system)
        if comp is not None:
            found.append((gi, m, comp[0]))
    if not found:
        return None
    if system in OPT_IN and not any(m.mode is not None or m.severity is not None
                                    for _, m, _ in found):
        return None
    states = tuple(wall_state(gi, m, key, std, a) for gi, m, key in found)
    not_kept = tuple(gi for gi, m, key in found
                     if m.mode is not None and m.mode not in std.walls.components[key].modes
                     and m.mode != "unknown")
    total = sum(s.weight for s in states)
    seen = sum(s.seen for s in states)
    count = sum(m.count for _, m, _ in found)
    if total <= 0:
        return WallStorey(d, states, seen, count, None, None, None, not_kept)
    ratio = round(sum(s.lambdas.q * s.weight for s in states) / total, 9)
    grade = grade_of_ratio(ratio, a)
    return WallStorey(d, states, seen, count, ratio, grade,
                      Level.of(a.grade_to_level[grade]), not_kept)


def walls_reason(label: str, w: WallStorey, std: Standards) -> str:
    """The reason line of a storey direction's FEMA 306 residual strength ratio."""
    head = f"storey {label}, {w.dir}: walls"
    if w.ratio is None:
        return (f"{head}: no wall inspected; FEMA 306 residual strength ratio not "
                "established there, the survey is provisional")
    assert w.grade is not None and w.level is not None
    worst = min(w.states, key=lambda s: (s.lambdas.q, s.group))
    seen = ("" if w.inspected == w.count else
            f" over the {w.inspected} of {w.count} seen (those not inspected are not counted)")
    return (f"{head}: FEMA 306 residual strength ratio {w.ratio:.1%} (lambda Q weighted as "
            f"for R, ours){seen}; the worst, {group_words(worst.kind, worst.group)}, behaviour "
            f"mode {mode_words(worst.mode)} at FEMA 306 severity {severity_words(worst.severity)}"
            f" (lambda Q {worst.lambdas.q:g}, {source(std)}); grade "
            f"{words('grades', w.grade)} and {level_words(w.level.word)} by our link of ratio "
            "to grade and level")
