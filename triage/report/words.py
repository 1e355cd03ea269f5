"""How the report writes numbers, times, citations and engine lines. Pure: no reportlab.

Shared by the report model (`model.py`, `rows.py`, `method.py`) and the comparison PDF's
model (`compare_model.py`), so a figure reads the same way on every page.
"""

from __future__ import annotations

import re
from datetime import datetime
from typing import Any

from triage.model import Survey
from triage.standards import Source
from triage.standards.vocabulary import plain_text

DASH = "—"
CLIP = 300  # longest text put in a table cell; longer ones are printed in full under Notes
CLIPPED = "… (in full under Notes)"


def pct(v: float | None) -> str:
    """A drift ratio as a percentage (two decimals under 1%), a dash when unmeasured."""
    if v is None:
        return DASH
    p = v * 100.0
    return f"{p:.2f}%" if abs(p) < 1.0 else f"{p:.1f}%"


def pct_figure(p: float) -> str:
    """A published figure given in percent, to two significant decimals at most.

    0.333333 reads "0.33%", 0.208333 "0.21%", 0.2 "0.2%", 1.0 "1%": a tolerance is a rough
    figure, and six decimals would claim a precision it never had.
    """
    text = f"{p:.2f}".rstrip("0").rstrip(".")
    return f"{text}%"


def edition_text(edition: str) -> str:
    """An edition without nested brackets: "2012 (2nd ed. 2018)" reads "2012; 2nd ed. 2018"."""
    return re.sub(r"\s*\(([^()]*)\)", r"; \1", edition).strip()


def cite(source: Source) -> str:
    """Document (edition) table, with the edition flattened so brackets never nest."""
    table = f" {source.table}" if source.table else ""
    return f"{source.document} ({edition_text(source.edition)}){table}"


def when_text(at: datetime, seconds: bool = False) -> str:
    """A time as people read it, with its zone: '1 December 2026, 14:05 UTC+13:00'.

    `seconds` adds them (a signing time: '1 December 2026, 20:00:05 UTC').
    """
    off = at.utcoffset()
    zone = ""
    if off is not None:
        mins = int(off.total_seconds() // 60)
        sign = "+" if mins >= 0 else "-"
        zone = "UTC" if mins == 0 else f"UTC{sign}{abs(mins) // 60:02d}:{abs(mins) % 60:02d}"
    clock = f"{at:%H:%M:%S}" if seconds else f"{at:%H:%M}"
    return f"{at.day} {at:%B %Y}, {clock} {zone}".strip()


def when_iso_text(text: str) -> str:
    """An ISO 8601 time (as the comparison format keeps it) as people read it; else as given."""
    try:
        return when_text(datetime.fromisoformat(text))
    except ValueError:
        return text


_FILE = re.compile(r"\b[\w-]+\.(?:toml|json)\b")


def in_words(text: str, survey: Survey | None = None) -> str:
    """A line of the engine in the shared vocabulary's words: no internal key is left in it.

    `vocabulary.plain_text` does the work (paths, keys, field names with their units); a data
    file's name (damage_floors.toml, survey.json) is a name a reader can open and stays.
    """
    out, at = [], 0
    for m in _FILE.finditer(text):
        out += [plain_text(text[at:m.start()], survey), m.group(0)]
        at = m.end()
    return "".join([*out, plain_text(text[at:], survey)])


def num(v: float) -> str:
    """A number as typed (no trailing zeros)."""
    return f"{v:g}"


def ratio_pm(value: float, u: float) -> str:
    """A signed drift ratio and its standard uncertainty, in percent."""
    return f"{value * 100:+.3f}% ± {u * 100:.3f}%"


def value_text(v: Any) -> str:
    """An assumption's value in words: a mapping as 'key → value' pairs, keys in words."""
    if isinstance(v, dict):
        if any(isinstance(w, dict) for w in v.values()):
            return "; ".join(f"{in_words(str(k))}: {value_text(w)}" for k, w in v.items())
        return ", ".join(f"{in_words(str(k))} → {value_text(w)}" for k, w in v.items())
    if isinstance(v, list | tuple):
        return ", ".join(in_words(str(w)) for w in v)
    return in_words(str(v))


class Clipper:
    """Shortens text for table cells, keeping every full text for the Notes section."""

    def __init__(self) -> None:
        self.full: list[tuple[str, str]] = []

    def __call__(self, what: str, text: str) -> str:
        """`text` as a cell shows it; a longer one is kept in full under `what`."""
        if len(text) <= CLIP:
            return text
        self.full.append((what, text))
        return text[:CLIP - len(CLIPPED)].rstrip() + CLIPPED
