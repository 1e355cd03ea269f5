"""Read a paper form's pages back by position: its ruled cells, its text, its colours.

Words found anywhere in a PDF prove little (the look-up sheet prints every sign), so the form's
tests take each page's drawing operations: every rectangle drawn (`re`), every line of text
with the place it was drawn at, every colour set. Cells that share their top and bottom and
touch side by side are a row; rows stacked with the same column edges are a grid; a grid's
first row is its heading, and a heading cell's text is the text drawn inside that cell.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path

from pypdf import PdfReader
from pypdf.generic import ContentStream

MM = 72 / 25.4
EPS = 0.05        # points: how far two edges may differ and still be one edge
CELL_MIN_W = 20.0  # narrower rectangles are tick boxes, not cells


@dataclass(frozen=True)
class Rect:
    x0: float
    y0: float
    x1: float
    y1: float

    @property
    def w(self) -> float:
        return self.x1 - self.x0

    @property
    def h(self) -> float:
        return self.y1 - self.y0

    def holds(self, x: float, y: float) -> bool:
        return self.x0 - EPS <= x <= self.x1 + EPS and self.y0 - EPS <= y <= self.y1 + EPS


@dataclass(frozen=True)
class Frag:
    x: float
    y: float
    text: str


@dataclass
class Page:
    rects: list[Rect] = field(default_factory=list)
    frags: list[Frag] = field(default_factory=list)
    colours: list[tuple[str, tuple[float, ...]]] = field(default_factory=list)

    @property
    def text(self) -> str:
        return " ".join(f.text for f in self.frags)

    def at(self, text: str) -> list[Frag]:
        return [f for f in self.frags if f.text == text]

    def boxes(self) -> list[Rect]:
        """The tick boxes: small squares."""
        return [r for r in self.rects if r.w < CELL_MIN_W and abs(r.w - r.h) < EPS]


def _mul(a: list[float], b: list[float]) -> list[float]:
    """The product a x b of two PDF matrices [a b c d e f]."""
    return [a[0] * b[0] + a[1] * b[2], a[0] * b[1] + a[1] * b[3],
            a[2] * b[0] + a[3] * b[2], a[2] * b[1] + a[3] * b[3],
            a[4] * b[0] + a[5] * b[2] + b[4], a[4] * b[1] + a[5] * b[3] + b[5]]


def read_pages(path: Path) -> list[Page]:
    """Every page's rectangles, text lines and colour operations, in page coordinates."""
    reader = PdfReader(path)
    pages = []
    for pdf_page in reader.pages:
        page = Page()
        ctm = [1.0, 0, 0, 1, 0, 0]
        stack: list[list[float]] = []
        for operands, op in ContentStream(pdf_page.get_contents(), reader).operations:
            name = op.decode()
            if name == "q":
                stack.append(ctm)
            elif name == "Q":
                ctm = stack.pop()
            elif name == "cm":
                ctm = _mul([float(v) for v in operands], ctm)
            elif name == "re":
                x, y, w, h = (float(v) for v in operands)
                xs = (x * ctm[0] + ctm[4], (x + w) * ctm[0] + ctm[4])
                ys = (y * ctm[3] + ctm[5], (y + h) * ctm[3] + ctm[5])
                page.rects.append(Rect(min(xs), min(ys), max(xs), max(ys)))
            elif name in ("g", "G", "rg", "RG", "k", "K", "sc", "SC", "scn", "SCN", "cs", "CS"):
                page.colours.append((name, tuple(float(v) for v in operands
                                                 if isinstance(v, (int, float)))))

        def visit(text, cm, tm, _font, _size, frags=page.frags):
            if text.strip():
                x = tm[4] * cm[0] + tm[5] * cm[2] + cm[4]
                y = tm[4] * cm[1] + tm[5] * cm[3] + cm[5]
                frags.append(Frag(round(x, 2), round(y, 2), text.strip()))

        pdf_page.extract_text(visitor_text=visit)
        pages.append(page)
    return pages


@dataclass
class Grid:
    rows: list[list[Rect]]   # top to bottom, each row's cells left to right

    @property
    def edges(self) -> list[float]:
        return [c.x0 for c in self.rows[0]] + [self.rows[0][-1].x1]

    @property
    def top(self) -> float:
        return self.rows[0][0].y1

    @property
    def body(self) -> list[list[Rect]]:
        """The rows under the heading."""
        return self.rows[1:]

    def heads(self, page: Page) -> list[str]:
        """The text drawn inside each heading cell, top line first."""
        return [cell_text(page, c) for c in self.rows[0]]


def cell_text(page: Page, cell: Rect) -> str:
    inside = [f for f in page.frags if cell.holds(f.x, f.y)]
    return " ".join(f.text for f in sorted(inside, key=lambda f: (-f.y, f.x)))


def _same(a: float, b: float) -> bool:
    return abs(a - b) <= EPS


def rows_of(page: Page) -> list[list[Rect]]:
    """Runs of cells side by side with the same top and bottom, top to bottom."""
    cells = sorted((r for r in page.rects if r.w >= CELL_MIN_W),
                   key=lambda r: (-round(r.y1, 1), -round(r.y0, 1), r.x0))
    rows: list[list[Rect]] = []
    for c in cells:
        last = rows[-1][-1] if rows else None
        if (last is not None and _same(last.y1, c.y1) and _same(last.y0, c.y0)
                and _same(last.x1, c.x0)):
            rows[-1].append(c)
        else:
            rows.append([c])
    return rows


def grids(page: Page, gap: float = 13.0) -> list[Grid]:
    """Rows with the same column edges, each under the last (at most `gap` apart: a group label
    line may sit between two rows), top to bottom."""
    out: list[Grid] = []
    for row in rows_of(page):
        edges = [c.x0 for c in row] + [row[-1].x1]
        for g in out:
            below = g.rows[-1][0].y0
            same = len(g.edges) == len(edges) and all(
                _same(a, b) for a, b in zip(g.edges, edges, strict=True))
            if same and -EPS <= below - row[0].y1 <= gap:
                g.rows.append(row)
                break
        else:
            out.append(Grid([row]))
    return sorted(out, key=lambda g: -g.top)


def grid_under(page: Page, frag: Frag) -> Grid:
    """The first grid whose heading starts just under a line of text."""
    below = [g for g in grids(page) if g.top < frag.y and frag.y - g.top < 20]
    assert below, f"no grid under {frag.text!r}"
    return max(below, key=lambda g: g.top)
