"""The paper form's grids read by position: each heading must sit in its own column, in order.

Looking for words anywhere in the PDF proves little (the look-up sheet prints every sign), so
these tests take the text with its place on the storey-band page and rebuild each grid's heading
row, column by column, left to right.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from pypdf import PdfReader

from triage.forms import load_form, load_forms
from triage.report.paper_form import words, write_paper_form

Frag = tuple[float, float, str]   # x, y (points from the bottom left), the text of one line

READINGS = ["#", "dir x / y", "offset mm (+/−)", "gauge mm", "sd mm", "or tilt ° (+/−)", "sd °",
            "as-built here", "where on the plan (grid, face)"]
SOUND = "sound: no crack, no sign"
# Columns that some member kinds carry between "count" and the crack width.
OPTIONAL = {"brittle (short column)", "dir (x / y / both)", "weight (in columns)"}


def _fragments(path: Path) -> list[list[Frag]]:
    pages = []
    for page in PdfReader(path).pages:
        frags: list[Frag] = []

        def visit(text, cm, tm, _font, _size, frags=frags):
            if text.strip():
                x = tm[4] * cm[0] + tm[5] * cm[2] + cm[4]
                y = tm[4] * cm[1] + tm[5] * cm[3] + cm[5]
                frags.append((round(x, 1), round(y, 1), text.strip()))

        page.extract_text(visitor_text=visit)
        pages.append(frags)
    return pages


def _columns(frags: list[Frag], top: float, bottom: float,
             right: float = float("inf")) -> list[tuple[float, str]]:
    """The heading cells strictly between two heights (left of `right`): one per left edge."""
    cells: dict[float, list[tuple[float, str]]] = {}
    for x, y, t in frags:
        if bottom < y < top and x < right:
            cells.setdefault(x, []).append((y, t))
    return [(x, " ".join(t for _, t in sorted(cells[x], reverse=True))) for x in sorted(cells)]


def _at(frags: list[Frag], text: str, below: float = float("inf")) -> Frag:
    """The highest line with exactly this text below a height."""
    hits = [f for f in frags if f[2] == text and f[1] < below]
    assert hits, (text, below)
    return max(hits, key=lambda f: f[1])


@pytest.fixture(scope="module")
def band_pages(tmp_path_factory: pytest.TempPathFactory) -> dict[str, list[list[Frag]]]:
    """Per system, the storey-band pages (one band) of its printed form, as placed lines."""
    folder = tmp_path_factory.mktemp("grid")
    out = {}
    for key, form in load_forms().items():
        path = folder / f"{key}.pdf"
        write_paper_form(form, path, storeys=1)
        out[key] = [p for p in _fragments(path)
                    if any("storey band 1 of 1" in t for _, _, t in p)]
    return out


def test_readings_grid_has_every_column_in_order(band_pages) -> None:
    for key, pages in band_pages.items():
        page = pages[0]
        head = _at(page, "Readings (residual drift)")
        first_row = _at(page, "1", below=head[1])
        notes = _at(page, "notes and photos (numbers, what they show)")   # beside the grid
        cols = _columns(page, head[1], first_row[1], right=notes[0])
        assert [t for _, t in cols] == READINGS, key
        # the row numbers sit in the first column, one under the other
        rows = [f for f in page if f[0] == cols[0][0] and f[2].isdigit() and f[1] < head[1]]
        assert [f[2] for f in sorted(rows, key=lambda f: -f[1])] == [str(i) for i in range(1, 7)]


def test_member_grids_have_every_sign_column_in_order(band_pages) -> None:
    for key, pages in band_pages.items():
        form = load_form(key)
        assert len(form.member_kinds) >= 1
        for kind in form.member_kinds:
            page = next(p for p in pages if any(f[2] == form.label_of(kind) and f[0] == 28.0
                                                for f in p))
            label = next(f for f in page if f[2] == form.label_of(kind) and f[0] == 28.0)
            sound = _at(page, SOUND, below=label[1])
            texts = [t for _, t in _columns(page, label[1], sound[1])]
            signs = [words(s) for s, _ in form.signs_for(kind)]
            tail = ["widest crack mm", "crack sd mm", *signs, "class by hand (I–V) and why"]
            assert texts[:2] == ["ref (grid mark) / where", "count"], (key, kind, texts)
            assert texts[-len(tail):] == tail, (key, kind, texts)
            middle = texts[2:-len(tail)]
            assert set(middle) <= OPTIONAL and len(middle) == len(set(middle)), (key, kind)


def test_a_missing_column_is_seen() -> None:
    """The check itself: a grid read by position tells a column that is not there."""
    frags = [(30.0, 100.0, "a"), (60.0, 100.0, "b c"), (60.0, 92.0, "d"), (90.0, 100.0, "e")]
    assert [t for _, t in _columns(frags, 110, 80)] == ["a", "b c d", "e"]
    assert [t for _, t in _columns(frags[:2] + frags[3:], 110, 80)] == ["a", "b c", "e"]
