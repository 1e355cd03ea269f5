"""Readings to spots: where a storey's drift was measured, each place counted once.

A reading's `where` names its spot. Readings of one storey and direction at the same spot are
repeats of one measurement when they share the method (offset or tilt), the baseline and, for
offsets, a gauge within 10% of the spot's first gauge; other readings at that spot become
sub-spots, shown as `where #2`, `where #3`, ... with a note. A reading with no `where` (absent or
blank) is a spot of its own.

A spot's value is the inverse-variance weighted mean of its readings' signed drift ratios,

    value = sum(x_i / u_i^2) / sum(1 / u_i^2),   u = 1 / sqrt(sum(1 / u_i^2)),

unless the repeats disagree: when `Q = sum(((x_i - value) / u_i)^2)` is over the 0.99 quantile
of the chi-square distribution with n - 1 degrees of freedom, the spot takes its largest absolute
reading (the first listed among equals) with that reading's own uncertainty, and a note names
the spot. A baseline's own uncertainty (`baseline_sd_mm` / `baseline_sd_deg`, or the instrument
default when absent) is then added in quadrature, once per spot: the repeats share one baseline,
so averaging them cannot shrink its error.

Everything here is pure and deterministic; `spots_of_survey` returns the spots in survey order
(storey, then direction x before y, then the spot's first reading).
"""

from __future__ import annotations

import math
import unicodedata
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Literal

from triage.model import Reading, Survey
from triage.standards import Assumptions

Dir = Literal["x", "y"]
Method = Literal["offset", "tilt"]

# Repeats share a gauge within this fraction of the spot's first gauge (docs/method.md: +/-10%).
GAUGE_TOLERANCE = 0.10
# The chi-square test of agreement between repeats is taken at this quantile.
AGREEMENT_QUANTILE = 0.99


def normalise_where(where: str | None) -> str | None:
    """The key of a `where`: NFKC, case-folded, whitespace runs collapsed, trimmed; None if empty.

    >>> normalise_where("  Grid  B2 ") == normalise_where("grid b2")
    True
    """
    if where is None:
        return None
    text = " ".join(unicodedata.normalize("NFKC", where).casefold().split())
    return text or None


def display_where(where: str | None) -> str | None:
    """A `where` as shown: the text as written, whitespace runs collapsed and trimmed."""
    if where is None:
        return None
    text = " ".join(where.split())
    return text or None


@dataclass(frozen=True)
class ReadingValue:
    """One reading reduced to a signed drift ratio and its standard uncertainty (ratio units).

    `u` is the reading's own measurement uncertainty only; the baseline's is added per spot.
    """

    index: int  # position in the storey's `readings`
    dir: Dir
    method: Method
    ratio: float  # signed drift ratio, baseline subtracted
    u: float  # standard uncertainty of `ratio` from the reading itself
    gauge_mm: float | None  # offsets only
    baseline: float | None  # baseline_mm or baseline_deg as written; None when absent
    u_baseline: float  # the baseline's standard uncertainty in ratio units (0 without one)
    sd_defaulted: bool  # the reading's sd was the instrument default
    baseline_sd_defaulted: bool  # a baseline is given without its own sd


def reading_value(r: Reading, index: int, a: Assumptions) -> ReadingValue:
    """A reading's signed drift ratio and uncertainties; a tilt's are linearised.

    Offset: ratio = (offset - baseline) / gauge, u = sd_mm / gauge, u_baseline =
    baseline_sd_mm / gauge. Tilt: ratio = tan(tilt - baseline); d ratio / d angle =
    1 / cos^2(tilt - baseline), so u = radians(sd_deg) / cos^2 and likewise for the baseline.
    """
    base_sd_mm, base_sd_deg = r.baseline_sd_mm, r.baseline_sd_deg
    if r.tilt_deg is not None:
        base = r.baseline_deg
        angle = math.radians(r.tilt_deg - (base or 0.0))
        slope = 1.0 / math.cos(angle) ** 2
        sd_deg = r.sd_deg if r.sd_deg is not None else a.sd_tilt_deg
        bsd_deg = base_sd_deg if base_sd_deg is not None else a.sd_tilt_deg
        return ReadingValue(
            index=index, dir=r.dir, method="tilt", ratio=math.tan(angle),
            u=math.radians(sd_deg) * slope, gauge_mm=None, baseline=base,
            u_baseline=math.radians(bsd_deg) * slope if base is not None else 0.0,
            sd_defaulted=r.sd_deg is None,
            baseline_sd_defaulted=base is not None and base_sd_deg is None)
    assert r.offset_mm is not None and r.gauge_mm is not None
    base = r.baseline_mm
    sd_mm = r.sd_mm if r.sd_mm is not None else a.sd_offset_mm
    bsd_mm = base_sd_mm if base_sd_mm is not None else a.sd_offset_mm
    return ReadingValue(
        index=index, dir=r.dir, method="offset",
        ratio=(r.offset_mm - (base or 0.0)) / r.gauge_mm, u=sd_mm / r.gauge_mm,
        gauge_mm=r.gauge_mm, baseline=base,
        u_baseline=bsd_mm / r.gauge_mm if base is not None else 0.0,
        sd_defaulted=r.sd_mm is None,
        baseline_sd_defaulted=base is not None and base_sd_mm is None)


@dataclass(frozen=True)
class Spot:
    """One place of a storey where drift was measured in one direction, repeats averaged.

    `value` is the signed drift ratio (baseline subtracted), `u` its standard uncertainty with
    the baseline's included, `u_measure` the same without the baseline's (what two inspections
    with the same baseline compare). `readings` are indices into the storey's `readings`.
    """

    storey: int  # index into survey.storeys
    storey_label: str
    dir: Dir
    where: str | None  # as shown: the first reading's `where`, "#2" added for a sub-spot
    key: str | None  # normalised `where`; None for a reading without one
    sub: int  # 1 for the spot itself, 2, 3, ... for its sub-spots
    value: float
    u: float
    u_measure: float
    u_baseline: float
    readings: tuple[int, ...]
    method: Method
    gauge_mm: float | None  # the first reading's gauge (offsets)
    baseline: float | None  # as written (mm or degrees); None: no as-built baseline
    disagree: bool  # the repeats failed the chi-square test: the largest reading was taken
    chi2: float | None  # Q of the repeats (None for a single reading)

    @property
    def has_baseline(self) -> bool:
        """Whether an as-built baseline was subtracted at this spot."""
        return self.baseline is not None

    @property
    def identity(self) -> tuple[int, str, str | None, int, int]:
        """What tells spots apart: storey, direction, key, sub-spot, first reading.

        The first reading counts only for a spot without `where` (each such reading is a spot).
        """
        return (self.storey, self.dir, self.key, self.sub,
                self.readings[0] if self.key is None else -1)

    def name(self) -> str:
        """How the spot is named in a line of text: its `where`, else its first reading."""
        if self.where is not None:
            return self.where
        return f"reading {self.readings[0] + 1}"


@dataclass(frozen=True)
class StoreySpots:
    """The spots of a survey and the notes the grouping made (sub-spots, disagreements)."""

    spots: tuple[Spot, ...]
    notes: tuple[str, ...]


def _repeats(first: ReadingValue, other: ReadingValue) -> bool:
    """Whether `other` repeats the measurement `first` opened at the same spot."""
    if first.method != other.method or first.baseline != other.baseline:
        return False
    if first.method == "tilt":
        return True
    assert first.gauge_mm is not None and other.gauge_mm is not None
    return abs(other.gauge_mm - first.gauge_mm) <= GAUGE_TOLERANCE * first.gauge_mm + 1e-12


def combine(values: Sequence[float], us: Sequence[float]) -> tuple[float, float, float, bool, int]:
    """Inverse-variance mean of repeats, with the chi-square test of their agreement.

    Returns (value, u, Q, disagree, pick): `pick` is the index taken when the repeats
    disagree (the largest absolute value, the first among equals), else -1.
    """
    if len(values) == 1:
        return values[0], us[0], 0.0, False, -1
    w = [1.0 / (u * u) for u in us]
    total = math.fsum(w)
    mean = math.fsum(x * wi for x, wi in zip(values, w, strict=True)) / total
    q = math.fsum(((x - mean) / u) ** 2 for x, u in zip(values, us, strict=True))
    if chi2_cdf(q, len(values) - 1) > AGREEMENT_QUANTILE:
        pick = max(range(len(values)), key=lambda i: (abs(values[i]), -i))
        return values[pick], us[pick], q, True, pick
    return mean, 1.0 / math.sqrt(total), q, False, -1


# A spot's group while grouping: direction, key, sub-spot number, reading (no `where`) or -1.
_GroupKey = tuple[str, str | None, int, int]


def storey_spots(readings: Sequence[Reading], storey: int, label: str,
                 a: Assumptions) -> tuple[list[Spot], list[str]]:
    """The spots of one storey (x first, then y; each in order of its first reading)."""
    values = [reading_value(r, i, a) for i, r in enumerate(readings)]
    # groups: (dir, key, sub) -> reading values; a reading without `where` is a group alone.
    groups: dict[_GroupKey, list[ReadingValue]] = {}
    shown: dict[_GroupKey, str | None] = {}
    subs: dict[tuple[str, str], list[_GroupKey]] = {}
    notes: list[str] = []
    for v, r in zip(values, readings, strict=True):
        key = normalise_where(r.where)
        gk: _GroupKey
        if key is None:
            gk = (v.dir, None, 1, v.index)
            groups[gk] = [v]
            shown[gk] = None
            continue
        family = subs.setdefault((v.dir, key), [])
        for gk in family:
            if _repeats(groups[gk][0], v):
                groups[gk].append(v)
                break
        else:
            gk = (v.dir, key, len(family) + 1, -1)
            family.append(gk)
            groups[gk] = [v]
            base = display_where(r.where)
            shown[gk] = base if gk[2] == 1 else f"{base} #{gk[2]}"
            if gk[2] > 1:
                first = groups[family[0]][0]
                notes.append(
                    f"storey {label}, {v.dir}, {base}: reading {v.index + 1} differs from "
                    f"reading {first.index + 1} at the same spot in {_difference(first, v)}, "
                    f"so it is kept as a spot of its own, '{shown[gk]}'")
    spots: list[Spot] = []
    for gk in sorted(groups, key=lambda k: (k[0], groups[k][0].index)):
        vs = groups[gk]
        value, u_m, q, disagree, pick = combine([v.ratio for v in vs], [v.u for v in vs])
        u_b = max(v.u_baseline for v in vs)
        where = shown[gk]
        if disagree:
            taken = vs[pick]
            notes.append(
                f"storey {label}, {gk[0]}, {where}: the {len(vs)} readings there disagree "
                f"beyond their uncertainties (chi-square {q:.3g} over "
                f"{chi2_quantile(AGREEMENT_QUANTILE, len(vs) - 1):.3g}, the 0.99 point for "
                f"{len(vs) - 1} degrees of freedom); the largest, reading {taken.index + 1}, "
                "is taken with its own uncertainty")
        spots.append(Spot(
            storey=storey, storey_label=label, dir=vs[0].dir, where=where, key=gk[1],
            sub=gk[2], value=value, u=math.hypot(u_m, u_b), u_measure=u_m, u_baseline=u_b,
            readings=tuple(v.index for v in vs), method=vs[0].method,
            gauge_mm=vs[0].gauge_mm, baseline=vs[0].baseline, disagree=disagree,
            chi2=q if len(vs) > 1 else None))
    return spots, notes


def _difference(first: ReadingValue, other: ReadingValue) -> str:
    if first.method != other.method:
        return "method (offset or tilt)"
    if first.baseline != other.baseline:
        return "baseline"
    return "gauge (more than 10% apart)"


def spots_of_survey(survey: Survey, a: Assumptions) -> StoreySpots:
    """Every spot of the survey, storey by storey, with the grouping's notes."""
    spots: list[Spot] = []
    notes: list[str] = []
    for si, st in enumerate(survey.storeys):
        s, n = storey_spots(st.readings, si, st.label, a)
        spots += s
        notes += n
    return StoreySpots(tuple(spots), tuple(notes))


# --- the chi-square distribution (no scipy in the core) ---------------------------------------

def _gamma_p(s: float, x: float) -> float:
    """The regularised lower incomplete gamma function P(s, x), s > 0, x >= 0.

    Series for x < s + 1, Lentz's continued fraction for Q = 1 - P beyond (both standard).
    """
    if x <= 0.0:
        return 0.0
    log_front = s * math.log(x) - x - math.lgamma(s)
    if x < s + 1.0:
        term = total = 1.0 / s
        n = s
        for _ in range(10_000):
            n += 1.0
            term *= x / n
            total += term
            if abs(term) < abs(total) * 1e-16:
                break
        return min(1.0, total * math.exp(log_front))
    tiny = 1e-300
    b = x + 1.0 - s
    c = 1.0 / tiny
    d = 1.0 / b
    h = d
    for i in range(1, 10_000):
        an = -i * (i - s)
        b += 2.0
        d = an * d + b
        d = tiny if abs(d) < tiny else d
        c = b + an / c
        c = tiny if abs(c) < tiny else c
        d = 1.0 / d
        delta = d * c
        h *= delta
        if abs(delta - 1.0) < 1e-16:
            break
    return max(0.0, 1.0 - math.exp(log_front) * h)


def chi2_cdf(q: float, dof: int) -> float:
    """P(X <= q) for X chi-square with `dof` degrees of freedom."""
    return _gamma_p(dof / 2.0, q / 2.0)


def chi2_quantile(p: float, dof: int) -> float:
    """The p-quantile of the chi-square distribution with `dof` degrees of freedom (bisection)."""
    lo, hi = 0.0, max(1.0, dof + 10.0 * math.sqrt(2.0 * dof) + 20.0)
    while chi2_cdf(hi, dof) < p:
        hi *= 2.0
    for _ in range(200):
        mid = 0.5 * (lo + hi)
        if chi2_cdf(mid, dof) < p:
            lo = mid
        else:
            hi = mid
        if hi - lo < 1e-12 * hi:
            break
    return 0.5 * (lo + hi)
