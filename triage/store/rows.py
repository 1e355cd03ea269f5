"""The records a store hands out: a survey's list row and one change of its log.

Plain frozen dataclasses, built from plain columns (`ROW_SQL`, `row_of`); no SQLite library.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any


@dataclass(frozen=True, slots=True)
class Change:
    """One entry of a survey's change log."""

    seq: int
    uid: str
    survey_id: str
    revision: int
    op: str
    path: str
    old: Any
    new: Any
    at: str
    who: str
    undoes: str | None


@dataclass(frozen=True)
class SurveyRow:
    """One survey as the lists show it, read from plain columns (never re-assessed)."""

    id: str
    building_id: str
    building: str
    address: str
    lat: float | None
    lon: float | None
    inspector: str
    at: str
    tier: str | None
    level: str | None
    governing_storey: str | None
    governing_dir: str | None
    governing_basis: str | None
    provisional: bool | None
    revision: int
    assessed_revision: int | None
    hidden: bool
    source: str | None
    conflict_of: str | None
    conflict: bool
    reported_revision: int | None

    @property
    def stale(self) -> bool:
        """The stored assessment is of an earlier revision (or there is none)."""
        return self.assessed_revision != self.revision

    @property
    def edited_since_report(self) -> bool | None:
        """Edited after its last report; None when no report was issued."""
        if self.reported_revision is None:
            return None
        return self.revision > self.reported_revision


ROW_SQL = """
SELECT s.id, s.building_id, s.building, s.address, s.lat, s.lon, s.inspector, s.at,
       s.tier, s.level, s.gov_storey, s.gov_dir, s.gov_basis, s.provisional, s.revision,
       s.assessed_revision, s.hidden, s.source, s.conflict_of,
       (EXISTS (SELECT 1 FROM surveys o WHERE o.id = s.conflict_of AND o.hidden = 0)
        OR EXISTS (SELECT 1 FROM surveys c WHERE c.conflict_of = s.id AND c.hidden = 0))
         AS conflict,
       (SELECT max(r.revision) FROM reports r WHERE r.survey_id = s.id) AS reported
FROM surveys s
"""


def row_of(r: tuple[Any, ...]) -> SurveyRow:
    """The `SurveyRow` of one result row of `ROW_SQL`."""
    return SurveyRow(
        id=r[0], building_id=r[1], building=r[2], address=r[3], lat=r[4], lon=r[5],
        inspector=r[6], at=r[7], tier=r[8], level=r[9], governing_storey=r[10],
        governing_dir=r[11], governing_basis=r[12],
        provisional=None if r[13] is None else bool(r[13]), revision=r[14],
        assessed_revision=r[15], hidden=bool(r[16]), source=r[17], conflict_of=r[18],
        conflict=bool(r[19]), reported_revision=r[20])
