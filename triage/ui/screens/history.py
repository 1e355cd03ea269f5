"""The change log of a survey, newest first, with undo of the last change."""

from __future__ import annotations

import json
from typing import Any, ClassVar

from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.screen import Screen
from textual.widgets import DataTable, Footer, Static

from triage.ui.data import Refused


def _short(v: Any, n: int = 18) -> str:
    if v is None:
        return "—"
    text = v if isinstance(v, str) else json.dumps(v, ensure_ascii=False)
    return text if len(text) <= n else text[: n - 1] + "…"


class HistoryScreen(Screen[bool]):
    """What changed, old and new, when and by whom; ctrl+z undoes the last change."""

    CSS_PATH = "history.tcss"
    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape", "close", "back"),
        Binding("f3", "close", "back", show=False, priority=True),
        Binding("ctrl+z", "undo", "undo last change", priority=True),
    ]

    def __init__(self, survey_id: str) -> None:
        super().__init__()
        self.survey_id = survey_id
        self.changed = False

    def compose(self) -> ComposeResult:
        """Title, the log, footer."""
        yield Static("History of this survey (newest first)", classes="title")
        yield DataTable(id="log", cursor_type="row", zebra_stripes=True)
        yield Static("", id="history-status", classes="hint")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        """Fill the log."""
        t = self.query_one("#log", DataTable)
        for name, w in (("when", 16), ("what", 24), ("old", 14), ("new", 14), ("who", 8)):
            t.add_column(name, width=w)
        self.fill()

    def fill(self) -> None:
        """Reload the log."""
        app: Any = self.app
        t = self.query_one("#log", DataTable)
        t.clear()
        for c in app.data.changes(self.survey_id):
            what = f"{c.op} {c.path}" if c.op != "set" else c.path
            t.add_row(str(c.at)[:16].replace("T", " "), _short(what, 24), _short(c.old, 14),
                      _short(c.new, 14), _short(c.who, 8), key=str(c.seq))
        t.focus()

    def action_undo(self) -> None:
        """Undo the last change not yet undone."""
        app: Any = self.app
        status = self.query_one("#history-status", Static)
        try:
            change = app.data.undo(self.survey_id, app.who)
        except Refused as err:
            status.update(f"cannot undo: {err}")
            return
        if change is None:
            status.update("nothing to undo")
            return
        self.changed = True
        status.update(f"✓ saved: undone {change.op} {change.path}")
        self.fill()

    def action_close(self) -> None:
        """Back, saying whether anything was undone."""
        self.dismiss(self.changed)
