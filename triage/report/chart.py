"""The drift profile: storey (up) against residual drift ratio (across), both directions.

Drawn straight onto the canvas as a platypus Flowable: x solid with round marks, y dashed with
square marks (one hue; the directions differ in line and mark, not colour), and the IO, LS and
CP figures of the systems as thin vertical lines, labelled.
"""

from __future__ import annotations

import math
from typing import Any

from reportlab.platypus import Flowable

from .rows import ChartFigure, ChartPoint
from .style import ACCENT, ACCENT_WEAK, INK, MUTED
from .words import pct

# Round tops of the drift axis (in units of a power of ten) and how many ticks divide each.
_TOPS = ((1, 5), (1.2, 6), (1.5, 3), (2, 4), (2.5, 5), (3, 6), (4, 4), (5, 5), (6, 6), (8, 4),
         (10, 5))


def _nice_top(v: float) -> tuple[float, int]:
    """A round upper bound for the drift axis (ratio units) and its number of tick steps."""
    if v <= 0:
        return 0.005, 5
    mag = 10 ** math.floor(math.log10(v))
    for top, steps in _TOPS:
        if top * mag >= v * (1 - 1e-9):
            return top * mag, steps
    return 10 * mag, 5


class DriftChart(Flowable):  # type: ignore[misc]  # reportlab ships no types
    """Storey against residual drift, with the level figures of the systems."""

    def __init__(self, points: list[ChartPoint], figures: list[ChartFigure], width: float,
                 height: float, font: str, bold: str) -> None:
        super().__init__()
        self.points = points
        self.figures = figures
        self.width = width
        self.height = height
        self.font = font
        self.bold = bold

    def wrap(self, aw: float, ah: float) -> tuple[float, float]:
        """Fixed size."""
        return self.width, self.height

    def draw(self) -> None:
        """Draw axes, figures and the two profiles."""
        c: Any = self.canv
        left, bottom, right, top = 46.0, 30.0, 12.0, 34.0
        w = self.width - left - right
        h = self.height - bottom - top
        n = len(self.points)
        measured = [abs(v) for p in self.points for v in (p.x, p.y) if v is not None]
        cp = [f.ratio for f in self.figures if f.level == "CP"]
        ls = [f.ratio for f in self.figures if f.level == "LS"]
        # Show at least up to the LS figures; the CP figures when drift comes near them.
        span = max([*measured, *ls, 0.0])
        if cp and span >= 0.7 * min(cp):
            span = max(span, *cp)
        xmax, steps = _nice_top(span * 1.08)

        def X(v: float) -> float:
            return left + w * min(v, xmax) / xmax

        def Y(i: int) -> float:
            return bottom + h * (i + 0.5) / max(n, 1)

        c.saveState()
        c.setStrokeColor(MUTED)
        c.setLineWidth(0.6)
        c.line(left, bottom, left, bottom + h)
        c.line(left, bottom, left + w, bottom)
        c.setFont(self.font, 7)
        c.setFillColor(INK)
        for k in range(steps + 1):
            v = xmax * k / steps
            c.line(X(v), bottom, X(v), bottom - 3)
            c.drawCentredString(X(v), bottom - 11, pct(v))
        c.drawCentredString(left + w / 2, bottom - 22, "residual drift ratio (absolute)")
        every = max(1, math.ceil(n / 30))
        for i, p in enumerate(self.points):
            if i % every == 0 or i == n - 1:
                c.drawRightString(left - 4, Y(i) - 2.5, p.label[:8])
        c.saveState()
        c.translate(9, bottom + h / 2)
        c.rotate(90)
        c.drawCentredString(0, 0, "storey")
        c.restoreState()

        # Level figures: thin vertical lines, labelled above the plot.
        c.setLineWidth(0.5)
        c.setStrokeColor(ACCENT_WEAK)
        shown: list[float] = []
        for f in self.figures:
            if f.ratio > xmax:
                continue
            c.setDash(2, 2)
            c.line(X(f.ratio), bottom, X(f.ratio), bottom + h)
            c.setDash()
            row = sum(1 for s in shown if abs(X(s) - X(f.ratio)) < 34)
            shown.append(f.ratio)
            c.setFillColor(INK)
            c.setFont(self.font, 6.5)
            c.drawCentredString(X(f.ratio), bottom + h + 4 + 8 * row,
                                f"{f.level} {f.dirs} {pct(f.ratio)}")

        # The two profiles.
        c.setStrokeColor(ACCENT)
        c.setFillColor(ACCENT)
        for d, dash in (("x", None), ("y", (4, 2))):
            pts = [(X(abs(v)), Y(i)) for i, p in enumerate(self.points)
                   if (v := getattr(p, d)) is not None]
            c.setLineWidth(1.2)
            if dash:
                c.setDash(*dash)
            if len(pts) > 1:
                path = c.beginPath()
                path.moveTo(*pts[0])
                for q in pts[1:]:
                    path.lineTo(*q)
                c.drawPath(path, stroke=1, fill=0)
            c.setDash()
            r = 2.2 if n <= 30 else 1.4
            for px, py in pts:
                if d == "x":
                    c.circle(px, py, r, stroke=0, fill=1)
                else:
                    c.rect(px - r, py - r, 2 * r, 2 * r, stroke=1, fill=0)
        # Legend.
        c.setFont(self.font, 7)
        c.setFillColor(INK)
        lx = left + w - 120
        ly = bottom + h + 24
        c.setStrokeColor(ACCENT)
        c.setLineWidth(1.2)
        c.line(lx, ly + 2.5, lx + 16, ly + 2.5)
        c.drawString(lx + 20, ly, "x")
        c.setDash(4, 2)
        c.line(lx + 40, ly + 2.5, lx + 56, ly + 2.5)
        c.setDash()
        c.drawString(lx + 60, ly, "y")
        c.restoreState()
