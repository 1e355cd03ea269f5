"""A list of items (readings, member groups, hazards, photos) with a form beside it.

The form works in two modes. *New*: the fields gather a new item; Enter in any field adds it
when what it needs is there (one durable add through the store). *Edit* (a row picked with
Enter or a click): each field is saved on its own the moment it is accepted, through the
screen's `FieldAccepted` handler. Either way a refused value is shown with its rule beside the
field and nothing is written.
"""

from __future__ import annotations

import re
from typing import TYPE_CHECKING, Generic, TypeAlias, TypeVar, cast

from rich.text import Text
from textual import getters
from textual.app import ComposeResult
from textual.containers import VerticalScroll
from textual.coordinate import Coordinate
from textual.widget import Widget
from textual.widgets import DataTable, Static
from textual.widgets._select import SelectOverlay

from triage.ui.app import TriageApp
from triage.ui.data import Refused, rule_of
from triage.ui.focus import focus_now
from triage.ui.messages import FieldAccepted
from triage.ui.shown import line
from triage.ui.widgets.field import Choice, Field, Saving, Tick, set_text

if TYPE_CHECKING:  # the screen imports the panes; the members pane imports this module
    from triage.ui.screens.survey import SurveyScreen
    from triage.ui.widgets.members import SignChecks

    FormField: TypeAlias = Field | Choice | Tick | SignChecks  # a field of a pane's form

ItemT = TypeVar("ItemT")
FIELD_KEY = re.compile(r"\.(\w+)(?:\[\d+\])?:")


def cell(text: object) -> Text:
    """A table cell: one escaped line, ending in an ellipsis where its column cuts it."""
    out = line(text)
    out.overflow = "ellipsis"
    return out


class FormPane(VerticalScroll):
    """A tab's pane on the survey screen: a form, entered where `focus_first` puts the cursor."""

    app = getters.app(TriageApp)

    @property
    def survey_screen(self) -> SurveyScreen:
        """The survey screen this pane lives on."""
        return cast("SurveyScreen", self.screen)

    def focus_first(self) -> None:
        """Put the cursor where entry starts."""
        raise NotImplementedError


class ItemPane(FormPane, Generic[ItemT]):
    """Base of the panes holding a table of items (of type ItemT) and the form of one."""

    can_focus = False
    DEFAULT_CSS = """
    ItemPane { height: 1fr; padding: 0 1; }
    ItemPane > DataTable { height: auto; max-height: 8; margin-bottom: 0; }
    ItemPane > .form-title { height: 1; text-style: bold; color: $accent; margin-top: 1; }
    ItemPane > .pane-note { height: auto; color: $text-muted; }
    ItemPane > .pane-head { height: 1; }
    ItemPane > .pane-empty { height: auto; color: $text-muted; }
    """

    noun = "item"
    columns: tuple[tuple[str, int], ...] = ()

    def __init__(self, id: str | None = None) -> None:
        super().__init__(id=id)
        self.editing: int | None = None
        self.dirty = False
        self.rows: list[tuple[str, ...]] = []
        self.form: dict[str, FormField] = {}
        self.table: DataTable[object] = DataTable(cursor_type="row", zebra_stripes=True)
        self.head = Static("", classes="pane-head")
        self.empty = Static("", classes="pane-empty")  # in place of an empty table
        self.empty.display = False
        self.form_title = Static("", classes="form-title")
        self.note = Static("", classes="pane-note")

    # --- what a subclass provides ------------------------------------------------------------

    def list_path(self) -> str:
        """The survey path of the list this pane edits, e.g. 'storeys[1].readings'."""
        raise NotImplementedError

    def items(self) -> list[ItemT]:
        """The items of the list in the survey as loaded."""
        raise NotImplementedError

    def row(self, index: int, item: ItemT) -> tuple[str, ...]:
        """A table row for an item."""
        raise NotImplementedError

    def form_widgets(self) -> ComposeResult:
        """The form's fields; each gets a `key` attribute, its JSON key."""
        raise NotImplementedError

    def fill(self, item: ItemT | None) -> None:
        """Put an item's values (or the defaults of a new one) in the form."""
        raise NotImplementedError

    def build_item(self) -> dict[str, object]:
        """The new item from the form; ValueError('key: rule') when a field breaks a rule."""
        raise NotImplementedError

    def after_add(self) -> None:
        """Clear what is particular to one item, keep what the next one shares."""
        self.fill(None)

    def heading(self) -> str:
        """The line above the table."""
        return ""

    def empty_words(self) -> str:
        """Said in place of the table when the list is empty ("": the bare table is shown)."""
        return ""

    def form_changed(self, widget: FormField) -> None:
        """A pick in the form changed (new mode)."""

    # --- the mechanics -------------------------------------------------------------------

    def compose(self) -> ComposeResult:
        """Heading, table, form."""
        yield self.head
        yield self.table
        yield self.empty
        yield self.form_title
        from triage.ui.widgets.members import SignChecks

        for w in self.form_widgets():
            if isinstance(w, (Field, Choice, Tick, SignChecks)) and w.key:
                self.form[w.key] = w
            yield w
        yield self.note

    def on_mount(self) -> None:
        """Columns of the table."""
        for name, width in self.columns:
            self.table.add_column(name, width=width)

    def reload(self, keep_form: bool = False) -> None:
        """Redraw the table from the survey; refill the form unless the user is in it."""
        self.dirty = False
        set_text(self.head, self.heading(), fixed=True)
        items = self.items()
        rows = [self.row(i, it) for i, it in enumerate(items)]
        if len(rows) == len(self.rows) == self.table.row_count:
            # same rows: change only the cells that differ (no new layout)
            for r, (old, new) in enumerate(zip(self.rows, rows, strict=True)):
                for c, (a, b) in enumerate(zip(old, new, strict=True)):
                    if a != b:
                        self.table.update_cell_at(Coordinate(r, c), cell(b))
        else:
            self.table.clear()
            for i, row in enumerate(rows):
                self.table.add_row(*(cell(c) for c in row), key=str(i))
        self.rows = rows
        self.show_empty(not rows)
        if self.editing is not None and self.editing >= len(items):
            self.editing = None
        if self.editing is not None:
            self.table.move_cursor(row=self.editing)
        if not keep_form:
            self.show_form()

    def show_empty(self, empty: bool) -> None:
        """An empty list with words of its own says them in place of the table (no blank row)."""
        said = self.empty_words() if empty else ""
        if said:
            set_text(self.empty, said)
        if self.table.display != (not said):
            self.table.display = not said
            self.empty.display = bool(said)

    def show_form(self) -> None:
        """Fill the form for the item being edited, or a new one."""
        items = self.items()
        item = items[self.editing] if self.editing is not None else None
        self.fill(item)
        self.set_paths()
        for w in self.form.values():
            if hasattr(w, "show_note"):
                w.show_note("")
        if self.editing is None:
            set_text(self.form_title, fixed=True, content=f"new {self.noun}: Enter adds it")
        else:
            set_text(self.form_title, fixed=True,
                     content=f"{self.noun} {self.editing + 1}: each field saves as accepted · "
                     "^n new · ^r remove")

    def field(self, key: str) -> Field:
        """The form's text field for `key`."""
        w = self.form[key]
        assert isinstance(w, Field), key
        return w

    def choice(self, key: str) -> Choice:
        """The form's pick list for `key`."""
        w = self.form[key]
        assert isinstance(w, Choice), key
        return w

    def item_path(self, index: int) -> str:
        """The survey path of the listed item at `index`, e.g. 'storeys[1].readings[3]'."""
        return f"{self.list_path()}[{index}]"

    def set_paths(self) -> None:
        """Point the form's fields at the item being edited (none in new mode)."""
        base = self.item_path(self.editing) if self.editing is not None else None
        for key, w in self.form.items():
            w.path = f"{base}.{key}" if base is not None else None

    def edit(self, index: int | None) -> None:
        """Switch the form to an existing item, or to a new one."""
        self.editing = index
        self.show_form()
        self.focus_first()

    first_key = ""  # the form field where entry starts (the first text field when empty)

    def focus_first(self) -> None:
        """Put the cursor where entry of a new item starts."""
        w = self.form.get(self.first_key)
        if isinstance(w, Choice):
            focus_now(w.select)
            return
        if isinstance(w, Field) and w.display:
            w.focus_input()
            return
        for w in self.form.values():
            if isinstance(w, Field) and w.display:
                w.focus_input()
                return

    def enter_pressed(self, widget: Widget) -> bool:
        """Enter, acted on at once (the app's priority binding; see triage/ui/focus.py).

        On a row: edit that item, the cursor in its form. In any field of a new item (a text
        field, a closed pick list, the sign list): add it, the form ready for the next. In a
        field of an item being edited: on to the next field (leaving a field saves it). An
        open pick list takes Enter itself, to pick.
        """
        if widget is self.table:
            if self.table.row_count == 0:
                return False
            self.edit(self.table.cursor_row)
            return True
        if isinstance(widget, SelectOverlay) or getattr(widget, "expanded", False):
            return False
        owner = next((a for a in widget.ancestors_with_self if isinstance(a, Saving)), None)
        if owner is None or self not in widget.ancestors:
            return False
        if self.editing is None:
            self.add_item()
        else:
            widget.screen.focus_next()
        return True

    def on_data_table_row_selected(self, event: DataTable.RowSelected) -> None:
        """Enter or a click on a row edits that item."""
        event.stop()
        if event.row_key.value is not None:
            self.edit(int(event.row_key.value))

    def on_field_accepted(self, event: FieldAccepted) -> None:
        """In new mode gather, and Enter in a text field adds the item.

        In edit mode the screen saves the field (the message goes on up).
        """
        if self.editing is not None:
            return
        event.stop()
        if isinstance(event.field, (Choice, Tick)):
            self.form_changed(event.field)
            return
        self.add_item()

    def retry_refused(self, saved: FormField) -> None:
        """After a field is saved, try again the fields of this form still refused.

        A class set by hand waits for its reason, for example.
        """
        if self.editing is None:
            return
        for w in self.form.values():
            if w is saved or not w.status_text.startswith("✗"):
                continue
            if isinstance(w, Field):
                w.accept(force=True)
            elif w.path:
                self.post_message(FieldAccepted(w, w.path, w.value()))

    def show_error(self, message: str) -> None:
        """Put a refusal beside the field it names, or under the form."""
        m = FIELD_KEY.search(message + ":") if ":" in message else None
        key = m.group(1) if m else None
        if key is None:
            head = message.partition(":")[0]
            key = head.rsplit(".", 1)[-1] if "." in head or head in self.form else None
        w = self.form.get(key or "")
        if w is not None:
            w.show_refused(rule_of(message))
            set_text(self.note, "")
        else:
            set_text(self.note, f"not saved: {message}")

    def add_item(self) -> None:
        """Add the new item through the store."""
        scr = self.survey_screen
        try:
            item = self.build_item()
        except ValueError as err:
            self.show_error(str(err))
            return
        try:
            scr.add_item(self.list_path(), item)
        except Refused as err:
            self.show_error(str(err))
            return
        n = len(self.items())
        self.after_add()
        if n:
            self.table.move_cursor(row=n - 1, animate=False)  # the new row in view
        self.focus_first()
        set_text(self.note, f"✓ saved: {self.noun} {n} added")
        for w in self.form.values():
            if hasattr(w, "show_note") and w.status_text.startswith("✗"):
                w.show_note("")

    def remove_selected(self) -> None:
        """Remove the item being edited (kept in the change log; ctrl+z brings it back)."""
        if self.editing is None:
            set_text(self.note, f"pick a {self.noun} in the table first (Enter or a click)")
            return
        idx = self.editing
        try:
            self.survey_screen.remove_item(self.item_path(idx))
        except Refused as err:
            set_text(self.note, f"not removed: {err}")
            return
        self.editing = None
        self.reload()
        set_text(self.note, f"✓ saved: {self.noun} {idx + 1} removed (ctrl+z undoes it)")


def values_of(form: dict[str, FormField], keys: list[str]) -> dict[str, object]:
    """The non-empty values of some form fields; ValueError('key: rule') on a broken one."""
    out: dict[str, object] = {}
    for k in keys:
        w = form[k]
        try:
            v = w.value()
        except ValueError as err:
            raise ValueError(f"{k}: {err}") from None
        if v is not None and v != "":
            out[k] = v
    return out
