"""What the stated measurement uncertainties alone allow: level distributions per component.

A *component* is a part of the survey whose level is independent of every other part's:
- the residual drift of one storey in one direction (its readings, independent normals):
  P(max_i |d_i| <= t) = prod_i [Phi((t - mu_i)/s_i) - Phi((-t - mu_i)/s_i)], exact;
- the members of one storey (cracks shared by both directions of R and by the damage floor):
  exact enumeration of the groups whose class is in doubt when they are few, else Monte Carlo
  of only those groups, seeded from the survey. Groups whose class is certain are never sampled,
  and a storey whose level cannot change within the plausible classes is not sampled at all.

The building's level is the worst component's, so P(level <= L) = prod_c P(level_c <= L).
"""

from __future__ import annotations

import itertools
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from .damage import EPS, CapacityTerms, MemberClass
from .drift import ReadingValue
from .result import Figures
from .stats import norm_cdf

ENUMERATE_LIMIT = 4096
SAMPLES = 40_000


def drift_cdfs(values: Sequence[ReadingValue], groups: Sequence[int], n_groups: int,
               figs: Sequence[Figures]) -> np.ndarray:
    """P(level <= L), L = IO, LS, CP, beyond-CP, for each drift group (shape (n_groups, 4)).

    `groups[i]` is the group of reading i, `figs[i]` the figures of its direction's system.
    """
    out = np.ones((n_groups, 4))
    if not values:
        return out
    # P(|d| <= t) depends on |mu| only; using |mu| keeps the tail term small (no cancellation).
    mu = np.abs(np.array([v.ratio for v in values]))[:, None]
    sd = np.array([v.sd for v in values])[:, None]
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
    """What decides a storey's member component: R per RC direction and the damage floor."""

    classes: Sequence[MemberClass]
    terms: dict[str, CapacityTerms]  # RC directions that have counted groups
    vertical: Sequence[bool]  # per group: counts toward the damage floor
    floor_of_class: np.ndarray  # level index per class index 0..5
    grade_bounds: np.ndarray  # R lower bounds of slight, light, moderate (fractions)
    level_of_grade: np.ndarray  # level index per grade index 0..3 (slight..severe)

    def level(self, k: np.ndarray) -> np.ndarray:
        """Component level index for class assignments `k` (shape (m, n_groups))."""
        lv = np.zeros(k.shape[0], dtype=int)
        for t in self.terms.values():
            cls = k[:, list(t.groups)]
            eta = t.etas[np.arange(len(t.groups))[None, :], cls]
            r = np.round((eta * t.weights).sum(axis=1) / t.total, 9)
            grade = (r < self.grade_bounds[0]).astype(int) + (r < self.grade_bounds[1]) + (
                r < self.grade_bounds[2])
            lv = np.maximum(lv, self.level_of_grade[grade])
        vert = [i for i, v in enumerate(self.vertical) if v]
        if vert:
            lv = np.maximum(lv, self.floor_of_class[k[:, vert]].max(axis=1))
        return lv


def member_cdf(model: MemberModel, rng: np.random.Generator) -> tuple[np.ndarray, bool]:
    """P(level <= L) of a storey's member component, and whether it was sampled."""
    n = len(model.classes)
    out = np.zeros(4)
    if n == 0:
        out[:] = 1.0
        return out, False
    point = np.array([[c.point for c in model.classes]])
    doubt = [i for i, c in enumerate(model.classes) if c.uncertain]
    if not doubt:
        out[int(model.level(point)[0]):] = 1.0
        return out, False
    options = [np.flatnonzero(model.classes[i].probs > EPS) for i in doubt]
    best, worst = point.copy(), point.copy()
    for i, opts in zip(doubt, options, strict=True):
        best[0, i], worst[0, i] = opts.min(), opts.max()
    lo, hi = int(model.level(best)[0]), int(model.level(worst)[0])
    if lo == hi:
        out[lo:] = 1.0
        return out, False
    combos = 1
    for opts in options:
        combos *= len(opts)
    if combos <= ENUMERATE_LIMIT:
        grid = np.array(list(itertools.product(*options)), dtype=int)
        k = np.repeat(point, len(grid), axis=0)
        k[:, doubt] = grid
        w = np.ones(len(grid))
        for j, i in enumerate(doubt):
            w *= model.classes[i].probs[grid[:, j]]
        w /= w.sum()
        sampled = False
    else:
        k = np.repeat(point, SAMPLES, axis=0)
        u = rng.random((SAMPLES, len(doubt)))
        for j, i in enumerate(doubt):
            cum = np.cumsum(model.classes[i].probs)
            k[:, i] = np.minimum(np.searchsorted(cum / cum[-1], u[:, j], side="right"),
                                 len(cum) - 1)
        w = np.full(SAMPLES, 1.0 / SAMPLES)
        sampled = True
    lv = model.level(k)
    pmf = np.bincount(lv, weights=w, minlength=4)[:4]
    return np.minimum(np.cumsum(pmf), 1.0), sampled
