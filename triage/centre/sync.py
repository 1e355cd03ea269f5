"""`triage sync --to URL`: send the centre what this laptop holds and the centre lacks.

What is compared (the field role may read only these key columns on the server):

- a survey *version* is its state: the SHA-256 of its JSON, its hidden flag and the sorted ids
  of the changes it holds. A version the server lacks is sent whole: its row, every change of
  its log the server lacks, the laptop's assessment of it (keyed by the JSON's hash and the
  engine version) and its report records;
- photo blobs by SHA-256, when the local database keeps them (a `photos` table with `sha256`
  and `data` columns): sent first, each in a transaction of photos only (a blob alone is
  harmless; a survey arrives after its photos).

Transactions carry whole surveys (`batch` of them, 200 by default); rows go in key order
(surveys by id, then each table's key), every table in the same order, with
`ON CONFLICT DO NOTHING`: two laptops sending the same rows wait for each other on the same
keys in the same order, so they never deadlock, and whichever commits first wins. A kill or a
dropped connection loses at most the open transaction; the next run sends the rest. A second
run sends nothing and says so. Conflicts are never resolved here: the server keeps every
version and its views flag them (see `schema`).
"""

from __future__ import annotations

import hashlib
import json
import re
import time
from collections import defaultdict
from collections.abc import Callable, Iterable, Sequence
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

from triage.store.merge import conflict_id

from .connect import CentreError, connect, first_line, redact
from .schema import SENT, TABLES, check_schema

if TYPE_CHECKING:
    import psycopg

    from triage.store import Store

Progress = Callable[[int, int, float], None]

_ENGINE = re.compile(r'"engine"\s*:\s*\{\s*"version"\s*:\s*"([^"\\]*)"')
PHOTO_BATCH_BYTES = 32 * 1024 * 1024


def engine_of(assessment_json: str) -> str:
    """The engine version recorded in an assessment's JSON."""
    m = _ENGINE.search(assessment_json)
    if m:
        return m.group(1)
    try:
        return str(json.loads(assessment_json)["engine"]["version"])
    except (ValueError, KeyError, TypeError):
        return "unknown"


def sha256(text: str) -> str:
    """Hex SHA-256 of UTF-8 text."""
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


def state_of(doc_sha: str, hidden: bool, uids: Iterable[str]) -> str:
    """A version's key: its JSON's hash, hidden flag and the change ids it holds."""
    h = hashlib.sha256(f"{doc_sha}\n{int(hidden)}\n".encode())
    h.update(",".join(sorted(uids)).encode())
    return h.hexdigest()


@dataclass
class SyncResult:
    """What one sync sent (rows the server did not hold), and in how long."""

    server: str
    surveys: int = 0          # local surveys
    versions: int = 0
    changes: int = 0
    assessments: int = 0
    reports: int = 0
    photos: int = 0
    transactions: int = 0
    seconds: float = 0.0
    notes: list[str] = field(default_factory=list)

    @property
    def nothing(self) -> bool:
        """Whether nothing at all was sent."""
        return not (self.versions or self.changes or self.assessments or self.reports
                    or self.photos)


def _sql_type(typ: str) -> str:
    base = typ.split(" NOT NULL")[0].split(" DEFAULT")[0].split(" GENERATED")[0].strip()
    return "text" if base == "text[]" else base


_INSERT_SQL: dict[str, str] = {}


def insert_sql(table: str) -> str:
    """INSERT of column arrays (one array per column, binary) unnested in their order."""
    if table not in _INSERT_SQL:
        cols = SENT[table]
        types = {name: _sql_type(t) for name, t, _ in TABLES[table]}
        arrays = ", ".join(f"%b::{types[c]}[]" for c in cols)
        exprs = ", ".join("string_to_array(u.changes, ',')" if c == "changes" else f"u.{c}"
                          for c in cols)
        _INSERT_SQL[table] = (f"INSERT INTO triage.{table} ({', '.join(cols)}) SELECT {exprs} "
                              f"FROM unnest({arrays}) AS u({', '.join(cols)}) "
                              "ON CONFLICT DO NOTHING")
    return _INSERT_SQL[table]


def _insert(conn: psycopg.Connection, table: str, rows: Sequence[tuple[Any, ...]]) -> int:
    if not rows:
        return 0
    columns = [list(c) for c in zip(*rows, strict=True)]
    cur = conn.execute(insert_sql(table), columns)
    return max(cur.rowcount, 0)


@dataclass
class _Local:
    """One survey as this laptop holds it, with what would be sent for it."""

    id: str
    version: tuple[Any, ...]
    state: str
    doc_sha: str
    changes: list[tuple[Any, ...]]
    assessment: tuple[Any, ...] | None
    reports: list[tuple[Any, ...]]


def _read_local(conn: Any, origin: str) -> list[_Local]:
    changes: dict[str, list[tuple[Any, ...]]] = defaultdict(list)
    for r in conn.execute("SELECT survey_id, uid, seq, revision, op, path, old, new, at, who, "
                          "undoes FROM changes ORDER BY survey_id, seq"):
        changes[r[0]].append((*r, origin))
    reports: dict[str, list[tuple[Any, ...]]] = defaultdict(list)
    for r in conn.execute("SELECT survey_id, revision, at, path, fingerprint, who FROM reports"):
        reports[r[0]].append((*r, origin))
    assessed = dict(conn.execute(
        "SELECT a.survey_id, a.json FROM assessments a JOIN surveys s ON s.id = a.survey_id "
        "AND a.revision = s.revision AND s.assessed_revision = s.revision").fetchall())
    out = []
    for r in conn.execute(
            "SELECT id, revision, hidden, building_id, building, address, lat, lon, inspector, "
            "at, at_utc, conflict_of, source, created_at, updated_at, doc, tier, level, "
            "gov_storey, gov_dir, gov_basis, provisional FROM surveys ORDER BY id"):
        sid, doc = r[0], r[15]
        doc_sha = sha256(doc)
        log = sorted(changes.get(sid, []), key=lambda c: c[1])
        uids = [c[1] for c in log]
        state = state_of(doc_sha, bool(r[2]), uids)
        version = (sid, state, doc_sha, conflict_id(sid, doc), ",".join(uids), r[1],
                   bool(r[2]), r[3], r[4], r[5], r[6], r[7], r[8], r[9], r[10], r[11], r[12],
                   r[13], r[14], origin, doc)
        a = assessed.get(sid)
        assessment = None if a is None else (
            sid, doc_sha, engine_of(a), r[16], r[17], r[18], r[19], r[20],
            None if r[21] is None else bool(r[21]), a, "laptop", origin)
        out.append(_Local(sid, version, state, doc_sha, log, assessment,
                          sorted(reports.get(sid, []), key=lambda x: (x[1], x[2]))))
    return out


def _photo_table(conn: Any) -> str | None:
    """The local table of photo blobs, when this database has one with sha256 and data."""
    row = conn.execute("SELECT name FROM sqlite_master WHERE type = 'table' AND name = "
                       "'photos'").fetchone()
    if row is None:
        return None
    cols = {r[1] for r in conn.execute("PRAGMA table_info(photos)")}
    return "photos" if {"sha256", "data"} <= cols else None


def _server_keys(conn: psycopg.Connection, ids: list[str]) -> dict[str, set[tuple[Any, ...]]]:
    q = {"versions": "SELECT survey_id, state FROM triage.versions WHERE survey_id = ANY(%s)",
         "changes": "SELECT survey_id, uid FROM triage.changes WHERE survey_id = ANY(%s)",
         "assessments": "SELECT survey_id, doc_sha256, engine FROM triage.assessments "
                        "WHERE survey_id = ANY(%s)",
         "reports": "SELECT survey_id, revision, at FROM triage.reports "
                    "WHERE survey_id = ANY(%s)"}
    out = {}
    with conn.transaction():
        for table, sql in q.items():
            out[table] = {tuple(r) for r in conn.execute(sql, (ids,))}
    return out


def _progress_line(done: int, total: int, seconds: float) -> str:
    rate = done / seconds if seconds > 0 else 0.0
    return f"sync: {done:,} of {total:,} surveys sent, {rate:,.0f}/s"


def sync(store: Store, url: str, *, batch: int = 200,
         progress: Progress | None = None) -> SyncResult:
    """Send what the server lacks, `batch` whole surveys per transaction; see the module."""
    import psycopg

    where = redact(url)
    result = SyncResult(where)
    t0 = time.perf_counter()
    conn = connect(url)
    try:
        check_schema(conn, url)
        origin = store.db_id
        store.refresh_stale()   # each version goes with this laptop's assessment of it
        local = _read_local(store.conn, origin)
        result.surveys = len(local)
        have = _server_keys(conn, [s.id for s in local])
        todo: list[tuple[_Local, bool, list[tuple[Any, ...]], bool, list[tuple[Any, ...]]]] = []
        for s in local:
            need_version = (s.id, s.state) not in have["versions"]
            need_changes = [c for c in s.changes if (s.id, c[1]) not in have["changes"]]
            need_a = (s.assessment is not None
                      and (s.id, s.doc_sha, s.assessment[2]) not in have["assessments"])
            need_r = [r for r in s.reports if (s.id, r[1], r[2]) not in have["reports"]]
            if need_version or need_changes or need_a or need_r:
                todo.append((s, need_version, need_changes, need_a, need_r))
        photos = _photo_table(store.conn)
        if photos:
            result.photos = _send_photos(store.conn, conn, origin, result)
        total = len(todo)
        done = 0
        for i in range(0, total, max(1, batch)):
            part = todo[i:i + batch]
            with conn.transaction():
                result.versions += _insert(conn, "versions", sorted(
                    (s.version for s, nv, _, _, _ in part if nv), key=lambda v: (v[0], v[1])))
                result.changes += _insert(conn, "changes", sorted(
                    (c for _, _, cs, _, _ in part for c in cs), key=lambda c: (c[0], c[1])))
                result.assessments += _insert(conn, "assessments", sorted(
                    (s.assessment for s, _, _, na, _ in part if na and s.assessment),
                    key=lambda a: (a[0], a[1], a[2])))
                result.reports += _insert(conn, "reports", sorted(
                    (r for _, _, _, _, rs in part for r in rs),
                    key=lambda r: (r[0], r[1], r[2])))
            result.transactions += 1
            done += len(part)
            if progress:
                progress(done, total, time.perf_counter() - t0)
    except psycopg.errors.InsufficientPrivilege as err:
        raise CentreError(f"{where}: this login may not send surveys ({first_line(err, url)}); "
                          "it needs the role triage_field") from None
    except psycopg.Error as err:
        raise CentreError(f"{where}: sync stopped ({first_line(err, url)}); what was sent "
                          "before is kept whole; run sync again to send the rest") from None
    finally:
        conn.close()
    result.seconds = time.perf_counter() - t0
    return result


def _send_photos(local: Any, conn: psycopg.Connection, origin: str,
                 result: SyncResult) -> int:
    """Photo blobs the server lacks, in transactions of at most PHOTO_BATCH_BYTES."""
    mine = [r[0] for r in local.execute("SELECT sha256 FROM photos ORDER BY sha256")]
    if not mine:
        return 0
    with conn.transaction():
        there = {r[0] for r in conn.execute(
            "SELECT sha256 FROM triage.photos WHERE sha256 = ANY(%s)", (mine,))}
    sent = 0
    rows: list[tuple[Any, ...]] = []
    size = 0

    def flush() -> None:
        nonlocal rows, size, sent
        if rows:
            with conn.transaction():
                sent += _insert(conn, "photos", rows)
            result.transactions += 1
        rows, size = [], 0

    for sha in mine:
        if sha in there:
            continue
        (data,) = local.execute("SELECT data FROM photos WHERE sha256 = ?", (sha,)).fetchone()
        blob = bytes(data)
        rows.append((sha, blob, len(blob), origin))
        size += len(blob)
        if size >= PHOTO_BATCH_BYTES:
            flush()
    flush()
    return sent


__all__ = ["SyncResult", "engine_of", "state_of", "sync"]
