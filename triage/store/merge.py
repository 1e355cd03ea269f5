"""Gathering other databases into this one: `triage merge DB... --into DB`.

Each source is copied in one transaction, keyed by survey id, with its change log, stored
assessments, reports and photo blobs (each checked again on the way in):

- a survey not in the target is added, recording the source database (path and `db_id`);
- a survey whose changes in the target are all among the source's (the source edited further)
  is brought forward to the source's version, with the missing changes;
- a survey whose source changes are all in the target already, or whose JSON is the same, is
  left as it is; so merging the same sources again changes nothing;
- a survey edited differently on both sides keeps both: the source's version is added under an
  id of its own (UUID 5 of the id and the source JSON, so a second merge finds it), linked to
  the first by `conflict_of`; `list` and `summary` flag both until one of them is hidden;
- two identical texts are never a conflict: a survey edited on both sides to the same text, or
  to the text of a version kept already, takes the source's missing changes into its log and
  the source's hidden flag when those changes hide, unhide or undo a hide (so an undo or a hide
  made on a laptop reaches the centre); a conflict copy brought by a source (area -> laptop ->
  area) whose text is the target's own version, or a copy kept already, is not added again.

Sources are only read: through a read-only connection (`mode=ro`), or, when a `-wal` or
`-journal` file lies beside it, through a copy of the file and that file made in a temporary
folder, so the source's bytes stay as they were and edits still in its WAL are not lost. A
file that is not a triage database, is damaged, or has a newer schema is named and skipped.
"""

from __future__ import annotations

import hashlib
import json
import shutil
import sqlite3
import tempfile
import uuid
from collections.abc import Callable
from dataclasses import dataclass
from datetime import UTC, datetime
from pathlib import Path

from triage.model import ID_NAMESPACE, canonical_json

from . import schema
from .blobs import copy_new_blobs
from .connect import StoreError, check_file, explain, immediate, uri
from .store import Store

# Columns copied as they are (id, source, source_db and conflict_of are set by the merge).
_COPIED = ("building_id", "building", "address", "lat", "lon", "inspector", "at", "at_utc",
           "doc", "revision", "hidden", "tier", "level", "gov_storey", "gov_dir", "gov_basis",
           "provisional", "assessed_revision", "created_at", "updated_at")
_CHANGE_COLS = "uid, revision, op, path, old, new, at, who, undoes"
_REPORT_COLS = "revision, path, fingerprint, at, who"


@dataclass
class MergeResult:
    """What one source brought: counts of surveys, or why it was skipped."""

    source: str
    added: int = 0
    updated: int = 0
    unchanged: int = 0
    conflicts: int = 0
    skipped: str | None = None


def conflict_id(survey_id: str, source_doc: str) -> str:
    """The id given to a conflicting version: the same for the same version every time."""
    digest = hashlib.sha256(source_doc.encode("utf-8")).hexdigest()
    return str(uuid.uuid5(ID_NAMESPACE, f"conflict:{survey_id}:{digest}"))


def _readable_copy(src: Path, tmp: Path) -> tuple[Path, bool]:
    """The source itself, opened immutable, or a copy of it with its -wal or -journal.

    Immutable, SQLite creates nothing beside the file; a file with a -wal or -journal is
    copied with it into `tmp`, and SQLite recovers the copy, never the source.
    """
    sidecars = [src.with_name(src.name + s) for s in ("-wal", "-journal")]
    if not any(p.exists() for p in sidecars):
        return src, True
    out = tmp / "source.db"
    shutil.copyfile(src, out)
    for p, s in zip(sidecars, ("-wal", "-journal"), strict=True):
        if p.exists():
            shutil.copyfile(p, out.with_name(out.name + s))
    return out, False


def _prepare(src: Path, tmp: Path) -> tuple[Path, bool]:
    """A checked file at this schema version to attach read-only, and whether immutable."""
    readable, immutable = _readable_copy(src, tmp)
    try:
        version = check_file(readable, immutable=immutable)
    except StoreError as err:   # name the source, not the copy read in its place
        raise StoreError(str(err).replace(str(readable), str(src))) from None
    if version == 0:
        raise StoreError("not a triage database (empty)")
    known = schema.current_version()
    if version > known:
        raise StoreError(f"written by a newer triage (schema {version}; this one knows "
                         f"{known}); update triage to merge it")
    if version < known:
        # An older schema is upgraded in a copy, never in the source.
        copy = tmp / "upgraded.db"
        ro = sqlite3.connect(uri(readable, "ro", immutable=immutable), uri=True)
        try:
            out = sqlite3.connect(str(copy))
            ro.backup(out)
            out.close()
        finally:
            ro.close()
        Store.open(copy, refresh=False).close()
        return copy, False
    return readable, immutable


def _reason(err: StoreError, src: Path) -> str:
    """The message without the path it starts with (the command names the source itself)."""
    msg = str(err)
    for prefix in (f"{src}: ", f"{src.resolve()}: "):
        if msg.startswith(prefix):
            return msg[len(prefix):]
    return msg


def merge_source(store: Store, src: Path) -> MergeResult:
    """Merge one source database into `store`; a refused source comes back with `skipped`."""
    result = MergeResult(str(src))
    if not src.exists():
        result.skipped = "no such file"
        return result
    if src.resolve() == store.path.resolve():
        result.skipped = "is the target database itself"
        return result
    with tempfile.TemporaryDirectory(prefix="triage-merge-") as tmp:
        try:
            readable, immutable = _prepare(src, Path(tmp))
        except StoreError as err:
            result.skipped = _reason(err, src)
            return result
        except OSError as err:
            result.skipped = f"cannot be read ({err.strerror})"
            return result
        conn = store.conn
        try:
            conn.execute("ATTACH DATABASE ? AS src",
                         (uri(readable, "ro", immutable=immutable),))
        except sqlite3.Error as err:
            result.skipped = _reason(explain(err, src), src)
            return result
        try:
            _merge_attached(store, src, result)
        except sqlite3.Error as err:
            raise explain(err, store.path) from None
        finally:
            conn.execute("DETACH DATABASE src")
    return result


def _merge_attached(store: Store, src: Path, result: MergeResult) -> None:
    source = str(src.resolve())
    cols = ", ".join(_COPIED)
    scols = ", ".join(f"s.{c}" for c in _COPIED)
    with immediate(store.conn, store.path) as c:
        c.execute("PRAGMA defer_foreign_keys = ON")
        row = c.execute("SELECT value FROM src.meta WHERE key = 'db_id'").fetchone()
        source_db = row[0] if row else None
        c.execute("CREATE TEMP TABLE IF NOT EXISTS merge_new (id TEXT PRIMARY KEY)")
        c.execute("DELETE FROM temp.merge_new")
        c.execute("INSERT INTO temp.merge_new SELECT id FROM src.surveys "
                  "WHERE id NOT IN (SELECT id FROM main.surveys)")
        echoes = _kept_already(c)
        if echoes:
            c.executemany("DELETE FROM temp.merge_new WHERE id = ?", [(x,) for x in echoes])
        result.added = c.execute("SELECT count(*) FROM temp.merge_new").fetchone()[0]
        if result.added:
            c.execute(f"INSERT INTO main.surveys (id, {cols}, source, source_db, conflict_of) "
                      f"SELECT s.id, {scols}, ?, ?, s.conflict_of FROM src.surveys s "
                      "WHERE s.id IN (SELECT id FROM temp.merge_new)", (source, source_db))
            c.execute(f"INSERT INTO main.changes (survey_id, {_CHANGE_COLS}) "
                      f"SELECT survey_id, {_CHANGE_COLS} FROM src.changes "
                      "WHERE survey_id IN (SELECT id FROM temp.merge_new) ORDER BY seq")
            c.execute("INSERT INTO main.assessments SELECT * FROM src.assessments "
                      "WHERE survey_id IN (SELECT id FROM temp.merge_new)")
            c.execute(f"INSERT INTO main.reports (survey_id, {_REPORT_COLS}) "
                      f"SELECT survey_id, {_REPORT_COLS} FROM src.reports "
                      "WHERE survey_id IN (SELECT id FROM temp.merge_new)")
        common = c.execute("SELECT count(*) FROM src.surveys WHERE id IN "
                           "(SELECT id FROM main.surveys) AND id NOT IN "
                           "(SELECT id FROM temp.merge_new)").fetchone()[0]
        # Surveys on both sides where the source holds changes the target lacks.
        moved = [r[0] for r in c.execute(
            "SELECT DISTINCT sc.survey_id FROM src.changes sc "
            "WHERE sc.survey_id IN (SELECT id FROM main.surveys) "
            "AND sc.survey_id NOT IN (SELECT id FROM temp.merge_new) "
            "AND NOT EXISTS (SELECT 1 FROM main.changes mc "
            "WHERE mc.survey_id = sc.survey_id AND mc.uid = sc.uid)")]
        for sid in moved:
            outcome = _merge_one(c, sid, source, source_db)
            if outcome == "updated":
                result.updated += 1
            elif outcome == "conflict":
                result.conflicts += 1
        result.unchanged = common - result.updated - result.conflicts + len(echoes)
        # Photos: every blob the source holds and the target lacks, checked on the way in.
        copy_new_blobs(c)
        # Reports issued on the source for a version the target holds too.
        c.execute(f"INSERT OR IGNORE INTO main.reports (survey_id, {_REPORT_COLS}) "
                  f"SELECT r.survey_id, {', '.join('r.' + x for x in _REPORT_COLS.split(', '))} "
                  "FROM src.reports r JOIN src.surveys s ON s.id = r.survey_id "
                  "JOIN main.surveys m ON m.id = s.id AND m.doc = s.doc")


def _merge_one(c: sqlite3.Connection, sid: str, source: str, source_db: str | None) -> str:
    """One survey edited on the source: bring it forward, or keep both; returns the outcome."""
    mine = {r[0] for r in c.execute("SELECT uid FROM main.changes WHERE survey_id = ?",
                                    (sid,))}
    theirs = {r[0] for r in c.execute("SELECT uid FROM src.changes WHERE survey_id = ?",
                                      (sid,))}
    src_doc = c.execute("SELECT doc FROM src.surveys WHERE id = ?", (sid,)).fetchone()[0]
    my_doc = c.execute("SELECT doc FROM main.surveys WHERE id = ?", (sid,)).fetchone()[0]
    sets = ", ".join(f"{col} = s.{col}" for col in _COPIED)
    if mine <= theirs:
        c.execute(f"UPDATE main.surveys SET {sets}, source = ?, source_db = ? "
                  "FROM (SELECT * FROM src.surveys WHERE id = ?) AS s WHERE main.surveys.id = ?",
                  (source, source_db, sid, sid))
        c.execute(f"INSERT INTO main.changes (survey_id, {_CHANGE_COLS}) "
                  f"SELECT survey_id, {_CHANGE_COLS} FROM src.changes WHERE survey_id = ? "
                  "AND uid NOT IN (SELECT uid FROM main.changes WHERE survey_id = ?) "
                  "ORDER BY seq", (sid, sid))
        c.execute("INSERT OR REPLACE INTO main.assessments "
                  "SELECT * FROM src.assessments WHERE survey_id = ?", (sid,))
        c.execute(f"INSERT OR IGNORE INTO main.reports (survey_id, {_REPORT_COLS}) "
                  f"SELECT survey_id, {_REPORT_COLS} FROM src.reports WHERE survey_id = ?",
                  (sid,))
        return "updated"
    line = _copy_of_their_line(c, sid, theirs)
    if line is not None:
        return _forward_copy(c, line, sid, src_doc, my_doc, source, source_db)
    if src_doc == my_doc:
        return _carry(c, sid, sid)
    kept = _same_text_in_target(c, sid, src_doc)
    if kept is not None:   # this version is kept already (an earlier merge, or elsewhere)
        return _carry(c, kept, sid)
    cid = conflict_id(sid, src_doc)
    doc = json.loads(src_doc)
    doc["id"] = cid
    cols = ", ".join(x for x in _COPIED if x not in ("doc", "assessed_revision"))
    scols = ", ".join(f"s.{x}" for x in _COPIED if x not in ("doc", "assessed_revision"))
    c.execute(f"INSERT INTO main.surveys (id, doc, assessed_revision, {cols}, source, "
              f"source_db, conflict_of) SELECT ?, ?, NULL, {scols}, ?, ?, ? "
              "FROM src.surveys s WHERE s.id = ?",
              (cid, canonical_json(doc), source, source_db, sid, sid))
    c.execute(f"INSERT INTO main.changes (survey_id, {_CHANGE_COLS}) "
              f"SELECT ?, {_CHANGE_COLS} FROM src.changes WHERE survey_id = ? ORDER BY seq",
              (cid, sid))
    return "conflict"


def _copy_of_their_line(c: sqlite3.Connection, sid: str, theirs: set[str]) -> str | None:
    """A conflict copy of `sid` kept here whose log is an earlier part of the source's log.

    That copy is the source's own earlier version (kept when both sides had edited); the
    source has moved on from it (a further edit, an undo), so the copy moves on too.
    """
    for (cid,) in c.execute("SELECT id FROM main.surveys WHERE conflict_of = ? ORDER BY id",
                            (sid,)).fetchall():
        log = {r[0] for r in c.execute("SELECT uid FROM main.changes WHERE survey_id = ?",
                                       (cid,))}
        if log and log < theirs:
            return str(cid)
    return None


def _forward_copy(c: sqlite3.Connection, cid: str, sid: str, src_doc: str, my_doc: str,
                  source: str, source_db: str | None) -> str:
    """Bring the copy `cid` to the source's version; hide it when that is the target's own."""
    doc = json.loads(src_doc)
    doc["id"] = cid
    cols = [x for x in _COPIED if x not in ("doc", "assessed_revision", "hidden")]
    sets = ", ".join(f"{x} = s.{x}" for x in cols)
    c.execute(f"UPDATE main.surveys SET {sets}, doc = ?, assessed_revision = NULL, "
              "hidden = s.hidden, source = ?, source_db = ? "
              "FROM (SELECT * FROM src.surveys WHERE id = ?) AS s WHERE main.surveys.id = ?",
              (canonical_json(doc), source, source_db, sid, cid))
    c.execute(f"INSERT INTO main.changes (survey_id, {_CHANGE_COLS}) "
              f"SELECT ?, {_CHANGE_COLS} FROM src.changes WHERE survey_id = ? "
              "AND uid NOT IN (SELECT uid FROM main.changes WHERE survey_id = ?) ORDER BY seq",
              (cid, sid, cid))
    if _as_id(src_doc, sid) == _as_id(my_doc, sid):
        # the source came back to the target's own text: no conflict is left to show
        _carry(c, sid, sid)
        row = c.execute("SELECT revision, hidden FROM main.surveys WHERE id = ?",
                        (cid,)).fetchone()
        if not row[1]:
            c.execute("UPDATE main.surveys SET hidden = 1 WHERE id = ?", (cid,))
            c.execute("INSERT INTO main.changes (uid, survey_id, revision, op, path, old, new, "
                      "at, who) VALUES (?, ?, ?, 'hide', 'hidden', 'false', 'true', ?, "
                      "'merge')", (str(uuid.uuid4()), cid, row[0],
                                   datetime.now(UTC).isoformat(timespec="milliseconds")))
    return "updated"


def _as_id(doc_text: str, sid: str) -> str:
    """The survey JSON text with its id replaced (to compare versions kept under two ids)."""
    doc = json.loads(doc_text)
    doc["id"] = sid
    return canonical_json(doc)


def _same_text_in_target(c: sqlite3.Connection, sid: str, src_doc: str) -> str | None:
    """The id of a version of survey `sid` in the target whose text is `src_doc`'s, if any."""
    want = _as_id(src_doc, sid)
    for oid, doc in c.execute("SELECT id, doc FROM main.surveys WHERE id = ? OR conflict_of = ?",
                              (sid, sid)):
        if doc == src_doc or _as_id(doc, sid) == want:
            return str(oid)
    return None


def _kept_already(c: sqlite3.Connection) -> list[str]:
    """New conflict copies from the source whose text the target keeps already."""
    out = []
    for cid, of, doc in c.execute(
            "SELECT s.id, s.conflict_of, s.doc FROM src.surveys s JOIN temp.merge_new n "
            "ON n.id = s.id WHERE s.conflict_of IS NOT NULL").fetchall():
        kept = _same_text_in_target(c, of, doc)
        if kept is not None:
            _carry(c, kept, cid)
            out.append(cid)
    return out


_HIDING = ("hide", "unhide")


def _carry(c: sqlite3.Connection, target_id: str, source_id: str) -> str:
    """Same text on both sides: take the source's missing changes, and its retractions.

    The source's changes the target's log lacks are added to it (so a later merge knows
    them); when they hide, unhide or undo a hide, the target takes the source's hidden flag.
    Returns "unchanged", or "updated" when the hidden flag changed.
    """
    missing = c.execute(
        f"SELECT {_CHANGE_COLS} FROM src.changes WHERE survey_id = ? AND uid NOT IN "
        "(SELECT uid FROM main.changes WHERE survey_id = ?) ORDER BY seq",
        (source_id, target_id)).fetchall()
    if not missing:
        return "unchanged"
    c.executemany(f"INSERT INTO main.changes (survey_id, {_CHANGE_COLS}) "
                  f"VALUES (?, {', '.join('?' * len(_CHANGE_COLS.split(', ')))})",
                  [(target_id, *row) for row in missing])
    # a hide, an unhide, or the undo of one (logged as op "undo" on the path "hidden")
    if not any(m[2] in _HIDING or (m[2] == "undo" and m[3] == "hidden") for m in missing):
        return "unchanged"
    hidden = c.execute("SELECT hidden FROM src.surveys WHERE id = ?", (source_id,)).fetchone()
    mine = c.execute("SELECT hidden FROM main.surveys WHERE id = ?", (target_id,)).fetchone()
    if hidden is None or mine is None or hidden[0] == mine[0]:
        return "unchanged"
    c.execute("UPDATE main.surveys SET hidden = ? WHERE id = ?", (hidden[0], target_id))
    return "updated"


def merge_into(store: Store, sources: list[Path],
               each: Callable[[MergeResult], None] | None = None) -> list[MergeResult]:
    """Merge each source in turn (one transaction each); refresh what came in stale.

    `each` is called with a source's result as soon as its transaction has committed (the
    command prints it then, so a merge stopped half-way has said what it did).
    """
    results = []
    for s in sources:
        r = merge_source(store, Path(s))
        results.append(r)
        if each is not None:
            each(r)
    store.forget_cache()
    store.refresh_stale()
    return results
