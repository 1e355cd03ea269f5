"""The messages the screens send each other, and the fixed words they show.

Kept in one module so a reader finds every event and every caution line in one place.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from textual.message import Message

if TYPE_CHECKING:  # the fields import these messages
    from triage.ui.widgets.pane import FormField

    CAUTION_FULL: str
    PROBABILITY_NOTE: str

# The caution, short; it keeps "indicative" and "engineer of record". The whole caution
# (CAUTION_FULL) and the probability label come from triage.assess, imported on first use
# (module __getattr__), so the first screen is drawn before the engine is loaded.
CAUTION_SHORT = "indicative only, not a safety certificate: the engineer of record decides"


def __getattr__(name: str) -> str:
    """CAUTION_FULL and PROBABILITY_NOTE, read from triage.assess when first asked for."""
    if name in ("CAUTION_FULL", "PROBABILITY_NOTE"):
        from triage.assess import CAUTION, PROBABILITY_LABEL

        return CAUTION if name == "CAUTION_FULL" else PROBABILITY_LABEL
    raise AttributeError(name)

SAVED = "✓ saved"
NOT_SAVED = "✗ not saved: "
UNSIGNED = "UNSIGNED report: no key was used; nobody vouches for it by signature"


class FieldAccepted(Message):
    """A field's value passed its own check and asks to be saved at `path`."""

    def __init__(self, field: FormField, path: str, value: object) -> None:
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
