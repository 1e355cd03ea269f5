"""Writing surveys: storing a new one, and each edit as one durable transaction.

An edit is applied to the survey JSON kept since this store's last edit (checked by the
UPDATE's revision condition under the write lock), validated where it touched (`edits`),
then the row and one change-log row are written together.
"""

from __future__ import annotations

import functools
import hashlib
import json
import sqlite3
import uuid
from collections.abc import Sequence
from datetime import UTC, datetime
from pathlib import Path
from typing import Any

from triage.model import ID_NAMESPACE, Survey, canonical_json
from triage.photos import CheckedPhoto, PhotoRefused

from . import edits
from .assessments import AssessmentRecords
from .blobs import put_photos
from .canonical import CanonicalText, scalar_json
from .connect import StoreError, SurveyConflict
from .rows import Change
from .texts import photos_found

_encode = json.JSONEncoder(ensure_ascii=False, separators=(",", ":")).encode


def dump(value: Any) -> str | None:
    """A change's old or new value as the JSON text the change log keeps (None stays NULL)."""
    if value is None:
        return None
    return _encode(value) if isinstance(value, dict | list) else scalar_json(value)


def import_uid(survey_id: str, doc_text: str) -> str:
    """The id of the change that brought a survey in: the same on every laptop for one file."""
    digest = hashlib.sha256(doc_text.encode("utf-8")).hexdigest()
    return str(uuid.uuid5(ID_NAMESPACE, f"stored:{survey_id}:{digest}"))


@functools.lru_cache(maxsize=64)
def _update_doc_sql(runs: int) -> str:
    """UPDATE of the survey JSON given as head, `runs` runs of storeys and tail."""
    middle = " || ',' || ".join("?" * runs)
    return (f"UPDATE surveys SET doc = ? || {middle + ' || ' if runs else ''}?, revision = ?, "
            "updated_at = ? WHERE id = ? AND revision = ?")


_RUNS = 200   # storey pieces joined by SQLite at most (a deeper `||` chain nears its limits)


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


class SurveyWrites(AssessmentRecords):
    """New surveys in, and edits (`set`, `add`, `remove`) to stored ones."""

    def add_survey(self, survey: Survey, who: str | None = None, source: str | None = None,
                   *, assess: bool = True, op: str = "import",
                   photos: Sequence[CheckedPhoto] = ()) -> str:
        """Store a validated survey in one transaction, with its assessment and photos.

        Returns "added", or "unchanged" when the identical survey is stored already (stored
        texts are all as this version writes them: schema 3 rewrote the `/1` ones), or
        "photos" when the stored survey is this one but for photos that were missing when it
        was imported and are now found: their digests are set (one `set` change each, by
        `who`) and their blobs stored. A different survey under a stored id raises
        `SurveyConflict`; the stored one is kept. `photos` are the checked blobs its photos
        name by `sha256` (`triage.photos.gather` reads them from the survey file's folder),
        stored in the same transaction.
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
                if self._attach_found(c, sid, row[0], text, doc, result, photos, who, now):
                    return "photos"
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
            if photos:
                put_photos(c, photos)
        self._keep(sid, 1, doc)
        return "added"

    def _attach_found(self, c: sqlite3.Connection, sid: str, stored: str, text: str,
                      doc: dict[str, Any], result: Any, photos: Sequence[CheckedPhoto],
                      who: str | None, now: str) -> bool:
        """Photos missing at import, found now: set their digests (see `add_survey`)."""
        fills = photos_found(json.loads(stored), text)
        if fills is None:
            return False
        rev = int(c.execute("SELECT revision FROM surveys WHERE id = ?", (sid,)).fetchone()[0])
        put_photos(c, photos)
        for field, sha in fills:
            rev += 1
            c.execute(
                "INSERT INTO changes (uid, survey_id, revision, op, path, old, new, at, who) "
                "VALUES (?, ?, ?, 'set', ?, NULL, ?, ?, ?)",
                (str(uuid.uuid4()), sid, rev, f"{field}.sha256", scalar_json(sha), now,
                 who or self.who))
        c.execute("UPDATE surveys SET doc = ?, revision = ?, updated_at = ? WHERE id = ?",
                  (text, rev, now, sid))
        if result is not None:
            self._put_assessment(c, sid, rev, result)
        self._docs.pop(sid, None)
        self._texts.pop(sid, None)
        self._keep(sid, rev, doc)
        return True

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
        head, storeys, tail = self._texts.setdefault(sid, CanonicalText()).parts(
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
        uid = str(uuid.uuid4())
        who = who or self.who
        cur = c.execute(
            "INSERT INTO changes (uid, survey_id, revision, op, path, old, new, at, who, undoes) "
            "VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)",
            (uid, sid, new_rev, op, applied.path, dump(applied.old), dump(applied.new), now,
             who, undoes))
        return Change(int(cur.lastrowid or 0), uid, sid, new_rev, op, applied.path,
                      applied.old, applied.new, now, who, undoes)

    def _edit(self, survey_id: str | uuid.UUID, op: str, path: str, value: Any,
              who: str | None, photos: Sequence[CheckedPhoto] = ()) -> Change:
        sid = str(survey_id)
        with self._write() as c:
            if photos:   # the blobs an attached photo names, in the edit's own transaction
                put_photos(c, photos)
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

    def attach_photo(self, survey_id: str | uuid.UUID, path: str, file: str | Path,
                     caption: str = "", who: str | None = None) -> int:
        """Attach a photo file to the photo list at `path`; returns the new revision.

        `path` is a storey's, member group's or hazard's list (`storeys[1].photos`,
        `storeys[1].members[0].photos`, `hazards[0].photos`). The file is read (a regular
        file, at most 20 MB), checked (`triage.photos.check_photo`: JPEG or PNG by content,
        at most 40 megapixels) and copied into the database as a blob named by its SHA-256;
        the survey gains `{"path": "img/NAME", "caption", "sha256"}`. Blob and item are one
        transaction. A photo breaking a rule raises `PhotoRefused` (an `InputRefused`, with
        the file and the rule); an edit the survey refuses raises `EditRefused`; either way
        nothing is saved. The original file is not needed afterwards.
        """
        from triage.photos import check_photo, read_inside

        f = Path(file)
        data = read_inside(f.parent, f.name, str(f))
        if data is None:
            raise PhotoRefused(f"{f}: no such file")
        checked = check_photo(data, str(f))
        item = {"path": f"img/{f.name}", "caption": caption, "sha256": checked.sha256}
        return self._edit(survey_id, "add", path, item, who, photos=[checked]).revision

    def remove_item(self, survey_id: str | uuid.UUID, path: str,
                    who: str | None = None) -> int:
        """Hide an item: it leaves the survey and is kept, whole, in its `remove` change."""
        return self._edit(survey_id, "remove", path, None, who).revision
