"""The area picture: one row per building id, its latest survey, from stored assessments.

Nothing here assesses: tier, level and governing storey are the columns stored with each
survey after its last recompute. A building is flagged `conflict` while two versions of one of
its surveys (kept by a merge) are both visible.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from .core import StoreCore


@dataclass(frozen=True)
class BuildingRow:
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
