"""`SurveyReader`: the read side of a survey database, as the reading commands use it.

`triage list`, `export`, `report`, `compare` and `summary` read surveys through this protocol
only, so any backend with these methods can serve them: the local SQLite `Store` today, a
coordination centre's server database later. A backend need not inherit from it (structural
typing); `tests/store/test_reader.py` checks that `Store` satisfies it.

Survey ids are text (a UUID as printed). A method given an id the backend does not hold raises
`triage.store.StoreError`, except `has_survey`, `survey_row`, `load_assessment` and
`photo_dir`, which answer False or None.
"""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING, Protocol, runtime_checkable

if TYPE_CHECKING:
    from triage.assess import Assessment
    from triage.model import Survey

    from .area import BuildingRow
    from .rows import SurveyRow


@runtime_checkable
class SurveyReader(Protocol):
    """What the reading commands ask of a survey database."""

    @property
    def location(self) -> str:
        """Where the surveys are, as a message names it (a file path, a server address)."""
        ...

    def has_survey(self, survey_id: str) -> bool:
        """Whether a survey with exactly this id is held (hidden ones too)."""
        ...

    def match_ids(self, given: str) -> list[str]:
        """The ids `given` names: `[given]` when it is a held survey's id.

        Else every id starting with it (hidden surveys too; the start compared in lower
        case); empty when none does.
        """
        ...

    def list_surveys(self, include_hidden: bool = False) -> list[SurveyRow]:
        """Every survey as the list shows it, newest inspection first, then by id.

        Read from stored columns: nothing is assessed.
        """
        ...

    def survey_row(self, survey_id: str) -> SurveyRow | None:
        """The list row of one survey (hidden ones too); None when it is not held.

        Its `stale` says whether the stored assessment is of an earlier revision.
        """
        ...

    def load_survey(self, survey_id: str) -> Survey:
        """The survey at its current revision, as the validated model."""
        ...

    def load_assessment(self, survey_id: str) -> Assessment | None:
        """The last stored assessment of the survey, possibly of an earlier revision.

        None when there is none or it no longer reads; `survey_row(...).stale` says whether
        it is of the current revision.
        """
        ...

    def revision(self, survey_id: str) -> int:
        """The survey's current revision: 1 when stored, one more with every change."""
        ...

    def photo_dir(self, survey_id: str) -> Path | None:
        """The folder the survey's relative photo paths start from, when known; else None."""
        ...

    def photo_bytes(self, sha256: str) -> bytes | None:
        """The photo named by this SHA-256 (a survey photo's `sha256`), checked against it.

        None when the backend does not hold it. Reports and `export DIR/` take photos only
        from here (or from inside a survey file's own folder), never from a path.
        """
        ...

    def building_rows(self) -> list[BuildingRow]:
        """The area summary: one row per building id with its latest visible survey.

        Latest by inspection time (UTC); rows ordered by building name, address and id.
        """
        ...

    def close(self) -> None:
        """Release the connection; the reader is not used after this."""
        ...


@runtime_checkable
class ReportLog(SurveyReader, Protocol):
    """A reader that also records the reports issued from it (`triage report ID`)."""

    def record_report(self, survey_id: str, revision: int, path: str | None = None,
                      fingerprint: str | None = None, who: str | None = None) -> None:
        """Record that a report covering `revision` was written to `path`.

        `fingerprint` is the signing key's (None: unsigned). A later edit then shows as
        "edited since report" in `list`.
        """
        ...
