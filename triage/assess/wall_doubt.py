"""FEMA 306 severities a crack width's uncertainty leaves in doubt, carried into P(level).

A wall whose FEMA 306 severity is read from its widest crack (no severity chosen, no class set
by hand) has a severity the crack's uncertainty makes uncertain, as it makes its JBDPA class
uncertain: the crack is normal with its uncertainty (`crack_sd_mm`, else `sd_crack_mm`), as in
`damage.member_classes`. The same draw of the crack sets both, so they are not independent:
the crack axis is cut at every bound that reads it (JBDPA's class bounds and the FEMA 306 bounds
of the wall's mode in each direction it acts in), and each piece is one *outcome* of the group,
with its JBDPA class, its FEMA 306 severity in each direction (each the worse of the crack's and
the signs', as at the point) and the chance the crack falls in it. The lowest piece is the
least class and severity a crack gives (the crack was seen); a crack alone never passes heavy.

A storey with such a wall takes its member component's distribution by enumerating the outcomes
of every group in doubt (a wall's pieces, another group's classes) when they are few, else by
sampling them (seeded from the survey), as `uncertainty.member_cdf` does for classes: the level
of an outcome is the worse of the member model's (R, floors, collapse rule, FEMA 352) and the
FEMA 306 level of each direction the walls in doubt act in. docs/method.md, section 8.
"""

from __future__ import annotations

import dataclasses
import itertools
from dataclasses import dataclass

import numpy as np

from triage.model import Survey
from triage.standards import Assumptions, Standards
from triage.standards.capacity_tables import ModeRow

from . import damage as dmg
from . import walls
from .capacity import DIRS, StoreyCapacity
from .damage import EPS
from .levels import Level
from .stats import norm_cdf
from .uncertainty import ENUMERATE_LIMIT, SAMPLES, MemberModel


@dataclass(frozen=True)
class Outcomes:
    """A wall group's outcomes: class, lambda Q per direction and chance of each piece."""

    group: int
    cls: np.ndarray  # (m,) JBDPA class index per outcome
    lam_q: dict[str, np.ndarray]  # per direction it acts in under FEMA 306: (m,) lambda Q
    probs: np.ndarray  # (m,)
    tops: np.ndarray  # (m,) the widest crack of each outcome (the last: infinity)
    point: int  # the outcome the crack as read falls in
    fema: frozenset[float]  # the FEMA 306 crack bounds among the tops (mm)


@dataclass(frozen=True)
class DirSum:
    """A direction's FEMA 306 ratio: the certain walls' part, the total weight, who varies."""

    dir: str
    base: float  # sum(lambda Q * w) of the walls not in doubt
    total: float
    weights: dict[int, float]  # group -> its weight (count seen times weight), in doubt


@dataclass(frozen=True)
class WallDoubt:
    """What the member component needs to carry FEMA 306 severities in doubt."""

    groups: tuple[Outcomes, ...]
    dirs: tuple[DirSum, ...]
    fixed: int  # the least level the storey's other FEMA 352 and FEMA 306 results set
    level_of_grade: np.ndarray  # level index per FEMA 306 grade index 0..3
    bounds: np.ndarray  # fema306_grade_bounds: slight, light, moderate

    def fema_level(self, pick: dict[int, np.ndarray], rows: int) -> np.ndarray:
        """The worst FEMA 306 level over the directions in doubt, for outcome indices `pick`."""
        lv = np.zeros(rows, dtype=int)
        by = {o.group: o for o in self.groups}
        for ds in self.dirs:
            acc = np.full(rows, ds.base)
            for g, w in ds.weights.items():
                acc = acc + by[g].lam_q[ds.dir][pick[g]] * w
            r = np.round(acc / ds.total, 9)
            grade = ((r < self.bounds[0]).astype(int) + (r < self.bounds[1])
                     + (r < self.bounds[2]))
            lv = np.maximum(lv, self.level_of_grade[grade])
        return lv


def _pieces(crack: float, sd: float, cuts: list[float]) -> tuple[np.ndarray, np.ndarray]:
    """A crack's pieces between the sorted cuts: a point inside each, and its chance."""
    b = np.array(cuts)
    inside = np.concatenate([[b[0] / 2], (b[:-1] + b[1:]) / 2, [b[-1] + 1.0]])
    f = norm_cdf((b - crack) / sd)
    return inside, np.diff(np.concatenate([[0.0], f, [1.0]]))


def _merged(g: int, cls: np.ndarray, lam: dict[str, np.ndarray], p: np.ndarray,
            tops: np.ndarray, crack: float, fema: set[float]) -> Outcomes:
    """Neighbouring pieces that give the same class and factors as one outcome."""
    keys = [(int(c), *(float(v[i]) for v in lam.values())) for i, c in enumerate(cls)]
    first = [i for i, k in enumerate(keys) if i == 0 or k != keys[i - 1]]
    last = [*(i - 1 for i in first[1:]), len(keys) - 1]
    sums = np.add.reduceat(p, first)
    top = tops[last]
    point = min(int(np.searchsorted(top, crack, side="left")), len(top) - 1)
    return Outcomes(g, cls[first], {d: v[first] for d, v in lam.items()}, sums / sums.sum(),
                    top, point, frozenset(float(t) for t in top[:-1] if float(t) in fema))


def wall_doubt(survey: Survey, si: int, beyond: StoreyCapacity, std: Standards,
               a: Assumptions) -> WallDoubt | None:
    """The walls of storey `si` whose FEMA 306 severity a crack leaves in doubt; None: none."""
    st = survey.storeys[si]
    if not any(m.kind in walls.WALL_KINDS and m.crack_mm and m.severity is None
               and m.damage_class is None for m in st.members):
        return None
    systems = survey.building.system
    known = beyond.walls_by_dir or {}
    found = {d: w for d in DIRS
             if (w := known[d] if d in known else walls.walls_in(st, d, systems, std, a))
             is not None and w.ratio is not None}
    rows: dict[int, dict[str, ModeRow]] = {}
    for d, w in found.items():
        for s in w.states:
            m = st.members[s.group]
            if s.by in ("crack", "signs") and m.crack_mm and s.weight > 0:
                rows.setdefault(s.group, {})[d] = std.walls.components[s.component].mode(
                    m.mode)[1]
    outs = []
    for g, by_dir in rows.items():
        m = st.members[g]
        sd = m.crack_sd_mm or a.sd_crack_mm
        cuts = sorted({*dmg.crack_bounds(std), *(b for r in by_dir.values() for b in r.crack_mm)})
        inside, p = _pieces(float(m.crack_mm or 0.0), sd, cuts)
        sign_cls = dmg.recorded_class(m, std, a)[0]
        sign_sev = walls.sign_severity(m, std, a)
        cls = np.array([max(dmg.crack_class(float(c), std), sign_cls) for c in inside])
        lam = {d: np.array([walls.lambdas_of(walls.worse_severity(
            walls.crack_severity(float(c), row), sign_sev), row, a).q for c in inside])
            for d, row in by_dir.items()}
        keep = p > EPS
        if any(len(set(v[keep].tolist())) > 1 for v in lam.values()):
            tops = np.append(np.array(cuts), np.inf)
            fema = {b for r in by_dir.values() for b in r.crack_mm}
            outs.append(_merged(g, cls[keep], {d: v[keep] for d, v in lam.items()}, p[keep],
                                tops[keep], float(m.crack_mm or 0.0), fema))
    if not outs:
        return None
    doubt = {o.group for o in outs}
    sums = []
    for d, w in found.items():
        varying = {s.group: s.weight for s in w.states if s.group in doubt and d in rows[s.group]}
        if varying:
            base = sum(s.lambdas.q * s.weight for s in w.states if s.group not in varying)
            sums.append(DirSum(d, base, sum(s.weight for s in w.states), varying))
    dirs = {ds.dir for ds in sums}
    others = [r.level for r in beyond.results if r.level is not None
              and not (r.method == "fema306" and r.dir in dirs)]
    fixed = int(max(others)) if others else int(Level.IO)
    gb = a.fema306_grade_bounds
    return WallDoubt(tuple(outs), tuple(sums), fixed,
                     np.array([Level.of(a.grade_to_level[g])
                               for g in ("slight", "light", "moderate", "severe")]),
                     np.array([gb["slight"], gb["light"], gb["moderate"]]))


def level_moved(model: MemberModel, doubt: WallDoubt, group: int, to: int) -> int:
    """The member component's level were one wall's crack in outcome `to`, the rest as read."""
    k = model.point[None, :].copy()
    pick = {o.group: np.array([o.point]) for o in doubt.groups}
    pick[group] = np.array([to])
    moved = next(o for o in doubt.groups if o.group == group)
    k[0, group] = moved.cls[to]
    others = dataclasses.replace(model, fixed=doubt.fixed)
    return int(max(others.level(k)[0], doubt.fema_level(pick, 1)[0]))


def wall_doubt_cdf(model: MemberModel, doubt: WallDoubt,
                   rng: np.random.Generator) -> tuple[np.ndarray, bool]:
    """P(level <= L) of a storey's member component with FEMA 306 severities in doubt.

    Every group in doubt (a wall's outcomes, another group's possible classes) is enumerated
    when the combinations are at most ENUMERATE_LIMIT, else sampled SAMPLES times from `rng`;
    the second value says whether it was sampled.
    """
    others = dataclasses.replace(model, fixed=doubt.fixed)
    walls_by = {o.group: o for o in doubt.groups}
    choices: list[tuple[int, np.ndarray, np.ndarray]] = []  # (group, class per option, P)
    for g in range(model.probs.shape[0]):
        if g in walls_by:
            choices.append((g, walls_by[g].cls, walls_by[g].probs))
        elif (model.probs[g] > EPS).sum() > 1:
            opts = np.flatnonzero(model.probs[g] > EPS)
            choices.append((g, opts, model.probs[g][opts] / model.probs[g][opts].sum()))

    def levels(idx: np.ndarray) -> np.ndarray:
        k = np.repeat(model.point[None, :], len(idx), axis=0)
        pick = {}
        for j, (g, cls, _) in enumerate(choices):
            k[:, g] = cls[idx[:, j]]
            pick[g] = idx[:, j]
        out: np.ndarray = np.maximum(others.level(k), doubt.fema_level(pick, len(idx)))
        return out

    sizes = [len(p) for _, _, p in choices]
    ends = levels(np.array([[0] * len(sizes), [s - 1 for s in sizes]]))
    out = np.zeros(4)
    if ends[0] == ends[1]:   # outcomes are ordered: class and severity never fall along them
        out[int(ends[0]):] = 1.0
        return out, False
    if int(np.prod(sizes)) <= ENUMERATE_LIMIT:
        idx = np.array(list(itertools.product(*(range(s) for s in sizes))), dtype=int)
        w = np.ones(len(idx))
        for j, (_, _, p) in enumerate(choices):
            w *= p[idx[:, j]]
        sampled = False
    else:
        u = rng.random((SAMPLES, len(choices)))
        idx = np.column_stack([np.minimum(np.searchsorted(np.cumsum(p), u[:, j], side="right"),
                                          len(p) - 1) for j, (_, _, p) in enumerate(choices)])
        w = np.full(SAMPLES, 1.0 / SAMPLES)
        sampled = True
    pmf = np.bincount(levels(idx), weights=w, minlength=4)[:4]
    return np.minimum(np.cumsum(pmf) / pmf.sum(), 1.0), sampled
