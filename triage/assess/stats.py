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
