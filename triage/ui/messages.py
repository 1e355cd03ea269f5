"""The messages the screens send each other, and the fixed words they show.

Kept in one module so a reader finds every event and every caution line in one place.
"""

from __future__ import annotations

from typing import Any

from textual.message import Message

from triage.assess import CAUTION, PROBABILITY_LABEL

# The caution, whole and short; the short form keeps "indicative" and "engineer of record".
CAUTION_FULL = CAUTION
CAUTION_SHORT = "indicative only, not a safety certificate: the engineer of record decides"
PROBABILITY_NOTE = PROBABILITY_LABEL

SAVED = "✓ saved"
NOT_SAVED = "✗ not saved: "
UNSIGNED = "UNSIGNED report: no key was used; nobody vouches for it by signature"


class FieldAccepted(Message):
    """A field's value passed its own check and asks to be saved at `path`."""

    def __init__(self, field: Any, path: str, value: Any) -> None:
        super().__init__()
        self.field = field
        self.path = path
        self.value = value


class SurveySaved(Message):
    """The open survey changed in the store (a field saved, an item added or removed)."""

    def __init__(self, survey_id: str, revision: int, structural: bool = False) -> None:
        super().__init__()
        self.survey_id = survey_id
        self.revision = revision
        self.structural = structural
