"""The area picture: one row per building id, its latest survey, from stored assessments.

Nothing here assesses: tier, level and governing storey are the columns stored with each
survey after its last recompute. A building is flagged `conflict` while two versions of one of
its surveys (kept by a merge) are both visible.

`TEXT_COLUMNS` is the text summary's table, for `triage summary` and for a reader that lays
the rows out itself (`AreaLines`: the centre does the per-building work on its server, so
100,000 buildings never become 100,000 Python objects).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from typing import TYPE_CHECKING, NamedTuple, Protocol, runtime_checkable

if TYPE_CHECKING:
    from .core import StoreCore

# The text summary's columns: heading, width (padded with spaces to it; 0: the last column),
# and whether a longer value is cut to the width with "…" (else it runs on).
TEXT_COLUMNS: tuple[tuple[str, int, bool], ...] = (
    ("building", 24, True), ("address", 28, True), ("location", 19, False),
    ("inspected", 25, False), ("inspector", 16, True), ("tier", 12, False),
    ("level", 9, False), ("governing", 9, False), ("provisional", 11, False),
    ("conflict", 0, False))
TEXT_GAP = "  "
NONE_MARK = "—"     # an empty cell


@dataclass(frozen=True)
class AreaTally:
    """The summary's counts: buildings, per tier (None: not assessed), with a conflict."""

    buildings: int
    tiers: dict[str | None, int]
    conflicts: int


NOT_ASSESSED = "not assessed"


def tier_text(tier: str | None) -> str:
    """A tier's words in the summary (with our mark); "not assessed" for None."""
    from triage.assess import tier_words

    return tier_words(tier) if tier else NOT_ASSESSED


@runtime_checkable
class AreaLines(Protocol):
    """A reader that does the summary's per-building work itself (the centre, in SQL).

    Its words are `tier_text`'s and its caution `triage.assess.CAUTION`, as the command's.
    """

    def summary_lines(self, lay_out: Callable[[list[BuildingRow]], list[str]]
                      ) -> tuple[AreaTally, str]:
        """The counts and the text's building rows (joined by newlines, in order), one reading.

        Rows the reader cannot lay out as the command does (wide or unsafe characters in a
        person's text) are given to `lay_out`, which returns their lines.
        """
        ...

    def summary_features(self) -> tuple[str, list[tuple[str, str]]]:
        """The located buildings' GeoJSON Features joined by ", ", and each one left out.

        A Feature reads as `json.dumps` writes it, in the summary's order, with the caution
        as its last property; a building left out (no location) is (name, id).
        """
        ...


class BuildingRow(NamedTuple):
    """A building and the state of its latest survey."""

    building_id: str
    building: str
    address: str
    lat: float | None
    lon: float | None
    at: str
    inspector: str
    tier: str | None
    level: str | None
    governing_storey: str | None
    provisional: bool | None
    conflict: bool
    survey_id: str
    surveys: int

    @property
    def located(self) -> bool:
        """Whether the building has a map position."""
        return self.lat is not None and self.lon is not None


_LATEST = """
SELECT building_id, building, address, lat, lon, at, inspector, tier, level, gov_storey,
       provisional, id, n
FROM (SELECT id, building_id, building, address, lat, lon, at, inspector, tier, level,
             gov_storey, provisional,
             row_number() OVER (PARTITION BY building_id
                                ORDER BY at_utc DESC, (conflict_of IS NULL) DESC, id) AS rn,
             count(*) OVER (PARTITION BY building_id) AS n
      FROM surveys WHERE hidden = 0)
WHERE rn = 1
ORDER BY building COLLATE NOCASE, address, building_id
"""

# Buildings with two visible versions of one survey (the copy names the first).
_IN_CONFLICT = """
SELECT DISTINCT c.building_id FROM surveys c JOIN surveys o ON o.id = c.conflict_of
WHERE c.conflict_of IS NOT NULL AND c.hidden = 0 AND o.hidden = 0
"""


def building_rows(store: StoreCore) -> list[BuildingRow]:
    """One row per building id: its latest visible survey (by inspection time, UTC)."""
    conflicted = {r[0] for r in store.conn.execute(_IN_CONFLICT)}
    out = []
    for r in store.conn.execute(_LATEST):
        out.append(BuildingRow(
            building_id=r[0], building=r[1], address=r[2], lat=r[3], lon=r[4], at=r[5],
            inspector=r[6], tier=r[7], level=r[8], governing_storey=r[9],
            provisional=None if r[10] is None else bool(r[10]), conflict=r[0] in conflicted,
            survey_id=r[11], surveys=r[12]))
    return out
