"""The drift profile drawn in characters: storeys as rows, both directions, IO/LS/CP marked.

Pure text work (no textual import), so it can be tested and reused. Each direction gets a
track from 0 to 1.25 times its system's CP figure, drawn in four equal bands (0 to IO, IO to
LS, LS to CP, beyond), so the small IO figure is as readable as CP; the bar is the storey's
largest residual drift ratio in that direction, and a bar that crosses a mark always shows
past it; `I`, `L`, `C` mark the IO, LS and CP figures; a bar past the end ends in `»`.
"""

from __future__ import annotations

from typing import Literal

from triage.assess import Assessment
from triage.assess.drift import pct

BANDS = (0.0, 0.25, 0.5, 0.75, 1.0)  # where 0, IO, LS, CP and 1.25 x CP sit on a track


def _place(v: float, io: float, ls: float, cp: float) -> float:
    """Where a drift ratio sits on the track, 0..1: each band between marks is equal width."""
    points = (0.0, io, ls, cp, cp * 1.25)
    if v >= points[-1]:
        return 1.0
    for k in range(4):
        lo, hi = points[k], points[k + 1]
        if v <= hi:
            frac = 0.0 if hi <= lo else (v - lo) / (hi - lo)
            return BANDS[k] + frac * (BANDS[k + 1] - BANDS[k])
    return 1.0


def _track(value: float | None, io: float, ls: float, cp: float, width: int) -> str:
    cells = [" "] * width
    marks = [(m, int(_place(v, io, ls, cp) * (width - 1))) for m, v in
             (("I", io), ("L", ls), ("C", cp))]
    if value is not None and value > 0:
        n = min(width, int(_place(value, io, ls, cp) * (width - 1)) + 1)
        for (_, i), v in zip(marks, (io, ls, cp), strict=True):
            if value > v:
                n = max(n, min(width, i + 2))  # past a mark it crosses, always visibly
        for i in range(n):
            cells[i] = "█"
        if value > cp * 1.25:
            cells[-1] = "»"
    for m, i in marks:
        cells[i] = m
    return "".join(cells)


DIRS: tuple[Literal["x", "y"], ...] = ("x", "y")


def drift_profile(assessment: Assessment, width: int = 72) -> list[str]:
    """Lines of the profile, top storey first, for an `Assessment`."""
    figs = assessment.drift_figures
    label_w = max([len(s.label) for s in assessment.storeys] + [6])
    track_w = max(8, (width - label_w - 2 - 2 * 8) // 2)
    head = f"{'storey':<{label_w}}  "
    foot = f"{'':<{label_w}}  "
    for d in ("x", "y"):
        f = figs[d]
        title = f"{d}: {f.system_name}"
        head += f"{title[:track_w + 7]:<{track_w + 8}}"
        marks = f"I {pct(f.IO)} L {pct(f.LS)} C {pct(f.CP)}"
        foot += f"{marks[:track_w + 7]:<{track_w + 8}}"
    lines = [head.rstrip()]
    for s in reversed(assessment.storeys):
        row = f"{s.label:<{label_w}}  "
        for d in DIRS:
            f = figs[d]
            v = s.drift_ratio.get(d)
            val = "     —" if v is None else f"{pct(v):>6}"
            row += _track(v, f.IO, f.LS, f.CP, track_w) + val + "  "
        lines.append(row.rstrip())
    lines.append(foot.rstrip())
    lines.append(f"{'':<{label_w}}  bar: largest reading · I L C: IO LS CP (bands equal)")
    return lines
