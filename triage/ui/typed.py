"""The screens' typed view of the app: `self.app` is the `TriageApp`, not a bare `App`.

Textual types a widget's `app` as `App[object]`; a screen or pane that reads the database
(`self.app.data`) or the verdict thread declares `app = getters.app(TriageApp)` instead, as
`TriageScreen` does here for every screen of ours.
"""

from __future__ import annotations

from typing import TypeVar

from textual import getters
from textual.screen import Screen

from triage.ui.app import TriageApp

ResultT = TypeVar("ResultT")


class TriageScreen(Screen[ResultT]):
    """A screen of ours: `self.app` is the `TriageApp`."""

    app = getters.app(TriageApp)
