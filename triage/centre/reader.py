"""`CentreReader`: the centre's surveys through the same `SurveyReader` interface as a local store.

`triage --db postgresql://… list|export|report|compare|summary` read through it and get the
same output as from a local database holding the same surveys (a merged one): the rows come
from the view `triage.survey_list` and the table `triage.building_latest` (kept current by
triggers: see `heads`), ordered as the local store orders them (byte order of the text, ASCII
letters folded for building names). `summary` in text and GeoJSON takes its lines written by
the server (`AreaLines`, SQL in `summary_sql`), in one repeatable-read transaction.

It never writes: its session is read-only (`SET SESSION CHARACTERISTICS AS TRANSACTION READ
ONLY`), and it has no `record_report`, so `triage report` from the centre writes only its PDF.
The survey list is read once per reader and kept (one command is a few lookups); each survey's
JSON and assessment are read when asked for. Photos are kept as blobs on the centre, not in a
folder: `photo_dir` is None.
"""

from __future__ import annotations

import json
from collections.abc import Callable
from pathlib import Path
from typing import TYPE_CHECKING, Any

from triage.store import StoreError
from triage.store.area import AreaTally, BuildingRow
from triage.store.rows import SurveyRow

from . import summary_sql as q
from .connect import CentreError, connect, first_line, redact
from .schema import check_schema

if TYPE_CHECKING:
    import psycopg

    from triage.assess import Assessment
    from triage.model import Survey

_ROWS = """
SELECT id, building_id, building, address, lat, lon, inspector, at, tier, level, gov_storey,
       gov_dir, gov_basis, provisional, revision, assessed_revision, hidden, source,
       conflict_of, conflict, reported_revision, at_utc, first_id, state, doc_sha256, rank
FROM triage.survey_list
"""


class CentreReader:
    """A centre's surveys, read-only, as `triage.store.reader.SurveyReader` asks."""

    def __init__(self, conn: psycopg.Connection, url: str) -> None:
        self.conn = conn
        self.url = url
        self._rows: dict[str, tuple[SurveyRow, tuple[Any, ...]]] | None = None
        self._order: list[str] = []

    @classmethod
    def open(cls, url: str) -> CentreReader:
        """Connect, make the session read-only, check the schema; `CentreError` in one line."""
        import psycopg

        conn = connect(url, autocommit=True)
        try:
            conn.execute("SET SESSION CHARACTERISTICS AS TRANSACTION READ ONLY")
            # The views' plans look costly to the planner and JIT compiling them costs seconds
            # more than running them; the sorts of a whole area fit in memory.
            conn.execute("SET jit = off")
            conn.execute("SET work_mem = '64MB'")
            conn.execute("SET extra_float_digits = 1")   # shortest exact floats, as repr
            # The summary's table is read whole, in order, from memory: by its index (the
            # default cost of a random read assumes a spinning disk and sorts instead).
            conn.execute("SET random_page_cost = 1.1")
            # A reading of several statements (the summary's counts and rows) sees one state.
            conn.isolation_level = psycopg.IsolationLevel.REPEATABLE_READ
            check_schema(conn, url)
        except psycopg.Error as err:
            conn.close()
            raise CentreError(f"{redact(url)}: {first_line(err, url)}") from None
        except BaseException:
            conn.close()
            raise
        return cls(conn, url)

    @property
    def location(self) -> str:
        """The centre as messages name it: its URL without the password."""
        return redact(self.url)

    def _query(self, sql: str, params: tuple[Any, ...] | dict[str, Any] | None = None
               ) -> list[tuple[Any, ...]]:
        import psycopg

        try:
            cur = self.conn.execute(sql, params)
            return cur.fetchall() if cur.description else []   # tuples, in one call
        except psycopg.errors.InsufficientPrivilege:
            raise CentreError(f"{self.location}: this login may not read the surveys; grant it "
                              "the role triage_read") from None
        except psycopg.Error as err:
            raise CentreError(f"{self.location}: {first_line(err, self.url)}") from None

    def _all(self) -> dict[str, tuple[SurveyRow, tuple[Any, ...]]]:
        if self._rows is None:
            rows = {}
            keyed = []
            for r in self._query(_ROWS):
                row = SurveyRow(
                    id=r[0], building_id=r[1], building=r[2], address=r[3], lat=r[4],
                    lon=r[5], inspector=r[6], at=r[7], tier=r[8], level=r[9],
                    governing_storey=r[10], governing_dir=r[11], governing_basis=r[12],
                    provisional=r[13], revision=r[14], assessed_revision=r[15],
                    hidden=bool(r[16]), source=r[17], conflict_of=r[18], conflict=bool(r[19]),
                    reported_revision=r[20])
                rows[row.id] = (row, r[21:])
                keyed.append((r[21], row.id))
            # Newest inspection first, then by id: the local store's order (byte order).
            keyed.sort(key=lambda k: k[1])
            keyed.sort(key=lambda k: k[0], reverse=True)
            self._order = [k[1] for k in keyed]
            self._rows = rows
        return self._rows

    def has_survey(self, survey_id: str) -> bool:
        """Whether a survey with exactly this id is held (hidden ones too)."""
        return str(survey_id) in self._all()

    def match_ids(self, given: str) -> list[str]:
        """`[given]` when held, else every id starting with it (in lower case)."""
        if self.has_survey(given):
            return [given]
        start = given.lower()
        self._all()
        return [i for i in self._order if i.startswith(start)]

    def list_surveys(self, include_hidden: bool = False) -> list[SurveyRow]:
        """Every current survey, newest inspection first, then by id."""
        rows = self._all()
        return [rows[i][0] for i in self._order if include_hidden or not rows[i][0].hidden]

    def survey_row(self, survey_id: str) -> SurveyRow | None:
        """The list row of one survey (hidden ones too); None when not held."""
        got = self._all().get(str(survey_id))
        return None if got is None else got[0]

    def _held(self, survey_id: str) -> tuple[SurveyRow, tuple[Any, ...]]:
        got = self._all().get(str(survey_id))
        if got is None:
            raise StoreError(f"survey {survey_id}: not at the centre ({self.location})")
        return got

    def load_survey(self, survey_id: str) -> Survey:
        """The survey's current version as the validated model (a kept copy under its id)."""
        from triage.model import SurveyError, parse_survey

        row, (_, first_id, state, _, rank) = self._held(survey_id)
        got = self._query("SELECT doc FROM triage.versions WHERE survey_id = %s AND state = %s",
                          (first_id, state))
        doc = json.loads(got[0][0])
        if rank != 1:
            doc["id"] = row.id   # a conflicting version, under the id merge gives it
        try:
            return parse_survey(doc)
        except SurveyError as err:
            raise StoreError(f"survey {survey_id}: the centre's copy does not validate here "
                             f"({err})") from None

    def load_assessment(self, survey_id: str) -> Assessment | None:
        """The latest assessment of the survey's version; None if none reads as this engine's.

        A conflicting version's assessment names the survey's first id: None then too (the
        commands assess it again).
        """
        from pydantic import ValidationError

        from triage.assess import parse_assessment

        got = self._all().get(str(survey_id))
        if got is None or got[1][4] != 1:
            return None
        _, (_, first_id, _, doc_sha, _) = got
        rows = self._query("SELECT json FROM triage.assessments WHERE survey_id = %s AND "
                           "doc_sha256 = %s ORDER BY seq DESC LIMIT 1", (first_id, doc_sha))
        if not rows:
            return None
        try:
            return parse_assessment(json.loads(rows[0][0]))
        except (ValidationError, ValueError):
            return None

    def revision(self, survey_id: str) -> int:
        """The survey's revision as the laptop that sent this version counted it."""
        return int(self._held(survey_id)[0].revision)

    def photo_dir(self, survey_id: str) -> Path | None:
        """None: the centre keeps photos as blobs, not in a folder."""
        return None

    def photo_bytes(self, sha256: str) -> bytes | None:
        """The photo blob with this SHA-256, checked against it; None when not held."""
        import hashlib

        rows = self._query("SELECT data FROM triage.photos WHERE sha256 = %s LIMIT 1",
                           (sha256,))
        if not rows:
            return None
        data = bytes(rows[0][0])
        return data if hashlib.sha256(data).hexdigest() == sha256 else None

    def building_rows(self) -> list[BuildingRow]:
        """One row per building: its latest visible survey; ordered as the local summary."""
        return list(map(BuildingRow._make, self._query(q.BUILDINGS)))   # ordered by the server

    def _reading(self) -> tuple[AreaTally, bool, bool, int]:
        """The counts, whether the cells stored follow this layout, exact order, lines left.

        In the caller's transaction. Lines left: rows whose line the command lays out. The
        order is the index's unless a name or an address is longer than its keys (then the
        whole texts are sorted); parallel plans are off, so the aggregates take the rows in
        the order given.
        """
        self._query("SET LOCAL max_parallel_workers_per_gather = 0")
        stored = self._query(q.STORED_LAYOUT) == [(q.LAYOUT,)]
        counts = self._query(q.TALLY if stored else q.TALLY_MADE)
        tally = AreaTally(sum(int(r[1]) for r in counts), {r[0]: int(r[1]) for r in counts},
                          sum(int(r[2]) for r in counts))
        return (tally, stored, any(r[3] for r in counts), sum(int(r[4]) for r in counts))

    def summary_lines(self, lay_out: Callable[[list[BuildingRow]], list[str]]
                      ) -> tuple[AreaTally, str]:
        """The counts and every building's text line, written by the server, in order.

        A line the server leaves to the command (a person's text with wide, zero-width or
        unsafe characters) comes back empty and is filled with `lay_out`'s line of its row.
        """
        with self.conn.transaction():   # repeatable read: the counts agree with the rows
            tally, stored, exact, unlaid = self._reading()
            text = self._query(q.lines_sql(stored, exact))[0][0] or ""
            if unlaid:
                rows = list(map(BuildingRow._make, self._query(q.unlaid_sql(stored))))
                text = _fill(text, lay_out(rows), self.location)
            return tally, text

    def summary_features(self) -> tuple[str, list[tuple[str, str]]]:
        """The located buildings' GeoJSON Features written by the server, and those left out."""
        with self.conn.transaction():
            _, stored, exact, _ = self._reading()
            # Rows joined here: for tens of megabytes, quicker than one string made there.
            features = ", ".join([r[0] for r in self._query(q.features_sql(stored, exact))])
            return features, [(str(a), str(b)) for a, b in self._query(q.MISSING)]

    def close(self) -> None:
        """Close the connection."""
        self.conn.close()

    def __enter__(self) -> CentreReader:
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()


def _fill(text: str, lines: list[str], where: str) -> str:
    """The server's lines with each empty one replaced by the next of `lines`, in order."""
    out = text.split("\n")
    empty = [i for i, line in enumerate(out) if not line]
    if len(empty) != len(lines):
        raise CentreError(f"{where}: the summary's rows changed while read; run it again")
    for i, line in zip(empty, lines, strict=True):
        out[i] = line
    return "\n".join(out)
