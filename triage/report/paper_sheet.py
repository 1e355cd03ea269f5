"""One sheet of the paper field form: the page's layout and a canvas with a cursor.

`Sheet` draws the page furniture every sheet carries (header naming the form and its systems,
page number, a place for the building's name, the caution band) and the pieces the form is built
of (text, wrapped paragraphs, labelled boxes to write in, ruled grids with tick boxes), moving
down the page and starting a new one when the next piece does not fit.
`triage.report.paper_form` lays the form out with it.

Black and white only: black ink and a grey for hints, never a fill or a hue, so the form
photocopies and faxes as it prints. Every box and grid row to write in is at least `ROW_H`
(8 mm) high: a gloved hand in the rain writes in it.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import Any

from triage.assess import CAUTION

from .paper_columns import Col

MM = 72 / 25.4
PAGE_W, PAGE_H = 841.89, 595.28  # A4 landscape, points
MARGIN = 28.0
CAUTION_H = 30.0
HEADER_H = 32.0
ROW_H = 8.0 * MM + 0.2          # every row to write in: at least 8 mm
BOX_H = 10.0 * MM               # a labelled box: the label at its top, 7 mm below to write
TICK_S = 11.0                   # a tick box's side, points (3.9 mm)
HINT_GREY = 0.35                # the grey of hints and choices to circle (0 black, 1 white)
MAX_STOREYS = 20

TICK = "□"  # a cell holding only this is drawn as an empty tick box
PAPER_NOTE = ("No tier is worked out on paper: type this form into triage, in the same order, "
              "to get the indicative tier.")


@dataclass
class Sheet:
    """A canvas with a cursor, page furniture and simple drawing helpers."""

    c: Any
    title: str
    systems_line: str
    regular: str
    bold: str
    total: int | None
    page: int = 0
    y: float = 0.0
    sections: list[str] = field(default_factory=list)
    storey_label: str = ""   # while set, every page's header has a line for the storey's label

    @property
    def width(self) -> float:
        """The width the body may use."""
        return PAGE_W - 2 * MARGIN

    # --- page furniture -------------------------------------------------------------------
    def new_page(self, section: str) -> None:
        """Finish the current page (if any) and start one with header and caution band."""
        if self.page:
            self.c.showPage()
        self.page += 1
        self.sections.append(section)
        c = self.c
        top = PAGE_H - MARGIN
        self.ink()
        c.setFont(self.bold, 10)
        c.drawString(MARGIN, top - 10, self.t(f"triage · paper field form · {self.title}"))
        c.setFont(self.regular, 8)
        c.drawString(MARGIN, top - 21, self.t(f"{self.systems_line} · {section}"))
        of = f" of {self.total}" if self.total else ""
        c.drawRightString(PAGE_W - MARGIN, top - 10, f"page {self.page}{of}")
        # Every sheet names its building (and a storey band's sheets their storey), so sheets
        # that come apart still match up.
        c.setLineWidth(0.6)
        for i, label in enumerate(["building"] + ([self.storey_label] if self.storey_label
                                                   else [])):
            c.drawRightString(PAGE_W - MARGIN - 216, top - 10 - 12 * i, self.t(label))
            c.line(PAGE_W - MARGIN - 212, top - 11 - 12 * i, PAGE_W - MARGIN - 60,
                   top - 11 - 12 * i)
        c.setLineWidth(1.2)
        c.line(MARGIN, top - HEADER_H + 4, PAGE_W - MARGIN, top - HEADER_H + 4)
        self._caution()
        self.y = top - HEADER_H - 4

    def ink(self, grey: float = 0.0) -> None:
        """Set stroke and fill to black (or a grey): the only colours the form uses."""
        self.c.setFillGray(grey)
        self.c.setStrokeGray(grey)

    def _caution(self) -> None:
        c = self.c
        self.ink()
        c.setLineWidth(1.0)
        c.rect(MARGIN, MARGIN, self.width, CAUTION_H, stroke=1, fill=0)
        c.setFont(self.bold, 8)
        c.drawString(MARGIN + 8, MARGIN + CAUTION_H - 12, self.t(CAUTION))
        c.setFont(self.regular, 7.5)
        c.drawString(MARGIN + 8, MARGIN + 7, self.t(PAPER_NOTE))

    @property
    def bottom(self) -> float:
        """The lowest y the body may use."""
        return MARGIN + CAUTION_H + 8

    def need(self, h: float, section: str) -> None:
        """Start a new page when `h` points do not fit above the caution band."""
        if self.y - h < self.bottom:
            self.new_page(section)

    # --- drawing helpers ------------------------------------------------------------------
    def text(self, x: float, y: float, s: str, size: float = 8, bold: bool = False,
             grey: bool = False) -> None:
        """One line of text."""
        self.c.setFont(self.bold if bold else self.regular, size)
        self.c.setFillGray(HINT_GREY if grey else 0.0)
        self.c.drawString(x, y, self.t(s))
        self.c.setFillGray(0.0)

    def wrap(self, s: str, width: float, size: float, bold: bool = False) -> list[str]:
        """Split text into lines that fit `width`."""
        from reportlab.lib.utils import simpleSplit

        return list(simpleSplit(self.t(s), self.bold if bold else self.regular, size, width))

    def para(self, x: float, s: str, width: float, size: float = 8, bold: bool = False,
             grey: bool = False, section: str = "") -> None:
        """Wrapped text at the cursor, moving it down."""
        lead = size * 1.25
        for line in self.wrap(s, width, size, bold):
            self.need(lead, section or self.sections[-1])
            self.y -= lead
            self.text(x, self.y + 2, line, size, bold, grey)

    def box(self, x: float, y: float, s: float = TICK_S) -> None:
        """An empty tick box with its lower-left corner at (x, y)."""
        self.ink()
        self.c.setLineWidth(0.8)
        self.c.rect(x, y, s, s, stroke=1, fill=0)

    def boxes(self, fields: Sequence[tuple[str, float]], section: str,
              h: float = BOX_H) -> None:
        """A row of labelled boxes to write in, left to right, `h` high (label at the top).

        A label ending in the tick mark gets a tick box in its box; one holding " / " between
        choices prints the choices to circle.
        """
        self.need(h, section)
        x, top = MARGIN, self.y
        self.ink()
        self.c.setLineWidth(0.6)
        for label, w in fields:
            self.c.rect(x, top - h, w, h, stroke=1, fill=0)
            self.text(x + 3, top - 8, label.removesuffix(" " + TICK), 6.5, grey=True)
            if label.endswith(TICK):
                self.box(x + w / 2 - TICK_S / 2, top - h + 5)
            x += w
        self.y = top - h

    def _head_lines(self, cols: Sequence[Col], widths: Sequence[float],
                    size: float) -> tuple[list[list[str]], float]:
        lines = [self.wrap(c.head, w - 4, size, bold=True)
                 for c, w in zip(cols, widths, strict=True)]
        return lines, max(ROW_H, max(len(ls) for ls in lines) * (size + 1.5) + 5)

    def _row_lines(self, r: Sequence[str] | str,
                   widths: Sequence[float]) -> tuple[list[list[str]], float]:
        if isinstance(r, str):
            return [], 12.0
        lines = [self.wrap(cell, w - 5, 6.5) if cell else [] for cell, w in
                 zip(r, widths, strict=True)]
        return lines, max(ROW_H, max(len(ls) for ls in lines) * 8.0 + 6)

    def table_height(self, cols: Sequence[Col], widths: Sequence[float],
                     rows: Sequence[Sequence[str] | str], head_size: float = 6.5) -> float:
        """The height `table` takes for these rows on one page, the gap after it included."""
        return (self._head_lines(cols, widths, head_size)[1]
                + sum(self._row_lines(r, widths)[1] for r in rows) + 6)

    def table(self, x: float, cols: Sequence[Col], widths: Sequence[float],
              rows: Sequence[Sequence[str] | str], section: str, head_size: float = 6.5,
              keep: int = 2) -> None:
        """A ruled grid: wrapped headings, then rows (text printed in grey, or blank to write in).

        Tick columns get an empty tick box in every row whose cell is empty, circle columns
        their choices; a row given as one string is a group label printed above the rows that
        follow. A row is `ROW_H` high, taller when its text needs more lines. The heading is
        printed again at the top of a new page.
        """
        head_lines, head_h = self._head_lines(cols, widths, head_size)
        self.need(head_h + ROW_H * min(len(rows), keep), section)
        y = self._heads(x, widths, head_lines, head_size, self.y, head_h)
        for r in rows:
            lines, h = self._row_lines(r, widths)
            if y - h < self.bottom:
                self.new_page(section)
                y = self._heads(x, widths, head_lines, head_size, self.y, head_h)
            if isinstance(r, str):
                self.text(x + 2, y - h + 4, r, 7.5, bold=True)
            else:
                self._row(x, cols, widths, y, h, lines)
            y -= h
        self.y = y - 6

    def _heads(self, x: float, widths: Sequence[float], head_lines: list[list[str]],
               size: float, top: float, h: float) -> float:
        self._cells(x, widths, top, h, 0.9)
        cx = x
        for lines, w in zip(head_lines, widths, strict=True):
            ty = top - size - 2.5
            for line in lines:
                self.text(cx + 2, ty, line, size, bold=True)
                ty -= size + 1.5
            cx += w
        return top - h

    def _row(self, x: float, cols: Sequence[Col], widths: Sequence[float], top: float,
             h: float, lines: list[list[str]]) -> None:
        self._cells(x, widths, top, h, 0.5)
        cx = x
        for col, w, cell in zip(cols, widths, lines, strict=True):
            if cell:
                for i, line in enumerate(cell):
                    self.text(cx + 2.5, top - 9 - 8 * i, line, 6.5, grey=True)
            elif col.fill == "tick":
                self.box(cx + w / 2 - TICK_S / 2, top - h / 2 - TICK_S / 2)
            elif col.fill == "circle":
                self.text(cx + 5, top - h / 2 - 2.5, col.choices, 8, grey=True)
            cx += w

    def _cells(self, x: float, widths: Sequence[float], top: float, h: float,
               line: float) -> None:
        self.ink()
        self.c.setLineWidth(line)
        cx = x
        for w in widths:
            self.c.rect(cx, top - h, w, h, stroke=1, fill=0)
            cx += w

    def t(self, s: str) -> str:
        """Text as the font can show it.

        With the Helvetica fallback (Windows-1252 glyphs only), marks outside that set become
        plain ASCII ones, anything else a '?'.
        """
        if self.regular != "Helvetica":
            return s
        s = s.replace(TICK, "[ ]").replace("−", "-")
        return s.encode("cp1252", errors="replace").decode("cp1252")

    def heading(self, s: str, section: str, size: float = 10, keep: float = 0.0) -> None:
        """A section heading, kept with the first `keep` points of what follows."""
        self.need(size + 10 + keep, section)
        self.y -= size + 4
        self.text(MARGIN, self.y, s, size, bold=True)
        self.y -= 4
