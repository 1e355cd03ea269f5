"""What every triage PDF shares: text pieces, tables, sections, page furniture, the build.

Used by the report (`draw.py`) and the comparison (`compare_draw.py`). The layout rules live
here once, each with a test in `tests/report/test_layout.py`:

- a heading is never the last thing on a page: `section` keeps it with the start of what
  follows (the whole of it when that is short);
- a table of at most `SMALL_TABLE` rows never splits across pages;
- the last page holds at least a third of a page (`keep_tail`), so a document never ends on a
  near-blank page of one row;
- the caution, the signed state and the identification are on every page (`page_canvas`).
"""

from __future__ import annotations

import io
from collections.abc import Callable
from typing import Any
from xml.sax.saxutils import escape

from reportlab.lib.pagesizes import A4
from reportlab.lib.units import mm
from reportlab.pdfgen.canvas import Canvas
from reportlab.platypus import (
    BaseDocTemplate,
    CondPageBreak,
    Flowable,
    Frame,
    KeepTogether,
    LayoutError,
    PageTemplate,
    Paragraph,
    Table,
    TableStyle,
)

from .fonts import register
from .style import ACCENT, ACCENT_TINT, ACCENT_WEAK, INK, MUTED, styles

PAGE_W, PAGE_H = A4
MARGIN = 16 * mm
BAND_H = 30.0
FOOT_H = 22.0
CONTENT_W = PAGE_W - 2 * MARGIN
BODY_H = PAGE_H - 2 * MARGIN - BAND_H - 4 - FOOT_H  # the body frame's height
SMALL_TABLE = 10  # rows (header included) of a table that is never split across pages
TAIL = 1 / 3  # the least share of a page the last page holds
CELL_PT = 7.5  # table text size
PAD = 3.0  # a table cell's left and right padding


def esc(text: str) -> str:
    """User or table text made safe for reportlab's paragraph markup; newlines kept."""
    return escape(text).replace("\n", "<br/>")


def para(text: str, style: str = "body", markup: str | None = None) -> Paragraph:
    """A paragraph of literal text; `markup` (ours, trusted) wraps the escaped text."""
    body = esc(text)
    if markup:
        body = markup.replace("{}", body)
    return Paragraph(body, styles()[style])


def h2(text: str) -> Paragraph:
    """A section heading."""
    return para(text, "h2")


def cell(text: str, width: float) -> str:
    """Plain (unparsed, so literal) cell text broken into lines that fit `width` points.

    Much quicker than a Paragraph for the long tables of a tall building. A word longer than
    the column is broken inside, so no cell ever runs into the next column.
    """
    from reportlab.lib.utils import simpleSplit

    regular, _ = register()
    room = width - 2 * PAD
    lines: list[str] = []
    for part in text.split("\n"):
        for line in simpleSplit(part, regular, CELL_PT, room) or [""]:
            # simpleSplit breaks at spaces only: a word wider than the column is cut here
            while len(line) > 1 and " " not in line and _width(line, regular) > room:
                cut = len(line) - 1
                while cut > 1 and _width(line[:cut], regular) > room:
                    cut -= 1
                lines.append(line[:cut])
                line = line[cut:]
            lines.append(line)
    return "\n".join(lines)


def _width(text: str, font: str) -> float:
    from reportlab.pdfbase.pdfmetrics import stringWidth

    return float(stringWidth(text, font, CELL_PT))


def cells(row: list[str], widths: list[float]) -> list[str]:
    """A row of plain cells, each wrapped to its column."""
    return [cell(t, w) for t, w in zip(row, widths, strict=True)]


def grid(rows: list[list[Any]], widths: list[float], header: bool = True,
         zebra: bool = True, split_in_row: bool = False) -> Table:
    """A table in the house style: header row repeated on each page, a small one kept whole.

    `split_in_row`: a row taller than a page (a 2,000-character place) may split across pages;
    off elsewhere, so an ordinary row is never cut in two.
    """
    t = Table(rows, colWidths=widths, repeatRows=1 if header else 0,
              splitInRow=1 if split_in_row else 0)
    regular, bold = register()
    cmds: list[tuple[Any, ...]] = [
        ("FONTNAME", (0, 0), (-1, -1), regular),
        ("FONTSIZE", (0, 0), (-1, -1), CELL_PT),
        ("LEADING", (0, 0), (-1, -1), 9),
        ("TEXTCOLOR", (0, 0), (-1, -1), INK),
        ("VALIGN", (0, 0), (-1, -1), "TOP"),
        ("TOPPADDING", (0, 0), (-1, -1), 1.5),
        ("BOTTOMPADDING", (0, 0), (-1, -1), 1.5),
        ("LEFTPADDING", (0, 0), (-1, -1), PAD),
        ("RIGHTPADDING", (0, 0), (-1, -1), PAD),
        ("LINEBELOW", (0, -1), (-1, -1), 0.4, ACCENT_WEAK),
    ]
    if header:
        cmds += [("FONTNAME", (0, 0), (-1, 0), bold), ("TEXTCOLOR", (0, 0), (-1, 0), ACCENT),
                 ("LINEBELOW", (0, 0), (-1, 0), 0.8, ACCENT)]
    if zebra and len(rows) > 2:
        cmds.append(("ROWBACKGROUNDS", (0, 1), (-1, -1), [None, ACCENT_TINT]))
    if len(rows) <= SMALL_TABLE and _plain_height(rows) < BODY_H * 0.9:
        cmds.append(("NOSPLIT", (0, 0), (-1, -1)))   # a small table never splits
    t.setStyle(TableStyle(cmds))
    return t


def _plain_height(rows: list[list[Any]]) -> float:
    """About how tall rows of plain cells are (9 pt a line, 3 pt of padding a row)."""
    return sum(3.0 + 9.0 * max((c.count("\n") + 1 if isinstance(c, str) else 1 for c in r),
                               default=1) for r in rows)


_CHUNK = 600   # characters per paragraph of a long text (see `pieces`)


def pieces(text: str) -> list[str]:
    """A long text cut at spaces into pieces of about `_CHUNK` characters.

    reportlab wraps a paragraph again from its start each time it splits it across a page, so
    one paragraph of 20,000 characters costs many times one of 600; pieces keep a report of
    texts at their length limits within its time (the text reads on as one).
    """
    if len(text) <= _CHUNK:
        return [text]
    out = []
    while len(text) > _CHUNK:
        cut = text.rfind(" ", _CHUNK // 2, _CHUNK)
        cut = _CHUNK if cut < 0 else cut + 1
        out.append(text[:cut])
        text = text[cut:]
    if text:
        out.append(text)
    return out


def bullets(lines: list[str], style: str = "bullet") -> list[Paragraph]:
    """One bullet paragraph per line (long lines in pieces)."""
    out = []
    for x in lines:
        first, *rest = pieces(x)
        out.append(Paragraph(esc(first), styles()[style], bulletText="–"))
        out += [Paragraph(esc(r), styles()[style]) for r in rest]
    return out


def height(flowables: list[Any]) -> float:
    """The height a list of flowables takes in the body frame (spaces included)."""
    total = 0.0
    for f in flowables:
        if isinstance(f, KeepTogether):   # its wrap needs a canvas; its content's does not
            total += height(f._content)
            continue
        _, h = f.wrap(CONTENT_W, PAGE_H)
        total += h + f.getSpaceBefore() + f.getSpaceAfter()
    return total


def _lead(f: Any) -> float:
    """The height of the start of `f` that must follow its heading on the same page."""
    if isinstance(f, Table):
        f.wrap(CONTENT_W, PAGE_H)
        rows = f._rowHeights
        return float(sum(rows[:min(len(rows), 4)]))  # the header and the first rows
    return min(height([f]), 60.0)


def section(title: str | Paragraph, body: list[Any]) -> list[Any]:
    """A heading with its body: kept whole when short, else kept with the body's start.

    A short section (at most half a page) moves to the next page whole rather than splitting;
    a long one starts on this page only when its heading and first rows fit here.
    """
    head = h2(title) if isinstance(title, str) else title
    long = any(isinstance(f, Table) and len(f._cellvalues) * 9 > BODY_H / 2
               for f in body)   # a long table: not wrapped twice just to learn it is long
    if not long and height([head, *body]) <= BODY_H / 2:
        return [KeepTogether([head, *body])]
    first = body[0] if body else None
    need = height([head]) + (_lead(first) if first is not None else 0.0) + 2
    return [CondPageBreak(need), head, *body]


def keep_tail(body: list[Any]) -> list[Any]:
    """`body`, arranged so that its last page holds at least a third of a page.

    Walking back from the end: flowables adding up to a third of a page are kept together
    (`KeepTogether`: they move to a new page whole rather than leave a line behind them); where
    the walk meets a long table, that table's last rows making up a third of a page are marked
    never to split, so the page holding its end holds at least them. End a document with its
    long table (nothing after it) and the rule holds whatever came before.
    """
    need = BODY_H * TAIL + 6
    tail: list[Any] = []
    rest = list(body)
    got = 0.0
    while rest and got < need:
        f = rest[-1]
        h = height([f])
        if isinstance(f, Table) and h > BODY_H / 2:
            _keep_rows(f, need)
            break
        tail.insert(0, rest.pop())
        got += h
    if len(tail) > 1:
        return [*rest, KeepTogether(tail)]
    return [*rest, *tail]


def _keep_rows(t: Table, need: float) -> None:
    """Mark the last rows of `t`, at least `need` points of them, as never split."""
    t.wrap(CONTENT_W, PAGE_H)
    rows = t._rowHeights
    got, first = 0.0, len(rows)
    while first > 1 and got < need:
        first -= 1
        got += rows[first]
    t.setStyle(TableStyle([("NOSPLIT", (0, first), (-1, -1))]))


Furniture = Callable[[Canvas, int, int], None]


def page_canvas(caution: str, state: str, footer: str,
                finish: Callable[[Any], None] | None = None) -> type:
    """A canvas class printing the caution band, state, identification and "page n of N".

    Every page gets them; `finish(doc)` runs on the document before it is saved.
    """
    regular, bold = register()

    class PageCanvas(Canvas):  # type: ignore[misc]  # reportlab ships no types
        """Holds pages back until the end, to print 'page n of N' and the band on each."""

        def __init__(self, *args: Any, **kw: Any) -> None:
            super().__init__(*args, **kw)
            self._pages: list[dict[str, Any]] = []

        def showPage(self) -> None:
            self._pages.append(dict(self.__dict__))
            self._startPage()

        def save(self) -> None:
            total = len(self._pages)
            for i, state_ in enumerate(self._pages):
                self.__dict__.update(state_)
                self._furniture(i + 1, total)
                Canvas.showPage(self)
            if finish is not None:
                finish(self._doc)
            Canvas.save(self)

        def _furniture(self, page: int, total: int) -> None:
            self.saveState()
            top = PAGE_H - MARGIN + 8
            self.setFillColor(ACCENT_TINT)
            self.setStrokeColor(ACCENT)
            self.rect(MARGIN, top - BAND_H, CONTENT_W, BAND_H, stroke=0, fill=1)
            self.setLineWidth(2)
            self.line(MARGIN, top - BAND_H, MARGIN, top)
            self.setFillColor(ACCENT)
            self.setFont(bold, 8.5)
            self.drawString(MARGIN + 7, top - 11, "Caution")
            self.setFillColor(INK)
            line, lines = "", []
            for wd in caution.split():
                trial = (line + " " + wd).strip()
                if self.stringWidth(trial, bold, 8.5) > CONTENT_W - 60:
                    lines.append(line)
                    line = wd
                else:
                    line = trial
            lines.append(line)
            for k, text in enumerate(lines[:2]):
                self.drawString(MARGIN + 50, top - 11 - 10 * k, text)
            self.setFont(regular, 6.5)
            self.setFillColor(MUTED)
            self.setStrokeColor(ACCENT_WEAK)
            self.setLineWidth(0.4)
            self.line(MARGIN, MARGIN + 10, PAGE_W - MARGIN, MARGIN + 10)
            self.drawString(MARGIN, MARGIN + 2, footer)
            self.setFont(bold, 8)
            self.setFillColor(INK)
            self.drawString(MARGIN, MARGIN + 13, state)
            self.setFont(bold, 7)
            self.drawRightString(PAGE_W - MARGIN, MARGIN + 2, f"page {page} of {total}")
            self.restoreState()

    return PageCanvas


def _first_text(f: Any) -> str:
    """A drawn flowable's first text: a paragraph's words, a table's first row."""
    if isinstance(f, Paragraph):
        return " ".join(f.getPlainText().split())
    if isinstance(f, Table):
        return " | ".join(_first_text(c) if isinstance(c, Paragraph) else " ".join(str(c).split())
                          for c in f._cellvalues[0])
    return ""


Drawn = tuple[int, str, str, float]  # page, kind of flowable, its first text, y below it


def build(flowables: list[Any], canvas: type, trace: list[Drawn] | None = None,
          **meta: Any) -> bytes:
    """The PDF bytes of `flowables` on A4 pages (invariant: the same input, the same bytes).

    An entry no page can hold is refused in one line (ValueError), never a traceback.
    `trace`, when given, receives one `Drawn` per flowable as it is drawn (the layout tests).
    """
    register()
    buf = io.BytesIO()
    doc = BaseDocTemplate(
        buf, pagesize=A4, leftMargin=MARGIN, rightMargin=MARGIN,
        topMargin=MARGIN + BAND_H + 4, bottomMargin=MARGIN + FOOT_H, invariant=1,
        creator="triage", **meta)
    frame = Frame(doc.leftMargin, doc.bottomMargin, doc.width, doc.height, id="body",
                  leftPadding=0, rightPadding=0, topPadding=0, bottomPadding=0)
    doc.addPageTemplates([PageTemplate(id="page", frames=[frame])])
    if trace is not None:
        def seen(f: Any) -> None:
            frame = getattr(doc, "frame", None)
            y = float(frame._y) if frame is not None else -1.0
            kind = type(f).__name__
            if isinstance(f, Paragraph):
                kind += ":" + f.style.name
            elif isinstance(f, Table):
                kind += f":{len(f._cellvalues)}"
            trace.append((doc.page, kind, _first_text(f), y))
        doc.afterFlowable = seen
    try:
        doc.build(flowables, canvasmaker=canvas)
    except LayoutError as err:  # an entry that no page can hold: one line, not a traceback
        raise ValueError("the report cannot be laid out: an entry is too large for a page "
                         f"({str(err).splitlines()[0][:120]})") from None
    return buf.getvalue()


__all__ = [
    "BODY_H",
    "CONTENT_W",
    "Flowable",
    "build",
    "bullets",
    "cell",
    "cells",
    "esc",
    "grid",
    "h2",
    "height",
    "keep_tail",
    "page_canvas",
    "para",
    "pieces",
    "section",
]
