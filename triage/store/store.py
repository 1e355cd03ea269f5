"""The `Store`: surveys kept in SQLite, every edit one durable transaction, every change logged.

See the package docstring for the representation (a survey's visible JSON in its row, removed
items kept in the change log) and the transaction rules.
"""

from __future__ import annotations

import functools
import getpass
import hashlib
import json
import random
import sqlite3
import time
import uuid
from collections.abc import Callable
from datetime import UTC, datetime
from pathlib import Path
from typing import TYPE_CHECKING, Any

import sqlite_utils

from triage.model import ID_NAMESPACE, Survey, SurveyError, canonical_json, parse_survey

from . import edits
from .connect import StoreError, SurveyConflict, check_file, connect, explain, immediate
from .paths import default_db_path
from .rows import ROW_SQL, Change, SurveyRow, row_of
from .schema import ensure_schema

if TYPE_CHECKING:
    from triage.assess import Assessment

    from .area import BuildingRow

Clock = Callable[[], datetime]
UNDOABLE = ("set", "add", "remove", "hide")


def _now_utc() -> datetime:
    return datetime.now(UTC)


def _who_default() -> str:
    try:
        return getpass.getuser() or "unknown"
    except Exception:  # no login name in some containers
        return "unknown"


_encode = json.JSONEncoder(ensure_ascii=False, separators=(",", ":")).encode


def _dump(value: Any) -> str | None:
    if value is None:
        return None
    return _encode(value) if isinstance(value, dict | list) else edits.scalar_json(value)


def _load(text: str | None) -> Any:
    return None if text is None else json.loads(text)


def import_uid(survey_id: str, doc_text: str) -> str:
    """The id of the change that brought a survey in: the same on every laptop for one file."""
    digest = hashlib.sha256(doc_text.encode("utf-8")).hexdigest()
    return str(uuid.uuid5(ID_NAMESPACE, f"stored:{survey_id}:{digest}"))


_RUNS = 200   # storey pieces joined by SQLite at most (a deeper `||` chain nears its limits)


@functools.lru_cache(maxsize=64)
def _update_doc_sql(runs: int) -> str:
    """UPDATE of the survey JSON given as head, `runs` runs of storeys and tail."""
    middle = " || ',' || ".join("?" * runs)
    return (f"UPDATE surveys SET doc = ? || {middle + ' || ' if runs else ''}?, revision = ?, "
            "updated_at = ? WHERE id = ? AND revision = ?")


def _doc_pieces(head: str, storeys: list[str], tail: str) -> list[str]:
    """The survey JSON in pieces for SQLite to join: head, runs of storeys, tail.

    Python keeps a string's UTF-8 with it once made, and needs none for an ASCII string. The
    head (the building's name and address, often not ASCII) and every storey that is not ASCII
    go as they are, so the UTF-8 of those no edit touched is not made again; ASCII storeys next
    to each other are joined here, so SQLite joins few pieces. Joined with commas between the
    runs, the pieces are the text.
    """
    pieces = [head]
    run: list[str] = []
    for text in storeys:
        if text.isascii():
            run.append(text)
            continue
        if run:
            pieces.append(",".join(run))
            run = []
        pieces.append(text)
    if run:
        pieces.append(",".join(run))
    if len(pieces) > _RUNS + 1:
        pieces = [head, ",".join(storeys)]
    pieces.append(tail)
    return pieces


_UID_KEEP = ~((0xF000 << 64) | (0xC000 << 48)) & ((1 << 128) - 1)   # version and variant bits
_UID_SET = (4 << 76) | (0x8000 << 48)                                 # version 4, RFC 4122


def new_uid() -> str:
    """A random (version 4) UUID as text, for a change's id: `str(uuid.uuid4())`, cheaper.

    The bits come from the `random` module's generator, which is seeded from the system's
    entropy at start and again in every forked child; a change id needs to be unique, not
    unguessable, and this saves a system call on every saved keystroke.
    """
    n = (random.getrandbits(128) & _UID_KEEP) | _UID_SET
    h = f"{n:032x}"
    return f"{h[:8]}-{h[8:12]}-{h[12:16]}-{h[16:20]}-{h[20:]}"


class _UtcStamp:
    """`datetime.now(UTC).isoformat(timespec="milliseconds")`, the date part kept per second.

    The second and its text are kept as one tuple, so threads sharing a stamp never pair one
    second's text with another's.
    """

    def __init__(self) -> None:
        self._kept: tuple[int, str] = (-1, "")

    def __call__(self) -> str:
        ms = time.time_ns() // 1_000_000
        second, frac = divmod(ms, 1000)
        kept = self._kept
        if kept[0] != second:
            kept = (second, time.strftime("%Y-%m-%dT%H:%M:%S", time.gmtime(second)))
            self._kept = kept
        return f"{kept[1]}.{frac:03d}+00:00"


_utc_stamp = _UtcStamp()


def list_columns(doc: dict[str, Any]) -> dict[str, Any]:
    """The copies of survey fields that the lists read without parsing the JSON."""
    b = doc["building"]
    loc = b.get("location") or {}
    insp = doc["inspection"]
    at = str(insp["at"])
    at_utc = datetime.fromisoformat(at).astimezone(UTC).strftime("%Y-%m-%dT%H:%M:%S.%fZ")
    return {"building_id": str(b["id"]), "building": b["name"], "address": b["address"],
            "lat": loc.get("lat"), "lon": loc.get("lon"),
            "inspector": insp["inspector"]["name"], "at": at, "at_utc": at_utc}


class Store:
    """A survey database. One per thread: an SQLite connection belongs to its thread."""

    def __init__(self, conn: sqlite3.Connection, path: Path, who: str | None = None,
                 clock: Clock | None = None) -> None:
        self.conn = conn
        self.path = path
        self.db = sqlite_utils.Database(conn)
        self.who = who or _who_default()
        self.clock = clock or _now_utc
        self.migration_backup: Path | None = None
        self._docs: dict[str, tuple[int, dict[str, Any]]] = {}
        self._texts: dict[str, edits.CanonicalText] = {}

    # --- opening -------------------------------------------------------------------------

    @classmethod
    def open(cls, path: str | Path | None = None, *, create: bool = True,
             who: str | None = None, refresh: bool = True, check: bool = True,
             clock: Clock | None = None) -> Store:
        """Open (or create) a database: checked first, schema upgraded after a backup.

        With `refresh`, assessments left stale (by a crash, or a merge) are refreshed. With
        `check` off, the `quick_check` pass is skipped (for short-lived worker stores on a
        file the app has just opened and checked).
        """
        p = Path(path) if path is not None else default_db_path()
        if not p.exists() and not create:
            raise StoreError(f"{p}: no database there; check the path (--db PATH)")
        version = check_file(p, deep=check)
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
        try:
            store.migration_backup = ensure_schema(conn, p, version)
            if refresh:
                store.refresh_stale()
        except BaseException:
            conn.close()
            raise
        return store

    def close(self) -> None:
        """Close the connection."""
        self.conn.close()

    def __enter__(self) -> Store:
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
        if self.clock is _now_utc:
            return _utc_stamp()
        return self.clock().astimezone(UTC).isoformat(timespec="milliseconds")

    # --- surveys in ----------------------------------------------------------------------

    def add_survey(self, survey: Survey, who: str | None = None, source: str | None = None,
                   *, assess: bool = True, op: str = "import") -> str:
        """Store a validated survey in one transaction, with its assessment.

        Returns "added", or "unchanged" when the identical survey is stored already. A
        different survey under a stored id raises `SurveyConflict`; the stored one is kept.
        """
        sid = str(survey.survey_id)
        doc = survey.to_json_dict()
        text = canonical_json(doc)
        result = None
        if assess:
            from triage.assess import assess as run_assess
            try:
                result = run_assess(survey)
            except Exception:  # the survey is kept all the same; its assessment stays stale
                result = None
        now = self._stamp()
        with self._write() as c:
            row = c.execute("SELECT doc FROM surveys WHERE id = ?", (sid,)).fetchone()
            if row is not None:
                if row[0] == text:
                    return "unchanged"
                raise SurveyConflict(
                    f"survey {sid}: a different survey is already stored under this id; the "
                    "stored one was kept (export it to compare, or give the new one its own id)")
            cols = list_columns(doc)
            c.execute(
                "INSERT INTO surveys (id, building_id, building, address, lat, lon, inspector, "
                "at, at_utc, doc, revision, source, created_at, updated_at) "
                "VALUES (:id, :building_id, :building, :address, :lat, :lon, :inspector, :at, "
                ":at_utc, :doc, 1, :source, :now, :now)",
                {**cols, "id": sid, "doc": text, "source": source, "now": now})
            c.execute(
                "INSERT INTO changes (uid, survey_id, revision, op, path, old, new, at, who) "
                "VALUES (?, ?, 1, ?, '', NULL, ?, ?, ?)",
                (import_uid(sid, text), sid, op, text, now, who or self.who))
            if result is not None:
                self._put_assessment(c, sid, 1, result)
        self._keep(sid, 1, doc)
        return "added"

    # --- reading -------------------------------------------------------------------------

    def _doc_row(self, sid: str) -> tuple[int, str]:
        row = self.conn.execute("SELECT revision, doc FROM surveys WHERE id = ?",
                                (sid,)).fetchone()
        if row is None:
            raise StoreError(f"survey {sid}: not in this database ({self.path})")
        return int(row[0]), str(row[1])

    def survey_json(self, survey_id: str | uuid.UUID) -> dict[str, Any]:
        """The survey's `triage-survey/1` JSON data as stored (the visible items)."""
        return dict(json.loads(self._doc_row(str(survey_id))[1]))

    def load_survey(self, survey_id: str | uuid.UUID) -> Survey:
        """The survey at its current revision, as the validated model."""
        sid = str(survey_id)
        _, text = self._doc_row(sid)
        try:
            return parse_survey(json.loads(text))
        except SurveyError as err:  # cannot happen for data the store validated
            raise StoreError(f"survey {sid}: stored data no longer validates ({err})") from None

    def revision(self, survey_id: str | uuid.UUID) -> int:
        """The survey's current revision (1 when stored, one more with every change)."""
        return self._doc_row(str(survey_id))[0]

    def photo_dir(self, survey_id: str | uuid.UUID) -> Path | None:
        """The folder the survey's photo paths are relative to, when it is known.

        Photo paths are relative to the survey file (DESIGN.md); the store keeps no files, so
        this is the folder of the survey file or report it was imported from, while that file
        is still there. None for a survey made in the app or merged from another database.
        """
        row = self.conn.execute("SELECT source FROM surveys WHERE id = ?",
                                (str(survey_id),)).fetchone()
        if row is None or not row[0]:
            return None
        src = Path(row[0])
        if src.suffix.lower() not in (".json", ".pdf") or not src.is_file():
            return None
        return src.parent

    def has_survey(self, survey_id: str | uuid.UUID) -> bool:
        """Whether the survey is in this database (hidden or not)."""
        return self.conn.execute("SELECT 1 FROM surveys WHERE id = ?",
                                 (str(survey_id),)).fetchone() is not None

    def match_ids(self, given: str) -> list[str]:
        """`[given]` when it is a stored survey's id, else every id starting with it.

        Hidden surveys count; the start is compared in lower case, as ids are printed.
        """
        if self.has_survey(given):
            return [given]
        start = given.lower()
        return [r.id for r in self.list_surveys(include_hidden=True) if r.id.startswith(start)]

    def list_surveys(self, include_hidden: bool = False) -> list[SurveyRow]:
        """Every survey, newest inspection first, from plain columns (fast, never assessed)."""
        where = "" if include_hidden else " WHERE s.hidden = 0"
        cur = self.conn.execute(ROW_SQL + where + " ORDER BY s.at_utc DESC, s.id")
        return [row_of(r) for r in cur]

    def survey_row(self, survey_id: str | uuid.UUID) -> SurveyRow | None:
        """The list row of one survey (hidden ones too); None when absent."""
        r = self.conn.execute(ROW_SQL + " WHERE s.id = ?", (str(survey_id),)).fetchone()
        return None if r is None else row_of(r)

    def building_rows(self) -> list[BuildingRow]:
        """One row per building id: its latest visible survey (see `triage.store.area`)."""
        from .area import building_rows

        return building_rows(self)

    def change_log(self, survey_id: str | uuid.UUID) -> list[Change]:
        """The survey's change log, newest first."""
        cur = self.conn.execute(
            "SELECT seq, uid, survey_id, revision, op, path, old, new, at, who, undoes "
            "FROM changes WHERE survey_id = ? ORDER BY seq DESC", (str(survey_id),))
        return [Change(r[0], r[1], r[2], r[3], r[4], r[5], _load(r[6]), _load(r[7]), r[8],
                       r[9], r[10]) for r in cur]

    def hidden_items(self, survey_id: str | uuid.UUID) -> list[Change]:
        """Items removed from the survey and not restored: each `remove` change, item in `old`."""
        undone = self._undone(str(survey_id))
        return [c for c in self.change_log(survey_id) if c.op == "remove"
                and c.uid not in undone]

    def _undone(self, sid: str) -> set[str]:
        return {r[0] for r in self.conn.execute(
            "SELECT undoes FROM changes WHERE survey_id = ? AND undoes IS NOT NULL", (sid,))}

    # --- edits ---------------------------------------------------------------------------

    def _current(self, c: sqlite3.Connection, sid: str) -> tuple[int, dict[str, Any]]:
        row = c.execute("SELECT revision FROM surveys WHERE id = ?", (sid,)).fetchone()
        if row is None:
            raise StoreError(f"survey {sid}: not in this database ({self.path})")
        rev = int(row[0])
        cached = self._docs.get(sid)
        if cached is not None and cached[0] == rev:
            return rev, cached[1]
        text = c.execute("SELECT doc FROM surveys WHERE id = ?", (sid,)).fetchone()[0]
        return rev, json.loads(text)

    def _commit_edit(self, c: sqlite3.Connection, sid: str, rev: int,
                     applied: edits.Applied, op: str, who: str | None,
                     undoes: str | None = None) -> Change | None:
        """Write the row (only if still at `rev`) and its change; None if it had moved on."""
        new_rev = rev + 1
        now = self._stamp()
        head, storeys, tail = self._texts.setdefault(sid, edits.CanonicalText()).parts(
            applied.doc)
        if applied.path.startswith(("building", "inspection")):
            # The list columns copy these blocks; other edits leave them (and their index) be.
            cur = c.execute(
                "UPDATE surveys SET doc = :doc, revision = :rev, building_id = :building_id, "
                "building = :building, address = :address, lat = :lat, lon = :lon, "
                "inspector = :inspector, at = :at, at_utc = :at_utc, updated_at = :now "
                "WHERE id = :id AND revision = :was",
                {**list_columns(applied.doc), "doc": head + ",".join(storeys) + tail,
                 "rev": new_rev, "now": now, "id": sid, "was": rev})
        else:
            pieces = _doc_pieces(head, storeys, tail)
            cur = c.execute(_update_doc_sql(len(pieces) - 2),
                            (*pieces, new_rev, now, sid, rev))
        if cur.rowcount != 1:
            return None
        uid = new_uid()
        who = who or self.who
        cur = c.execute(
            "INSERT INTO changes (uid, survey_id, revision, op, path, old, new, at, who, undoes) "
            "VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)",
            (uid, sid, new_rev, op, applied.path, _dump(applied.old), _dump(applied.new), now,
             who, undoes))
        return Change(int(cur.lastrowid or 0), uid, sid, new_rev, op, applied.path,
                      applied.old, applied.new, now, who, undoes)

    def _edit(self, survey_id: str | uuid.UUID, op: str, path: str, value: Any,
              who: str | None) -> Change:
        sid = str(survey_id)
        with self._write() as c:
            # Optimistic: the JSON kept since this store's last edit, checked by the UPDATE's
            # revision condition under the write lock; reloaded if another process moved on.
            cached = self._docs.get(sid)
            change = None
            if cached is not None:
                try:
                    applied = edits.apply(cached[1], op, path, value)
                except edits.EditRefused:
                    # Refuse only on the survey as it is now, not as this store last saw it.
                    row = c.execute("SELECT revision FROM surveys WHERE id = ?",
                                    (sid,)).fetchone()
                    if row is not None and int(row[0]) == cached[0]:
                        raise
                else:
                    change = self._commit_edit(c, sid, cached[0], applied, op, who)
            if change is None:
                self._docs.pop(sid, None)
                rev, doc = self._current(c, sid)
                applied = edits.apply(doc, op, path, value)
                change = self._commit_edit(c, sid, rev, applied, op, who)
                if change is None:   # cannot happen under the write lock
                    raise StoreError(f"survey {sid}: changed during the edit; try again")
        self._keep(sid, change.revision, applied.doc)
        return change

    def edit(self, survey_id: str | uuid.UUID, op: str, path: str, value: Any = None,
             who: str | None = None) -> Change:
        """One edit (`set`, `add`, `remove`) as one durable transaction; the change logged."""
        return self._edit(survey_id, op, path, value, who)

    def set_value(self, survey_id: str | uuid.UUID, path: str, value: Any,
                  who: str | None = None) -> int:
        """Set one field (None: make it absent); returns the new revision."""
        return self._edit(survey_id, "set", path, value, who).revision

    def add_item(self, survey_id: str | uuid.UUID, path: str, item: dict[str, Any],
                 who: str | None = None, index: int | None = None) -> int:
        """Add a storey, reading, member group, hazard or photo to the list at `path`."""
        target = path if index is None else f"{path}[{index}]"
        return self._edit(survey_id, "add", target, item, who).revision

    def remove_item(self, survey_id: str | uuid.UUID, path: str,
                    who: str | None = None) -> int:
        """Hide an item: it leaves the survey and is kept, whole, in its `remove` change."""
        return self._edit(survey_id, "remove", path, None, who).revision

    def undo_last(self, survey_id: str | uuid.UUID, who: str | None = None) -> Change | None:
        """Undo the survey's last change not yet undone; returns the change undone, or None.

        The undo is itself a change (op `undo`), so the log keeps both values.
        """
        sid = str(survey_id)
        with self._write() as c:
            row = c.execute(
                "SELECT seq, uid, survey_id, revision, op, path, old, new, at, who, undoes "
                "FROM changes WHERE survey_id = ? AND op IN ('set', 'add', 'remove', 'hide') "
                "AND uid NOT IN (SELECT undoes FROM changes WHERE survey_id = ? "
                "AND undoes IS NOT NULL) ORDER BY seq DESC LIMIT 1", (sid, sid)).fetchone()
            if row is None:
                return None
            target = Change(row[0], row[1], row[2], row[3], row[4], row[5], _load(row[6]),
                            _load(row[7]), row[8], row[9], row[10])
            if target.op == "hide":
                c.execute("UPDATE surveys SET hidden = 0, updated_at = ? WHERE id = ?",
                          (self._stamp(), sid))
                self._log_plain(c, sid, "undo", "hidden", True, False, who, target.uid)
                return target
            rev, doc = self._current(c, sid)
            inv_op, inv_path, inv_value = edits.inverse(target.op, target.path, target.old,
                                                        target.new)
            applied = edits.apply(doc, inv_op, inv_path, inv_value)
            change = self._commit_edit(c, sid, rev, applied, "undo", who, undoes=target.uid)
            if change is None:
                raise StoreError(f"survey {sid}: changed during the undo; try again")
        self._keep(sid, change.revision, applied.doc)
        return target

    def _log_plain(self, c: sqlite3.Connection, sid: str, op: str, path: str, old: Any,
                   new: Any, who: str | None, undoes: str | None = None) -> None:
        rev = c.execute("SELECT revision FROM surveys WHERE id = ?", (sid,)).fetchone()[0]
        c.execute(
            "INSERT INTO changes (uid, survey_id, revision, op, path, old, new, at, who, undoes) "
            "VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)",
            (new_uid(), sid, rev, op, path, _dump(old), _dump(new), self._stamp(),
             who or self.who, undoes))

    def hide_survey(self, survey_id: str | uuid.UUID, who: str | None = None) -> None:
        """Hide a survey from the lists (kept, logged, undone by `undo_last`)."""
        sid = str(survey_id)
        with self._write() as c:
            cur = c.execute("UPDATE surveys SET hidden = 1, updated_at = ? WHERE id = ?",
                            (self._stamp(), sid))
            if cur.rowcount == 0:
                raise StoreError(f"survey {sid}: not in this database ({self.path})")
            self._log_plain(c, sid, "hide", "hidden", False, True, who)

    # --- assessments ---------------------------------------------------------------------

    def _put_assessment(self, c: sqlite3.Connection, sid: str, revision: int,
                        a: Assessment) -> None:
        g = a.governing
        c.execute(
            "UPDATE surveys SET tier = ?, level = ?, gov_storey = ?, gov_dir = ?, "
            "gov_basis = ?, provisional = ?, assessed_revision = ? WHERE id = ?",
            (a.tier, a.performance_level, g.storey, g.dir, g.basis, int(a.provisional),
             revision, sid))
        c.execute("INSERT OR REPLACE INTO assessments (survey_id, revision, json) "
                  "VALUES (?, ?, ?)", (sid, revision, a.to_json()))

    def save_assessment(self, survey_id: str | uuid.UUID, revision: int,
                        assessment: Assessment) -> bool:
        """Store the assessment computed for `revision`, in its own transaction.

        False (nothing written) when the survey has moved on to a later revision meanwhile.
        """
        sid = str(survey_id)
        with self._write() as c:
            row = c.execute("SELECT revision FROM surveys WHERE id = ?", (sid,)).fetchone()
            if row is None or int(row[0]) != int(revision):
                return False
            self._put_assessment(c, sid, int(revision), assessment)
        return True

    def load_assessment(self, survey_id: str | uuid.UUID) -> Assessment | None:
        """The last stored assessment of the survey (possibly of an earlier revision).

        None when there is none, or when it no longer reads as this engine's assessment
        (written by another version): recompute it then.
        """
        from pydantic import ValidationError

        from triage.assess import parse_assessment

        row = self.conn.execute("SELECT json FROM assessments WHERE survey_id = ?",
                                (str(survey_id),)).fetchone()
        if row is None:
            return None
        try:
            return parse_assessment(json.loads(row[0]))
        except (ValidationError, ValueError):
            return None

    def stale_ids(self) -> list[str]:
        """Surveys whose stored assessment is not of their current revision."""
        return [r[0] for r in self.conn.execute(
            "SELECT id FROM surveys WHERE assessed_revision IS NOT revision ORDER BY id")]

    def refresh_stale(self) -> int:
        """Assess every stale survey and store the result; returns how many were refreshed."""
        ids = self.stale_ids()
        if not ids:
            return 0
        from triage.assess import assess

        n = 0
        for sid in ids:
            rev = self.revision(sid)
            try:
                result = assess(self.load_survey(sid))
            except Exception:  # left stale: the list shows no tier rather than a wrong one
                continue
            n += self.save_assessment(sid, rev, result)
        return n

    def assess_now(self, survey_id: str | uuid.UUID) -> Assessment:
        """Assess the survey at its current revision and store the result."""
        from triage.assess import assess

        rev = self.revision(survey_id)
        result = assess(self.load_survey(survey_id))
        self.save_assessment(survey_id, rev, result)
        return result

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
        return list(self.db.query(
            "SELECT revision, path, fingerprint, at, who FROM reports WHERE survey_id = ? "
            "ORDER BY at, revision", [str(survey_id)]))

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

