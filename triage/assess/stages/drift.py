"""Stage 1, drift: readings to spots, and each storey direction's largest spot and level.

Also the reason line of a storey direction's drift.
"""

from __future__ import annotations

from dataclasses import dataclass

from ..context import DRIFT_SOURCE, Context, Plumbness
from ..drift import level_index, pct
from ..levels import Level
from ..spots import Spot, spots_of_survey
from ..wording import field_name


@dataclass(frozen=True)
class DirDrift:
    """One storey and direction: its spots, the largest, and the level it sets."""

    storey: int
    dir: str
    spots: tuple[Spot, ...]
    top: Spot  # the largest absolute value (the first listed among equals)
    level: Level
    mean: float  # mean of the absolute spot values


@dataclass(frozen=True)
class DriftStage:
    """Every spot, and per storey and direction the drift that sets a level."""

    spots: tuple[Spot, ...]
    dirs: dict[tuple[int, str], DirDrift]
    notes: tuple[str, ...]
    defaulted: tuple[str, ...]

    def spot_level(self, s: Spot, ctx: Context) -> Level:
        """The level of one spot's value on its direction's figures."""
        return Level(level_index(abs(s.value), ctx.figs[s.dir]))


def drift_stage(ctx: Context) -> DriftStage:
    """Readings to spots (spots.py), and the largest spot of each storey and direction."""
    found = spots_of_survey(ctx.survey, ctx.a)
    grouped: dict[tuple[int, str], list[Spot]] = {}
    for s in found.spots:
        grouped.setdefault((s.storey, s.dir), []).append(s)
    dirs = {}
    for key, spots in grouped.items():
        top = max(spots, key=lambda s: abs(s.value))
        dirs[key] = DirDrift(key[0], key[1], tuple(spots), top,
                             Level(level_index(abs(top.value), ctx.figs[key[1]])),
                             sum(abs(s.value) for s in spots) / len(spots))
    a = ctx.a
    defaulted = []
    for st in ctx.survey.storeys:
        for ri, r in enumerate(st.readings):
            if not (r.sd_deg is None if r.by_tilt else r.sd_mm is None) and (
                    r.baseline_deg is None or r.baseline_sd_deg is not None) and (
                    r.baseline_mm is None or r.baseline_sd_mm is not None):
                continue  # nothing defaulted (the common case: no line to word)
            at = f" ({r.where})" if r.where else ""
            head = f"storey {st.label}, {r.dir}, reading {ri + 1}{at}"
            if r.by_tilt and r.sd_deg is None:
                defaulted.append(_defaulted(head, "sd_deg", f"{a.sd_tilt_deg:g}°"))
            elif not r.by_tilt and r.sd_mm is None:
                defaulted.append(_defaulted(head, "sd_mm", f"{a.sd_offset_mm:g} mm"))
            if r.baseline_deg is not None and r.baseline_sd_deg is None:
                defaulted.append(_defaulted(head, "baseline_sd_deg", f"{a.sd_tilt_deg:g}°"))
            if r.baseline_mm is not None and r.baseline_sd_mm is None:
                defaulted.append(_defaulted(head, "baseline_sd_mm", f"{a.sd_offset_mm:g} mm"))
    return DriftStage(found.spots, dirs, found.notes, tuple(defaulted))


def _defaulted(head: str, field: str, value: str) -> str:
    """A reading's uncertainty taken from the instrument default, the field in words."""
    return (f"{head}: {field_name('reading', field)} {value} (instrument default, "
            "common practice)")


def drift_reason(ctx: Context, dd: DirDrift, plumb: Plumbness = ()) -> str:
    """The reason line of a storey direction's drift, naming its largest spot.

    Where a spot of the direction is listed under plumbness, the line says so.
    """
    f = ctx.figs[dd.dir]
    v = abs(dd.top.value)
    io = f"{pct(f.IO)} (our value for 'negligible', IO)" if f.io_negligible else f"{pct(f.IO)} (IO)"
    figs = {0: io, 1: f"{pct(f.LS)} (LS)", 2: f"{pct(f.CP)} (CP)"}
    lv = dd.level
    if lv == Level.IO:
        text = f"is within {figs[0]}"
    elif lv == Level.BEYOND_CP:
        text = f"is over {figs[2]}: beyond CP"
    else:
        text = f"is over {figs[lv - 1]} and within {figs[lv]}"
    at = f" at {dd.top.where}" if dd.top.where else ""
    line = (f"storey {ctx.label(dd.storey)}, {dd.dir}: residual drift {pct(v)}{at} {text} for "
            f"{f.system_name} ({DRIFT_SOURCE})")
    for s, band in plumb:
        if s.storey == dd.storey and s.dir == dd.dir:
            material = ctx.material(s.dir)
            line += (f"; with no as-built baseline at {s.name()}, {pct(abs(s.value))} lies within "
                     f"the plumbness band of {material} ({pct(band)}, "
                     f"{ctx.std.plumbness_sources.get(material, 'ours')}) and cannot be told "
                     "from construction lean")
            break
    return line
