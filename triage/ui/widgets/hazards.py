"""Hazards of the building, from the forms' check list, with height for the keep-out zone."""

from __future__ import annotations

from typing import TYPE_CHECKING

from textual.app import ComposeResult

from triage.assess import tier_words
from triage.model import Hazard
from triage.standards.vocabulary import words
from triage.ui.choices import hazard_choices
from triage.ui.messages import FieldAccepted
from triage.ui.widgets.field import Choice, Field, set_text
from triage.ui.widgets.pane import ItemPane, values_of

if TYPE_CHECKING:
    from triage.ui.widgets.pane import FormField

KEYS = ["kind", "height_above_ground_m", "where", "storey", "note"]  # the form's order


class HazardsPane(ItemPane[Hazard]):
    """The hazards of the survey (any time, whatever storey is in view)."""

    first_key = "kind"
    noun = "hazard"
    columns = (("#", 2), ("kind", 15), ("where", 11), ("st.", 4), ("height", 6),
               ("zone", 7), ("at least", 10))

    def list_path(self) -> str:
        """Hazards belong to the survey."""
        return "hazards"

    def items(self) -> list[Hazard]:
        """The survey's hazards."""
        return list(self.survey_screen.survey.hazards)

    def heading(self) -> str:
        """What the list is."""
        return "Hazards (check list from the forms of the building's systems)"

    def row(self, index: int, item: Hazard) -> tuple[str, ...]:
        """One hazard with its keep-out distance as assessed."""
        a = self.survey_screen.assessment
        res = None
        if a is not None:
            res = next((h for h in a.hazards if h.index == index), None)
        keep = "" if res is None or res.keep_out_m is None else f"{res.keep_out_m:g} m"
        return (str(index + 1), words("hazards", item.kind), item.where or "", item.storey or "",
                "" if item.height_above_ground_m is None else f"{item.height_above_ground_m:g}",
                keep, "" if res is None else tier_words(res.tier))

    def _options(self) -> list[tuple[str, str]]:
        s = self.survey_screen.survey
        return [(f"{words('hazards', key)} ({group})", key)
                for group, key, _ in hazard_choices((s.building.system.x,
                                                     s.building.system.y))]

    def hint(self, key: str | None) -> str:
        """Where to look for a hazard kind, from the forms."""
        s = self.survey_screen.survey
        for _, k, hint in hazard_choices((s.building.system.x, s.building.system.y)):
            if k == key:
                return hint
        return ""

    def _storeys(self) -> list[tuple[str, str]]:
        return [(st.label, st.label) for st in self.survey_screen.survey.storeys]

    def form_widgets(self) -> ComposeResult:
        """Kind, height, where, storey, note."""
        opts = self._options()
        w: list[Field | Choice] = [  # kind, then its height (the keep-out rests on it)
            Choice("kind", None, opts, None, allow_blank=True, id="h-kind", width=40),
            Field("height", None, kind="float", unit="m", id="h-height",
                  placeholder="above ground"),
            Field("where", None, id="h-where", width=30, placeholder="e.g. north parapet"),
            Choice("storey", None, self._storeys(), None, allow_blank=True, id="h-storey"),
            Field("note", None, id="h-note", width=40),
        ]
        for widget, k in zip(w, KEYS, strict=True):
            widget.key = k
        yield from w

    def fill(self, item: Hazard | None) -> None:
        """A hazard's values, or a new one."""
        self.choice("storey").set_options(self._storeys(),
                                        None if item is None else item.storey)
        if item is None:
            for k in ("where", "height_above_ground_m", "note"):
                self.form[k].set_value(None)
            self.form["storey"].set_value(None)
            self.form["kind"].set_value(None)
        else:
            for k in KEYS:
                self.form[k].set_value(getattr(item, k))
        set_text(self.note, "keep-out: a falling hazard's zone is at least as wide as it is "
                         "high; give its height above ground")

    def form_changed(self, widget: FormField) -> None:
        """Say where to look for the kind picked."""
        if widget is self.form["kind"]:
            set_text(self.note, self.hint(str(widget.value() or "")))

    def on_field_accepted(self, event: FieldAccepted) -> None:
        """Show the hint of a kind picked while editing too."""
        if self.editing is not None and event.field is self.form["kind"]:
            set_text(self.note, self.hint(str(event.value or "")))
        # (Textual then calls ItemPane.on_field_accepted itself: handlers run down the MRO)

    def build_item(self) -> dict[str, object]:
        """The hazard from the form."""
        data = values_of(self.form, KEYS)
        if "kind" not in data:
            raise ValueError("kind: pick what the hazard is")
        return data
