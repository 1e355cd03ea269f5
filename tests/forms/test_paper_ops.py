"""The paper form's drawing, call by call: the reviewed layout, and what every page must hold.

`tests/forms/paper_ops.py` records every call the form makes on its canvas. The first test
compares that record with the reviewed one (`paper_ops_mixed.txt`): a line width, a font size,
a grey or a coordinate that changes fails it, with the first differences shown; the second does
the same for every system's form by digest. A change meant is written again with
`python -m tests.forms.paper_ops --write` and its diff read before it is committed. The other
tests say, for every system's form, what no reviewed record may break: each page carries the
caution band at its foot and its header at its head, nothing is drawn over the band or past the
margins, and the only colours are black and the hints' grey.

Each test records in its own (function-scoped) fixture: a test only reading another test's
recording would not be linked by the mutation benchmark to the code that drew it.
"""

from __future__ import annotations

import difflib
from pathlib import Path

import pytest

from tests.forms.conftest import CASES
from tests.forms.paper_ops import (
    EVERY_STOREYS,
    GOLDEN,
    SYSTEMS,
    Recorder,
    digest,
    read_digests,
    record,
)
from triage.assess import CAUTION
from triage.report.paper_sheet import CAUTION_H, HINT_GREY, MARGIN, PAGE_H, PAGE_W, PAPER_NOTE
from triage.standards.vocabulary import words

EPS = 0.01
TOP = PAGE_H - MARGIN


@pytest.fixture
def mixed(tmp_path: Path) -> tuple[list[str], list[str], int, list[Recorder]]:
    """The reviewed record, the record made now, and what `write_paper_form` returned."""
    pages, made = record(tmp_path)
    return GOLDEN.read_text(encoding="utf-8").splitlines(), made[-1].lines(), pages, made


def test_the_layout_is_the_one_reviewed(mixed) -> None:
    want, got, _, _ = mixed
    if got != want:
        diff = list(difflib.unified_diff(want, got, "paper_ops_mixed.txt", "drawn now",
                                         n=1, lineterm=""))
        pytest.fail("the form's drawing changed (python -m tests.forms.paper_ops --write "
                    "if meant):\n" + "\n".join(diff[:60]))


def test_the_page_count_is_counted_before_it_is_printed(mixed) -> None:
    _, got, pages, made = mixed
    first, last = made
    assert SYSTEMS == ("rc_frame", "steel_braced_frame")
    assert pages == 8 == got.count("showPage()")
    # the first pass only counts: the same pages, no metadata, never saved
    assert [n for n, _, _ in first.calls].count("showPage") == pages
    assert not any(n.startswith(("set" + "Title", "save")) for n, _, _ in first.calls)
    assert [f"page {i} of 8" for i in range(1, 9)] == [
        a[2] for n, a, _ in last.calls if n == "drawRightString" and a[0] == PAGE_W - MARGIN]


Calls = list[tuple[str, tuple, dict]]


@pytest.fixture
def every(tmp_path: Path) -> dict[str, tuple[list[Calls], list[str]]]:
    """Per case (every system, and the building of two), the last pass's calls page by page,
    and its record as lines."""
    out = {}
    for name, systems in CASES.items():
        _, made = record(tmp_path, systems, storeys=EVERY_STOREYS)
        pages: list[Calls] = [[]]
        for call in made[-1].calls:
            if call[0] == "showPage":
                pages.append([])
            else:
                pages[-1].append(call)
        assert pages[-1] == [("save", (), {})]
        out[name] = (pages[:-1], made[-1].lines())
    return out


def test_every_systems_layout_is_the_one_reviewed(every) -> None:
    got = {name: digest(lines) for name, (_, lines) in every.items()}
    changed = sorted(k for k, v in read_digests().items() if got.get(k) != v)
    assert set(got) == set(read_digests())
    assert not changed, ("the form's drawing changed for these cases (python -m "
                         "tests.forms.paper_ops --write if meant)", changed)


def test_every_page_has_its_header_and_the_caution_band_at_its_foot(every) -> None:
    for name, (pages, _) in every.items():
        n = len(pages)
        systems = CASES[name]
        line = (f"for {words('systems', systems[0])}" if len(systems) == 1 else
                f"for {words('systems', systems[0])} (x), {words('systems', systems[1])} (y)")
        assert n >= 5, name
        for i, calls in enumerate(pages, start=1):
            texts = {(a[0], a[1]): a[2] for c, a, _ in calls if c in ("drawString",
                                                                       "drawRightString")}
            assert texts[(PAGE_W - MARGIN, TOP - 10)] == f"page {i} of {n}", (name, i)
            assert texts[(MARGIN, TOP - 10)].startswith("triage · paper field form · ")
            assert texts[(MARGIN, TOP - 21)].startswith(f"{line} · "), (name, i)
            assert texts[(MARGIN + 8, MARGIN + CAUTION_H - 12)] == CAUTION, (name, i)
            assert texts[(MARGIN + 8, MARGIN + 7)] == PAPER_NOTE, (name, i)
            band = [a for c, a, _ in calls if c == "rect" and a[:2] == (MARGIN, MARGIN)]
            assert band == [(MARGIN, MARGIN, PAGE_W - 2 * MARGIN, CAUTION_H)], (name, i)


def test_nothing_is_drawn_over_the_band_or_past_the_margins(every) -> None:
    foot = MARGIN + CAUTION_H
    for name, (pages, _) in every.items():
        for i, calls in enumerate(pages, start=1):
            drawn = 0
            for c, a, _ in calls:
                if c == "rect" and a[:2] != (MARGIN, MARGIN):
                    x, y, w, h = a
                    assert x >= MARGIN - EPS and x + w <= PAGE_W - MARGIN + EPS, (name, i, a)
                    assert foot < y and y + h <= TOP, (name, i, a)
                    drawn += 1
                elif c in ("drawString", "drawRightString") and a[1] > foot:
                    assert MARGIN - EPS <= a[0] <= PAGE_W - MARGIN + EPS, (name, i, a)
                    assert a[1] <= TOP, (name, i, a)
                    drawn += 1
                elif c == "drawString":   # in the band: only its two lines
                    assert a[2] in (CAUTION, PAPER_NOTE), (name, i, a)
            assert drawn > 0, (name, i)


def test_black_ink_and_the_hint_grey_only(every) -> None:
    for name, (pages, _) in every.items():
        fills, strokes = set(), set()
        for calls in pages:
            fills |= {a[0] for c, a, _ in calls if c == "setFillGray"}
            strokes |= {a[0] for c, a, _ in calls if c == "setStrokeGray"}
            assert not {c for c, _, _ in calls} & {"setFillColor", "setFillColorRGB",
                                                   "setStrokeColor", "setStrokeColorRGB",
                                                   "setFillColorCMYK", "setStrokeColorCMYK"}
        assert fills == {0.0, HINT_GREY} and strokes == {0.0}, (name, fills, strokes)
