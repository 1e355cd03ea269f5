"""One sheet of the paper field form: the page's layout and a canvas with a cursor.

`Sheet` draws the page furniture every sheet carries (header naming the form and system, page
number, building line, the caution band) and the simple pieces the form is built of (text,
wrapped paragraphs, rows of boxes and tick boxes), moving down the page and starting a new one
when the next piece does not fit. `triage.report.paper_form` lays the form out with it.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass, field
from typing import Any

from triage.assess import CAUTION
from triage.forms import Form

# The app's one accent hue (the report's slate blue), strong for rules and a weak tint for bands.
ACCENT_HEX = "#24476b"
TINT_HEX = "#e6edf4"
MUTED_HEX = "#5a5a5a"

PAGE_W, PAGE_H = 841.89, 595.28  # A4 landscape, points
MARGIN = 28.0
CAUTION_H = 30.0
HEADER_H = 30.0
ROW_H = 13.0
READING_ROWS = 6
MAX_STOREYS = 20

TICK = "□"  # a cell holding only this is drawn as an empty tick box
PAPER_NOTE = ("No tier is worked out on paper: type this form into triage, in the same order, "
              "to get the indicative tier.")



@dataclass
class Sheet:
    """A canvas with a cursor, page furniture and simple drawing helpers."""

    c: Any
    form: Form
    regular: str
    bold: str
    total: int | None
    page: int = 0
    y: float = 0.0
    continued: Callable[[], None] | None = None
    accent: Any = None
    tint: Any = None
    muted: Any = None
    sections: list[str] = field(default_factory=list)

    # --- page furniture -------------------------------------------------------------------
    def new_page(self, section: str) -> None:
        """Finish the current page (if any) and start one with header and caution band."""
        if self.page:
            self.c.showPage()
        self.page += 1
        self.sections.append(section)
        c = self.c
        top = PAGE_H - MARGIN
        c.setFillColor(self.accent)
        c.setFont(self.bold, 10)
        c.drawString(MARGIN, top - 10, f"triage · paper field form · {self.form.title}")
        c.setFont(self.regular, 8)
        c.setFillColor(self.muted)
        c.drawString(MARGIN, top - 21, f"system {self.form.system} · {section}")
        of = f" of {self.total}" if self.total else ""
        c.drawRightString(PAGE_W - MARGIN, top - 10, f"page {self.page}{of}")
        # Every sheet names its building, so sheets that come apart still match up.
        c.drawRightString(PAGE_W - MARGIN - 150, top - 21, "building")
        c.setStrokeColor(self.muted)
        c.setLineWidth(0.5)
        c.line(PAGE_W - MARGIN - 146, top - 22, PAGE_W - MARGIN, top - 22)
        c.setStrokeColor(self.accent)
        c.setLineWidth(1.2)
        c.line(MARGIN, top - HEADER_H + 4, PAGE_W - MARGIN, top - HEADER_H + 4)
        self._caution()
        c.setFillColor(self.ink)
        c.setStrokeColor(self.ink)
        c.setLineWidth(0.6)
        self.y = top - HEADER_H - 6

    @property
    def ink(self) -> Any:
        """Black ink."""
        from reportlab.lib.colors import black

        return black

    def _caution(self) -> None:
        c = self.c
        c.setFillColor(self.tint)
        c.setStrokeColor(self.accent)
        c.setLineWidth(0.8)
        c.rect(MARGIN, MARGIN, PAGE_W - 2 * MARGIN, CAUTION_H, stroke=1, fill=1)
        c.setFillColor(self.accent)
        c.setFont(self.bold, 8)
        c.drawString(MARGIN + 8, MARGIN + CAUTION_H - 12, CAUTION)
        c.setFont(self.regular, 7.5)
        c.drawString(MARGIN + 8, MARGIN + 7, PAPER_NOTE)

    @property
    def bottom(self) -> float:
        """The lowest y the body may use."""
        return MARGIN + CAUTION_H + 8

    def need(self, h: float, section: str) -> None:
        """Start a new page when `h` points do not fit above the caution band."""
        if self.y - h < self.bottom:
            self.new_page(section)
            if self.continued is not None:
                self.continued()

    # --- drawing helpers ------------------------------------------------------------------
    def text(self, x: float, y: float, s: str, size: float = 8, bold: bool = False,
             muted: bool = False) -> None:
        """One line of text."""
        self.c.setFont(self.bold if bold else self.regular, size)
        self.c.setFillColor(self.muted if muted else self.ink)
        self.c.drawString(x, y, self.t(s))
        self.c.setFillColor(self.ink)

    def wrap(self, s: str, width: float, size: float, bold: bool = False) -> list[str]:
        """Split text into lines that fit `width`."""
        from reportlab.lib.utils import simpleSplit

        return list(simpleSplit(s, self.bold if bold else self.regular, size, width))

    def para(self, x: float, s: str, width: float, size: float = 8, bold: bool = False,
             muted: bool = False, section: str = "") -> None:
        """Wrapped text at the cursor, moving it down."""
        lead = size * 1.25
        for line in self.wrap(s, width, size, bold):
            self.need(lead, section or self.sections[-1])
            self.y -= lead
            self.text(x, self.y + 2, line, size, bold, muted)

    def box(self, x: float, y: float, s: float = 8.0) -> None:
        """An empty tick box with its lower-left corner at (x, y)."""
        self.c.setStrokeColor(self.ink)
        self.c.setLineWidth(0.6)
        self.c.rect(x, y, s, s, stroke=1, fill=0)

    def field(self, x: float, y: float, label: str, width: float) -> None:
        """A label and a line to write on."""
        self.text(x, y + 2, label, 7, muted=True)
        lw = self.c.stringWidth(label, self.regular, 7) + 4
        self.c.setLineWidth(0.5)
        self.c.line(x + lw, y, x + width - 6, y)

    def table(self, x: float, widths: list[float], heads: list[str],
              rows: Sequence[list[str] | str], section: str, head_size: float = 6.5,
              first_bold: bool = False) -> None:
        """A ruled grid: wrapped headings, then rows (pre-filled text or blank to write in).

        A cell holding only the tick mark is drawn as an empty tick box; a row given as one
        string is a label spanning the whole width (a group heading).
        """
        heads = [self.t(h) for h in heads]
        head_lines = [self.wrap(h, w - 4, head_size) for h, w in zip(heads, widths, strict=True)]
        head_h = max(len(lines) for lines in head_lines) * (head_size + 1.5) + 4
        self.need(head_h + ROW_H * min(len(rows), 2), section)
        top = self.y
        self._heads(x, widths, head_lines, head_size, top, head_h)
        y = top - head_h
        for r in rows:
            if y - ROW_H < self.bottom:
                self.new_page(section)
                if self.continued is not None:
                    self.continued()
                top = self.y
                self._heads(x, widths, head_lines, head_size, top, head_h)
                y = top - head_h
            if isinstance(r, str):
                self.c.setFillColor(self.tint)
                self.c.rect(x, y - ROW_H, sum(widths), ROW_H, stroke=1, fill=1)
                self.text(x + 3, y - ROW_H + 4, r, 7.5, bold=True)
            else:
                self._row(x, widths, y, r, first_bold)
            y -= ROW_H
        self.y = y - 6

    def _heads(self, x: float, widths: list[float], head_lines: list[list[str]],
               size: float, top: float, h: float) -> None:
        c = self.c
        c.setFillColor(self.tint)
        c.rect(x, top - h, sum(widths), h, stroke=0, fill=1)
        c.setFillColor(self.ink)
        self._cells(x, widths, top, h)
        cx = x
        for lines, w in zip(head_lines, widths, strict=True):
            ty = top - size - 2
            for line in lines:
                self.text(cx + 2, ty, line, size)
                ty -= size + 1.5
            cx += w

    def _row(self, x: float, widths: list[float], top: float, r: list[str],
             first_bold: bool) -> None:
        self._cells(x, widths, top, ROW_H)
        cx = x
        for i, cell in enumerate(r):
            if cell == TICK:
                self.box(cx + widths[i] / 2 - 4, top - ROW_H + 3)
            elif cell:
                self.text(cx + 2, top - ROW_H + 4, self.t(cell), 6.5,
                          bold=first_bold and i == 0, muted=not first_bold)
            cx += widths[i]

    def _cells(self, x: float, widths: list[float], top: float, h: float) -> None:
        c = self.c
        c.setStrokeColor(self.ink)
        c.setLineWidth(0.5)
        cx = x
        for w in widths:
            c.rect(cx, top - h, w, h, stroke=1, fill=0)
            cx += w

    def t(self, s: str) -> str:
        """Text as the font can show it: plain ASCII marks when falling back to Helvetica."""
        if self.regular != "Helvetica":
            return s
        return s.replace(TICK, "[ ]").replace("−", "-").replace("…", "...")

    def heading(self, s: str, section: str, size: float = 10) -> None:
        """A section heading in the accent hue."""
        self.need(size + 10, section)
        self.y -= size + 4
        self.c.setFont(self.bold, size)
        self.c.setFillColor(self.accent)
        self.c.drawString(MARGIN, self.y, s)
        self.c.setFillColor(self.ink)
        self.y -= 4
