"""Wherever a page breaks, the new page names the part of the form it continues.

Sheets come apart on site; each one's header says which part it holds. Each part of the form is
drawn on a recording canvas (`tests/forms/paper_ops.py`) with the foot of the page raised step
by step (the building block, which shares the form's first page, from ever lower down), so that
each piece of the part is, in one run or another, the one that starts a page.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence

import pytest

from tests.forms.paper_ops import Recorder
from triage.forms import Form, load_form
from triage.report import paper_form
from triage.report.paper_columns import KindGrid, kind_grids
from triage.report.paper_form import fonts
from triage.report.paper_sheet import MARGIN, PAGE_H, Sheet

Part = Callable[[Sheet, Sequence[Form], Sequence[KindGrid]], None]
PARTS: dict[str, Part] = {
    "building and inspection": lambda d, fs, gs: paper_form._building_block(d, fs, gs),
    "storey band 2 of 3 (band 1 is the lowest storey)":
        lambda d, fs, gs: paper_form._storey_band(d, fs, gs, 2, 3),
    "hazards, then signature": lambda d, fs, gs: paper_form._hazards(d, fs),
    "look-up sheet: what to look for": lambda d, fs, gs: paper_form._lookup(d, fs[0]),
}
FEET = [66.0 + 6.0 * i for i in range(60)]   # the page's foot, raised 6 points at a time
# The building block starts on the page the form starts with: it is drawn from ever lower down.
DROPS = [6.0 * i for i in range(78)]


class ShortSheet(Sheet):
    """A sheet whose body ends higher up the page."""

    foot = 66.0

    @property
    def bottom(self) -> float:
        return self.foot


def _headers(foot: float, drop: float, part: Part, forms: Sequence[Form]) -> list[str]:
    c = Recorder()
    regular, bold = fonts()
    d = ShortSheet(c=c, title="t", systems_line="for x", regular=regular, bold=bold, total=None)
    d.foot = foot
    d.new_page("before")
    d.y -= drop
    part(d, forms, kind_grids(forms))
    return [a[2].removeprefix("for x · ") for n, a, _ in c.calls
            if n == "drawString" and a[:2] == (MARGIN, PAGE_H - MARGIN - 21)]


@pytest.mark.parametrize("section", list(PARTS))
def test_every_page_a_part_starts_names_that_part(section: str) -> None:
    forms = (load_form("rc_frame"), load_form("steel_braced_frame"))
    pages = 0
    runs = ([(66.0, drop) for drop in DROPS] if section == "building and inspection"
            else [(foot, 0.0) for foot in FEET])
    for foot, drop in runs:
        headers = _headers(foot, drop, PARTS[section], forms)
        assert headers[0] == "before"
        assert set(headers[1:]) <= {section}, (foot, drop, headers)
        pages += len(headers) - 1
    assert pages > len(runs) // 2   # the part ran onto further pages, often
