"""The change log of a survey, newest first, with undo of the last change."""

from __future__ import annotations

import json
import re
from datetime import datetime, tzinfo
from typing import TYPE_CHECKING, ClassVar

from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.widgets import DataTable, Footer, Static

from triage.safetext import visible_line
from triage.ui.data import Refused
from triage.ui.shown import block, line
from triage.ui.typed import TriageScreen

if TYPE_CHECKING:  # the store is loaded behind the first screen
    from triage.store.rows import Change

def _short(v: object, n: int = 18) -> str:
    if v is None:
        return "—"
    text = v if isinstance(v, str) else json.dumps(v, ensure_ascii=False)
    return text if len(text) <= n else text[: n - 1] + "…"


_OP = {"import": "survey imported", "create": "survey created", "hide": "survey hidden",
       "unhide": "survey shown again"}
_STOREY = re.compile(r"^storeys\[(\d+)\](\.label)?$")


def _in_words(path: str, labels: list[str] | None) -> list[str]:
    """The steps of a path in words, the storey by the label it had ('storey G')."""
    from triage.standards.vocabulary import field_words

    survey = None if labels is None else {"storeys": [{"label": x} for x in labels]}
    said = field_words(path, survey)
    if said == path:  # not a path the vocabulary reads: its names, plainly
        return [path.replace("_", " ")]
    return said.split(", ")


def describe_change(op: str, path: str, new: object = None,
                    labels: list[str] | None = None) -> str:
    """A change in words, the field first: `offset (mm), storey G, reading 1`.

    Storeys are named by `labels`, the labels the survey's storeys had when the change was
    made (bottom to top; `storey_labels` works them out), else counted from the bottom;
    other items count from 1 as they stood then. `new` tells whether an undo took an item
    out (None) or put it back.
    """
    if op in _OP or path in ("", "hidden"):
        return _OP.get(op, "survey shown again" if op == "undo" else op)
    steps = _in_words(path, labels)
    if path.endswith("]"):  # an item added, removed or replaced
        verb = {"add": "added", "remove": "removed", "set": "replaced"}.get(
            op, "removed" if new is None else "put back")
        text = f"{verb} {steps[-1]}" + (f", {', '.join(steps[:-1])}" if steps[:-1] else "")
    else:
        text = ", ".join([steps[-1], *steps[:-1]])
    return f"undone: {text}" if op == "undo" else text


def storey_labels(changes: list[Change], labels: list[str]) -> dict[int, list[str]]:
    """The storey labels each change is told with, by its `seq` (changes newest first).

    Worked back from the survey's labels now: each change is undone on the list of labels in
    turn. A change is told with the labels after it, but an item taken out (a removal) with
    the labels before it, where its storey was still there.
    """
    out: dict[int, list[str]] = {}
    now = list(labels)
    for c in changes:
        after = list(now)
        m = _STOREY.match(c.path or "")
        if m is not None:
            i = int(m.group(1))
            if m.group(2):  # a storey relabelled
                if 0 <= i < len(now) and isinstance(c.old, str):
                    now[i] = c.old
            elif c.old is None and c.new is not None and i < len(now):  # added, or put back
                now.pop(i)
            elif c.new is None and isinstance(c.old, dict):  # removed, or taken out by undo
                now.insert(min(i, len(now)), str(c.old.get("label", "?")))
            elif isinstance(c.old, dict) and 0 <= i < len(now):  # a storey replaced
                now[i] = str(c.old.get("label", now[i]))
        out[c.seq] = list(now) if (c.new is None and c.old is not None) else after
    return out


def _local(at: str, fmt: str, tz: tzinfo | None = None) -> str:
    """A stored UTC time stamp as this laptop's local time (the app clock's zone)."""
    try:
        return datetime.fromisoformat(at).astimezone(tz).strftime(fmt)
    except ValueError:
        return at


class HistoryScreen(TriageScreen[bool]):
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
        self.entries: dict[str, Change] = {}
        self.labels: dict[int, list[str]] = {}

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
        app = self.app
        t = self.query_one("#log", DataTable)
        t.clear()
        changes = app.data.changes(self.survey_id)
        current = [st.label for st in app.data.load(self.survey_id).storeys]
        self.labels = storey_labels(changes, current)
        self.entries = {str(c.seq): c for c in changes}
        for key, c in self.entries.items():
            what = self.what(c)
            t.add_row(_local(str(c.at), "%d %b %H:%M", self.tz), line(_short(what, 28)),
                      line(_short(self.value(c, c.old), 10)),
                      line(_short(self.value(c, c.new), 10)), line(_short(c.who, 8)), key=key)
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
        self.query_one("#history-detail", Static).update(block(
            f"{_local(str(c.at), '%Y-%m-%d %H:%M %z', self.tz)}, {visible_line(c.who)}, "
            f"revision {c.revision}\n{visible_line(what + values)}"))

    @property
    def tz(self) -> tzinfo | None:
        """The zone times are shown in: the laptop's (or the test clock's)."""
        app = self.app
        return app.now().tzinfo

    def what(self, c: Change) -> str:
        """A change in words; a survey made on this screen was created, not imported."""
        if c.op == "import":
            app = self.app
            row = app.data.row(self.survey_id)
            if row is not None and row.source == "new survey":
                return "survey created"
        return describe_change(c.op, c.path, c.new, self.labels.get(c.seq))

    def value(self, c: Change, v: object) -> str:
        """An old or new value in words, with its unit; a whole survey is not shown."""
        from triage.standards.vocabulary import value_words

        if c.op in _OP or c.path in ("", "hidden"):
            return "—"
        return value_words(c.path, v)

    def action_undo(self) -> None:
        """Undo the last change not yet undone."""
        app = self.app
        status = self.query_one("#history-status", Static)
        try:
            change = app.data.undo(self.survey_id, app.who)
        except Refused as err:
            status.update(block(f"cannot undo: {err}"))
            return
        if change is None:
            status.update("nothing to undo")
            return
        self.changed = True
        labels = [st.label for st in app.data.load(self.survey_id).storeys]
        status.update(block("✓ saved: undone "
                            + describe_change(change.op, change.path, change.new, labels)))
        self.fill()

    def action_close(self) -> None:
        """Back, saying whether anything was undone."""
        self.dismiss(self.changed)
