"""The keys of the screen underneath, and how the app saves."""

from __future__ import annotations

from typing import ClassVar

from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import VerticalScroll
from textual.screen import ModalScreen, Screen
from textual.widgets import Static

from triage.ui.messages import CAUTION_FULL

HOW = """How it works
 • Every field is saved the moment it is accepted (Enter, leaving it, or a pick) and says
   ✓ saved beside it. A value that breaks a rule is shown with the rule and is not saved.
 • Plain letters never act as commands: actions are ctrl+ keys, F-keys, Enter and Escape.
 • In a form, Enter adds the item from any field and readies the next; on a pick list or the
   sign list a letter jumps to the choice beginning with it; Space ticks a sign.
 • Tabs (storey, readings, members, hazards, photos) can also be clicked; so can rows.
 • The verdict is recomputed after every change, without holding up typing.
"""


def binding_lines(screen: Screen[object]) -> list[str]:
    """One line per key of a screen and of the app."""
    seen: set[str] = set()
    lines = []
    for owner in (screen, screen.app):
        for b in getattr(owner, "BINDINGS", []):
            if not isinstance(b, Binding):
                continue
            key = b.key_display or b.key
            if key in seen or not b.description:
                continue
            seen.add(key)
            lines.append(f"  {key:<14} {b.description}")
    return lines


class HelpScreen(ModalScreen[None]):
    """Keys and how saving works."""

    CSS_PATH = "help.tcss"
    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape,f1", "close", "close help", priority=True),
    ]

    def __init__(self, under: Screen[object]) -> None:
        super().__init__()
        self.under = under

    def compose(self) -> ComposeResult:
        """The keys."""
        keys = "\n".join(binding_lines(self.under))
        with VerticalScroll(id="help-box"):
            yield Static(f"Keys on this screen\n{keys}\n\n{HOW}\n{CAUTION_FULL}",
                         id="help-text", markup=False)

    def on_mount(self) -> None:
        """Arrow keys scroll the help."""
        self.query_one("#help-box").focus()

    def action_close(self) -> None:
        """Back."""
        self.app.pop_screen()
