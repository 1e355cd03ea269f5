"""The core of a `Store`: the connection, the write transaction, the time stamp, the cache.

The `Store` is built in layers, each a class in its own module adding one concern on top of
the one below (`StoreCore` <- `SurveyReads` <- `AssessmentRecords` <- `SurveyWrites` <-
`ChangeHistory` <- `Store`); see DEVELOPERS.md. This one holds what every layer uses: the
connection, who writes, the clock, the survey JSON kept between edits.
"""

from __future__ import annotations

import getpass
import sqlite3
from collections.abc import Callable
from datetime import UTC, datetime
from pathlib import Path
from typing import Any, Self

from .canonical import CanonicalText
from .connect import immediate

Clock = Callable[[], datetime]


def _now_utc() -> datetime:
    return datetime.now(UTC)


def default_who() -> str:
    """Who edits when no name is given: the login name, or "unknown" when there is none."""
    try:
        return getpass.getuser() or "unknown"
    except Exception:  # no login name in some containers
        return "unknown"


class StoreCore:
    """A survey database's connection. One per thread: a connection belongs to its thread."""

    def __init__(self, conn: sqlite3.Connection, path: Path, who: str | None = None,
                 clock: Clock | None = None) -> None:
        self.conn = conn
        self.path = path
        self.who = who or default_who()
        self.clock = clock or _now_utc
        self.migration_backup: Path | None = None
        self._docs: dict[str, tuple[int, dict[str, Any]]] = {}
        self._texts: dict[str, CanonicalText] = {}

    def close(self) -> None:
        """Close the connection."""
        self.conn.close()

    def __enter__(self) -> Self:
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()

    @property
    def location(self) -> str:
        """The database file, as messages name it."""
        return str(self.path)

    @property
    def db_id(self) -> str:
        """The id this database was given when it was created."""
        row = self.conn.execute("SELECT value FROM meta WHERE key = 'db_id'").fetchone()
        return str(row[0])

    def forget_cache(self) -> None:
        """Drop the survey JSON kept between edits (after writes not made through `_edit`)."""
        self._docs.clear()
        self._texts.clear()

    KEEP = 16   # surveys whose JSON is kept between edits (the ones being worked on)

    def _keep(self, sid: str, revision: int, doc: dict[str, Any]) -> None:
        self._docs.pop(sid, None)
        self._docs[sid] = (revision, doc)
        while len(self._docs) > self.KEEP:
            old = next(iter(self._docs))
            del self._docs[old]
            self._texts.pop(old, None)

    def _write(self) -> Any:
        return immediate(self.conn, self.path)

    def _stamp(self) -> str:
        return self.clock().astimezone(UTC).isoformat(timespec="milliseconds")
