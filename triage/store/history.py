"""The change log read back, undo, and hiding a whole survey."""

from __future__ import annotations

import json
import sqlite3
import uuid
from typing import Any

from . import edits
from .connect import StoreError
from .rows import Change
from .writes import SurveyWrites, dump


def _load(text: str | None) -> Any:
    return None if text is None else json.loads(text)


class ChangeHistory(SurveyWrites):
    """A survey's changes: listed, undone one by one (an undo is a change too), hidden items."""

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
            (str(uuid.uuid4()), sid, rev, op, path, dump(old), dump(new), self._stamp(),
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
