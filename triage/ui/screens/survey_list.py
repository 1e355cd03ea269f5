"""Surveys on this laptop: filter by typing, open, start new, re-inspect, hide."""

from __future__ import annotations

import contextlib
from typing import TYPE_CHECKING, ClassVar

from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.widgets import DataTable, Footer, Input, Static

from triage.ui.messages import CAUTION_SHORT
from triage.ui.shown import block
from triage.ui.typed import TriageScreen
from triage.ui.widgets.field import no_blink, set_text, when_text
from triage.ui.widgets.pane import cell

if TYPE_CHECKING:  # the store is loaded behind the first screen
    from triage.store.rows import SurveyRow

def _when(at: str) -> str:
    """'2026-11-29 14:05 +13:00' from an ISO time, its offset kept (as the fields show it)."""
    return when_text(at)


class SurveyListScreen(TriageScreen[None]):
    """The list of surveys: the first screen."""

    CSS_PATH = "survey_list.tcss"
    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("enter", "open", "open", priority=True),
        Binding("ctrl+o", "open", "open", show=False, priority=True),
        Binding("ctrl+n", "new", "new survey", priority=True),
        Binding("ctrl+r", "reinspect", "re-inspect", priority=True),
        Binding("ctrl+t", "hide", "hide", priority=True),
        Binding("ctrl+l", "show_hidden", "hidden too", priority=True),
        Binding("ctrl+q", "app.quit", "quit", priority=True),
        Binding("down", "cursor(1)", "down", show=False),
        Binding("up", "cursor(-1)", "up", show=False),
    ]

    def __init__(self) -> None:
        super().__init__()
        self.rows: list[SurveyRow] = []
        self.include_hidden = False

    def compose(self) -> ComposeResult:
        """Title, filter, table, caution, footer."""
        yield Static("Surveys on this laptop", classes="title", id="list-title")
        yield Input(placeholder="type to filter by building, address, inspector or tier",
                    id="filter", compact=True)
        table: DataTable[str] = DataTable(id="surveys", cursor_type="row", zebra_stripes=True)
        yield table
        yield Static("", id="list-status", classes="hint")
        yield Static(f"Tiers are {CAUTION_SHORT}.", classes="caution")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        """Fill the table."""
        table = self.query_one("#surveys", DataTable)
        table.add_column("building", width=19, key="building")
        table.add_column("address", width=15, key="address")
        table.add_column("inspected", width=23, key="at")
        table.add_column("tier", width=10, key="tier")
        table.add_column("", width=3, key="flags")
        no_blink(self.query_one("#filter", Input))
        self.query_one("#filter", Input).focus()
        self.refresh_rows()

    def on_screen_resume(self) -> None:
        """Back from a survey: its tier may have changed."""
        self.refresh_rows()

    def ready(self) -> bool:
        """Whether the database is open; says so when not."""
        app = self.app
        if not app.is_open:
            set_text(self.query_one("#list-status", Static), "opening the survey database …")
            return False
        return True

    def refresh_rows(self, keep: str | None = None) -> None:
        """Reload the rows from the store and apply the filter."""
        app = self.app
        if not self.ready():
            return
        self.rows = app.data.surveys(include_hidden=self.include_hidden)
        self.apply_filter(keep)

    def _matches(self, row: SurveyRow, words: list[str]) -> bool:
        # the id too, so the 8-character code a paper form gives finds the earlier survey
        hay = " ".join(str(x or "") for x in (row.building, row.address, row.inspector,
                                              row.tier, _when(row.at), row.id)).lower()
        return all(w in hay for w in words)

    def apply_filter(self, keep: str | None = None) -> None:
        """Show the rows matching what is typed in the filter."""
        from triage.assess import tier_words

        table = self.query_one("#surveys", DataTable)
        current = keep or self.selected_id()
        words = self.query_one("#filter", Input).value.lower().split()
        table.clear()
        shown = 0
        for r in self.rows:
            if not self._matches(r, words):
                continue
            flags = ("p" if r.provisional else "") + ("e" if r.edited_since_report else "") + (
                "h" if r.hidden else "")
            tier = tier_words(r.tier) if r.tier else "not yet"
            table.add_row(cell(r.building), cell(r.address), _when(r.at), tier, flags,
                          key=str(r.id))
            shown += 1
        if current is not None:
            with contextlib.suppress(Exception):  # the row may be filtered out
                table.move_cursor(row=table.get_row_index(current))
        total = len(self.rows)
        legend = "p provisional · e edited since its report · h hidden"
        self.query_one("#list-status", Static).update(
            f"{shown} of {total} surveys · {legend}" if total else
            "No surveys yet: ctrl+n starts one.")

    def on_input_changed(self, event: Input.Changed) -> None:
        """Filter as the user types."""
        if event.input.id == "filter" and self.ready():
            self.apply_filter()

    def selected_id(self) -> str | None:
        """The survey id of the highlighted row."""
        table = self.query_one("#surveys", DataTable)
        if table.row_count == 0:
            return None
        try:
            key = table.coordinate_to_cell_key(table.cursor_coordinate).row_key
        except Exception:
            return None
        return None if key.value is None else str(key.value)

    def action_cursor(self, step: int) -> None:
        """Move the highlight while typing in the filter."""
        table = self.query_one("#surveys", DataTable)
        if table.row_count:
            table.move_cursor(row=max(0, min(table.row_count - 1, table.cursor_row + step)))

    async def on_data_table_row_selected(self, event: DataTable.RowSelected) -> None:
        """A click or Enter on a row opens it."""
        await self.action_open()

    async def action_open(self) -> None:
        """Open the highlighted survey; keys typed after Enter go to its first field.

        The app takes no key until the survey screen is mounted and its field focused.
        """
        from triage.ui.focus import drain
        from triage.ui.screens.survey import SurveyScreen

        table = self.query_one("#surveys", DataTable)
        if self.app.focused is table:
            await drain(table)  # a Down typed before Enter moves the highlight first
        sid = self.selected_id()
        if sid is not None and self.ready():
            await self.app.push_screen(SurveyScreen(sid))

    def action_new(self) -> None:
        """Start a new survey."""
        from triage.ui.screens.new_survey import NewSurveyScreen

        if not self.ready():
            return

        def opened(sid: str | None) -> None:
            self.refresh_rows(keep=sid)
            if sid:
                from triage.ui.screens.survey import SurveyScreen

                self.app.push_screen(SurveyScreen(sid))

        self.app.push_screen(NewSurveyScreen(), opened)

    def action_reinspect(self) -> None:
        """Start a re-inspection of the highlighted survey's building."""
        from triage.ui.data import Refused

        sid = self.selected_id()
        if sid is None or not self.ready():
            return
        app = self.app
        inspector = {"name": app.data.setting("last_inspector_name") or app.who}
        iid = app.data.setting("last_inspector_id")
        if iid:
            inspector["id"] = iid
        try:
            new = app.data.reinspect(sid, inspector, app.who)
        except Refused as err:
            self.query_one("#list-status", Static).update(block(f"re-inspection refused: {err}"))
            return
        self.refresh_rows(keep=new)
        from triage.ui.screens.survey import SurveyScreen

        self.app.push_screen(SurveyScreen(new))
        self.app.notify("re-inspection started: storeys copied, readings and damage cleared")

    def action_hide(self) -> None:
        """Hide the highlighted survey (kept, and logged)."""
        sid = self.selected_id()
        if sid is None or not self.ready():
            return
        app = self.app
        app.data.hide(sid, app.who)
        self.refresh_rows()
        self.query_one("#list-status", Static).update(
            "survey hidden (kept in the database; ctrl+l shows hidden surveys)")

    def action_show_hidden(self) -> None:
        """Show or leave out hidden surveys."""
        if not self.ready():
            return
        self.include_hidden = not self.include_hidden
        self.refresh_rows()
