"""The paper form's grids read by position: every column of every grid of every form.

Each grid is found by its ruled cells in the PDF's drawing operations and its heading cells are
read by the text drawn inside each one (`tests/forms/pdfgrid.py`), so a column that is removed,
or a heading that lands in the wrong cell, fails here even though the look-up sheet still prints
its words. The expected columns are typed in below, not read from the form's own tables. Row
heights are measured from the drawn cells, never from the layout's constants.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from tests.forms.conftest import CASES
from tests.forms.pdfgrid import MM, Grid, Page, cell_text, grid_under, grids, read_pages
from triage import standards
from triage.forms import Form, load_form, load_forms
from triage.report.paper_form import write_paper_form
from triage.standards.vocabulary import many, words

READINGS = ["#", "direction", "where", "offset (mm)", "gauge (mm)", "uncertainty (mm)",
            "as-built offset (mm)", "as-built uncertainty (mm)", "tilt (°)", "uncertainty (°)",
            "as-built tilt (°)", "as-built uncertainty (°)"]
HAZARDS = ["seen", "kind, and where to look", "where", "storey", "height above ground (m)",
           "note"]
CRACKED = {"reinforced concrete", "masonry"}   # materials judged by crack width
# Residual capacity beyond concrete (docs/method.md, section 4a): FEMA 352 types on a steel
# moment frame's connections; FEMA 306 modes and severities on the walls and infill panels of
# the systems whose component types it covers.
FEMA352 = {"connection": {"steel_moment_frame"}}
FEMA306 = {"wall": {"urm_wall", "urm_infill", "reinforced_masonry_wall", "rc_wall"},
           "infill": {"urm_infill"}}


def expected_member_heads(kind: str, systems: tuple[str, ...], signs: list[str]) -> list[str]:
    """The columns a member kind's grid must have, left to right (typed in, not read back)."""
    heads = ["mark", "count"]
    if kind == "column":
        heads.append("ductility: tick if brittle")
    if kind in ("wall", "brace", "infill", "connection"):
        heads.append("acts in (blank: both)")
    if kind in ("column", "wall"):
        heads.append("weight per member (blank: 1)")
    table = standards.load().systems
    if {table[s].material for s in systems} & CRACKED:
        heads += ["widest crack (mm)", "crack uncertainty (mm)"]
    steel = bool(FEMA352.get(kind, set()) & set(systems))
    walls = bool(FEMA306.get(kind, set()) & set(systems))
    if steel or walls:
        heads.append("members inspected (blank: all)")
    if steel:
        heads.append("FEMA 352 damage type (code)")
    if walls:
        heads += ["behaviour mode", "FEMA 306 severity"]
    heads += [words("signs", s) for s in signs]
    return [*heads, "class set by hand (I–V)", "why set by hand"]


def kinds_of(forms: list[Form]) -> dict[str, tuple[tuple[str, ...], list[str]]]:
    """Each kind the forms list: the systems listing it and the signs of all, in form order."""
    out: dict[str, tuple[tuple[str, ...], list[str]]] = {}
    for f in forms:
        for k in f.member_kinds:
            systems, signs = out.get(k, ((), []))
            out[k] = ((*systems, f.system),
                      signs + [s for s, _ in f.signs_for(k) if s not in signs])
    return out


@pytest.fixture(scope="module")
def printed(printed_forms) -> dict[str, list[Page]]:
    return {name: pages for name, (_, pages) in printed_forms.items()}


def _band(pages: list[Page], n: int) -> list[Page]:
    return [p for p in pages if f"storey band {n} of 2" in p.text]


def _asked(pages: list[Page], pattern: str) -> int:
    got = re.search(pattern, pages[0].text)
    assert got, pattern
    return int(got.group(1))


def _in_every_row(grid: Grid) -> None:
    """Every row has a cell under every heading cell, edge for edge."""
    for row in grid.body:
        assert [round(c.x0, 1) for c in row] == [round(c.x0, 1) for c in grid.rows[0]]
        assert round(row[-1].x1, 1) == round(grid.rows[0][-1].x1, 1)


def test_readings_grid_has_every_column_and_the_rows_asked_for(printed) -> None:
    for name, pages in printed.items():
        asked = _asked(pages, r"at least (\d+) readings a storey")
        assert asked >= 10, name
        for n in (1, 2):
            page = _band(pages, n)[0]
            (head,) = [f for f in page.frags if f.text.startswith("Readings: at least ")]
            assert head.text.startswith(f"Readings: at least {asked},"), name
            grid = grid_under(page, head)
            heads = grid.heads(page)
            assert heads == READINGS, (name, heads)
            # the uncertainty of each way of reading sits right after what it qualifies
            assert heads[heads.index("gauge (mm)") + 1] == "uncertainty (mm)"
            assert heads[heads.index("tilt (°)") + 1] == "uncertainty (°)"
            assert len(grid.body) >= asked, name
            _in_every_row(grid)
            numbers = [cell_text(page, row[0]) for row in grid.body]
            assert numbers == [str(i + 1) for i in range(len(grid.body))], name
            for row in grid.body:   # the direction column offers x and y to circle
                assert cell_text(page, row[1]).split() == ["x", "y"]


def _member_grids(band: list[Page], title: str) -> list[tuple[Page, Grid]]:
    found = []
    for page in band:
        for f in page.at(title):
            if f.x < 40:     # the grid's title, at the left margin
                found.append((page, grid_under(page, f)))
    return found


def test_member_grids_have_every_column_in_order(printed) -> None:
    vertical = standards.load().assumptions.vertical_kinds
    for name, pages in printed.items():
        forms = [load_form(s) for s in CASES[name]]
        lines = _asked(pages, r"signs seen: (\d+) lines for")
        assert lines >= 8, name
        for n in (1, 2):
            band = _band(pages, n)
            for kind, (systems, signs) in kinds_of(forms).items():
                found = _member_grids(band, many("member_kinds", kind).capitalize())
                assert len(found) == 1, (name, n, kind)    # each kind once, whole on a page
                page, grid = found[0]
                heads = grid.heads(page)
                want = expected_member_heads(kind, systems, signs)
                assert heads == want, (name, kind, heads)
                _in_every_row(grid)
                damaged = grid.body[1:]
                assert cell_text(page, grid.body[0][0]).startswith("sound ones")
                assert len(damaged) >= (lines if kind in vertical else 4), (name, kind)
                # every damaged row has a tick box in every sign column, the last one included
                boxes = page.boxes()
                first_sign = len(want) - 2 - len(signs)
                for row in damaged:
                    for cell in row[first_sign:first_sign + len(signs)]:
                        assert sum(cell.holds(b.x0, b.y0) and cell.holds(b.x1, b.y1)
                                   for b in boxes) == 1, (name, kind, heads)
                if "widest crack (mm)" in heads:   # its uncertainty right after it
                    assert heads[heads.index("widest crack (mm)") + 1] == \
                        "crack uncertainty (mm)"


def test_hazard_grid_has_every_column_and_every_hazard(printed) -> None:
    hazards = standards.load().hazards
    for name, pages in printed.items():
        (page,) = [p for p in pages if p.at("Hazards: tick what you saw, from outside all "
                                             "round and inside")]
        gs = [g for g in grids(page) if g.heads(page) == HAZARDS]
        assert len(gs) == 1, name
        grid = gs[0]
        _in_every_row(grid)
        kinds = [cell_text(page, row[1]) for row in grid.body]
        for key in hazards:
            assert sum(k.startswith(words("hazards", key) + ":") for k in kinds) == 1, key
        assert len(grid.body) == len(hazards) + 3
        boxes = page.boxes()
        for row in grid.body:
            assert any(row[0].holds(b.x0, b.y0) and row[0].holds(b.x1, b.y1) for b in boxes)


def test_every_row_to_write_in_is_at_least_8_mm_high(printed) -> None:
    for name, pages in printed.items():
        heights = [r.h for p in pages for g in grids(p) for row in g.rows for r in row]
        assert len(heights) > 100, name
        assert min(heights) >= 8 * MM, (name, min(heights) / MM)


def test_the_short_code_has_a_box_per_character(printed) -> None:
    for name, pages in printed.items():
        page = pages[0]
        assert "the first 8 characters of its id as 'triage list' and its report show them" in \
            page.text
        rows = [g for g in grids(page) if len(g.rows[0]) == 8 and len(g.rows) == 1
                and all(cell_text(page, c) == "" for c in g.rows[0])]
        assert len(rows) == 1, name
        assert all(c.h >= 8 * MM and c.w >= 7 * MM for c in rows[0].rows[0])


def test_a_missing_column_is_seen(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    """The check itself: the same reading finds a grid one column short."""
    from triage.report import paper_columns, paper_form

    full = paper_columns.reading_columns()
    monkeypatch.setattr(paper_form, "reading_columns",
                        lambda: [c for c in full if c.head != "uncertainty (°)"])
    out = tmp_path / "short.pdf"
    write_paper_form(load_forms()["rc_frame"], out, storeys=1)
    page = next(p for p in read_pages(out) if "storey band 1 of 1" in p.text)
    (head,) = [f for f in page.frags if f.text.startswith("Readings: at least ")]
    heads = grid_under(page, head).heads(page)
    assert heads != READINGS and "uncertainty (°)" not in heads
    assert len(heads) == len(READINGS) - 1
