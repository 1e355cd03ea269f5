"""What the stated measurement uncertainties alone allow: level distributions per component.

A *component* is a part of the survey whose level is independent of every other part's:
- the residual drift of one storey in one direction (its spots, independent normals):
  P(max_i |d_i| <= t) = prod_i [Phi((t - mu_i)/s_i) - Phi((-t - mu_i)/s_i)], exact;
- the members of one storey (cracks shared by both directions of R and by the damage floor):
  exact enumeration of the groups whose class is in doubt when they are few, else Monte Carlo
  of only those groups, seeded from the survey. Groups whose class is certain are never sampled,
  and a storey whose level cannot change within the plausible classes is not sampled at all.

The building's level is the worst component's, so P(level <= L) = prod_c P(level_c <= L).
"""

from __future__ import annotations

import itertools
import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from .damage import EPS, CapacityTerms
from .result import Figures
from .stats import norm_cdf

ENUMERATE_LIMIT = 4096
SAMPLES = 40_000


def drift_cdfs(values: Sequence[float], us: Sequence[float], groups: Sequence[int],
               n_groups: int, figs: Sequence[Figures]) -> np.ndarray:
    """P(level <= L), L = IO, LS, CP, beyond-CP, for each drift group (shape (n_groups, 4)).

    `values[i]` and `us[i]` are spot i's signed drift ratio and standard uncertainty,
    `groups[i]` its group (storey and direction), `figs[i]` the figures of its direction's
    system. Spots are separate places, independent: the group's CDF is their product.
    """
    out = np.ones((n_groups, 4))
    if not values:
        return out
    # P(|d| <= t) depends on |mu| only; using |mu| keeps the tail term small (no cancellation).
    mu = np.abs(np.array(values, dtype=float))[:, None]
    sd = np.array(us, dtype=float)[:, None]
    t = np.array([[f.IO, f.LS, f.CP] for f in figs])
    p = norm_cdf((t - mu) / sd) - norm_cdf((-t - mu) / sd)
    p = np.clip(p, 0.0, 1.0)
    logp = np.log(np.maximum(p, 1e-300))
    zero = p <= 0.0
    acc = np.zeros((n_groups, 3))
    np.add.at(acc, np.asarray(groups), logp)
    dead = np.zeros((n_groups, 3), dtype=bool)
    np.logical_or.at(dead, np.asarray(groups), zero)
    cdf = np.where(dead, 0.0, np.exp(acc))
    out[:, :3] = cdf
    # A CDF never decreases: guard against rounding in the products.
    return np.maximum.accumulate(out, axis=1)


@dataclass(frozen=True)
class MemberModel:
    """What decides a storey's member component.

    R per RC direction, the damage floors and the all-class-V collapse rule.
    """

    probs: np.ndarray  # (n_groups, 6): P(class index k) of each group
    point: np.ndarray  # (n_groups,): the point class of each group
    terms: dict[str, CapacityTerms]  # RC directions that have counted groups
    floors: np.ndarray  # (n_groups, 6): the level each class of each group holds the storey to
    grade_bounds: np.ndarray  # R lower bounds of slight, light, moderate (fractions)
    level_of_grade: np.ndarray  # level index per grade index 0..3 (slight..severe)
    vertical: np.ndarray  # (n_groups,) bool: columns and walls, for the collapse rule
    collapse_rule: bool  # enough vertical members logged for the all-class-V rule
    # The least level the storey's FEMA 352 and FEMA 306 capacities set at their point values
    # (a FEMA 306 severity a crack leaves in doubt is carried by `wall_doubt` instead).
    fixed: int = 0

    def level(self, k: np.ndarray) -> np.ndarray:
        """Component level index for class assignments `k` (shape (m, n_groups))."""
        lv = np.full(k.shape[0], self.fixed, dtype=int)
        for t in self.terms.values():
            cls = k[:, t.index]
            eta = t.etas[t.rows, cls]
            r = np.round((eta * t.weights).sum(axis=1) / t.total, 9)
            grade = (r < self.grade_bounds[0]).astype(int) + (r < self.grade_bounds[1]) + (
                r < self.grade_bounds[2])
            lv = np.maximum(lv, self.level_of_grade[grade])
        if k.shape[1]:
            lv = np.maximum(lv, self.floors[np.arange(k.shape[1])[None, :], k].max(axis=1))
        if self.collapse_rule:
            lv = np.where((k[:, self.vertical] == 5).all(axis=1), 3, lv)
        return lv


def _grid_scale(values: np.ndarray) -> int | None:
    """The least s in a short list making every value * s an integer, or None."""
    for s in (1, 2, 4, 5, 10, 20, 100):
        v = values * s
        if np.all(np.abs(v - np.round(v)) < 1e-9):
            return s
    return None


FFT_LIMIT = 1 << 16
# The widest total loss (in grid units) summed exactly; wider storeys are sampled. Plain
# convolution beyond FFT_LIMIT costs about width * groups, so this bounds the exact path's time.
EXACT_SUM_LIMIT = 1 << 20
# The least of a row's live losses is taken with the dead ones set to this.
_INT64_MAX = int(np.iinfo(np.int64).max)
# A class this unlikely is left out of the exact sums (its mass is far below the 0.01 asked).
TINY = 1e-12


def _loss_pmf(loss: np.ndarray, probs: np.ndarray, cap: int) -> np.ndarray:
    """P(total loss = j), j = 0..cap, for independent groups with integer losses.

    `loss[g, k]` is group g's loss in class k, `probs[g, k]` its probability. The distribution
    of the sum is the product of the groups' polynomials, taken by FFT (or plain convolution
    when that would be large); mass beyond `cap` is dropped (losses only grow).
    """
    out = np.zeros(cap + 1)
    if loss.shape[0] == 0:
        out[0] = 1.0
        return out
    live = probs > TINY
    lo = np.where(live, loss, _INT64_MAX).min(axis=1)
    const = int(lo.sum())
    if const > cap:
        return out
    width = cap - const + 1
    shift = np.where(live, loss - lo[:, None], 0)
    keep = live & (shift < width)
    # A group with more than one possible class moves the sum; its kernel keeps only the
    # outcomes under the cap (its lost mass is what the cap cuts off).
    moving = live.sum(axis=1) > 1
    if not moving.any():
        out[const] = 1.0
        return out
    sh, pr, kp = shift[moving], probs[moving], keep[moving]
    degree = int((sh * kp).max(axis=1).sum())
    m = 1 << max(degree, 1).bit_length()
    rows = np.repeat(np.arange(sh.shape[0]), sh.shape[1]).reshape(sh.shape)
    if m <= FFT_LIMIT:
        kern = np.zeros((sh.shape[0], m))
        np.add.at(kern, (rows[kp], sh[kp]), pr[kp])
        arr = np.fft.irfft(np.prod(np.fft.rfft(kern, axis=1), axis=0), n=m)[:width]
    else:
        arr = np.zeros(width)
        arr[0] = 1.0
        for g in range(sh.shape[0]):
            k = np.zeros(int((sh[g] * kp[g]).max()) + 1)
            np.add.at(k, sh[g][kp[g]], pr[g][kp[g]])
            arr = np.convolve(arr, k)[:width]
    out[const:const + len(arr)] = np.clip(arr, 0.0, 1.0)
    return out


HOEFFDING = 1e-10


def _hoeffding(loss: np.ndarray, probs: np.ndarray, cap: int) -> int | None:
    """1 if P(total loss <= cap) > 1 - HOEFFDING, 0 if it is < HOEFFDING, else None."""
    live = probs > TINY
    live_loss = np.where(live, loss, 0)
    hi = live_loss.max(axis=1)
    lo = np.where(live, loss, _INT64_MAX).min(axis=1)
    spread = float(((hi - lo).astype(float) ** 2).sum())
    mean = float((live_loss * np.where(live, probs, 0.0)).sum())
    if spread == 0.0:
        return 1 if mean <= cap + 1e-9 else 0
    gap = cap + 0.5 - mean  # the half unit: losses are integers
    if math.exp(-2.0 * gap * gap / spread) < HOEFFDING:
        return 1 if gap > 0 else 0
    return None


def member_cdf_exact(model: MemberModel, lo: int, hi: int) -> np.ndarray | None:
    """P(level <= L) of a storey's member component, exactly; None if weights fit no grid.

    Only levels lo <= L < hi are computed (under lo the probability is 0, from hi on 1).
    R >= b in a direction is, in integer units of 1/(20 s) of a weight, "total loss
    sum((1 - eta) w) <= (1 - b) W": a sum of independent discrete losses. The damage floors
    are handled by conditioning each group on the classes the level allows. Columns and walls
    without a direction count in both directions; walls with one count in it alone, and the two
    directions then share the column part, which is summed over exactly. The all-class-V rule
    (level beyond-CP) is taken out by subtraction: P(A and not all V) = P(A) - P(all V) P(A | all
    V), the second term computed the same way with every vertical group set to class V.
    """
    out = np.zeros(4)
    out[hi:] = 1.0
    sums = _LossSums.of(model)
    if sums is None:
        return None
    all_v = None
    if model.collapse_rule:
        pv = float(np.prod(model.probs[model.vertical, 5]))
        if pv > 0.0:
            given = model.probs.copy()
            given[model.vertical] = 0.0
            given[model.vertical, 5] = 1.0
            all_v = (pv, given)
    for lv in range(lo, min(hi, 3)):
        p = sums.at_most(model, model.probs, lv)
        if all_v is not None:
            p -= all_v[0] * sums.at_most(model, all_v[1], lv)
        out[lv] = p
    return np.minimum(np.maximum.accumulate(np.clip(out, 0.0, 1.0)), 1.0)


@dataclass(frozen=True)
class _LossSums:
    """R's conditions as integer loss sums per RC direction (see `member_cdf_exact`)."""

    loss: dict[str, np.ndarray]
    rows: dict[str, dict[int, int]]
    scale: int
    unit: int  # the common divisor the losses were divided by (sums stay exact: see `of`)

    @classmethod
    def of(cls, model: MemberModel) -> _LossSums | None:
        terms = model.terms
        scale = 1
        if terms:
            w = np.concatenate([t.weights for t in terms.values()])
            e20 = np.concatenate([t.etas.ravel() for t in terms.values()]) * 20
            found = _grid_scale(w)
            if found is None or _grid_scale(e20) != 1:
                return None
            scale = found
        loss = {d: np.round((20 - 20 * t.etas) * t.weights[:, None] * scale).astype(np.int64)
                for d, t in terms.items()}
        # Losses that share a divisor g are summed in units of g: a sum of multiples of g is
        # at most a cap exactly when it is at most g * floor(cap / g). Groups of equal large
        # counts (ten thousand columns alike) then cost what groups of one cost.
        flat = [v.ravel() for v in loss.values()]
        unit = max(int(np.gcd.reduce(np.concatenate(flat))), 1) if flat else 1
        loss = {d: v // unit for d, v in loss.items()}
        widest = max((int(v.max(axis=1).sum()) for v in loss.values() if v.size), default=0)
        if widest > EXACT_SUM_LIMIT:
            return None  # too wide to sum exactly within the time budget: sampled instead
        rows = {d: {g: j for j, g in enumerate(t.groups)} for d, t in terms.items()}
        return cls(loss, rows, scale, unit)

    def at_most(self, model: MemberModel, probs: np.ndarray, lv: int) -> float:
        """P(floors and R keep the component at level `lv` or better) under class `probs`."""
        terms, rows, loss, scale = model.terms, self.rows, self.loss, self.scale
        dirs = list(terms)
        allowed = model.floors <= lv
        pa_rows = probs * allowed
        pa = pa_rows.sum(axis=1)
        factor = float(np.prod(pa))
        if factor <= TINY:
            return factor if factor > 0 else 0.0  # R's condition can only lower it
        probs = pa_rows / pa[:, None]
        ok = model.level_of_grade <= lv
        if not dirs or ok[3]:
            return factor  # severe R still meets this level: R sets no condition
        if not ok.any():
            return 0.0
        b = model.grade_bounds[int(np.flatnonzero(ok).max())]
        caps = {d: int(np.floor((1.0 - b) * 20 * scale * terms[d].total + 1e-6)) // self.unit
                for d in dirs}
        # Hoeffding's inequality settles most directions without the sums: a total loss whose
        # mean lies far from the cap, against the spread its groups allow, meets (or misses)
        # it with certainty to within HOEFFDING.
        verdicts = [_hoeffding(loss[d], probs[list(terms[d].groups)], caps[d]) for d in dirs]
        if any(v == 0 for v in verdicts):
            return 0.0
        if all(v == 1 for v in verdicts):
            return factor

        def pmf(groups: list[int], d: str, cap: int) -> np.ndarray:
            idx = [rows[d][g] for g in groups]
            return _loss_pmf(loss[d][idx], probs[groups], cap)

        shared = sorted(set.intersection(*(set(rows[d]) for d in dirs)))
        if len(dirs) == 1 or all(len(rows[d]) == len(shared) for d in dirs):
            d0 = min(dirs, key=lambda d: caps[d])
            return factor * float(pmf(sorted(rows[d0]), d0, caps[d0]).sum())
        dx, dy = dirs
        top = max(caps.values())
        pc = pmf(shared, dx, top)
        fx = np.cumsum(pmf(sorted(set(rows[dx]) - set(shared)), dx, caps[dx]))
        fy = np.cumsum(pmf(sorted(set(rows[dy]) - set(shared)), dy, caps[dy]))
        c = np.arange(top + 1)
        gx = np.where(c <= caps[dx], fx[np.clip(caps[dx] - c, 0, caps[dx])], 0.0)
        gy = np.where(c <= caps[dy], fy[np.clip(caps[dy] - c, 0, caps[dy])], 0.0)
        return factor * float((pc * gx * gy).sum())


def member_cdf(model: MemberModel, rng: np.random.Generator) -> tuple[np.ndarray, bool]:
    """P(level <= L) of a storey's member component, and whether it was sampled."""
    n = model.probs.shape[0]
    out = np.zeros(4)
    if n == 0:
        out[:] = 1.0
        return out, False
    possible = model.probs > EPS
    doubt = np.flatnonzero(possible.sum(axis=1) > 1)
    point = model.point[None, :]
    if len(doubt) == 0:
        out[int(model.level(point)[0]):] = 1.0
        return out, False
    ends = np.repeat(point, 2, axis=0)  # the best and the worst plausible classes
    ends[0, doubt] = possible[doubt].argmax(axis=1)
    ends[1, doubt] = 5 - possible[doubt][:, ::-1].argmax(axis=1)
    lo, hi = model.level(ends).tolist()
    if lo == hi:
        out[lo:] = 1.0
        return out, False
    exact = member_cdf_exact(model, lo, hi)
    if exact is not None:
        return exact, False
    options = [np.flatnonzero(possible[i]) for i in doubt]
    combos = 1
    for opts in options:
        combos *= len(opts)
    if combos <= ENUMERATE_LIMIT:
        grid = np.array(list(itertools.product(*options)), dtype=int)
        k = np.repeat(point, len(grid), axis=0)
        k[:, doubt] = grid
        w = np.ones(len(grid))
        for j, i in enumerate(doubt):
            w *= model.probs[i][grid[:, j]]
        w /= w.sum()
        sampled = False
    else:
        k = np.repeat(point, SAMPLES, axis=0)
        u = rng.random((SAMPLES, len(doubt)))
        for j, i in enumerate(doubt):
            cum = np.cumsum(model.probs[i])
            k[:, i] = np.minimum(np.searchsorted(cum / cum[-1], u[:, j], side="right"),
                                 len(cum) - 1)
        w = np.full(SAMPLES, 1.0 / SAMPLES)
        sampled = True
    lv = model.level(k)
    pmf = np.bincount(lv, weights=w, minlength=4)[:4]
    return np.minimum(np.cumsum(pmf), 1.0), sampled
