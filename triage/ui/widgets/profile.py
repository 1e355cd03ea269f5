"""The drift profile drawn in characters: storeys as rows, both directions, IO/LS/CP marked.

Pure text work (no textual import), so it can be tested and reused. Each direction gets a
track scaled from 0 to a little past its system's CP figure; the bar is the storey's largest
residual drift ratio in that direction; `I`, `L`, `C` mark the IO, LS and CP figures on the
track; a bar that runs past the end ends in `»`.
"""

from __future__ import annotations

from typing import Any

from triage.assess.drift import pct


def _track(value: float | None, io: float, ls: float, cp: float, width: int) -> str:
    top = cp * 1.25
    cells = [" "] * width

    def at(v: float) -> int:
        return min(width - 1, max(0, round(v / top * (width - 1))))

    if value is not None:
        n = at(value) if value <= top else width
        for i in range(min(n, width)):
            cells[i] = "█"
        if value > top:
            cells[-1] = "»"
        elif n == 0 and value > 0:
            cells[0] = "▏"
    for mark, v in (("I", io), ("L", ls), ("C", cp)):
        i = at(v)
        cells[i] = mark if cells[i] == " " else ("|" if cells[i] == "█" else cells[i])
    return "".join(cells)


def drift_profile(assessment: Any, width: int = 72) -> list[str]:
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
        for d in ("x", "y"):
            f = figs[d]
            v = s.drift_ratio.get(d)
            val = "     —" if v is None else f"{pct(v):>6}"
            row += _track(v, f.IO, f.LS, f.CP, track_w) + val + "  "
        lines.append(row.rstrip())
    lines.append(foot.rstrip())
    lines.append(f"{'':<{label_w}}  I, L, C: the IO, LS and CP figures; bar: largest reading")
    return lines
