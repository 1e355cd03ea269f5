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

from pathlib import Path
from typing import Any

from triage import standards
from triage.assess import CAUTION
from triage.forms import Form

from .paper_sheet import (
    ACCENT_HEX,
    MARGIN,
    MAX_STOREYS,
    MUTED_HEX,
    PAGE_H,
    PAGE_W,
    READING_ROWS,
    ROW_H,
    TICK,
    TINT_HEX,
    Sheet,
)

FONT_DIR = Path(__file__).resolve().parent / "fonts"
REGULAR_TTF = FONT_DIR / "DejaVuSans.ttf"
BOLD_TTF = FONT_DIR / "DejaVuSans-Bold.ttf"
# Our own font names, so this module does not depend on how the report registers its fonts.
REGULAR = "TriageFormSans"
BOLD = "TriageFormSans-Bold"

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


# --- the parts of the form --------------------------------------------------------------------

def _building_block(d: Sheet) -> None:
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


def _storey_band(d: Sheet, n: int, count: int) -> None:
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


def _hazards(d: Sheet) -> None:
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


def _lookup(d: Sheet) -> None:
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
    d = Sheet(c=c, form=form, regular=regular, bold=bold, total=total,
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
    from triage.output import write_output

    write_output(out, buf.getvalue())
    return pages
