"""The one place the screens talk to the store: `FieldData`, the facade over `triage.store`.

Screens never write SQL and never open the database themselves: they call `FieldData`, which
wraps `triage.store.Store`. Every edit is one durable transaction in the store; a value the
store (or the survey model behind it) refuses raises `Refused` with the rule in one line, and
nothing is written.

Beside it: `triage.ui.verdicts` (the verdict and report workers, each thread with its own
store) and `triage.ui.choices` (what the field forms offer to pick from).
"""

from __future__ import annotations

import re
import uuid
from collections.abc import Callable
from datetime import datetime
from pathlib import Path
from typing import TYPE_CHECKING

from triage.model import Survey, SurveyError, parse_survey, parse_survey_text
from triage.store import Store, StoreError
from triage.store.rows import Change, SurveyRow

if TYPE_CHECKING:  # the engine loads in the verdict thread
    from triage.assess import Assessment

Clock = Callable[[], datetime]


class Refused(Exception):
    """A value or an action was refused; `str()` is one line, the rule broken."""


def rule_of(message: str) -> str:
    """The rule of a one-line message `field.path: rule`, in words (the field is beside it).

    The field's own name in words, which the model adds at the end, is left out too; any key
    left in the rule reads as words (triage.standards.vocabulary.plain_text).
    """
    from triage.standards.vocabulary import plain_text

    head, sep, rest = message.partition(": ")
    if sep and (re.fullmatch(r"[\w\[\].]+", head) is not None):
        said = plain_text(message)
        _, sep2, rule = said.partition(": ")
        return rule if sep2 else plain_text(rest)
    return plain_text(message)


def said(message: str, survey: Survey | None = None) -> str:
    """A one-line message for a person: its field and any key in it as words."""
    from triage.standards.vocabulary import plain_text

    return plain_text(message, survey)


def now_local(clock: Clock | None = None) -> datetime:
    """The time now, with the laptop's offset (or the test clock's)."""
    if clock is not None:
        return clock()
    return datetime.now().astimezone().replace(microsecond=0)


class FieldData:
    """The store of one database, as the screens use it (UI thread only)."""

    def __init__(self, db_path: Path, clock: Clock | None = None) -> None:
        self.path = Path(db_path)
        self.clock = clock
        try:
            self.store = Store.open(self.path, create=True)
        except StoreError as err:
            raise Refused(str(err)) from None

    def close(self) -> None:
        """Close the database."""
        self.store.close()

    # --- reading ---------------------------------------------------------------------------

    def surveys(self, include_hidden: bool = False) -> list[SurveyRow]:
        """The surveys on this laptop, as rows for the list."""
        return list(self.store.list_surveys(include_hidden=include_hidden))

    def row(self, survey_id: str) -> SurveyRow | None:
        """The list row of one survey (None when hidden or gone)."""
        return self.store.survey_row(survey_id)

    def load(self, survey_id: str) -> Survey:
        """The survey at its current revision."""
        return self.store.load_survey(survey_id)

    def revision(self, survey_id: str) -> int:
        """The survey's current revision number."""
        return int(self.store.revision(survey_id))

    def stored_assessment(self, survey_id: str) -> Assessment | None:
        """The last assessment saved for the survey, if any."""
        return self.store.load_assessment(survey_id)

    def changes(self, survey_id: str) -> list[Change]:
        """The survey's change log, newest first."""
        return list(self.store.change_log(survey_id))

    # --- editing ---------------------------------------------------------------------------

    def set(self, survey_id: str, path: str, value: object, who: str) -> int:
        """Save one field; returns the new revision, or raises `Refused` with the rule."""
        try:
            return int(self.store.set_value(survey_id, path, value, who))
        except (StoreError, SurveyError, ValueError) as err:
            raise Refused(str(err).splitlines()[0] if str(err) else "refused") from None

    def add(self, survey_id: str, path: str, item: dict[str, object], who: str,
            index: int | None = None) -> int:
        """Add an item to a list of the survey (a reading, a member group, a storey …)."""
        try:
            return int(self.store.add_item(survey_id, path, item, who, index=index))
        except (StoreError, SurveyError, ValueError) as err:
            raise Refused(str(err).splitlines()[0] if str(err) else "refused") from None

    def attach_photo(self, survey_id: str, path: str, file: str, caption: str,
                     who: str) -> int:
        """Copy a photo file into the store, onto the photo list at `path`.

        Blob and entry are one transaction; returns the new revision, or raises `Refused` in
        one line (not a JPEG or PNG, too big, no such file) with nothing saved.
        """
        from triage.errors import TriageError

        try:
            f = Path(file).expanduser()
            return int(self.store.attach_photo(survey_id, path, f, caption, who))
        except (TriageError, ValueError) as err:
            raise Refused(str(err).splitlines()[0] if str(err) else "refused") from None
        except OSError as err:
            raise Refused(f"{file}: {err.strerror or 'could not be read'}") from None

    def remove(self, survey_id: str, path: str, who: str) -> int:
        """Remove an item (kept in the change log)."""
        try:
            return int(self.store.remove_item(survey_id, path, who))
        except (StoreError, SurveyError, ValueError) as err:
            raise Refused(str(err).splitlines()[0] if str(err) else "refused") from None

    def undo(self, survey_id: str, who: str) -> Change | None:
        """Undo the survey's last change; the change undone, or None when there is none."""
        try:
            return self.store.undo_last(survey_id, who)
        except (StoreError, SurveyError, ValueError) as err:
            raise Refused(str(err).splitlines()[0]) from None

    def hide(self, survey_id: str, who: str) -> None:
        """Hide a survey from the list (kept, and logged)."""
        self.store.hide_survey(survey_id, who)

    def add_survey(self, data: dict[str, object], who: str, source: str | None = None) -> str:
        """Validate survey data and store it as a new survey; returns its id."""
        try:
            survey = parse_survey(data)
            self.store.add_survey(survey, who, source)
        except (StoreError, SurveyError) as err:
            raise Refused(str(err)) from None
        return str(survey.survey_id)

    def new_survey(self, data: dict[str, object], who: str) -> str:
        """A new survey from the new-survey form: fresh ids, inspected now."""
        data = dict(data)
        data.setdefault("format", "triage-survey/1")
        data["id"] = str(uuid.uuid4())
        building = data["building"]
        data["building"] = dict(building) if isinstance(building, dict) else building
        if isinstance(data["building"], dict):
            data["building"].setdefault("id", str(uuid.uuid4()))
        given = data.get("inspection")
        insp: dict[str, object] = dict(given) if isinstance(given, dict) else {}
        insp.setdefault("at", now_local(self.clock).isoformat())
        data["inspection"] = insp
        return self.add_survey(data, who, source="new survey")

    def reinspect(self, survey_id: str, inspector: dict[str, object], who: str) -> str:
        """A re-inspection of a survey; returns the new survey's id.

        Building and storeys are copied, readings and damage cleared, and the earlier survey
        is linked as `previous`.
        """
        old = self.load(survey_id).to_json_dict()
        storeys = [{"label": s["label"], "height_m": s["height_m"],
                    "below_grade": s.get("below_grade", False)} for s in old["storeys"]]
        data = {
            "format": "triage-survey/1",
            "id": str(uuid.uuid4()),
            "building": old["building"],
            "inspection": {"inspector": inspector, "at": now_local(self.clock).isoformat(),
                           "previous": str(survey_id)},
            "storeys": storeys,
        }
        return self.add_survey(data, who, source=f"re-inspection of {survey_id}")

    def load_samples(self, folder: Path, who: str) -> int:
        """Import every sample survey of a folder (the demo); returns how many were added."""
        n = 0
        for f in sorted(folder.glob("*.json")):
            try:
                survey = parse_survey_text(f.read_text(encoding="utf-8"))
                self.store.add_survey(survey, who, f.name)
                n += 1
            except (StoreError, SurveyError, OSError):
                continue  # a broken sample is left out; the rest still load
        return n

    # --- settings and reports ---------------------------------------------------------------

    def setting(self, key: str, default: object = None) -> object:
        """A remembered setting (last inspector, last gauge length, last key file)."""
        return self.store.settings_get(key, default)

    def remember(self, key: str, value: object) -> None:
        """Remember a setting for next time."""
        self.store.settings_set(key, value)

    def record_report(self, survey_id: str, revision: int, path: str,
                      fingerprint: str | None) -> None:
        """Note that a report of this revision was written."""
        self.store.record_report(survey_id, revision, path, fingerprint)

