"""A labelled field that checks its value, asks to save it, and shows saved or the rule.

`Field` (typed text and numbers), `Choice` (a pick from a list) and `Tick` (yes/no) share one
pattern: when the value is accepted (Enter, leaving the field, or a pick) and differs from what
was last saved, the widget posts `FieldAccepted`; the screen saves it through the store and
calls `show_saved()` or `show_refused(rule)`. A refused value stays in the field, shown with the
rule beside it, and nothing is saved.
"""

from __future__ import annotations

import math
import re
from collections.abc import Callable, Sequence
from datetime import datetime, tzinfo

from rich.console import RenderableType
from rich.text import Text
from textual import events
from textual.app import ComposeResult
from textual.containers import Horizontal
from textual.widgets import Checkbox, Input, Label, Select, Static

from triage.safetext import visible_line
from triage.ui.focus import focus_now
from triage.ui.messages import NOT_SAVED, SAVED, FieldAccepted
from triage.ui.shown import block, line
from triage.ui.widgets.search import PickSelect
from triage.ui.widgets.ticks import TickBox


def no_blink(widget: Input) -> None:
    """Stop a text cursor blinking when the app asks for it (tests and snapshots)."""
    try:
        if not getattr(widget.app, "blink", True):
            widget.cursor_blink = False
    except Exception:  # no app yet: blink stays as it is
        pass


def set_text(widget: Static, content: str | Text, fixed: bool = False) -> None:
    """Update a Static only when its text changes.

    `fixed`: its size cannot change, so no new layout is needed (a layout pass of the whole
    screen is the costly part of a redraw). Text is shown through `triage.ui.shown.block`.
    """
    text = str(content)
    if getattr(widget, "_triage_text", None) == text:
        return
    widget._triage_text = text  # type: ignore[attr-defined]
    # a str may quote the survey: escaped, never markup
    widget.update(block(content) if isinstance(content, str) else content, layout=not fixed)


def parse_value(text: str, kind: str, unit: str = "", required: bool = False) -> object:
    """The value of a field's text, or ValueError with the rule: empty means none."""
    text = text.strip()
    if not text:
        if required:
            raise ValueError("required")
        return None
    if kind == "text":
        return text
    try:
        v: float = float(text.replace(",", "."))
    except ValueError:
        raise ValueError(f"must be a number{' in ' + unit if unit else ''}, "
                         f"not {text!r}") from None
    if not math.isfinite(v):
        raise ValueError("must be a finite number")
    if kind == "int":
        if v != int(v):
            raise ValueError("must be a whole number")
        return int(v)
    return v


def show_text(value: object) -> str:
    """A value as a field shows it."""
    if value is None:
        return ""
    if isinstance(value, float):
        return f"{value:g}"
    return str(value)


WHEN_FORMATS = ("%Y-%m-%d %H:%M %z", "%Y-%m-%d %H:%M:%S %z", "%Y-%m-%d %H:%M",
                "%Y-%m-%d %H:%M:%S", "%Y-%m-%dT%H:%M")


def when_text(value: object) -> str:
    """A time as a field shows it: '2026-11-29 14:05 +13:00' (its own offset kept)."""
    if value is None or value == "":
        return ""
    dt = value if isinstance(value, datetime) else datetime.fromisoformat(str(value))
    text = dt.strftime("%Y-%m-%d %H:%M")
    if dt.second:
        text += dt.strftime(":%S")
    off = dt.strftime("%z")
    return f"{text} {off[:3]}:{off[3:]}" if off else text


def parse_when(text: str, tz: tzinfo | None) -> str:
    """A typed date and time as ISO 8601 with offset (the laptop's when none is typed)."""
    text = " ".join(text.split())
    if not text:
        raise ValueError("required")
    dt: datetime | None = None
    for fmt in WHEN_FORMATS:
        try:
            dt = datetime.strptime(text, fmt)
            break
        except ValueError:
            continue
    if dt is None:
        try:
            dt = datetime.fromisoformat(text)
        except ValueError:
            raise ValueError("a date and time such as 2026-11-29 14:05") from None
    if dt.tzinfo is None:
        dt = dt.replace(tzinfo=tz) if tz is not None else dt.astimezone()
    return dt.isoformat()


_PERSON = re.compile(r"^(?P<name>[^()]*?)\s*(?:\((?P<id>[^()]*)\))?$")


def team_text(value: object) -> str:
    """Team members as a field shows them: 'Ana Rewi (NZ-42); Tom Hale'."""
    out = []
    for p in value if isinstance(value, (list, tuple)) else ():
        name = p.get("name") if isinstance(p, dict) else getattr(p, "name", p)
        pid = p.get("id") if isinstance(p, dict) else getattr(p, "id", None)
        out.append(f"{name} ({pid})" if pid else str(name))
    return "; ".join(out)


def parse_team(text: str) -> list[dict[str, str]]:
    """'Ana Rewi (NZ-42); Tom Hale' as the survey keeps a team: names with their ids."""
    out: list[dict[str, str]] = []
    for part in text.split(";"):
        part = part.strip()
        if not part:
            continue
        m = _PERSON.match(part)
        if m is None or not m.group("name").strip():
            raise ValueError(f"{part!r}: a name, then its id in brackets if there is one; "
                             "people separated by ;")
        person = {"name": m.group("name").strip()}
        if m.group("id") and m.group("id").strip():
            person["id"] = m.group("id").strip()
        out.append(person)
    return out


def picks(options: Sequence[tuple[str, object]]) -> list[tuple[RenderableType, object]]:
    """Options of a pick list, their words shown through `triage.ui.shown.line`."""
    return [(line(text) if isinstance(text, str) else text, value) for text, value in options]


class Saving:
    """The saved / refused status shared by the field widgets, and what a form asks of them.

    A mixin, not a widget: a field widget is a `Saving` before its container class
    (`Field(Saving, Horizontal)`), so these handlers come first, and Textual takes its CSS
    from the container (it follows a widget's first widget base only). The value methods
    are each widget's own.
    """

    status: Static
    key: str = ""  # the JSON key the widget edits, inside a pane's form
    path: str | None = None  # where it saves in the survey; None: a new item's form

    def value(self) -> object:
        """The value shown (ValueError with the rule when it breaks the field's own)."""
        raise NotImplementedError

    def set_value(self, value: object) -> None:
        """Show a stored value without asking to save it."""
        raise NotImplementedError

    def mark_saved(self, note: str = "", value: object = ...) -> None:
        """The store took the value."""
        raise NotImplementedError

    def show_saved(self, note: str = "") -> None:
        """Mark the value as saved."""
        set_text(self.status, SAVED + (f"  {note}" if note else ""),
                 fixed=len(getattr(self.status, "_triage_text", "") or "") < 30)
        self.status.set_class(False, "refused")
        self.status.set_class(True, "saved")

    def show_refused(self, rule: str) -> None:
        """Show the rule the value broke; the value stays, unsaved."""
        set_text(self.status, NOT_SAVED + rule)
        self.status.set_class(True, "refused")
        self.status.set_class(False, "saved")

    def show_note(self, note: str) -> None:
        """A neutral line beside the field (e.g. a computed drift)."""
        set_text(self.status, note, fixed=len(note) < 30 and len(
            getattr(self.status, "_triage_text", "") or "") < 30)
        self.status.set_class(False, "refused")
        self.status.set_class(False, "saved")

    def on_descendant_focus(self, event: events.DescendantFocus) -> None:
        """The cursor came into this field: its label marks it."""
        self.set_class(True, "-here")  # type: ignore[attr-defined]

    def on_descendant_blur(self, event: events.DescendantBlur) -> None:
        """The cursor left this field."""
        self.set_class(False, "-here")  # type: ignore[attr-defined]

    def clear_refusal(self) -> None:
        """The value was changed: a refusal of the old one no longer stands beside it."""
        if self.status.has_class("refused"):
            self.show_note("")

    @property
    def status_text(self) -> str:
        """What the status beside the field says (for tests and the help screen)."""
        return str(self.status.render())


class Field(Saving, Horizontal):
    """A labelled text or number input."""

    DEFAULT_CSS = """
    Field { height: auto; width: 1fr; }
    Field > Label { width: 15; }
    Field > Input { width: 14; }
    Field > .fstatus { width: 1fr; padding-left: 1; color: $text-muted; }
    Field > .fstatus.refused { color: $accent; text-style: bold; }
    """

    def __init__(self, label: str, path: str | None, value: object = None, *, kind: str = "text",
                 unit: str = "", required: bool = False, width: int | None = None,
                 placeholder: str = "", password: bool = False, id: str | None = None,
                 classes: str | None = None, show: Callable[[object], str] | None = None,
                 parse: Callable[[str], object] | None = None) -> None:
        super().__init__(id=id, classes=classes)
        self.label_text = label
        self.path = path
        self.kind = kind
        self.unit = unit
        self.required = required
        self.show = show or show_text
        self.parse = parse
        self.saved_text = self.shown(value)
        self._width = width
        self.input = Input(self.saved_text, placeholder=placeholder or unit, compact=True,
                           password=password, select_on_focus=True)
        self.status = Static("", classes="fstatus")

    def compose(self) -> ComposeResult:
        """Label, input, status."""
        yield Label(self.label_text)
        yield self.input
        yield self.status

    def on_mount(self) -> None:
        """Apply the width and the blink setting."""
        if self._width:
            self.input.styles.width = self._width
        no_blink(self.input)

    @property
    def text(self) -> str:
        """The text typed in the field."""
        return self.input.value

    def shown(self, value: object) -> str:
        """A stored value as the field shows it (control and bidi characters as escapes)."""
        return visible_line(self.show(value))

    def set_value(self, value: object, saved: bool = True) -> None:
        """Put a value in the field (as stored)."""
        t = self.shown(value)
        self.input.value = t
        if saved:
            self.saved_text = t

    def value(self) -> object:
        """The field's value; ValueError with the rule when it breaks the field's own rule."""
        if self.parse is not None:
            if not self.input.value.strip() and not self.required:
                return None
            return self.parse(self.input.value)
        return parse_value(self.input.value, self.kind, self.unit, self.required)

    def accept(self, force: bool = False) -> None:
        """Check the typed value and, if it changed, ask to save it."""
        if not force and self.input.value.strip() == self.saved_text.strip():
            return
        try:
            v = self.value()
        except ValueError as err:
            self.show_refused(str(err))
            return
        self.post_message(FieldAccepted(self, self.path or "", v))

    def mark_saved(self, note: str = "", value: object = ...) -> None:
        """The store took the value (the field's text: it is not typed in meanwhile)."""
        self.saved_text = self.input.value
        self.show_saved(note)

    def on_input_submitted(self, event: Input.Submitted) -> None:
        """Enter accepts the value (the event goes on up: a form may move to the next field)."""
        self.accept(force=self.path is None)

    def on_input_changed(self, event: Input.Changed) -> None:
        """A change clears the refusal shown (the event goes on up: a form may preview)."""
        self.clear_refusal()

    def on_input_blurred(self, event: Input.Blurred) -> None:
        """Leaving the field accepts the value."""
        event.stop()
        if self.path is not None:
            self.accept()

    def focus_input(self) -> None:
        """Put the cursor in the field, at once."""
        focus_now(self.input)


class Choice(Saving, Horizontal):
    """A labelled pick from a list of (text, value)."""

    DEFAULT_CSS = """
    Choice { height: auto; width: 1fr; }
    Choice > Label { width: 15; }
    Choice > Select { width: 24; }
    Choice > .fstatus { width: 1fr; padding-left: 1; color: $text-muted; }
    Choice > .fstatus.refused { color: $accent; text-style: bold; }
    """

    def __init__(self, label: str, path: str | None, options: Sequence[tuple[str, object]],
                 value: object = None, *, allow_blank: bool = False, width: int | None = None,
                 id: str | None = None, classes: str | None = None) -> None:
        super().__init__(id=id, classes=classes)
        self.label_text = label
        self.path = path
        self.saved_value = value
        self._width = width
        self.select = PickSelect(
            picks(options), value=value if value is not None else Select.NULL,
            allow_blank=allow_blank or value is None, compact=True, prompt="—")
        self.status = Static("", classes="fstatus")

    def compose(self) -> ComposeResult:
        """Label, pick, status."""
        yield Label(self.label_text)
        yield self.select
        yield self.status

    def on_mount(self) -> None:
        """Apply the width."""
        if self._width:
            self.select.styles.width = self._width

    def value(self) -> object:
        """The picked value, None when blank."""
        v = self.select.value
        return None if v is Select.NULL or isinstance(v, type(Select.NULL)) else v

    def set_value(self, value: object) -> None:
        """Show a stored value without asking to save it."""
        self.saved_value = value
        self.select.value = value if value is not None else Select.NULL

    def set_options(self, options: Sequence[tuple[str, object]], value: object = None) -> None:
        """Replace the choices."""
        self.saved_value = value
        self.select.set_options(picks(options))
        if value is not None:
            self.select.value = value

    def mark_saved(self, note: str = "", value: object = ...) -> None:
        """The store took `value` (by default the value shown; a later pick may differ)."""
        self.saved_value = self.value() if value is ... else value
        self.show_saved(note)

    def on_select_changed(self, event: Select.Changed) -> None:
        """A pick asks to be saved when it differs from the stored value."""
        event.stop()
        self.clear_refusal()
        v = self.value()
        if v == self.saved_value:
            return
        self.post_message(FieldAccepted(self, self.path or "", v))


class Tick(Saving, Horizontal):
    """A labelled yes/no."""

    DEFAULT_CSS = """
    Tick { height: auto; width: 1fr; }
    Tick > Checkbox { width: auto; }
    Tick > .fstatus { width: 1fr; padding-left: 1; color: $text-muted; }
    Tick > .fstatus.refused { color: $accent; text-style: bold; }
    """

    def __init__(self, label: str, path: str | None, value: bool = False, *,
                 id: str | None = None, classes: str | None = None) -> None:
        super().__init__(id=id, classes=classes)
        self.path = path
        self.saved_value = value
        self.box = TickBox(label, value, compact=True)
        self.status = Static("", classes="fstatus")

    def compose(self) -> ComposeResult:
        """Box, status."""
        yield self.box
        yield self.status

    def value(self) -> bool:
        """Ticked or not."""
        return bool(self.box.value)

    def set_value(self, value: object) -> None:
        """Show a stored value without asking to save it."""
        self.saved_value = bool(value)
        self.box.value = bool(value)

    def mark_saved(self, note: str = "", value: object = ...) -> None:
        """The store took `value` (by default the value shown; a later pick may differ)."""
        self.saved_value = self.value() if value is ... else bool(value)
        self.show_saved(note)

    def on_checkbox_changed(self, event: Checkbox.Changed) -> None:
        """A change asks to be saved."""
        event.stop()
        self.clear_refusal()
        if self.value() == self.saved_value:
            return
        self.post_message(FieldAccepted(self, self.path or "", self.value()))
