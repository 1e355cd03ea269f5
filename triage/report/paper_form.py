"""The paper fallback: a blank printable field form for one structural system.

Batteries die. This draws, from the system's form definition (`triage.forms`), a storey grid on
A4 landscape: the building and inspection block; one band per storey with its access, boxes
for drift readings and a member tally per kind with crack width and the signs to tick; the
hazards to tick; a place for the inspector's signature; then a look-up sheet of what each sign
and class looks like. The pages follow the order of the survey format, so what is written on
paper is typed in later in the same order. There is no result box: the tier is worked out only
when the form is typed in. Every page carries the caution band (triage.assess.CAUTION).

    from triage.report.paper_form import write_paper_form
    pages = write_paper_form(load_form("rc_frame"), Path("rc_frame.pdf"), storeys=3)
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from triage import standards
from triage.assess import CAUTION
from triage.forms import Form

FONT_DIR = Path(__file__).resolve().parent / "fonts"
REGULAR_TTF = FONT_DIR / "DejaVuSans.ttf"
BOLD_TTF = FONT_DIR / "DejaVuSans-Bold.ttf"
# Our own font names, so this module does not depend on how the report registers its fonts.
REGULAR = "TriageFormSans"
BOLD = "TriageFormSans-Bold"

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


def fonts() -> tuple[str, str]:
    """Register DejaVu Sans when the package ships it; else fall back to Helvetica."""
    from reportlab.pdfbase import pdfmetrics

    if not (REGULAR_TTF.is_file() and BOLD_TTF.is_file()):
        return "Helvetica", "Helvetica-Bold"
    if REGULAR not in pdfmetrics.getRegisteredFontNames():
        from reportlab.pdfbase.ttfonts import TTFont

        pdfmetrics.registerFont(TTFont(REGULAR, str(REGULAR_TTF)))
        pdfmetrics.registerFont(TTFont(BOLD, str(BOLD_TTF)))
    return REGULAR, BOLD


def words(key: str) -> str:
    """A table key as words: 'cover_spalling' -> 'cover spalling'."""
    return key.replace("_", " ")


@dataclass
class _Doc:
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


# --- the parts of the form --------------------------------------------------------------------

def _building_block(d: _Doc) -> None:
    sec = "building and inspection"
    width = PAGE_W - 2 * MARGIN
    half = width / 2
    d.heading("Building", sec)
    rows = [[("name", half), ("address", half)],
            [("use", half), ("latitude", half / 2), ("longitude", half / 2)]]
    for row in rows:
        d.y -= 18
        x = MARGIN
        for label, w in row:
            d.field(x, d.y, label, w)
            x += w
    systems = standards.system_keys()
    d.y -= 16
    d.text(MARGIN, d.y, "structural system (tick one per direction; this form is for "
           f"{d.form.system})", 7, muted=True)
    col_w = (width - 30) / len(systems)
    d.y -= 12
    for i, key in enumerate(systems):
        d.text(MARGIN + 30 + i * col_w, d.y, key, 6.5)
    for axis in ("x", "y"):
        d.y -= 13
        d.text(MARGIN, d.y, axis, 8, bold=True)
        for i, _ in enumerate(systems):
            d.box(MARGIN + 30 + i * col_w + 10, d.y - 1)
    d.heading("Inspection", sec)
    d.y -= 18
    d.field(MARGIN, d.y, "inspector", half * 0.7)
    d.field(MARGIN + half * 0.7, d.y, "inspector id", half * 0.3)
    d.field(MARGIN + half, d.y, "date and local time (with UTC offset, e.g. +13:00)", half)
    d.y -= 18
    d.field(MARGIN, d.y, "second inspector (team)", half)
    d.field(MARGIN + half, d.y, "re-inspection of survey (id of the earlier survey, if any)",
            half)
    d.heading("How to fill it in", sec)
    steps = [
        "1. Walk round the outside first and tick the hazards (the page after the storey bands) "
        "before going in; "
        "do not enter where collapse, a lean or a hanging hazard threatens.",
        "2. Storeys from the bottom up, one band each; label them as marked on site (B1, G, 1, "
        "2 ...). Tick the access you had: partial or none makes the survey provisional.",
        "3. Readings: an offset over a measured gauge length, or a tilt; keep the sign (+ toward "
        "+x or +y) and write the reading's uncertainty (sd). Several spots per storey and "
        "direction: corners and the core. " + d.form.readings_hint,
        "4. Members: count the sound members of each kind on one line; log each damaged member "
        "(or a group damaged alike) on its own line with its grid mark, the widest residual "
        "crack in mm and the signs seen. Write a class by hand only with the reason.",
        "5. Sign below. The look-up sheet at the end says what each sign and class looks like "
        "on this system.",
    ]
    for s in steps:
        d.para(MARGIN, s, width, 8, section=sec)
        d.y -= 2
    d.y -= 4
    d.para(MARGIN, d.form.summary, width, 8, muted=True, section=sec)


def _dir_column(kind: str) -> str | None:
    if kind == "column":
        return "brittle (short column)"
    if kind in ("wall", "brace", "infill"):
        return "dir (x / y / both)"
    return None


def _storey_band(d: _Doc, n: int, count: int) -> None:
    sec = f"storey band {n} of {count} (band 1 is the lowest storey)"
    width = PAGE_W - 2 * MARGIN

    def continued() -> None:
        d.y -= 12
        d.text(MARGIN, d.y, f"storey band {n}, continued", 8, bold=True)
        d.field(MARGIN + 130, d.y, "storey label", 110)
        d.y -= 6

    d.continued = None
    d.new_page(sec)
    d.continued = continued
    # storey line: label, height, below grade, access
    d.y -= 16
    d.text(MARGIN, d.y, f"Storey band {n}", 10, bold=True)
    x = MARGIN + 92
    d.field(x, d.y, "storey label", 100)
    d.field(x + 100, d.y, "height m", 80)
    d.text(x + 190, d.y + 2, "below grade", 7, muted=True)
    d.box(x + 236, d.y)
    d.text(x + 262, d.y + 2, "access:", 7, muted=True)
    for i, a in enumerate(("full", "partial", "none")):
        d.box(x + 292 + i * 50, d.y)
        d.text(x + 303 + i * 50, d.y + 1, a, 7)
    d.y -= 8
    # readings, with the notes beside them
    d.heading("Readings (residual drift)", sec, 9)
    heads = ["#", "dir x / y", "offset mm (+/−)", "gauge mm", "sd mm", "or tilt ° (+/−)",
             "sd °", "as-built here", "where on the plan (grid, face)"]
    widths = [16.0, 34.0, 58.0, 44.0, 34.0, 56.0, 30.0, 50.0, 178.0]
    top = d.y
    rows = [[str(i + 1)] + [""] * 8 for i in range(READING_ROWS)]
    d.table(MARGIN, widths, heads, rows, sec)
    nx = MARGIN + sum(widths) + 10
    d.text(nx, top - 8, "notes and photos (numbers, what they show)", 6.5, muted=True)
    d.c.setLineWidth(0.4)
    ly = top - 8 - ROW_H
    while ly > d.y + 6:
        d.c.line(nx, ly, PAGE_W - MARGIN, ly)
        ly -= ROW_H
    # members
    d.heading("Members: sound ones as one line, each damaged one (or group alike) on its own",
              sec, 9)
    rc = standards.load().systems[d.form.system].residual_capacity
    vertical = standards.load().assumptions.vertical_kinds
    for ki, kind in enumerate(d.form.member_kinds):
        signs = [s for s, _ in d.form.signs_for(kind)]
        heads = ["ref (grid mark) / where", "count"]
        widths = [150.0, 36.0]
        extra = _dir_column(kind)
        if extra:
            heads.append(extra)
            widths.append(52.0)
        if kind == "wall" and rc:
            heads.append("weight (in columns)")
            widths.append(46.0)
        heads += ["widest crack mm", "crack sd mm"]
        widths += [44.0, 40.0]
        heads += [words(s) for s in signs]
        widths += [44.0] * len(signs)
        heads.append("class by hand (I–V) and why")
        widths.append(max(width - sum(widths), 90.0))
        scale = min(1.0, width / sum(widths))
        widths = [w * scale for w in widths]
        damaged = (3 if ki == 0 else 2) if kind in vertical else 1
        d.need(10 + 3 + 20 + ROW_H * (1 + damaged), sec)
        d.y -= 10
        d.text(MARGIN, d.y, d.form.label_of(kind), 8.5, bold=True)
        hint_lines = d.wrap(d.form.count_hint(kind), width - 200, 6.5)
        hint, more = hint_lines[0], ("…" if len(hint_lines) > 1 else "")
        lw = d.c.stringWidth(d.form.label_of(kind), d.bold, 8.5)
        d.text(MARGIN + max(110.0, lw + 10), d.y, f"({kind}) {hint}{more}", 6.5, muted=True)
        d.y -= 3
        sound = ["sound: no crack, no sign", ""] + [""] * (len(heads) - 2)
        rows = [sound] + [[""] * len(heads) for _ in range(damaged)]
        if extra and kind == "column":
            for r in rows[1:]:
                r[2] = TICK
        for r in rows[1:]:
            for si in range(len(signs)):
                r[len(heads) - 1 - len(signs) + si] = TICK
        d.table(MARGIN, widths, heads, rows, sec)
    d.continued = None


def _hazards(d: _Doc) -> None:
    sec = "hazards, then signature"
    width = PAGE_W - 2 * MARGIN
    d.new_page(sec)
    table = standards.load().hazards
    d.heading("Hazards: tick what you saw, from outside all round and inside", sec)
    heads = ["seen", "hazard, and where to look", "where", "storey label",
             "height above ground m", "note, photo numbers"]
    widths = [26.0, 400.0, 140.0, 46.0, 58.0, width - 670.0]
    rows: list[list[str] | str] = []
    for group, items in d.form.hazard_groups:
        rows.append(group)
        for key, hint in items:
            text = f"{words(key)}: {table[key].description}. Look: {hint}"
            for i, line in enumerate(d.wrap(text, widths[1] - 8, 6.5)):
                rows.append([TICK if i == 0 else "", line, "", "", "", ""])
    d.table(MARGIN, widths, heads, rows, sec)
    # signature
    d.need(70, sec)
    d.heading("Signature", sec)
    d.para(MARGIN, "I inspected this building as recorded on these sheets. What is written here "
           "is what was seen and measured; it is no verdict on the building.", width, 8,
           section=sec)
    d.y -= 22
    d.field(MARGIN, d.y, "inspector's signature", width * 0.4)
    d.field(MARGIN + width * 0.4, d.y, "name", width * 0.3)
    d.field(MARGIN + width * 0.7, d.y, "date and time", width * 0.3)
    d.y -= 22
    d.field(MARGIN, d.y, "second inspector's signature", width * 0.4)
    d.field(MARGIN + width * 0.4, d.y, "name", width * 0.3)
    d.field(MARGIN + width * 0.7, d.y, "typed into triage by, on", width * 0.3)


def _lookup(d: _Doc) -> None:
    sec = "look-up sheet: what to look for"
    width = PAGE_W - 2 * MARGIN
    std = standards.load()
    d.continued = None
    d.new_page(sec)
    d.heading(f"What to look for: {d.form.title.lower()}", sec)
    d.para(MARGIN, d.form.summary, width, 8, section=sec)
    d.para(MARGIN, "Readings: " + d.form.readings_hint, width, 8, section=sec)
    col = width / 2 - 8
    for kind in d.form.member_kinds:
        d.need(30, sec)
        d.y -= 6
        d.para(MARGIN, f"{d.form.label_of(kind)} ({kind})", width, 8.5, bold=True, section=sec)
        d.para(MARGIN + 8, d.form.count_hint(kind), width - 8, 7, muted=True, section=sec)
        for sign, hint in d.form.signs_for(kind):
            s = std.signs[sign]
            left = d.wrap(f"{words(sign)} (class {s.damage_class}): {s.description}", col, 7)
            right = d.wrap(f"where: {hint}", col, 7)
            n = max(len(left), len(right))
            d.need(n * 9 + 2, sec)
            for i in range(n):
                d.y -= 9
                if i < len(left):
                    d.text(MARGIN + 8, d.y, left[i], 7)
                if i < len(right):
                    d.text(MARGIN + 16 + col, d.y, right[i], 7, muted=True)
    d.need(40, sec)
    d.y -= 6
    d.para(MARGIN, "Damage classes on this system's members (a crack width or a sign sets the "
           "class when the form is typed in)", width, 8.5, bold=True, section=sec)
    for c, text in d.form.class_text.items():
        d.para(MARGIN + 8, f"{c}: {text}", width - 8, 7.5, section=sec)


def draw(c: Any, form: Form, storeys: int, total: int | None) -> int:
    """Draw the whole form on a reportlab canvas; return the number of pages."""
    from reportlab.lib.colors import HexColor

    regular, bold = fonts()
    d = _Doc(c=c, form=form, regular=regular, bold=bold, total=total,
             accent=HexColor(ACCENT_HEX), tint=HexColor(TINT_HEX), muted=HexColor(MUTED_HEX))
    d.new_page("building and inspection")
    _building_block(d)
    for n in range(1, storeys + 1):
        _storey_band(d, n, storeys)
    _hazards(d)
    _lookup(d)
    c.showPage()
    return d.page


def write_paper_form(form: Form, out: Path, storeys: int = 3) -> int:
    """Write the blank paper form of `form` with `storeys` storey bands; return its pages.

    The PDF is reproducible byte for byte (reportlab's invariant mode). Raises ValueError for
    a storey count outside 1..20 and OSError when `out` cannot be written.
    """
    from io import BytesIO

    from reportlab.pdfgen.canvas import Canvas

    if not 1 <= storeys <= MAX_STOREYS:
        raise ValueError(f"storeys: {storeys} is outside 1..{MAX_STOREYS}")
    # First pass counts the pages, so every page can say "page n of m".
    total = draw(Canvas(BytesIO(), pagesize=(PAGE_W, PAGE_H), invariant=1), form, storeys,
                 None)
    buf = BytesIO()
    c = Canvas(buf, pagesize=(PAGE_W, PAGE_H), invariant=1)
    c.setTitle(f"triage paper field form: {form.title}")
    c.setAuthor("triage")
    c.setSubject(CAUTION)
    c.setCreator("triage form")
    pages = draw(c, form, storeys, total)
    c.save()
    out.write_bytes(buf.getvalue())
    return pages
