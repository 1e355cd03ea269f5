"""The survey's limits and its rules across fields: each written once, here.

`triage.model` applies them while it validates a survey, and the store's edit API applies them
after an edit (`storey_rules` for the storey it touched, `survey_rules` always), so a file
import, `triage assess`, an edit and a screen all refuse the same input with the same line.
The rules read validated data, either model objects or their JSON dicts (`_get` takes both).
The text scan (`check_json_text`) runs before a file's JSON is parsed. docs/formats.md states
every limit in words. Pure: no I/O, no clock.
"""

from __future__ import annotations

import math
import re
from collections.abc import Callable, Iterable
from datetime import UTC, datetime
from typing import Any

from triage.errors import InputRefused
from triage.safetext import visible_line
from triage.standards import vocabulary

# --- the limits (docs/formats.md, "Limits") ------------------------------------------------

MAX_DEPTH = 20                # JSON nesting, refused before the text is parsed
MAX_DIGITS = 15               # digits before the decimal point of any number
MAX_TEXT = 2_000              # characters of a text field
MAX_NOTES = 20_000            # characters of a storey's notes or a hazard's note
MAX_STOREYS = 300
MAX_READINGS = 200            # per storey
MAX_MEMBER_GROUPS = 500       # per storey
MAX_COUNT = 10_000            # members in one group
MAX_CAPACITY = 100_000        # sum of count * weight over a storey's member groups
MAX_HAZARDS = 500
MAX_PHOTOS = 50               # per storey, member group or hazard
MIN_GAUGE_MM = 100.0
GAUGE_OVER_STOREY = 0.05      # a gauge may exceed the storey height by 5% (it spans the slab)
SHORT_GAUGE_SHARE = 0.25      # a gauge under a quarter of the storey height gets a note
MAX_SD_DEG = 5.0
MAX_CRACK_SD_MM = 5.0
MAX_HEIGHT_ABOVE_GROUND_M = 1_000.0
FIRST_YEAR = 1900             # an inspection's time lies within these years
LAST_YEAR = 2100
FIRST_YEAR_BUILT = 1000


class RuleBroken(InputRefused, ValueError):
    """A rule broken at `path` (relative to the data checked); `rule` says which, with limits."""

    def __init__(self, path: tuple[str | int, ...], rule: str) -> None:
        super().__init__(f"{format_path(path)}: {rule}" if path else rule)
        self.path = path
        self.rule = rule


# --- naming a field for a person ----------------------------------------------------------

def _get(item: Any, key: str, default: Any = None) -> Any:
    """A field of validated data, a model object or its JSON dict alike."""
    value = item.get(key, default) if isinstance(item, dict) else getattr(item, key, default)
    return default if value is None else value


def _shown(text: Any) -> str | None:
    """A short label as typed, when it can be shown plainly; else None."""
    if isinstance(text, str) and 0 < len(text) <= 20 and text.isprintable():
        return text
    return None


def format_path(path: Iterable[str | int]) -> str:
    """('storeys', 2, 'label') -> 'storeys[2].label' (the survey file's own key path)."""
    out = ""
    for t in path:
        out += f"[{t}]" if isinstance(t, int) else ("." if out else "") + str(t)
    return out


def line(path: tuple[str | int, ...], rule: str, doc: Any = None) -> str:
    """One refusal: `key.path: rule (the field in words)`, on one line."""
    if not path:
        return visible_line(f"(survey): {rule}")
    where = format_path(path)
    named = vocabulary.field_words(where, doc)
    # Labels and marks come from the file: shown with their control characters escaped, so
    # the line stays one line and cannot drive the terminal it is printed on.
    return visible_line(f"{where}: {rule}" + (f" ({named})" if named != where else ""))


# --- numbers and text (used by the model's field types) -----------------------------------

def _digits(n: int) -> int:
    return len(str(abs(n))) if abs(n) < 10 ** 4000 else 4001


def strict_number(value: Any) -> Any:
    """A finite number of at most 15 digits before the point; no true/false, no text."""
    if isinstance(value, bool):
        raise ValueError(f"{str(value).lower()} is not a number (a number is expected here)")
    if isinstance(value, int):
        if abs(value) >= 10 ** MAX_DIGITS:
            raise ValueError(f"a number of {_digits(value):,} digits; numbers have at most "
                             f"{MAX_DIGITS} digits before the point")
        return value
    if isinstance(value, float):
        if not math.isfinite(value):
            raise ValueError(f"{value} is not a number a survey may hold (only finite numbers: "
                             "no NaN or Infinity)")
        if abs(value) >= 10.0 ** MAX_DIGITS:
            raise ValueError(f"{value:g} has over {MAX_DIGITS} digits before the point "
                             f"(at most {MAX_DIGITS})")
        return value
    if isinstance(value, str):
        raise ValueError("text is not a number (write the number without quotes)")
    return value   # the field's own type check refuses it, naming the type expected


def strict_integer(value: Any) -> Any:
    """`strict_number`, and a whole number."""
    value = strict_number(value)
    if isinstance(value, float) and not value.is_integer():
        raise ValueError(f"{value:g} is not a whole number")
    return value


def plain_text(value: Any) -> Any:
    """Text that UTF-8 can hold: a lone surrogate (half of a UTF-16 pair) is refused."""
    if isinstance(value, str):
        try:
            value.encode("utf-8")
        except UnicodeEncodeError as err:
            bad = value[err.start]
            raise ValueError(f"holds a lone surrogate \\u{ord(bad):04x} at character "
                             f"{err.start + 1}, which is not text") from None
    return value


def inspection_time(value: datetime) -> datetime:
    """An inspection time within FIRST_YEAR..LAST_YEAR, in its own offset and in UTC."""
    try:
        utc_year: int | None = value.astimezone(UTC).year
    except OverflowError:   # year 9999 late in the day with a negative offset, and the like
        utc_year = None
    if utc_year is None or not (FIRST_YEAR <= value.year <= LAST_YEAR
                                and FIRST_YEAR <= utc_year <= LAST_YEAR):
        raise ValueError(f"year {value.year} is outside {FIRST_YEAR}-{LAST_YEAR}, the years an "
                         "inspection time may carry")
    return value


# --- readings -------------------------------------------------------------------------------

def reading_rules(r: Any, max_ratio: float) -> None:
    """A reading's own plausibility (the storey height is checked by `storey_rules`)."""
    gauge = _get(r, "gauge_mm")
    sd = _get(r, "sd_mm")
    if gauge is not None:
        if gauge < MIN_GAUGE_MM:
            raise RuleBroken(("gauge_mm",), f"{gauge:g} mm is under {MIN_GAUGE_MM:g} mm, the "
                             "shortest gauge accepted (check the unit: mm)")
        if sd is not None and sd > gauge:
            raise RuleBroken(("sd_mm",), f"{sd:g} mm is more than the gauge, {gauge:g} mm")
        bsd = _get(r, "baseline_sd_mm")
        if bsd is not None and bsd > gauge:
            raise RuleBroken(("baseline_sd_mm",),
                             f"{bsd:g} mm is more than the gauge, {gauge:g} mm")
        base = _get(r, "baseline_mm")
        if base is not None and abs(base) / gauge >= max_ratio:
            raise RuleBroken(("baseline_mm",), f"the baseline's ratio {abs(base) / gauge:.1%} is "
                             f"{max_ratio:.0%} or more, beyond the largest drift ratio accepted")
    base_deg = _get(r, "baseline_deg")
    if base_deg is not None and abs(math.tan(math.radians(base_deg))) >= max_ratio:
        ratio = abs(math.tan(math.radians(base_deg)))
        raise RuleBroken(("baseline_deg",), f"the baseline's ratio {ratio:.1%} is {max_ratio:.0%} "
                         "or more, beyond the largest drift ratio accepted")


def too_large_drift(ratio: float, max_ratio: float) -> str:
    """The refusal of a drift ratio (baseline subtracted) at or over the largest accepted."""
    return (f"drift ratio {abs(ratio):.1%} (baseline subtracted) is {max_ratio:.0%} or more: "
            "refused as a mis-entry (check offset and gauge units, mm); a lean that large is "
            "recorded as a visible_lean hazard, not as a reading")


# --- a storey ---------------------------------------------------------------------------------

def _size(items: Any, limit: int, path: tuple[str | int, ...], what: str, per: str) -> None:
    if isinstance(items, list | tuple) and len(items) > limit:
        raise RuleBroken(path, f"{len(items):,} {what}; {per} at most {limit:,}")


def storey_sizes(st: Any) -> None:
    """Readings and member groups per storey (checked before their items are)."""
    if not isinstance(st, dict) and not hasattr(st, "readings"):
        return
    _size(_get(st, "readings"), MAX_READINGS, ("readings",), "readings", "a storey holds")
    _size(_get(st, "members"), MAX_MEMBER_GROUPS, ("members",), "member groups",
          "a storey holds")


def storey_rules(st: Any) -> None:
    """The rules across one storey's items; paths relative to the storey."""
    storey_sizes(st)
    height = _get(st, "height_m")
    if isinstance(height, int | float):
        longest = height * 1000.0 * (1 + GAUGE_OVER_STOREY)
        for ri, r in enumerate(_get(st, "readings", ())):
            gauge = _get(r, "gauge_mm")
            if gauge is not None and gauge > longest:
                raise RuleBroken(("readings", ri, "gauge_mm"), (
                    f"{gauge:g} mm is longer than the storey ({height:g} m) plus "
                    f"{GAUGE_OVER_STOREY:.0%}, {longest:,.0f} mm"))
    seen: dict[str, int] = {}
    total = 0.0
    for mi, m in enumerate(_get(st, "members", ())):
        ref = _get(m, "ref")
        if isinstance(ref, str) and ref.strip():
            key = " ".join(ref.split()).casefold()
            if key in seen:
                raise RuleBroken(("members", mi, "ref"), (
                    f"{ref!r} is also the mark of member group {seen[key] + 1}; a mark is "
                    "used once in a storey"))
            seen[key] = mi
        total += _get(m, "count", 0) * _get(m, "weight", 1.0)
    if total > MAX_CAPACITY:
        raise RuleBroken(("members",), (
            f"the sum of count times weight is {total:,.0f}; a storey holds at most "
            f"{MAX_CAPACITY:,}"))


def capacity_rules(m: Any, modes: tuple[str, ...]) -> None:
    """The keys of residual capacity beyond concrete on one member group (docs/formats.md).

    `inspected` at most `count`, and at least one when damage is recorded; `connection_type`
    on connection groups only; `mode` and `severity` on wall and infill groups only, `mode`
    one of `modes` (the FEMA 306 modes of the group's kind).
    """
    kind = _get(m, "kind")
    seen = _get(m, "inspected")
    count = _get(m, "count")
    if seen is not None and isinstance(count, int) and seen > count:
        raise RuleBroken(("inspected",), f"{seen:,} inspected of a group of {count:,}; at most "
                         "its count")
    if seen == 0 and (_get(m, "crack_mm") or _get(m, "signs") or _get(m, "damage_class")
                      or _get(m, "connection_type") or _get(m, "severity")):
        raise RuleBroken(("inspected",), "none inspected, yet damage is recorded; a crack, "
                         "sign, class, type or severity needs at least one member seen")
    if _get(m, "connection_type") is not None and kind != "connection":
        raise RuleBroken(("connection_type",), f"a FEMA 352 damage type belongs on a connection "
                         f"group, not on a {kind}")
    for key, what in (("mode", "behaviour mode"), ("severity", "severity")):
        if _get(m, key) is not None and kind not in ("wall", "infill"):
            raise RuleBroken((key,), f"a FEMA 306 {what} belongs on a wall or infill group, not "
                             f"on a {kind}")
    mode = _get(m, "mode")
    if mode is not None and mode not in modes:
        what = vocabulary.words("member_kinds", kind)
        raise RuleBroken(("mode",), f"{_said('wall_modes', mode, repr)} is not a FEMA 306 mode of "
                         f"{'an' if what[:1] in 'aeiou' else 'a'} {what}; mode must be one of: "
                         f"{', '.join(_said('wall_modes', k) for k in modes)}")


def _said(section: str, key: str, show: Callable[[str], str] = str) -> str:
    """A key as a file holds it, with its words where they differ: 'toe_crushing (toe crushing)'."""
    said = vocabulary.words(section, key)
    return show(key) if said == key else f"{show(key)} ({said})"


# --- the whole survey -----------------------------------------------------------------------

def survey_sizes(doc: Any) -> None:
    """Storeys and hazards of a survey (checked before their items are)."""
    if not isinstance(doc, dict) and not hasattr(doc, "storeys"):
        return
    _size(_get(doc, "storeys"), MAX_STOREYS, ("storeys",), "storeys", "a survey holds")
    _size(_get(doc, "hazards"), MAX_HAZARDS, ("hazards",), "hazards", "a survey holds")


def survey_rules(doc: Any) -> None:
    """The rules across the survey's parts (each storey's own: `storey_rules`)."""
    storeys = _get(doc, "storeys")
    if not isinstance(storeys, list | tuple) or not storeys:
        raise RuleBroken(("storeys",), "a survey keeps at least one storey")
    survey_sizes(doc)
    seen: set[str] = set()
    above: Any = None
    for i, st in enumerate(storeys):
        lab = _get(st, "label")
        if lab in seen:
            raise RuleBroken(("storeys", i, "label"), f"{lab!r} is used twice; labels are unique")
        seen.add(lab)
        if not _get(st, "below_grade", False):
            above = lab if above is None else above
        elif above is not None:
            raise RuleBroken(("storeys", i, "below_grade"), (
                f"a storey below grade stands above storey {above!r}, which is above grade; "
                "storeys run bottom to top, below-grade ones first"))
    labels = [str(_get(st, "label")) for st in storeys]
    for i, h in enumerate(_get(doc, "hazards", ())):
        s = _get(h, "storey")
        if s is not None and s not in seen:
            raise RuleBroken(("hazards", i, "storey"),
                             f"{s!r} names no storey (storeys: {', '.join(labels)})")
    inspection = _get(doc, "inspection")
    prev = _get(inspection, "previous")
    if prev is not None and str(prev) == str(_get(doc, "id")):
        raise RuleBroken(("inspection", "previous"), "a survey cannot follow itself")
    built = _get(_get(doc, "building"), "year_built")
    at = _get(inspection, "at")
    year = _year(at)
    if built is not None and year is not None and built > year:
        raise RuleBroken(("building", "year_built"),
                         f"{built} is after the inspection ({year}); a building is inspected "
                         "after it is built")


def _year(at: Any) -> int | None:
    if isinstance(at, datetime):
        return at.year
    if isinstance(at, str):
        m = re.match(r"(\d{4})-", at)
        return int(m.group(1)) if m else None
    return None


# --- notes the assessment carries (kept, not refused) ---------------------------------------

def short_gauge_notes(storeys: Any) -> list[str]:
    """One note per offset reading whose gauge is under a quarter of its storey's height."""
    out = []
    for st in storeys:
        height = _get(st, "height_m")
        label = _shown(_get(st, "label"))
        for ri, r in enumerate(_get(st, "readings", ())):
            gauge = _get(r, "gauge_mm")
            if gauge is None or not isinstance(height, int | float):
                continue
            if gauge < SHORT_GAUGE_SHARE * height * 1000.0:
                where = f"storey {label}" if label else "a storey"
                out.append(
                    f"{where}, reading {ri + 1}: gauge {gauge:g} mm is under a quarter of the "
                    f"storey height ({height:g} m); a short gauge reads local out-of-plumb as "
                    "much as storey drift")
    return out


# --- the text of a file, before it is parsed --------------------------------------------------

_STRING = re.compile(r'"[^"\\]*(?:\\.[^"\\]*)*"', re.DOTALL)
_BRACKET = re.compile(r"[\[\]{}]")
_DIGITS = re.compile(r"\d{" + str(MAX_DIGITS + 1) + r",}")


def _long_number(masked: str) -> re.Match[str] | None:
    """The first run of too many digits before a number's point (not a fraction, exponent)."""
    for m in _DIGITS.finditer(masked):
        before = masked[m.start() - 1] if m.start() else " "
        if before == "-":
            before = masked[m.start() - 2] if m.start() > 1 else " "
        if before not in ".eE+" and not before.isalnum():
            return m
    return None


def check_json_text(text: str) -> None:
    """Refuse nesting over MAX_DEPTH and numbers over MAX_DIGITS digits, before parsing.

    Raises `RuleBroken` with an empty path and a rule naming the line and column. Text inside
    strings is blanked first (same length, so positions hold), then scanned with regexes.
    """
    masked = _STRING.sub(lambda m: '"' + " " * (len(m.group()) - 2) + '"', text)
    long = _long_number(masked)
    depth = 0
    for m in _BRACKET.finditer(masked):
        if long is not None and m.start() > long.start():
            break   # the long number comes first
        if m.group() in "[{":
            depth += 1
            if depth > MAX_DEPTH:
                raise RuleBroken((), f"{_where(text, m.start())}: JSON nested over {MAX_DEPTH} "
                                 f"levels deep (a survey needs at most {MAX_DEPTH})")
        else:
            depth -= 1
    if long is not None:
        n = len(long.group())
        raise RuleBroken((), f"{_where(text, long.start())}: a number of {n:,} digits before "
                         f"the point; numbers have at most {MAX_DIGITS}")


def _where(text: str, pos: int) -> str:
    line_no = text.count("\n", 0, pos) + 1
    col = pos - (text.rfind("\n", 0, pos) + 1) + 1
    return f"line {line_no} column {col}"
