"""Assessments kept with their survey: saved per revision, loaded, refreshed when stale."""

from __future__ import annotations

import json
import sqlite3
import uuid
from typing import TYPE_CHECKING

from .reads import SurveyReads

if TYPE_CHECKING:
    from triage.assess import Assessment


class AssessmentRecords(SurveyReads):
    """The latest assessment of each survey, with the revision it is of."""

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
