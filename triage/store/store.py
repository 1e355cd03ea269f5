"""The `Store`: surveys kept in SQLite, every edit one durable transaction, every change logged.

See the package docstring for the representation (a survey's visible JSON in its row, removed
items kept in the change log) and the transaction rules. The class is built in layers, one
concern per module: `core` (connection, write transaction, time stamp), `reads` (surveys,
list and area rows), `assessments`, `writes` (new surveys, edits), `history` (change log,
undo, hide) and, here, the checked opening, reports issued, settings and whole-file work.
"""

from __future__ import annotations

import json
import os
import shutil
import sqlite3
import tempfile
import threading
import uuid
from pathlib import Path
from typing import Any

from .connect import StoreError, check_file, connect, explain
from .core import Clock
from .history import ChangeHistory
from .paths import default_db_path
from .schema import current_version, ensure_schema

# Files this process has open through a Store, with how many stores. Closing any descriptor of
# a file drops every POSIX lock the process holds on it, SQLite's included: a second store of
# the same file (a worker's) must not read the header with a plain open(), or another process
# could checkpoint and delete the WAL beneath the first one's open connection.
_OPEN_HERE: dict[Path, int] = {}
_OPEN_LOCK = threading.Lock()


def _opened(p: Path, step: int) -> None:
    with _OPEN_LOCK:
        n = _OPEN_HERE.get(p, 0) + step
        if n > 0:
            _OPEN_HERE[p] = n
        else:
            _OPEN_HERE.pop(p, None)


class Store(ChangeHistory):
    """A survey database. One per thread: an SQLite connection belongs to its thread."""

    _key: Path | None = None  # the resolved path, while open (see _OPEN_HERE)

    # --- opening -------------------------------------------------------------------------

    read_only = False
    _scratch: Path | None = None

    @classmethod
    def open(cls, path: str | Path | None = None, *, create: bool = True,
             who: str | None = None, refresh: bool = True, check: bool = True,
             clock: Clock | None = None, read_only: bool = False) -> Store:
        """Open (or create) a database: checked first, schema upgraded after a backup.

        With `refresh`, assessments left stale (by a crash, or a merge) are refreshed. With
        `check` off, the `quick_check` pass is skipped (for short-lived worker stores on a
        file the app has just opened and checked). With `read_only`, nothing is ever written
        to the file or beside it (`open_read_only`): for the commands that only read.
        """
        p = Path(path) if path is not None else default_db_path()
        if read_only:
            return cls.open_read_only(p, who=who, check=check, clock=clock)
        if not p.exists() and not create:
            raise StoreError(f"{p}: no database there; check the path (--db PATH)")
        key = p.resolve()
        with _OPEN_LOCK:
            open_here = _OPEN_HERE.get(key, 0) > 0
        # a file open here already was checked when it was first opened (see _OPEN_HERE)
        version = -1 if open_here else check_file(p, deep=check)
        if not p.exists():
            try:
                p.parent.mkdir(parents=True, exist_ok=True)
            except OSError as err:
                raise StoreError(f"{p.parent}: cannot create the folder ({err.strerror}); use "
                                 "--db PATH with a writable folder") from None
        try:
            conn = connect(p)
            mode = conn.execute("PRAGMA journal_mode").fetchone()[0]
            if mode != "wal":
                conn.execute("PRAGMA journal_mode = WAL")
        except sqlite3.Error as err:
            raise explain(err, p) from None
        store = cls(conn, p, who=who, clock=clock)
        store._key = key
        _opened(key, 1)
        try:
            if version < 0:
                version = int(conn.execute("PRAGMA user_version").fetchone()[0])
            store.migration_backup = ensure_schema(conn, p, version)
            if refresh:
                store.refresh_stale()
        except BaseException:
            store.close()
            raise
        return store

    @classmethod
    def open_read_only(cls, path: str | Path, *, who: str | None = None, check: bool = True,
                       clock: Clock | None = None) -> Store:
        """Open an existing database only to read it; works on read-only media.

        The file is checked as `open` checks it, then read through a read-only connection
        (`mode=ro`; `immutable` when its folder cannot be written and no `-wal` or `-journal`
        lies beside it, so SQLite needs no `-shm` there). A file SQLite cannot read in place
        (a `-wal` on a read-only stick) or of an older schema is read through a copy made in a
        temporary folder (upgraded there; the file itself is never changed). Stale
        assessments are left as they are; any write is refused as read-only.
        """
        p = Path(path)
        if not p.exists():
            raise StoreError(f"{p}: no database there; check the path (--db PATH)")
        version = check_file(p, deep=check)
        if version == 0:
            raise StoreError(f"{p}: an empty file, not yet a triage database (--db PATH)")
        sidecars = any(p.with_name(p.name + s).exists() for s in ("-wal", "-journal"))
        writable = os.access(p.parent, os.W_OK)
        conn = None
        if version == current_version():
            try:
                conn = connect(p, read_only=True, immutable=not writable and not sidecars)
                conn.execute("SELECT count(*) FROM surveys").fetchone()
            except sqlite3.Error:
                if conn is not None:
                    conn.close()
                conn = None
        scratch = None
        if conn is None:
            scratch = Path(tempfile.mkdtemp(prefix="triage-read-"))
            try:
                copy = scratch / "read.db"
                shutil.copyfile(p, copy)
                for s in ("-wal", "-journal"):
                    if p.with_name(p.name + s).exists():
                        shutil.copyfile(p.with_name(p.name + s), copy.with_name(copy.name + s))
                if version != current_version():
                    cls.open(copy, refresh=False, check=False).close()
                conn = connect(copy, read_only=True)
            except (OSError, sqlite3.Error, StoreError) as err:
                shutil.rmtree(scratch, ignore_errors=True)
                if isinstance(err, StoreError):
                    raise StoreError(str(err).replace(str(scratch / "read.db"), str(p))) \
                        from None
                if isinstance(err, sqlite3.Error):
                    raise explain(err, p) from None
                raise StoreError(f"{p}: cannot be read ({err.strerror})") from None
        store = cls(conn, p, who=who, clock=clock)
        store.read_only = True
        store._scratch = scratch
        return store

    def close(self) -> None:
        """Close the connection (and drop the temporary copy a read-only open made)."""
        super().close()
        key, self._key = self._key, None
        if key is not None:
            _opened(key, -1)
        if self._scratch is not None:
            shutil.rmtree(self._scratch, ignore_errors=True)
            self._scratch = None

    # --- reports and settings ------------------------------------------------------------

    def record_report(self, survey_id: str | uuid.UUID, revision: int,
                      path: str | None = None, fingerprint: str | None = None,
                      who: str | None = None) -> None:
        """Record that a report covering `revision` was issued; a later edit shows in `list`."""
        sid = str(survey_id)
        with self._write() as c:
            row = c.execute("SELECT revision FROM surveys WHERE id = ?", (sid,)).fetchone()
            if row is None:
                raise StoreError(f"survey {sid}: not in this database ({self.path})")
            if not 1 <= int(revision) <= int(row[0]):
                raise StoreError(f"survey {sid}: revision {revision} does not exist "
                                 f"(current: {row[0]})")
            c.execute("INSERT INTO reports (survey_id, revision, path, fingerprint, at, who) "
                      "VALUES (?, ?, ?, ?, ?, ?)",
                      (sid, int(revision), path, fingerprint, self._stamp(), who or self.who))

    def reports(self, survey_id: str | uuid.UUID) -> list[dict[str, Any]]:
        """The reports issued for a survey, oldest first."""
        cur = self.conn.execute(
            "SELECT revision, path, fingerprint, at, who FROM reports WHERE survey_id = ? "
            "ORDER BY at, revision", (str(survey_id),))
        names = [d[0] for d in cur.description]
        return [dict(zip(names, row, strict=True)) for row in cur]

    def settings_get(self, key: str, default: Any = None) -> Any:
        """A remembered setting, or `default`."""
        row = self.conn.execute("SELECT value FROM settings WHERE key = ?", (key,)).fetchone()
        return default if row is None else json.loads(row[0])

    def settings_set(self, key: str, value: Any) -> None:
        """Remember a setting (JSON data)."""
        with self._write() as c:
            c.execute("INSERT OR REPLACE INTO settings (key, value) VALUES (?, ?)",
                      (key, json.dumps(value, ensure_ascii=False)))

    # --- whole-file operations -----------------------------------------------------------

    def backup_to(self, dest: str | Path) -> Path:
        """A consistent single-file copy (WAL content included), safe while others write."""
        from .backup import backup_connection

        return backup_connection(self.conn, self.path, Path(dest))

    def integrity(self) -> str:
        """`PRAGMA integrity_check` ('ok' when sound)."""
        return str(self.conn.execute("PRAGMA integrity_check").fetchone()[0])
