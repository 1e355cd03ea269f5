"""Control and bidi characters are shown as escapes; CSV cells are never formulas."""

from __future__ import annotations

import io
import json

import pytest

from triage.safetext import SafeStream, csv_cell, is_safe, visible, visible_line

CLEAR = "\x1b[2J"
TITLE = "\x1b]0;owned\x07"                 # OSC: set the window title
RLO = "\u202e"


@pytest.mark.parametrize("raw, shown", [
    (f"Harbour{CLEAR}Flats", "Harbour\\u001b[2JFlats"),
    (f"A{TITLE}B", "A\\u001b]0;owned\\u0007B"),
    (f"{RLO}etaucave", "\\u202eetaucave"),
    ("\u2066x\u2069", "\\u2066x\\u2069"),
    ("csi\x9b31m", "csi\\u009b31m"),       # 8-bit CSI (C1)
    ("bell\x07del\x7f", "bell\\u0007del\\u007f"),
    ("back\rspace\x08", "back\\u000dspace\\u0008"),
])
def test_visible_escapes_control_and_bidi(raw, shown):
    assert visible(raw) == shown
    assert is_safe(shown) and not is_safe(raw)


def test_no_character_visible_escapes_counts_as_printable():
    """`visible` leaves a printable text as it is without its pattern: sound only while every
    character the pattern escapes is one `str.isprintable` refuses (all are in the BMP)."""
    from triage.safetext import _FIND, _UNSAFE

    assert all(ord(c) < 0x10000 for c in _UNSAFE)
    escaped = [chr(c) for c in range(0x10000) if _FIND.match(chr(c))]
    assert len(escaped) == 9 + 21 + 33 + 5 + 4
    assert not any(c.isprintable() for c in escaped)
    assert [visible(f"a{c}b") for c in escaped] == [f"a\\u{ord(c):04x}b" for c in escaped]


def test_ordinary_text_passes_unchanged_and_is_not_copied():
    text = "Kōwhai Bay — 3 storeys\n\tnote: 'ok' \\ path C:\\x"
    assert visible(text) is text
    assert visible("مدرسة ‎") == "مدرسة ‎"    # right-to-left letters stay; only overrides go


def test_visible_line_keeps_a_cell_on_one_line():
    assert visible_line("a\nb\tc\x1b") == "a\\u000ab\\u0009c\\u001b"


def test_json_through_visible_stays_the_same_json():
    data = {"building": f"X{RLO}{CLEAR}\x9b", "n": [1, "\u2067"]}
    text = json.dumps(data, ensure_ascii=False)
    shown = visible(text)
    assert is_safe(shown) and json.loads(shown) == data


@pytest.mark.parametrize("cell", ["=1+2", "+1", "-2+3", "@SUM(A1)", "\tx", "\r=1"])
def test_csv_cells_that_could_be_formulas_get_a_quote(cell):
    got = csv_cell(cell)
    assert got.startswith("'") and is_safe(got)


def test_csv_plain_cells_and_numbers_unchanged():
    assert csv_cell("Harbour Flats") == "Harbour Flats"
    assert csv_cell(-41.25) == -41.25 and csv_cell(None) is None and csv_cell(True) is True
    assert csv_cell("a=b") == "a=b"


def test_safe_stream_escapes_everything_written():
    buf = io.StringIO()
    s = SafeStream(buf)
    assert s.write(f"x{CLEAR}") == 5
    print(TITLE, file=s)
    s.flush()
    assert buf.getvalue() == "x\\u001b[2J\\u001b]0;owned\\u0007\n"
