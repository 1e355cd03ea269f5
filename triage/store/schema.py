"""The schema of the store, its version, and the migrations from one version to the next.

The version is `PRAGMA user_version`; `PRAGMA application_id` marks the file as ours. To change
the schema: write a function `_to_N(conn)` that turns version N-1 into N with plain SQL (keep
every row; add columns with defaults rather than rebuilding tables), append it to `MIGRATIONS`,
and raise `SCHEMA_VERSION` to N. Opening an older file first copies it beside itself
(`VACUUM INTO` `NAME.vK-backup.db`, a name claimed first, so two programs upgrading the same file
at once each keep their own copy), then runs each step in its own BEGIN IMMEDIATE transaction,
setting `user_version` in the same transaction, so a crash mid-way leaves a file of a known
version. A file of a newer version than `SCHEMA_VERSION` is refused, never changed.
"""

from __future__ import annotations

import os
import sqlite3
import uuid
from collections.abc import Callable
from datetime import UTC, datetime
from pathlib import Path

from .connect import APPLICATION_ID, StoreError, explain, immediate

SCHEMA_V1 = """
CREATE TABLE meta (
  key TEXT PRIMARY KEY,
  value TEXT NOT NULL
);
CREATE TABLE settings (
  key TEXT PRIMARY KEY,
  value TEXT NOT NULL                 -- JSON
);
CREATE TABLE surveys (
  id TEXT PRIMARY KEY,                -- survey id (UUID)
  building_id TEXT NOT NULL,
  building TEXT NOT NULL,             -- building name, address, location, inspector, time:
  address TEXT NOT NULL,              --   copies of the JSON for the lists
  lat REAL,
  lon REAL,
  inspector TEXT NOT NULL,
  at TEXT NOT NULL,                   -- inspection time as entered (ISO 8601 with offset)
  at_utc TEXT NOT NULL,               -- the same in UTC, for ordering
  revision INTEGER NOT NULL,          -- 1 when stored, +1 with every change
  hidden INTEGER NOT NULL DEFAULT 0,
  source TEXT,                        -- where it came from: file or merged database
  source_db TEXT,                     -- meta.db_id of the database it was merged from
  conflict_of TEXT REFERENCES surveys(id),
  tier TEXT,                          -- the latest assessment, for the lists
  level TEXT,
  gov_storey TEXT,
  gov_dir TEXT,
  gov_basis TEXT,
  provisional INTEGER,
  assessed_revision INTEGER,          -- the revision it was computed for (stale if not current)
  created_at TEXT NOT NULL,
  updated_at TEXT NOT NULL,
  doc TEXT NOT NULL                   -- canonical triage-survey/1 JSON: the visible items
);                                    -- (last: the list columns are read without paging it)
CREATE INDEX surveys_building ON surveys (building_id, at_utc);
CREATE INDEX surveys_conflict ON surveys (conflict_of) WHERE conflict_of IS NOT NULL;
CREATE TABLE assessments (
  survey_id TEXT PRIMARY KEY REFERENCES surveys(id),
  revision INTEGER NOT NULL,
  json TEXT NOT NULL                  -- triage-assessment/1
);
CREATE TABLE changes (
  seq INTEGER PRIMARY KEY AUTOINCREMENT,
  uid TEXT NOT NULL,                  -- the change's own id, kept by merges
  survey_id TEXT NOT NULL REFERENCES surveys(id),
  revision INTEGER NOT NULL,          -- the survey's revision after the change
  op TEXT NOT NULL CHECK (op IN ('import', 'create', 'set', 'add', 'remove', 'undo',
                                 'hide', 'unhide')),
  path TEXT NOT NULL DEFAULT '',
  old TEXT,                           -- JSON (NULL: absent)
  new TEXT,                           -- JSON (NULL: absent)
  at TEXT NOT NULL,                   -- UTC, ISO 8601
  who TEXT NOT NULL,
  undoes TEXT,                        -- uid of the change an undo reverses
  UNIQUE (survey_id, uid)
);
CREATE INDEX changes_survey ON changes (survey_id, seq);
CREATE TABLE reports (
  survey_id TEXT NOT NULL REFERENCES surveys(id),
  revision INTEGER NOT NULL,          -- the revision the report covers
  path TEXT,
  fingerprint TEXT,
  at TEXT NOT NULL,
  who TEXT NOT NULL,
  UNIQUE (survey_id, revision, at)
);
"""


def _to_1(conn: sqlite3.Connection) -> None:
    run_script(conn, SCHEMA_V1)
    now = datetime.now(UTC).isoformat(timespec="seconds")
    conn.executemany("INSERT INTO meta (key, value) VALUES (?, ?)",
                     [("db_id", str(uuid.uuid4())), ("created_at", now)])
    conn.execute(f"PRAGMA application_id = {APPLICATION_ID}")


def run_script(conn: sqlite3.Connection, script: str) -> None:
    """Run SQL statements one by one inside the open transaction (executescript would commit)."""
    buf = ""
    for line in script.splitlines(keepends=True):
        buf += line
        if sqlite3.complete_statement(buf):
            conn.execute(buf)
            buf = ""
    if buf.strip():
        conn.execute(buf)


SCHEMA_V2 = """
CREATE TABLE photos (
  sha256 TEXT PRIMARY KEY CHECK (length(sha256) = 64),   -- of `data`, lowercase hex
  format TEXT NOT NULL CHECK (format IN ('JPEG', 'PNG')),
  width INTEGER NOT NULL,
  height INTEGER NOT NULL,
  size INTEGER NOT NULL,              -- bytes
  added_at TEXT NOT NULL,
  data BLOB NOT NULL                  -- the image as checked (triage.photos.check_photo)
);
"""


def _to_2(conn: sqlite3.Connection) -> None:
    """Photos kept in the store: blobs named by their SHA-256 (surveys name them by `sha256`)."""
    run_script(conn, SCHEMA_V2)


def _to_3(conn: sqlite3.Connection) -> None:
    """Survey texts written as `triage-survey/1` rewritten as `/2` (`texts.rewrite_v1_texts`).

    Not plain SQL: each text is read through the model. Ids, revisions, the change log and the
    assessments are kept; `meta` records the step.
    """
    from .texts import rewrite_v1_texts

    rewrite_v1_texts(conn)


Migration = Callable[[sqlite3.Connection], None]

# MIGRATIONS[k] turns version k into version k + 1; MIGRATIONS[0] creates an empty store.
MIGRATIONS: list[Migration] = [_to_1, _to_2, _to_3]
SCHEMA_VERSION = len(MIGRATIONS)


def current_version() -> int:
    """The schema version this tool writes (read at call time, so tests can add a step)."""
    return len(MIGRATIONS)


def backup_path(path: Path, version: int) -> Path:
    """Where the copy made before migrating from `version` goes (a free name beside it)."""
    base = path.with_name(f"{path.stem}.v{version}-backup{path.suffix or '.db'}")
    n = 1
    out = base
    while out.exists():
        n += 1
        out = base.with_name(f"{path.stem}.v{version}-backup-{n}{path.suffix or '.db'}")
    return out


def claim_backup(path: Path, version: int) -> Path:
    """A free backup name (`backup_path`), taken as an empty file no other program can take."""
    while True:
        out = backup_path(path, version)
        try:
            os.close(os.open(out, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o644))
        except FileExistsError:   # another program took it between the look and the claim
            continue
        return out


def ensure_schema(conn: sqlite3.Connection, path: Path, version: int) -> Path | None:
    """Bring the file from `version` to the current schema; return the backup made, if any."""
    migrations = MIGRATIONS
    target = len(migrations)
    if version > target:
        raise StoreError(f"{path}: written by a newer triage (schema {version}; this one knows "
                         f"{target}); it was left as it is; update triage to open it")
    if version == target:
        return None
    saved: Path | None = None
    if version > 0:
        try:
            saved = claim_backup(path, version)
        except OSError as err:
            raise StoreError(f"{path}: could not back up before upgrading the schema "
                             f"({backup_path(path, version)}: {err.strerror}); nothing was "
                             "changed") from None
        try:
            conn.execute("VACUUM INTO ?", (str(saved),))   # into the empty file claimed
        except sqlite3.Error as err:
            saved.unlink(missing_ok=True)
            raise StoreError(f"{path}: could not back up before upgrading the schema "
                             f"({explain(err, saved)}); nothing was changed") from None
    for v in range(version, target):
        with immediate(conn, path):
            current = int(conn.execute("PRAGMA user_version").fetchone()[0])
            if current != v:   # another process migrated meanwhile
                continue
            migrations[v](conn)
            conn.execute(f"PRAGMA user_version = {v + 1}")
    return saved
