"""Reading surveys: their JSON, the validated model, list rows, the area rows.

These are the `SurveyReader` methods (`triage/store/reader.py`) of the local store.
"""

from __future__ import annotations

import json
import uuid
from pathlib import Path
from typing import TYPE_CHECKING, Any

from triage.model import Survey, SurveyError, parse_survey

from . import blobs
from .connect import StoreError
from .core import StoreCore
from .rows import ROW_SQL, SurveyRow, row_of

if TYPE_CHECKING:
    from .area import BuildingRow


class SurveyReads(StoreCore):
    """The read side: surveys by id, the list, the one-row-per-building summary."""

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

        Photo paths are relative to the survey file (docs/formats.md); the store keeps no files, so
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

    def photo_bytes(self, sha256: str) -> bytes | None:
        """The photo blob named by this SHA-256, checked against it; None when not held."""
        return blobs.photo_data(self.conn, sha256)

    def has_photo(self, sha256: str) -> bool:
        """Whether the blob named by this SHA-256 is held."""
        return blobs.has_photo(self.conn, sha256)

    def missing_photos(self, survey_id: str | uuid.UUID) -> list[tuple[str, str]]:
        """(field path, photo path) of each photo of the survey whose blob is not held."""
        return blobs.missing_photos(self.survey_json(survey_id), self.conn)

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
