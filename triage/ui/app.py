"""The app and its one factory, `build_app`, used by the `triage` command and by the tests.

The first screen is drawn before the heavy parts are loaded: the store, the survey model and
the engine are imported (and the demo database filled) in a thread worker; the database is
then opened on the UI thread (an SQLite connection belongs to the thread that opened it) and
the survey list fills in. Keys that need the database say so until it is open.
"""

from __future__ import annotations

from collections.abc import Callable
from datetime import datetime
from pathlib import Path
from typing import TYPE_CHECKING, ClassVar, TypedDict, Unpack

from textual import events, work
from textual.app import App
from textual.binding import Binding, BindingType
from textual.notifications import SeverityLevel
from textual.theme import Theme
from textual.worker import Worker, WorkerState

if TYPE_CHECKING:  # the store and the engine load after the first screen is drawn
    from triage.ui.data import FieldData
    from triage.ui.verdicts import VerdictThread

# One accent hue (a slate blue) in stronger or weaker weight; no traffic-light colours: the
# theme's success, warning and error colours are the same hue, so no widget turns green,
# amber or red. Three themes of that one hue: dark, light (for sunlight) and high contrast;
# meaning is carried by words and marks (tier words, ✓ saved, ✗ not saved, the reversed
# label of the focused field), never by colour alone.
ACCENT = "#6c8ebf"
THEME = Theme(name="triage", primary=ACCENT, secondary="#4f6a94", accent=ACCENT,
              success=ACCENT, warning=ACCENT, error="#93b1dc", foreground="#dde3ea",
              background="#15191f", surface="#1d232b", panel="#262e38", dark=True)
LIGHT = Theme(name="triage-light", primary="#35598c", secondary="#4f6a94", accent="#35598c",
              success="#35598c", warning="#35598c", error="#284670", foreground="#111820",
              background="#f7f8fa", surface="#eceff4", panel="#dde3ec", dark=False)
CONTRAST = Theme(name="triage-contrast", primary="#a8c8ff", secondary="#a8c8ff",
                 accent="#a8c8ff", success="#a8c8ff", warning="#a8c8ff", error="#c9dcff",
                 foreground="#ffffff", background="#000000", surface="#000000",
                 panel="#202020", dark=True)
THEMES = {"triage": ("dark", THEME), "triage-light": ("light", LIGHT),
          "triage-contrast": ("high contrast", CONTRAST)}


class TriageApp(App[None]):
    """The field screens over one survey database."""

    TITLE = "triage"
    CSS_PATH = "app.tcss"
    ENABLE_COMMAND_PALETTE = False
    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("ctrl+q", "quit", "quit", priority=True, show=False),
        Binding("f1", "help", "help", priority=True),
        Binding("f12", "next_theme", "theme: dark, light, high contrast", priority=True,
                show=False),
        # Focus moves at once, before the next key is taken (triage/ui/focus.py).
        Binding("tab", "next_field(1)", "next field", priority=True, show=False),
        Binding("shift+tab", "next_field(-1)", "previous field", priority=True, show=False),
        Binding("enter", "enter", "accept", priority=True, show=False),
    ]

    def __init__(self, db_path: Path, *, clock: Callable[[], datetime] | None = None,
                 blink: bool = True, open_survey: str | None = None,
                 report_dir: Path | None = None,
                 demo_samples: Path | None = None) -> None:
        super().__init__()
        self.db_path = Path(db_path)
        self._data: FieldData | None = None  # once the database is open
        self._verdicts: VerdictThread | None = None
        self.clock = clock
        self.blink = blink
        self.open_survey = open_survey
        self.report_dir = report_dir or self.db_path.parent / "reports"
        self.demo_samples = demo_samples
        self.who = "inspector"
        self.refusal: str | None = None

    @property
    def is_open(self) -> bool:
        """Whether the survey database is open (it opens behind the first screen)."""
        return self._data is not None

    @property
    def data(self) -> FieldData:
        """The survey database (`triage.ui.data.FieldData`); ask `is_open` first."""
        if self._data is None:
            raise RuntimeError("the survey database is not open yet")
        return self._data

    @property
    def verdicts(self) -> VerdictThread:
        """The thread that recomputes the verdict, once the database is open."""
        if self._verdicts is None:
            raise RuntimeError("the survey database is not open yet")
        return self._verdicts

    async def on_event(self, event: events.Event) -> None:
        """Keys are acted on in the order they were typed (triage/ui/focus.py).

        Textual hands a key to the focused widget's queue, and a binding of that widget (Down
        in a table, Backspace in a field) runs only when the key has come back up to the app,
        behind the keys taken meanwhile. Here a key a binding takes runs that binding at once,
        once the focused widget has handled the keys already handed to it; a key the widget
        types (a printable character in a field) goes to it in order as before.
        """
        if (isinstance(event, events.Key) and not event.is_forwarded
                and await self._key_in_order(event)):
            return
        await super().on_event(event)

    async def _key_in_order(self, event: events.Key) -> bool:
        from triage.ui.focus import drain

        self.app_focus = True
        if await self._check_bindings(event.key, priority=True):
            return True
        widget = self.focused
        if widget is None or widget.check_consume_key(event.key, event.character):
            return False
        await drain(widget)
        return bool(await self._check_bindings(event.key))

    def on_mount(self) -> None:
        """Draw the survey list at once; open the database behind it."""
        from triage.ui.screens.survey_list import SurveyListScreen
        from triage.ui.settings import load_settings

        for _, theme in THEMES.values():
            self.register_theme(theme)
        saved = load_settings().get("theme")
        self.theme = saved if saved in THEMES else "triage"
        self.push_screen(SurveyListScreen())
        # after the first frame, so the heavy imports do not hold it up
        self.call_after_refresh(self.load_worker)

    @work(thread=True, exclusive=True, group="open", exit_on_error=False)
    def load_worker(self) -> None:
        """Import the store, the model and the engine; fill the demo database if asked."""
        from triage.ui import data

        if self.demo_samples is not None:
            fd = data.FieldData(self.db_path, clock=self.clock)
            try:
                fd.load_samples(self.demo_samples, "demo")
                if not fd.setting("last_inspector_name"):
                    fd.remember("last_inspector_name", "Demo Inspector")
            finally:
                fd.close()
        import triage.assess  # noqa: F401  (warm: the first verdict needs it)

    def on_worker_state_changed(self, event: Worker.StateChanged) -> None:
        """The database can be opened once the heavy modules are in."""
        if event.worker.group != "open":
            return
        if event.state == WorkerState.SUCCESS:
            self.database_ready()
        elif event.state == WorkerState.ERROR:
            self.refuse(str(event.worker.error).splitlines()[0])

    def database_ready(self) -> None:
        """Open the database on the UI thread and fill the first screen."""
        from triage.store import default_who
        from triage.ui.data import FieldData, Refused
        from triage.ui.screens.survey_list import SurveyListScreen
        from triage.ui.verdicts import VerdictThread

        try:
            self._data = FieldData(self.db_path, clock=self.clock)
        except Refused as err:
            self.refuse(str(err))
            return
        self._verdicts = VerdictThread(self.db_path)
        self.who = str(self.data.setting("last_inspector_name") or default_who())
        if isinstance(self.screen, SurveyListScreen):
            self.screen.refresh_rows()
        if self.open_survey:
            from triage.store import StoreError
            from triage.ui.screens.survey import SurveyScreen

            try:
                self.push_screen(SurveyScreen(self.open_survey))
            except (StoreError, Refused, ValueError) as err:
                self.notify(f"survey not opened: {str(err).splitlines()[0]}")

    def refuse(self, message: str) -> None:
        """The database cannot be used: leave with the one-line reason (status 1)."""
        self.refusal = message
        self.exit(return_code=1)

    def notify(self, message: str, *, title: str = "", severity: SeverityLevel = "information",
               timeout: float | None = None, markup: bool = False) -> None:
        """A notification; its text may quote a survey, so it is escaped and never markup."""
        from triage.safetext import visible

        super().notify(visible(message), title=visible(title), severity=severity,
                       timeout=timeout, markup=False)

    def action_next_field(self, step: int) -> None:
        """Tab and shift+Tab: the next or previous field, focused at once."""
        if step > 0:
            self.screen.focus_next()
        else:
            self.screen.focus_previous()

    async def action_enter(self) -> None:
        """Enter: the screen acts at once (accept and move on, add the item, edit the row).

        The focused widget first handles the keys already handed to it; a screen that does
        not take Enter here (no `enter_pressed`, or it returns False) gets it the usual way.
        """
        from textual.actions import SkipAction

        from triage.ui.focus import drain

        widget = self.focused
        handler = getattr(self.screen, "enter_pressed", None)
        if widget is None or handler is None:
            raise SkipAction()
        await drain(widget)
        if self.focused is not widget or not handler(widget):
            raise SkipAction()

    def action_next_theme(self) -> None:
        """F12: the next theme (dark, light, high contrast), remembered for next time."""
        from triage.ui.settings import save_setting

        names = list(THEMES)
        name = names[(names.index(self.theme) + 1) % len(names)] if self.theme in names \
            else names[0]
        self.theme = name
        kept = save_setting("theme", name)
        self.notify(f"theme: {THEMES[name][0]}" + ("" if kept else
                    " (for this session: the settings file could not be written)"))

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
        if self._verdicts is not None:
            self._verdicts.close()
        if self._data is not None:
            self._data.close()


class Options(TypedDict, total=False):
    """What `build_app` takes beside the database (see TriageApp)."""

    clock: Callable[[], datetime] | None
    blink: bool
    open_survey: str | None
    report_dir: Path | None
    demo_samples: Path | None


def build_app(db_path: Path | str, **options: Unpack[Options]) -> TriageApp:
    """The app on a survey database (created when missing).

    Options: `clock` (a callable giving the time, for tests), `blink` (False stops cursors
    blinking), `open_survey` (a survey id to open at once), `report_dir` (where reports are
    written by default), `demo_samples` (a folder of survey files loaded into the database
    first: `triage demo`).
    """
    return TriageApp(Path(db_path), **options)
