"""The paper sheet's rules on their own, drawn on a recording canvas (`tests/forms/paper_ops.py`).

When a piece still fits above the caution band and when it starts a page; that a grid's first
rows are kept with its heading; that the height a grid is said to take (which keeps a member
grid whole on a page) is the height it is drawn; what the Helvetica fallback prints for the marks
it lacks.
"""

from __future__ import annotations

import pytest

from tests.forms.paper_ops import Recorder
from triage.report.paper_columns import Col
from triage.report.paper_form import fonts
from triage.report.paper_sheet import (
    CAUTION_H,
    HEADER_H,
    MARGIN,
    PAGE_H,
    ROW_H,
    TICK,
    TICK_S,
    Sheet,
)

COLS = [Col("number", 60.0), Col("tick", 40.0, "tick"), Col("words", 300.0)]
WIDTHS = [c.width for c in COLS]


def _sheet(regular: str = "", bold: str = "") -> tuple[Sheet, Recorder]:
    c = Recorder()
    if not regular:
        regular, bold = fonts()
    d = Sheet(c=c, title="test", systems_line="for a test", regular=regular, bold=bold,
              total=3)
    d.new_page("first")
    return d, c


def _pages(c: Recorder) -> int:
    return 1 + [n for n, _, _ in c.calls].count("showPage")


def test_a_page_starts_below_its_header_and_ends_above_the_band() -> None:
    d, c = _sheet()
    assert _pages(c) == 1 and d.page == 1 and d.sections == ["first"]
    assert d.y == PAGE_H - MARGIN - HEADER_H - 4
    assert d.bottom == MARGIN + CAUTION_H + 8


@pytest.mark.parametrize(("more", "pages"), [(0.0, 1), (0.5, 2)])
def test_a_piece_that_just_fits_stays_on_the_page(more: float, pages: int) -> None:
    d, c = _sheet()
    d.y = d.bottom + 10.0
    d.need(10.0 + more, "second")
    assert (_pages(c), d.page) == (pages, pages)
    assert d.sections == ["first", "second"][:pages]


@pytest.mark.parametrize(("rows_fit", "pages_before"), [(2, 1), (1, 2)])
def test_a_grid_starts_where_its_heading_and_first_two_rows_fit(
        rows_fit: int, pages_before: int) -> None:
    d, c = _sheet()
    head_h = d.table_height(COLS, WIDTHS, []) - 6
    d.y = d.bottom + head_h + rows_fit * ROW_H
    top = d.y
    d.table(MARGIN, COLS, WIDTHS, [["1", "", ""], ["2", "", ""], ["3", "", ""]], "grid")
    heads = [(i, a) for i, (n, a, _) in enumerate(c.calls)
             if n == "drawString" and a[2] == "number"]
    breaks = [i for i, (n, _, _) in enumerate(c.calls) if n == "showPage"]
    assert len(breaks) == 1
    if pages_before == 1:    # the heading and two rows on this page, the third row on the next
        assert len(heads) == 2     # under the heading printed again
        assert heads[0][0] < breaks[0] < heads[1][0] and heads[0][1][1] < top
    else:                    # the whole grid on the next page
        assert len(heads) == 1 and breaks[0] < heads[0][0]


@pytest.mark.parametrize("rows", [
    [["1", "", ""]],
    [["1", "", ""], "a group label", ["2", "", "a long text " * 12]],
])
def test_a_grid_takes_the_height_it_is_said_to_take(rows) -> None:
    d, _ = _sheet()
    before = d.y
    d.table(MARGIN, COLS, WIDTHS, rows, "grid")
    assert before - d.y == pytest.approx(d.table_height(COLS, WIDTHS, rows))
    assert d.table_height(COLS, WIDTHS, rows) > d.table_height(COLS, WIDTHS, rows[:-1])


def test_rows_are_row_high_and_a_label_row_twelve_points() -> None:
    d, c = _sheet()
    d.table(MARGIN, COLS, WIDTHS, [["1", "", ""], "label", ["2", "", ""]], "grid")
    cells = [a for n, a, _ in c.calls if n == "rect" and a[2] == 300.0]
    _heads, first, second = cells[-3:]
    assert first[3] == second[3] == ROW_H
    assert first[1] - (second[1] + second[3]) == 12.0    # the label's line between the rows
    boxes = [a for n, a, _ in c.calls if n == "rect" and a[2] == TICK_S]
    assert len(boxes) == 2                                # one per row, none on the label
    for (x, y, _, _), row in zip(boxes, (first, second), strict=True):
        assert x == MARGIN + 60.0 + 20.0 - TICK_S / 2     # centred in the tick column
        assert y == row[1] + ROW_H / 2 - TICK_S / 2


def test_a_labelled_box_with_the_tick_mark_gets_a_tick_box() -> None:
    d, c = _sheet()
    top = d.y
    d.boxes([("below ground " + TICK, 100.0), ("height (m)", 80.0)], "boxes")
    texts = [a for n, a, _ in c.calls if n == "drawString" and a[1] == top - 8]
    assert [a[2] for a in texts] == ["below ground", "height (m)"]
    assert [a[0] for a in texts] == [MARGIN + 3, MARGIN + 103]
    boxes = [a for n, a, _ in c.calls if n == "rect" and a[2] == TICK_S]
    assert boxes == [(MARGIN + 50 - TICK_S / 2, d.y + 5, TICK_S, TICK_S)]


def test_the_helvetica_fallback_prints_marks_it_has() -> None:
    d, _ = _sheet("Helvetica", "Helvetica-Bold")
    assert d.t(f"{TICK} −0.5 mm, 20 °C, ✓ é") == "[ ] -0.5 mm, 20 °C, ? é"
    dejavu, _ = _sheet()
    assert dejavu.t(f"{TICK} −0.5 ✓") == f"{TICK} −0.5 ✓"


@pytest.mark.parametrize(("widths", "row"), [(WIDTHS, ["1", ""]), (WIDTHS[:2], None)])
def test_a_row_or_widths_short_of_the_columns_is_a_mistake_not_a_grid(widths, row) -> None:
    d, _ = _sheet()
    with pytest.raises(ValueError, match="zip"):
        d.table(MARGIN, COLS, widths, [row] if row else [], "grid")
