"""The change log of a survey, newest first, with undo of the last change."""

from __future__ import annotations

import json
import re
from datetime import datetime
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


_PART = re.compile(r"([A-Za-z_][A-Za-z0-9_]*)((?:\[\d+\])*)")
_NOUN = {"storeys": "storey", "readings": "reading", "members": "member group",
         "hazards": "hazard", "photos": "photo", "signs": "sign"}
_OP = {"import": "survey imported", "create": "survey created", "hide": "survey hidden",
       "unhide": "survey shown again"}


def _places(path: str) -> tuple[list[str], str | None]:
    """The items a path goes through, in words, and the field it ends on (None: an item)."""
    places: list[str] = []
    parts = path.split(".")
    for k, part in enumerate(parts):
        m = _PART.fullmatch(part)
        if m is None:
            return [path], None
        name, index = m.group(1), [int(i) for i in re.findall(r"\d+", m.group(2))]
        if not index:
            if k == len(parts) - 1:
                return places, name.replace("_", " ")
            places.append(name)
            continue
        places.append(f"{_NOUN.get(name, name)} #{index[0] + 1}")
        places.extend(f"#{i + 1}" for i in index[1:])
    return places, None


def describe_change(op: str, path: str, new: Any = None) -> str:
    """A change in words, the field first: `offset mm (storey #2, reading #1)`.

    Positions count from 1 and are those of the survey as it was when the change was made;
    `new` tells whether an undo took an item out (None) or put it back.
    """
    if op in _OP or path in ("", "hidden"):
        return _OP.get(op, "survey shown again" if op == "undo" else op)
    places, field = _places(path)
    if field is None:
        item, within = (places[-1], places[:-1]) if places else (path, [])
        verb = {"add": "added", "remove": "removed", "set": "replaced"}.get(
            op, "removed" if new is None else "put back")
        text = f"{verb} {item}" + (f" ({', '.join(within)})" if within else "")
    else:
        text = field + (f" ({', '.join(places)})" if places else "")
    return f"undone: {text}" if op == "undo" else text


def _local(at: str, fmt: str, tz: Any = None) -> str:
    """A stored UTC time stamp as this laptop's local time (the app clock's zone)."""
    try:
        return datetime.fromisoformat(at).astimezone(tz).strftime(fmt)
    except ValueError:
        return at


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
        self.entries: dict[str, Any] = {}

    def compose(self) -> ComposeResult:
        """Title, the log, footer."""
        yield Static("History of this survey (newest first)", classes="title")
        yield DataTable(id="log", cursor_type="row", zebra_stripes=True)
        yield Static("", id="history-detail")
        yield Static("", id="history-status", classes="hint")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        """Fill the log."""
        t = self.query_one("#log", DataTable)
        for name, w in (("when", 12), ("what", 28), ("old", 10), ("new", 10), ("who", 8)):
            t.add_column(name, width=w)
        self.fill()

    def fill(self) -> None:
        """Reload the log."""
        app: Any = self.app
        t = self.query_one("#log", DataTable)
        t.clear()
        self.entries = {str(c.seq): c for c in app.data.changes(self.survey_id)}
        for key, c in self.entries.items():
            what = self.what(c)
            t.add_row(_local(str(c.at), "%d %b %H:%M", self.tz), _short(what, 28),
                      _short(self.value(c, c.old), 10), _short(self.value(c, c.new), 10),
                      _short(c.who, 8), key=key)
        t.focus()
        if not self.entries:
            self.query_one("#history-detail", Static).update("")

    def on_data_table_row_highlighted(self, event: DataTable.RowHighlighted) -> None:
        """The highlighted change in full below the table."""
        c = self.entries.get(str(event.row_key.value))
        if c is None:
            return
        what = self.what(c)
        values = "" if c.op in _OP else (f": {_short(self.value(c, c.old), 60)} → "
                                         f"{_short(self.value(c, c.new), 60)}")
        self.query_one("#history-detail", Static).update(
            f"{_local(str(c.at), '%Y-%m-%d %H:%M %z', self.tz)}, {c.who}, revision "
            f"{c.revision}\n{what}{values}")

    @property
    def tz(self) -> Any:
        """The zone times are shown in: the laptop's (or the test clock's)."""
        app: Any = self.app
        return app.now().tzinfo

    def what(self, c: Any) -> str:
        """A change in words; a survey made on this screen was created, not imported."""
        if c.op == "import":
            app: Any = self.app
            row = app.data.row(self.survey_id)
            if row is not None and row.source == "new survey":
                return "survey created"
        return describe_change(c.op, c.path, c.new)

    def value(self, c: Any, v: Any) -> str:
        """An old or new value in words, with its unit; a whole survey is not shown."""
        from triage.standards.vocabulary import value_words

        if c.op in _OP or c.path in ("", "hidden"):
            return "—"
        return value_words(c.path, v)

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
        status.update(f"✓ saved: undone {describe_change(change.op, change.path)}")
        self.fill()

    def action_close(self) -> None:
        """Back, saying whether anything was undone."""
        self.dismiss(self.changed)
