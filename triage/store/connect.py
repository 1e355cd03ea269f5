"""Opening a database file safely: checks first (read-only), then the pragmas on every connection.

A file that is not a database, is truncated, fails `quick_check`, belongs to another program or
was written by a newer `triage` is refused before anything could write to it: the checks run on
a read-only connection, so the file's bytes stay as they were.
"""

from __future__ import annotations

import sqlite3
from collections.abc import Iterator
from contextlib import contextmanager, suppress
from pathlib import Path

from triage.errors import IOFailure, TriageError

# PRAGMA application_id of a triage database: the bytes "TRIA".
APPLICATION_ID = 0x54524941
BUSY_TIMEOUT_MS = 15000
_HEADER = b"SQLite format 3\x00"


class StoreError(TriageError):
    """The store refused or could not do something; `str()` is one line saying what to do."""


class StoreIOFailure(StoreError, IOFailure):
    """The database could not be read or written: disk full, read-only, locked, no folder."""


class SurveyConflict(StoreError):
    """A different survey under an id already stored; the stored one is untouched."""


def uri(path: Path, mode: str | None = None, *, immutable: bool = False) -> str:
    """The `file:` URI of a path (percent-encoded), optionally with `?mode=`.

    `immutable` tells SQLite the file cannot change, so it opens no -shm or -wal beside it
    (only right for a file no one is writing and with no -wal of its own).
    """
    u = path.resolve().as_uri()
    params = ([f"mode={mode}"] if mode else []) + (["immutable=1"] if immutable else [])
    return u + ("?" + "&".join(params) if params else "")


def set_pragmas(conn: sqlite3.Connection) -> None:
    """What every connection needs (only journal_mode is kept in the file)."""
    conn.execute(f"PRAGMA busy_timeout = {BUSY_TIMEOUT_MS}")
    conn.execute("PRAGMA foreign_keys = ON")
    conn.execute("PRAGMA synchronous = FULL")


def connect(path: Path, *, read_only: bool = False,
            immutable: bool = False) -> sqlite3.Connection:
    """A connection in autocommit mode (writes begin explicitly), pragmas set."""
    conn = sqlite3.connect(uri(path, "ro" if read_only else "rwc", immutable=immutable),
                           uri=True,
                           isolation_level=None, timeout=BUSY_TIMEOUT_MS / 1000)
    set_pragmas(conn)
    return conn


@contextmanager
def immediate(conn: sqlite3.Connection, path: Path) -> Iterator[sqlite3.Connection]:
    """One write transaction begun with BEGIN IMMEDIATE; rolled back whole on any error."""
    try:
        conn.execute("BEGIN IMMEDIATE")
    except sqlite3.Error as err:
        raise explain(err, path) from None
    try:
        yield conn
    except BaseException as err:
        with suppress(sqlite3.Error):
            conn.execute("ROLLBACK")
        if isinstance(err, sqlite3.Error):
            raise explain(err, path) from None
        raise
    try:
        conn.execute("COMMIT")
    except sqlite3.Error as err:
        with suppress(sqlite3.Error):
            conn.execute("ROLLBACK")
        raise explain(err, path) from None


def explain(err: sqlite3.Error, path: Path) -> StoreError:
    """A one-line message for an SQLite error, naming the file and what to do."""
    text = str(err).lower()
    if "full" in text:
        return StoreIOFailure(f"{path}: the disk is full; this change was not saved and "
                              "earlier data is whole; free some space and try again")
    if "readonly" in text or "read-only" in text:
        return StoreIOFailure(f"{path}: the database or its folder is read-only; nothing was "
                              "changed; use a writable folder (triage --db PATH)")
    if "unable to open" in text or "cannot open" in text:
        return StoreIOFailure(f"{path}: cannot open or create the database there (missing or "
                              "read-only folder?); use triage --db PATH with a writable folder")
    if "locked" in text or "busy" in text:
        return StoreIOFailure(f"{path}: the database stayed busy in another program for "
                              f"{BUSY_TIMEOUT_MS // 1000} s; nothing was changed; try again")
    if "not a database" in text or "malformed" in text or "corrupt" in text:
        return StoreError(f"{path}: damaged database ({err}); it was left as it is; restore it "
                          "from a backup (triage backup) or use another --db")
    return StoreError(f"{path}: database error: {' '.join(str(err).split())}")


def check_file(path: Path, *, immutable: bool = False, deep: bool = True) -> int:
    """Check an existing database file without writing to it; return its schema version.

    `deep` runs `PRAGMA quick_check` (it reads the whole file); the header, size, owner and
    version are always checked.

    0 for a file that does not exist or is empty (a new database). Raise `StoreError` naming
    the path and what to do for anything else that is not a sound triage database.
    """
    if not path.exists():
        return 0
    if path.is_dir():
        raise StoreError(f"{path}: is a folder, not a database; give a file name (--db PATH)")
    try:
        with path.open("rb") as f:
            head = f.read(100)
        size = path.stat().st_size
    except OSError as err:
        raise StoreError(f"{path}: cannot be read ({err.strerror}); check its permissions") \
            from None
    if size == 0:
        return 0
    if not head.startswith(_HEADER) or len(head) < 100:
        raise StoreError(f"{path}: not a database file (no SQLite header); it was left as it "
                         "is; give the path of a triage database (--db PATH)")
    page_size = int.from_bytes(head[16:18], "big")
    page_size = 65536 if page_size == 1 else page_size
    pages = int.from_bytes(head[28:32], "big")
    valid_for = int.from_bytes(head[92:96], "big")
    counter = int.from_bytes(head[24:28], "big")
    wal = path.with_name(path.name + "-wal")
    # A crash during a checkpoint can leave the file short while the WAL still holds the pages.
    wal_pending = wal.exists() and wal.stat().st_size > 0
    if pages and valid_for == counter and size < pages * page_size and not wal_pending:
        raise StoreError(f"{path}: truncated database ({size} of {pages * page_size} bytes); "
                         "it was left as it is; restore it from a backup (triage backup)")
    # With no -wal or -journal beside it no one is writing the file now, and reading it
    # immutable creates nothing beside a file that may turn out to be refused.
    quiet = immutable or not (wal.exists() or path.with_name(path.name + "-journal").exists())
    try:
        conn = connect(path, read_only=True, immutable=quiet)
    except sqlite3.Error as err:
        raise explain(err, path) from None
    try:
        row = conn.execute("PRAGMA quick_check(1)").fetchone() if deep else ("ok",)
        if row is None or row[0] != "ok":
            said = " ".join(str(row[0] if row else "no answer").replace("*", "").split())
            raise StoreError(f"{path}: damaged database (quick_check: {said}); it was left "
                             "as it is; restore it from a backup (triage backup)")
        app = conn.execute("PRAGMA application_id").fetchone()[0]
        version = int(conn.execute("PRAGMA user_version").fetchone()[0])
        if app != APPLICATION_ID:
            tables = conn.execute("SELECT count(*) FROM sqlite_schema").fetchone()[0]
            if tables or version:
                raise StoreError(f"{path}: an SQLite database of another program, not a triage "
                                 "database; it was left as it is; give another --db")
            return 0
        return version
    except sqlite3.Error as err:
        raise explain(err, path) from None
    finally:
        conn.close()
