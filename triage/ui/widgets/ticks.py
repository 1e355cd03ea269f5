"""Tick boxes that are empty when unticked and show a tick when ticked.

Textual draws its check box with an "X" in both states and tells them apart by colour alone;
an unticked box coloured to fade still showed a faint mark, and in monochrome (NO_COLOR) none
of it is told apart. Here the mark itself says it: a blank box unticked, `TICKED` ticked, in
every theme and without colour.
"""

from __future__ import annotations

from rich.segment import Segment
from textual.strip import Strip
from textual.widgets import Checkbox, SelectionList
from textual.widgets._toggle_button import ToggleButton
from textual.widgets.option_list import OptionDoesNotExist

TICKED = "✓"
UNTICKED = " "


def mark(ticked: bool) -> str:
    """What a box shows inside: the tick, or nothing."""
    return TICKED if ticked else UNTICKED


class TickBox(Checkbox):
    """A check box showing `TICKED` when ticked and an empty box when not."""

    def __init__(self, label: str, value: bool = False, *, compact: bool = False) -> None:
        super().__init__(label, value, compact=compact)
        self.BUTTON_INNER = mark(self.value)

    def watch_value(self) -> None:
        """The mark follows the value; then Textual's own (the `-on` class, `Changed`)."""
        self.BUTTON_INNER = mark(self.value)
        super().watch_value()


class TickList(SelectionList[str]):
    """A check list whose boxes show `TICKED` or nothing, not a coloured "X"."""

    def render_line(self, y: int) -> Strip:
        """The list's line with the mark of its own option in the box."""
        strip = super().render_line(y)
        segments = list(strip)
        if len(segments) < 2 or segments[1].text != ToggleButton.BUTTON_INNER:
            return strip
        try:
            option = self.get_option_at_index(self.scroll_offset.y + y)
        except OptionDoesNotExist:
            return strip
        segments[1] = Segment(mark(option.value in self.selected), segments[1].style)
        return Strip(segments, strip.cell_length)
