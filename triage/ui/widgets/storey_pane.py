"""The storey itself: label, height, below ground, access, notes."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.widgets import Static

from triage.ui.widgets.field import Choice, Field, Tick, set_text
from triage.ui.widgets.pane import FormPane

ACCESS = [("full: all of it entered", "full"), ("partial: part of it", "partial"),
          ("none: seen from outside", "none")]


class StoreyPane(FormPane):
    """The fields of the storey in view; each saves as accepted."""

    can_focus = False
    DEFAULT_CSS = """
    StoreyPane { height: 1fr; padding: 0 1; }
    StoreyPane > .pane-head { height: 1; text-style: bold; }
    StoreyPane > .summary { height: 1; color: $text-muted; margin-top: 1; }
    StoreyPane > .pane-note { height: auto; color: $text-muted; margin-top: 1; }
    """

    def compose(self) -> ComposeResult:
        """The fields."""
        self.head = Static("", classes="pane-head")
        yield self.head
        self.label_f = Field("label", None, required=True, id="s-label")
        self.height_f = Field("height", None, kind="float", unit="m", required=True,
                              id="s-height")
        self.below_f = Tick("below ground (basement)", None, id="s-below")
        self.access_f = Choice("access", None, ACCESS, "full", id="s-access", width=28)
        self.notes_f = Field("notes", None, id="s-notes", width=52)
        yield self.label_f
        yield self.height_f
        yield self.below_f
        yield self.access_f
        yield self.notes_f
        yield Static("ctrl+n adds a storey on top · ctrl+b adds one below the lowest · "
                     "ctrl+r removes this storey (kept in the change log) · PgUp/PgDn "
                     "walk up and down", classes="pane-note")
        self.summary = Static("", classes="summary")
        yield self.summary

    def focus_first(self) -> None:
        """Cursor in the height field."""
        self.height_f.focus_input()

    def load(self, refill: bool = True) -> None:
        """Show the storey in view."""
        scr = self.survey_screen
        st = scr.storey
        i = scr.storey_index
        if st is None:
            return
        n = len(scr.survey.storeys)
        set_text(self.head, fixed=True,
                 content=f"Storey {st.label} ({i + 1} of {n}, counted from the bottom)")
        base = f"storeys[{i}]"
        for f, key in ((self.label_f, "label"), (self.height_f, "height_m"),
                       (self.below_f, "below_grade"), (self.access_f, "access"),
                       (self.notes_f, "notes")):
            f.path = f"{base}.{key}"
            if refill:
                f.set_value(getattr(st, key))
                f.show_note("")
        set_text(self.summary, fixed=True,
                 content=f"{len(st.readings)} readings · {len(st.members)} member groups "
                 f"({sum(m.count for m in st.members)} members) · "
                 f"{len(st.photos)} photos on the storey")
