"""Tables line up by display width: wide, combining and control characters, measured as rich
does."""

from __future__ import annotations

import pytest
from rich.cells import cell_len, get_character_cell_size

from tests.cli.conftest import write_json
from tests.helpers import clone, two_storey_frame
from triage.cli.table import NOT_PLAIN, fit, plain, row, table, width
from triage.safetext import is_safe

NAMES = [
    "Harbour Flats",                       # ASCII
    "Kōwhai Bay Library",                  # precomposed macron: one cell
    "Ko\u0304whai Hall",                    # o + combining macron: one cell, two characters
    "港湾倉庫 Harbour Store",               # CJK: two cells each
    "Café 👩‍👩‍👧 Family Rooms",             # an emoji family joined by ZWJ: two cells
    "e\u0301" * 40,                         # forty combining accents, longer than any column
    "Harbour\x1b[2J Flats\u202e",           # escape sequence and bidi override
    "two\nlines\tand a tab",                # would break the row
    "○◐● marks",                            # the tier marks: one cell each
    "",
]


@pytest.mark.parametrize("text", NAMES)
@pytest.mark.parametrize("cells", [1, 5, 12, 28])
def test_fit_gives_exactly_the_width_asked(text, cells):
    got = fit(text, cells)
    assert cell_len(got) == cells, (text, got)
    assert "\x1b" not in got and "\n" not in got and "\u202e" not in got
    if width(text) <= cells:
        assert got.rstrip(" ") == fit(text, width(text)).rstrip(" ")
    else:
        assert got.rstrip(" ").endswith("…")


def test_a_cut_keeps_combining_marks_with_their_letter():
    assert fit("Ko\u0304whai Hall", 4) == "Ko\u0304w…"
    assert fit("港湾倉庫", 4) == "港 …"     # a wide character never split: a space pads


def test_plain_is_exactly_the_one_cell_printable_range_of_rich():
    """Every character `plain` lets through takes one cell in rich's table and is safe."""
    for c in range(0x0, 0x3000):
        ch = chr(c)
        if plain(ch):
            assert get_character_cell_size(ch) == 1 and is_safe(ch), hex(c)
    assert not plain("\u0300") and not plain("\u00ad") and not plain("\x7f")
    assert NOT_PLAIN.search("Kōwhai Bay, Ōtaki") is None


def test_rows_line_up_whatever_the_names():
    rows = [(name, "2026-11-29T09:00:00+13:00", "◐ hold") for name in NAMES]
    lines = table(("building", "inspected", "tier"), rows, limits=(20, None, None))
    starts = set()
    for line in lines:
        at = line.index("inspected") if line.startswith("building") else line.index("2026")
        starts.add(cell_len(line[:at]))
    assert starts == {22}            # 20 cells and the gap, on every row
    assert all("\n" not in line and not line.endswith(" ") for line in lines)


def test_row_leaves_the_last_cell_free_or_cut():
    assert row(("a", "b", "tail text"), (3, 3)) == "a    b    tail text"
    assert row(("a", "b", "tail text"), (3, 3, 4)) == "a    b    tai…"


def _columns(line: str, marks: list[str]) -> list[int]:
    return [cell_len(line[:line.index(m)]) for m in marks]


def test_list_and_summary_columns_line_up_with_wide_and_combining_names(tmp_path, cli):
    db = str(tmp_path / "f.db")
    for i, name in enumerate(NAMES[:9]):
        d = clone(two_storey_frame())
        d["building"]["name"] = name or "x"
        d["inspection"]["inspector"]["name"] = f"{name[:6]} 検査" if i % 2 else "Tess Tester"
        d["building"]["address"] = f"{i} Ko\u0304whai Road, 港湾"
        code, _, err = cli("--db", db, "import", str(write_json(tmp_path / f"{i}.json", d)))
        assert code == 0, err
    listed = cli("--db", db, "list")[1].splitlines()
    rows = [line for line in listed if "2026-11-29T09:00:00+13:00" in line]
    assert len(rows) == 9
    cols = {tuple(_columns(r, ["2026-11-29", "◐ hold"])) for r in rows}
    header = listed[2]
    assert cols == {tuple(_columns(header, ["inspected", "tier"]))}
    summary = cli("--db", db, "summary")[1].splitlines()
    rows = [line for line in summary if "2026-11-29T09:00:00+13:00" in line]
    assert len(rows) == 9
    header = summary[2]
    marks = ["location", "inspected", "inspector", "tier", "level"]
    want = _columns(header, marks)
    for r in rows:
        got = _columns(r, ["—", "2026-11-29"])
        assert got == want[:2], r
        assert cell_len(r[:r.index("◐ hold")]) == want[3], r
