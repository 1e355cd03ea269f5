r"""Text tables whose columns line up on a terminal: widths measured in cells, as rich does.

A building's name may hold wide characters (CJK, emoji: two cells each), combining marks
(`o` + U+0304 reads `ō` in one cell) or the tier marks ○◐●; padding by `len` would push every
column after it out of line. Each cell is measured and cut by display width with rich's own
functions (`rich.cells.cell_len`, `set_cell_size`: grapheme clusters kept whole), so a column
starts at the same terminal column on every row.

Why not `rich.table.Table`: it lays out every row through its renderable machinery, about
1.5 ms a row here, 15 s for the 10,000 buildings `triage summary` must print within a second;
these few lines give the same column positions at a few microseconds a row.

Every cell goes through `triage.safetext.visible_line` before it is measured, so a control
or bidi character (and a newline or tab, which would break the row) is shown as `\uXXXX` and
counted at the width it is shown with.
"""

from __future__ import annotations

import re
from collections.abc import Sequence

from rich.cells import cell_len, set_cell_size

from triage.safetext import visible_line

GAP = "  "   # between columns
MORE = "…"   # ends a cell cut to its column


# A character that may not take exactly one cell, or is not safe as it is. Below U+0300,
# every printable character takes one cell in rich's table (a test checks it): ASCII,
# Latin-1 and the Latin extensions, Māori's macrons among them; the combining marks start at
# U+0300. Controls, DEL, C1 and the soft hyphen (U+00AD) are left out of the class.
NOT_PLAIN = re.compile("[^\x20-\x7e\xa0-\xac\xae-\u02ff]")


def plain(text: str) -> bool:
    """Whether every character of `text` takes one cell and is safe as it is.

    Then `len` measures it; anything else is measured by rich.
    """
    return NOT_PLAIN.search(text) is None


def width(text: str) -> int:
    """The terminal cells `text` takes once made visible."""
    return len(text) if plain(text) else cell_len(visible_line(text))


def fit(text: str, cells: int) -> str:
    """`text` made visible and padded or cut (ending in `…`) to exactly `cells` cells."""
    if plain(text):
        n = len(text)
        return text + " " * (cells - n) if n <= cells else text[:cells - 1] + MORE
    text = visible_line(text)   # wide, zero-width or unsafe characters: rich measures
    n = cell_len(text)
    if n <= cells:
        return text + " " * (cells - n)
    return set_cell_size(text, cells - 1) + MORE


def row(cells: Sequence[str], widths: Sequence[int]) -> str:
    """One line: each cell fitted to its width, the last one as wide as it is (no padding).

    `widths` has one entry fewer than `cells` or as many; the last cell is cut only when
    `widths` names a width for it.
    """
    parts = [fit(c, w) for c, w in zip(cells, widths, strict=False)]
    if len(cells) > len(widths):
        parts.append(visible_line(cells[-1]))
    else:
        parts[-1] = parts[-1].rstrip(" ")
    return GAP.join(parts)


def table(headers: Sequence[str], rows: Sequence[Sequence[str]],
          limits: Sequence[int | None] | None = None) -> list[str]:
    """Header and rows, each column as wide as its widest cell (at most its limit, if any).

    The last column is not padded, so no line ends in spaces.
    """
    n = len(headers)
    limits = list(limits) if limits is not None else [None] * n
    widths = []
    for i in range(n):
        w = max([width(headers[i]), *(width(r[i]) for r in rows)])
        cap = limits[i]
        widths.append(w if cap is None else min(w, cap))
    return [row(headers, widths), *(row(r, widths) for r in rows)]
