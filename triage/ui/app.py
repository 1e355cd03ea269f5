"""The app and its one factory, `build_app`, used by the `triage` command and by the tests."""

from __future__ import annotations

from datetime import datetime
from pathlib import Path
from typing import Any, ClassVar

from textual.app import App
from textual.binding import Binding, BindingType
from textual.theme import Theme

from triage.ui.data import Clock, FieldData, VerdictThread, default_who

# One accent hue (a slate blue) in stronger or weaker weight; no traffic-light colours: the
# theme's success, warning and error colours are the same hue, so no widget turns green,
# amber or red.
ACCENT = "#6c8ebf"
THEME = Theme(name="triage", primary=ACCENT, secondary="#4f6a94", accent=ACCENT,
              success=ACCENT, warning=ACCENT, error="#93b1dc", foreground="#dde3ea",
              background="#15191f", surface="#1d232b", panel="#262e38", dark=True)


class TriageApp(App[None]):
    """The field screens over one survey database."""

    TITLE = "triage"
    CSS_PATH = "app.tcss"
    ENABLE_COMMAND_PALETTE = False
    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("ctrl+q", "quit", "quit", priority=True, show=False),
        Binding("f1", "help", "help", priority=True),
    ]

    def __init__(self, db_path: Path, *, clock: Clock | None = None, blink: bool = True,
                 open_survey: str | None = None, key_dir: Path | None = None,
                 report_dir: Path | None = None) -> None:
        super().__init__()
        self.db_path = Path(db_path)
        self.data = FieldData(self.db_path, clock=clock)
        self.clock = clock
        self.blink = blink
        self.open_survey = open_survey
        self.key_dir = key_dir
        self.report_dir = report_dir or self.db_path.parent / "reports"
        self.who = str(self.data.setting("last_inspector_name") or default_who())
        self.verdicts = VerdictThread(self.db_path)

    def on_mount(self) -> None:
        """Open on the survey list (or straight on one survey)."""
        self.register_theme(THEME)
        self.theme = "triage"
        from triage.ui.screens.survey_list import SurveyListScreen

        self.push_screen(SurveyListScreen())
        if self.open_survey:
            from triage.ui.screens.survey import SurveyScreen

            self.push_screen(SurveyScreen(self.open_survey))

    def action_help(self) -> None:
        """Show the keys of the screen in view."""
        from triage.ui.screens.help import HelpScreen

        if not isinstance(self.screen, HelpScreen):
            self.push_screen(HelpScreen(self.screen))

    def now(self) -> datetime:
        """The time now (the test clock when one is set)."""
        from triage.ui.data import now_local

        return now_local(self.clock)

    def on_unmount(self) -> None:
        """Close the database."""
        self.verdicts.close()
        self.data.close()


def build_app(db_path: Path | str, **options: Any) -> TriageApp:
    """The app on a survey database (created when missing).

    Options: `clock` (a callable giving the time, for tests), `blink` (False stops cursors
    blinking), `open_survey` (a survey id to open at once), `key_dir` (where to look for
    signing keys), `report_dir` (where reports are written by default).
    """
    return TriageApp(Path(db_path), **options)
