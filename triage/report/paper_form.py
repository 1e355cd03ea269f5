"""The paper fallback: a blank printable field form for a building's structural systems.

Batteries die. This draws, from the form definitions (`triage.forms`) of one system, or of the
two systems of a building whose directions differ, a storey grid on A4 landscape: the building
and inspection boxes (exactly the fields the screens take); one band per storey with its access,
a grid of drift readings and, per member kind, a grid of damaged members with the signs to tick;
the hazards to tick; a place to sign; then a look-up sheet of what each sign and class looks
like. The pages follow the order of the survey format, so what is written on paper is typed in
later in the same order. There is no result box: the tier is worked out only when the form is
typed in. Every page carries the caution band (triage.assess.CAUTION). What each grid holds is
data (`paper_columns`); every label is the vocabulary's words, never a key.

    from triage.report.paper_form import write_paper_form
    pages = write_paper_form(load_form("rc_frame"), Path("rc_frame.pdf"), storeys=3)
    pages = write_paper_form((load_form("rc_frame"), load_form("steel_braced_frame")), out)
"""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path
from typing import Any

from triage import standards
from triage.assess import CAUTION
from triage.forms import Form
from triage.standards.vocabulary import entry, many, words

from .paper_capacity import capacity_lookup, capacity_step
from .paper_columns import (
    DAMAGED_ROWS_OTHER,
    DAMAGED_ROWS_VERTICAL,
    READING_ROWS,
    READINGS_ASKED,
    SPARE_HAZARD_ROWS,
    Col,
    KindGrid,
    fit,
    hazard_columns,
    kind_grids,
    reading_columns,
)
from .paper_sheet import BOX_H, MARGIN, MAX_STOREYS, PAGE_H, PAGE_W, ROW_H, TICK, Sheet

FONT_DIR = Path(__file__).resolve().parent / "fonts"
REGULAR_TTF = FONT_DIR / "DejaVuSans.ttf"
BOLD_TTF = FONT_DIR / "DejaVuSans-Bold.ttf"
# Our own font names, so this module does not depend on how the report registers its fonts.
REGULAR = "TriageFormSans"
BOLD = "TriageFormSans-Bold"
# Characters of the short survey code (the id's first 8, as `triage list` and reports show it).
CODE_CHARS = 8
NOT_HERE = "–"   # a cell that does not apply to the row (the sound members' line)


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


def fw(block: str, key: str) -> str:
    """A survey field's words with its unit, e.g. ('reading', 'gauge_mm') -> 'gauge (mm)'."""
    e = entry(f"fields.{block}", key)
    if e is None:
        raise KeyError(f"the vocabulary has no words for fields.{block}.{key}")
    return e.with_unit


def systems_line(forms: Sequence[Form]) -> str:
    """Which systems the form is for, in words: 'for concrete frame (x), braced steel frame (y)'."""
    if len(forms) == 1:
        return f"for {words('systems', forms[0].system)}"
    return f"for {words('systems', forms[0].system)} (x), {words('systems', forms[1].system)} (y)"


# --- the parts of the form --------------------------------------------------------------------

def _building_block(d: Sheet, forms: Sequence[Form], grids: Sequence[KindGrid]) -> None:
    sec = "building and inspection"
    w = d.width
    d.heading("Building", sec)
    d.boxes([(fw("building", "name"), w / 2), (fw("building", "address"), w / 2)], sec)
    d.boxes([(fw("building", "use"), w * 0.4), (fw("building", "year_built"), w * 0.2),
             (fw("location", "lat"), w * 0.2), (fw("location", "lon"), w * 0.2)], sec)
    d.heading(f"{fw('building', 'system')}: tick one in each direction ({systems_line(forms)})",
              sec, 8.5, keep=3 * ROW_H)
    systems = standards.system_keys()
    first = 76.0
    cols = [Col(fw("building", "system"), first)] + [
        Col(words("systems", k), (w - first) / len(systems), "tick") for k in systems]
    d.table(MARGIN, cols, [c.width for c in cols],
            [[fw("systems", "x")] + [""] * len(systems),
             [fw("systems", "y")] + [""] * len(systems)], sec)
    d.y += 6
    d.boxes([("storeys named (circle one; basements B1, B2 either way)", w * 0.5),
             ("storeys above ground", w * 0.25), ("storeys below ground", w * 0.25)], sec)
    d.text(MARGIN + 12, d.y + 7, "G, 1, 2 …        1, 2, 3 …", 9, grey=True)
    inspector = fw("inspection", "inspector")
    d.heading("Inspection", sec)
    d.boxes([(f"{inspector}: {fw('inspector', 'name')}", w * 0.4),
             (f"{inspector}: {fw('inspector', 'id')}", w * 0.2),
             (f"{fw('inspection', 'at')} (with the UTC offset, e.g. +13:00)", w * 0.4)], sec)
    d.boxes([(f"{fw('inspection', 'team')}: {fw('inspector', 'name')} "
              f"({fw('inspector', 'id')}); {fw('inspector', 'name')} ({fw('inspector', 'id')})",
              w * 0.6), (fw("inspection", "event"), w * 0.4)], sec)
    d.boxes([(fw("inspection", "weather"), w * 0.3),
             (f"{fw('inspection', 'not_inspected')} (what could not be seen, and why)",
              w * 0.7)], sec)
    _code_boxes(d, sec)
    _instructions(d, grids, sec)


def _code_boxes(d: Sheet, sec: str) -> None:
    """The earlier survey's short code: one box per character."""
    label = (f"{fw('inspection', 'previous')}, for a re-inspection: its code, the first "
             f"{CODE_CHARS} characters of its id as 'triage list' and its report show them")
    h = ROW_H + 6
    d.need(h, sec)
    top = d.y
    d.ink()
    d.c.setLineWidth(0.6)
    d.c.rect(MARGIN, top - h, d.width, h, stroke=1, fill=0)
    d.text(MARGIN + 3, top - 8, label, 6.5, grey=True)
    x = MARGIN + d.c.stringWidth(label, d.regular, 6.5) + 16
    for i in range(CODE_CHARS):
        d.c.rect(x + i * 22, top - h + 3, 22, ROW_H, stroke=1, fill=0)
    d.y = top - h


def _instructions(d: Sheet, grids: Sequence[KindGrid], sec: str) -> None:
    vertical = [many("member_kinds", g.kind) for g in grids
                if g.damaged_rows == DAMAGED_ROWS_VERTICAL]
    other = [many("member_kinds", g.kind) for g in grids if g.damaged_rows == DAMAGED_ROWS_OTHER]
    crack = ("its widest residual crack in mm (where the grid asks for it), "
             if any(g.cracks for g in grids) else "")
    lines = (f"{DAMAGED_ROWS_VERTICAL} lines for {', '.join(vertical)}" if vertical else "")
    if other:
        lines += ("; " if lines else "") + f"{DAMAGED_ROWS_OTHER} for {', '.join(other)}"
    steps = [
        "1. Walk round the outside first and tick the hazards (the page after the storey bands) "
        "before going in; do not enter where collapse, a lean or a hanging hazard threatens.",
        "2. Storeys from the bottom up, one band each, labelled as marked on site and named as "
        "ticked above. Circle the access you had: partly entered or not entered makes the "
        "survey provisional.",
        f"3. Readings: at least {READINGS_ASKED} readings a storey, five spots (the four "
        "corners and the middle of the plan, or as the look-up sheet says for this system) in x "
        "and in y; the spare rows are for repeats. Each is an offset over a measured gauge, or "
        "a tilt: keep its sign (+ toward +x or +y), write its uncertainty, and the as-built "
        "offset or tilt at that spot with its uncertainty when known.",
        "4. Members: count the sound members of each kind on its first line; log each damaged "
        f"member (or group damaged alike) on its own line with its mark, {crack}and tick the "
        f"signs seen: {lines} in each storey band. Set a class by hand only with the reason."
        + capacity_step([(g.kind, g.systems) for g in grids]),
        "5. Sign at the end. The look-up sheet says what each sign and class looks like.",
    ]
    d.heading("How to fill it in", sec, 9)
    for s in steps:
        d.para(MARGIN, s, d.width, 7.5, section=sec)


def _storey_band(d: Sheet, forms: Sequence[Form], grids: Sequence[KindGrid], n: int,
                 count: int) -> None:
    sec = f"storey band {n} of {count} (band 1 is the lowest storey)"
    w = d.width
    label = f"{fw('storey', 'label')} (as marked on site)"

    d.storey_label = f"band {n}: {fw('storey', 'label')}"
    d.new_page(sec)
    d.heading(f"Storey band {n}", sec)
    access = " / ".join(words("access", k) for k in ("full", "partial", "none"))
    d.boxes([(label, w * 0.25), (fw("storey", "height_m"), w * 0.15),
             (f"{fw('storey', 'below_grade')} {TICK}", w * 0.15),
             (f"{fw('storey', 'access')} (circle one)", w * 0.45)], sec)
    d.text(MARGIN + w * 0.55 + 12, d.y + 7, access.replace(" / ", "      "), 9, grey=True)
    d.y -= 4
    cols = reading_columns()
    d.heading(f"{fw('storey', 'readings').capitalize()}: at least {READINGS_ASKED}, residual drift "
              "(+ toward +x or +y)", sec, 9, keep=3 * ROW_H)
    rows = [[str(i + 1)] + [""] * (len(cols) - 1) for i in range(READING_ROWS)]
    d.table(MARGIN, cols, fit(cols, w, "reading.where"), rows, sec, keep=READING_ROWS)
    d.boxes([(f"{fw('storey', 'notes')} (and photo numbers, what they show)", w)], sec,
            h=3 * ROW_H)
    d.y -= 4
    d.heading("Members: the sound ones of each kind on its first line, each damaged one (or "
              "group damaged alike) on its own", sec, 9, keep=4 * ROW_H)
    hints: dict[str, str] = {}
    for form in reversed(forms):
        hints.update({k.kind: k.count_hint for k in form.kinds})
    # Each grid whole on a page; a smaller grid further on fills the space one leaves.
    todo = list(grids)
    while todo:
        fits = [g for g in todo if d.y - _grid_height(d, g) >= d.bottom]
        g = fits[0] if fits else todo[0]
        todo.remove(g)
        _member_grid(d, g, hints[g.kind], sec)
    d.storey_label = ""


def _member_rows(g: KindGrid) -> list[list[str]]:
    sound = f"sound ones: no {'crack, no ' if g.cracks else ''}sign"
    first = [sound, ""] + [NOT_HERE if c.fill != "write" else "" for c in g.columns[2:]]
    return [first] + [[""] * len(g.columns) for _ in range(g.damaged_rows)]


def _grid_height(d: Sheet, g: KindGrid) -> float:
    widths = fit(g.columns, d.width, "member_group.override_reason")
    return 16 + d.table_height(g.columns, widths, _member_rows(g))


def _member_grid(d: Sheet, g: KindGrid, hint: str, sec: str) -> None:
    cols = list(g.columns)
    widths = fit(cols, d.width, "member_group.override_reason")
    rows = _member_rows(g)
    d.need(_grid_height(d, g), sec)
    d.y -= 12
    title = many("member_kinds", g.kind).capitalize()
    d.text(MARGIN, d.y, title, 9, bold=True)
    tw = d.c.stringWidth(title, d.bold, 9) + 10
    lines = d.wrap(hint, d.width - tw, 6.5)
    d.text(MARGIN + tw, d.y, lines[0] + ("…" if len(lines) > 1 else ""), 6.5, grey=True)
    d.y -= 4
    d.table(MARGIN, cols, widths, rows, sec, keep=len(rows))   # kept whole on one page


def _hazards(d: Sheet, forms: Sequence[Form]) -> None:
    sec = "hazards, then signature"
    d.new_page(sec)
    table = standards.load().hazards
    d.heading("Hazards: tick what you saw, from outside all round and inside", sec)
    cols = hazard_columns()
    widths = fit(cols, d.width, "hazard.note")
    rows: list[list[str] | str] = []
    for group, items in forms[0].hazard_groups:
        rows.append(group)
        for key, hint in items:
            rows.append(["", f"{words('hazards', key)}: {table[key].description}. "
                             f"Look: {hint}", "", "", "", ""])
    rows.append("another hazard of a kind already listed")
    rows += [["", f"{fw('hazard', 'kind')}:", "", "", "", ""]
             for _ in range(SPARE_HAZARD_ROWS)]
    d.table(MARGIN, cols, widths, rows, sec)
    d.heading("Signature", sec, keep=12 + BOX_H + 6)   # kept with its box
    d.para(MARGIN, "I inspected this building as recorded on these sheets: what was seen and "
           "measured, no verdict on the building (the signature stays on paper).", d.width, 8,
           section=sec)
    d.y -= 4
    d.boxes([(f"{fw('inspection', 'inspector')}'s signature", d.width * 0.5)], sec,
            h=BOX_H + 6)


def _lookup(d: Sheet, form: Form) -> None:
    sec = "look-up sheet: what to look for"
    w = d.width
    std = standards.load()
    d.new_page(sec)
    d.heading(f"What to look for: {form.title.lower()} ({words('systems', form.system)})", sec)
    d.para(MARGIN, form.summary, w, 8, section=sec)
    d.para(MARGIN, f"{fw('storey', 'readings').capitalize()}: {form.readings_hint}", w, 8,
           section=sec)
    col = w / 2 - 8
    for kind in form.member_kinds:
        d.need(30, sec)
        d.y -= 6
        d.para(MARGIN, f"{many('member_kinds', kind).capitalize()} (on this form: "
               f"{form.label_of(kind)})", w, 8.5, bold=True, section=sec)
        d.para(MARGIN + 8, form.count_hint(kind), w - 8, 7, grey=True, section=sec)
        for sign, hint in form.signs_for(kind):
            s = std.signs[sign]
            left = d.wrap(f"{words('signs', sign)} (class {s.damage_class}): {s.description}",
                          col, 7)
            right = d.wrap(f"where: {hint}", col, 7)
            n = max(len(left), len(right))
            d.need(n * 9 + 2, sec)
            for i in range(n):
                d.y -= 9
                if i < len(left):
                    d.text(MARGIN + 8, d.y, left[i], 7)
                if i < len(right):
                    d.text(MARGIN + 16 + col, d.y, right[i], 7, grey=True)
    d.need(40, sec)
    d.y -= 6
    d.para(MARGIN, f"Damage classes on {words('systems', form.system)} members (a sign, or a "
           "crack width where the grid asks for one, sets the class when the form is typed in)",
           w, 8.5, bold=True, section=sec)
    for c, text in form.class_text.items():
        d.para(MARGIN + 8, f"{c}: {text}", w - 8, 7.5, section=sec)
    for head, lines in capacity_lookup(form.member_kinds, (form.system,)):
        d.need(30, sec)
        d.y -= 6
        d.para(MARGIN, head, w, 8.5, bold=True, section=sec)
        for text in lines:
            d.para(MARGIN + 8, text, w - 8, 7, section=sec)


def _forms(forms: Form | Sequence[Form]) -> tuple[Form, ...]:
    got = (forms,) if isinstance(forms, Form) else tuple(forms)
    if not 1 <= len(got) <= 2:
        raise ValueError(f"systems: {len(got)} given; one, or two (x then y)")
    if len(got) == 2 and got[0].system == got[1].system:
        got = got[:1]
    return got


def title_of(forms: Sequence[Form]) -> str:
    """The form's title: the system's, or both systems' for a building of two."""
    return " · ".join(f.title for f in forms)


def draw(c: Any, forms: Form | Sequence[Form], storeys: int, total: int | None) -> int:
    """Draw the whole form on a reportlab canvas; return the number of pages."""
    fs = _forms(forms)
    regular, bold = fonts()
    d = Sheet(c=c, title=title_of(fs), systems_line=systems_line(fs), regular=regular,
              bold=bold, total=total)
    grids = kind_grids(fs)
    d.new_page("building and inspection")
    _building_block(d, fs, grids)
    for n in range(1, storeys + 1):
        _storey_band(d, fs, grids, n, storeys)
    _hazards(d, fs)
    for form in fs:
        _lookup(d, form)
    c.showPage()
    return d.page


def write_paper_form(forms: Form | Sequence[Form], out: Path, storeys: int = 3) -> int:
    """Write the blank paper form with `storeys` storey bands; return its pages.

    `forms` is one system's form, or the forms of the x and y directions' systems (a building
    of two systems gets both systems' grids and look-up sheets). The PDF is reproducible byte
    for byte (reportlab's invariant mode). Raises ValueError for a storey count outside 1..20
    or other than one or two forms, and `triage.errors.IOFailure` (one line) when
    `out` cannot be written.
    """
    from io import BytesIO

    from reportlab.pdfgen.canvas import Canvas

    fs = _forms(forms)
    if not 1 <= storeys <= MAX_STOREYS:
        raise ValueError(f"storeys: {storeys} is outside 1..{MAX_STOREYS}")
    # First pass counts the pages, so every page can say "page n of m".
    total = draw(Canvas(BytesIO(), pagesize=(PAGE_W, PAGE_H), invariant=1), fs, storeys, None)
    buf = BytesIO()
    c = Canvas(buf, pagesize=(PAGE_W, PAGE_H), invariant=1)
    c.setTitle(f"triage paper field form: {title_of(fs)}")
    c.setAuthor("triage")
    c.setSubject(CAUTION)
    c.setCreator("triage form")
    pages = draw(c, fs, storeys, total)
    c.save()
    from triage.output import write_output

    write_output(out, buf.getvalue())
    return pages
