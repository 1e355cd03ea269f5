"""Small numeric helpers: the normal CDF and 6-significant-digit rounding (no scipy in the core)."""

from __future__ import annotations

import math
from typing import Any

import numpy as np

_erfc = np.frompyfunc(math.erfc, 1, 1)
_SQRT2 = math.sqrt(2.0)


def norm_cdf(z: Any) -> np.ndarray:
    """Standard normal CDF, elementwise, via the C library's erfc (accurate in both tails)."""
    arr = np.asarray(z, dtype=float)
    return np.asarray(0.5 * _erfc(-arr / _SQRT2), dtype=float)


def norm_cdf1(z: float) -> float:
    """Standard normal CDF of one value."""
    return 0.5 * math.erfc(-z / _SQRT2)


def sig6(x: float) -> float:
    """Round to 6 significant digits (docs/method.md: output floats are so rounded)."""
    if x == 0 or not math.isfinite(x):
        return 0.0 if x == 0 else x
    return float(f"{x:.6g}")


def sig6_opt(x: float | None) -> float | None:
    """`sig6`, passing None through."""
    return None if x is None else sig6(x)


def _beta_cf(a: float, b: float, x: float) -> float:
    """The continued fraction of the regularized incomplete beta function (Lentz's method)."""
    tiny = 1e-300
    c, d = 1.0, 1.0 - (a + b) * x / (a + 1.0)
    d = 1.0 / (d if abs(d) > tiny else tiny)
    h = d
    for m in range(1, 500):
        for num in (m * (b - m) * x / ((a + 2 * m - 1) * (a + 2 * m)),
                    -(a + m) * (a + b + m) * x / ((a + 2 * m) * (a + 2 * m + 1))):
            d = 1.0 + num * d
            d = 1.0 / (d if abs(d) > tiny else tiny)
            c = 1.0 + num / c
            c = c if abs(c) > tiny else tiny
            h *= d * c
        if abs(d * c - 1.0) < 1e-15:
            break
    return h


def beta_inc(a: float, b: float, x: float) -> float:
    """The regularized incomplete beta function I_x(a, b), 0 <= x <= 1."""
    if x <= 0.0:
        return 0.0
    if x >= 1.0:
        return 1.0
    front = math.exp(math.lgamma(a + b) - math.lgamma(a) - math.lgamma(b)
                     + a * math.log(x) + b * math.log1p(-x))
    if x < (a + 1.0) / (a + b + 2.0):
        return front * _beta_cf(a, b, x) / a
    return 1.0 - front * _beta_cf(b, a, 1.0 - x) / b


def t_cdf(t: float, df: float) -> float:
    """Student's t distribution function with `df` degrees of freedom."""
    tail = 0.5 * beta_inc(df / 2.0, 0.5, df / (df + t * t))
    return 1.0 - tail if t >= 0 else tail


def t_quantile(p: float, df: float) -> float:
    """The value Student's t with `df` degrees of freedom stays under with probability p.

    For 0.5 <= p < 1 (the one-sided bounds the assessment takes), by bisection to 1e-12.
    """
    if not 0.5 <= p < 1.0 or df <= 0:
        raise ValueError("t_quantile: 0.5 <= p < 1 and df > 0")
    lo, hi = 0.0, 1.0
    while t_cdf(hi, df) < p:
        hi *= 2.0
    while hi - lo > 1e-12 * max(1.0, hi):
        mid = 0.5 * (lo + hi)
        if t_cdf(mid, df) < p:
            lo = mid
        else:
            hi = mid
    return 0.5 * (lo + hi)
