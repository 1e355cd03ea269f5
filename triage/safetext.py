r"""Text that cannot be turned against its reader: terminals and spreadsheets.

A survey is written by whoever wrote the file, so a building name may carry `ESC [ 2 J` (clear
the screen), an OSC sequence (set the window title, write the clipboard) or a right-to-left
override that makes `evacuate` read as something else. Every piece of text that reaches a
terminal goes through `visible`, which shows these characters as escapes instead of sending
them raw:

- C0 controls but newline and tab (U+0000–U+001F), DEL (U+007F) and C1 controls
  (U+0080–U+009F, 8-bit CSI among them): `\u001b`, `\u009b`, ...
- bidirectional embeddings, overrides and isolates (U+202A–U+202E, U+2066–U+2069).

The escape is written as `\uXXXX`, the form JSON uses, so JSON output passed through
`visible` stays valid JSON with the same data. `visible_line` also shows newline and tab, for
one-line cells (a table row, a status line).

`csv_cell` guards a spreadsheet: a cell beginning with `=`, `+`, `-`, `@`, tab or carriage
return gets a leading `'`, so no cell is taken for a formula.

Imports nothing: the screens use the same functions.
"""

from __future__ import annotations

import re
from typing import Any

_UNSAFE = "\x00-\x08\x0b-\x1f\x7f-\x9f\u202a-\u202e\u2066-\u2069"
_FIND = re.compile(f"[{_UNSAFE}]")
_FIND_LINE = re.compile(f"[{_UNSAFE}\t\n]")


def _escape(m: re.Match[str]) -> str:
    return f"\\u{ord(m.group()):04x}"


def visible(text: str) -> str:
    r"""`text` with control and bidi-override characters shown as `\uXXXX` (newline, tab kept)."""
    # The common case: one scan, no copy. `isprintable` is false for every character escaped
    # here (the controls are category Cc, the bidi ones Cf; a test checks them all) and scans
    # a few times faster than the pattern (tens of megabytes of a GeoJSON summary); a newline
    # stops it at once, and the pattern decides.
    if text.isprintable() or _FIND.search(text) is None:
        return text
    return _FIND.sub(_escape, text)


def visible_line(text: str) -> str:
    """`visible`, and newline and tab shown too: for text that must stay on one line."""
    if _FIND_LINE.search(text) is None:
        return text
    return _FIND_LINE.sub(_escape, text)


def is_safe(text: str) -> bool:
    """Whether `visible` would leave `text` as it is."""
    return _FIND.search(text) is None


_FORMULA_START = ("=", "+", "-", "@", "\t", "\r")


def csv_cell(value: Any) -> Any:
    """A CSV cell a spreadsheet shows as text: `'` before `= + - @`, tab or CR; text made visible.

    Numbers, booleans and None pass as they are (a negative number is a number, not a formula).
    """
    if not isinstance(value, str):
        return value
    if value.startswith(_FORMULA_START):
        value = "'" + value
    return visible(value)


class SafeStream:
    """A text stream that passes everything written through `visible` to the stream it wraps."""

    def __init__(self, stream: Any) -> None:
        self._stream = stream

    def write(self, text: str) -> int:
        """Write `text`, escaped; returns the length of `text` as given."""
        self._stream.write(visible(text))
        return len(text)

    def writelines(self, lines: Any) -> None:
        """Write each line, escaped."""
        for line in lines:
            self.write(line)

    @property
    def wrapped(self) -> Any:
        """The stream written to."""
        return self._stream

    def __getattr__(self, name: str) -> Any:   # flush, isatty, encoding, fileno, ...
        return getattr(self._stream, name)
