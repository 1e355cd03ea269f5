"""The full verdict of a survey: reasons, probabilities, measure next, keep-out, profile, R."""

from __future__ import annotations

from typing import ClassVar

from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import VerticalScroll
from textual.widgets import Footer, Static

from triage.assess import Assessment
from triage.model import Survey
from triage.ui.shown import line
from triage.ui.typed import TriageScreen
from triage.ui.widgets.verdict import verdict_lines


class VerdictScreen(TriageScreen[None]):
    """The verdict panel on its own screen (F2 from the logging screen)."""

    CSS_PATH = "verdict.tcss"
    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape", "close", "back"),
        Binding("f2", "close", "back", show=False, priority=True),
    ]

    def __init__(self, survey: Survey, assessment: Assessment) -> None:
        super().__init__()
        self.survey = survey
        self.assessment = assessment

    def compose(self) -> ComposeResult:
        """Title, the verdict, footer."""
        b = self.survey.building
        yield Static(line(f"Verdict · {b.name} · {b.address}"), classes="title")
        with VerticalScroll(id="verdict-body"):
            yield Static(verdict_lines(self.survey, self.assessment,
                                       width=max(60, self.app.size.width - 6)),
                         id="verdict-text")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        """Arrow keys and PgUp/PgDn scroll the verdict."""
        self.query_one("#verdict-body").focus()

    def action_close(self) -> None:
        """Back to logging."""
        self.app.pop_screen()
