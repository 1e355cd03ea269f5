"""The survey itself: the building and the inspection.

Who inspected, when, after what event, in what weather, and what could not be seen; each
field saves as accepted, as the storey's do.
"""

from __future__ import annotations

from datetime import tzinfo
from typing import TypedDict

from textual.app import ComposeResult
from textual.widgets import Static

from triage.ui.widgets.field import (
    Choice,
    Field,
    parse_team,
    parse_when,
    set_text,
    team_text,
    when_text,
)
from triage.ui.widgets.pane import FormPane


class Options(TypedDict, total=False):
    """A text field's options (see `Field`)."""

    required: bool
    width: int
    kind: str


# (id, path, label, options): the fields in the order an inspector fills them in
Spec = tuple[tuple[str, str, str, Options], ...]
TEXT: Spec = (("v-name", "building.name", "name", {"required": True, "width": 40}),
              ("v-address", "building.address", "address", {"required": True, "width": 40}),
              ("v-use", "building.use", "use", {"width": 24}),
              ("v-year", "building.year_built", "year built", {"kind": "int"}))
INSPECTION: Spec = (("v-event", "inspection.event", "event", {"width": 40}),
                    ("v-weather", "inspection.weather", "weather", {"width": 30}),
                    ("v-not", "inspection.not_inspected", "not inspected", {"width": 40}))


def _get(obj: object, path: str) -> object:
    for part in path.split("."):
        obj = getattr(obj, part, None) if obj is not None else None
    return obj


class SurveyPane(FormPane):
    """The building and inspection fields of the survey in view."""

    can_focus = False
    DEFAULT_CSS = """
    SurveyPane { height: 1fr; padding: 0 1; }
    SurveyPane > .pane-head { height: 1; text-style: bold; }
    SurveyPane > .section { height: 1; }
    """

    def compose(self) -> ComposeResult:
        """The fields."""
        from triage import standards
        from triage.standards.vocabulary import words

        systems = [(f"{words('systems', k)}", k) for k in standards.load().systems]
        self.fields: dict[str, Field | Choice] = {}
        yield Static("The building and the inspection", classes="pane-head")
        for fid, path, label, kw in TEXT:
            self.fields[path] = Field(label, path, id=fid, **kw)
        self.fields["building.system.x"] = Choice("system x", "building.system.x", systems,
                                                  None, id="v-sx", width=40)
        self.fields["building.system.y"] = Choice("system y", "building.system.y", systems,
                                                  None, id="v-sy", width=40)
        self.fields["inspection.inspector.name"] = Field(
            "inspector", "inspection.inspector.name", required=True, id="v-inspector",
            width=30)
        self.fields["inspection.inspector.id"] = Field("inspector id", "inspection.inspector.id",
                                                       id="v-inspector-id", width=16)
        self.fields["inspection.team"] = Field(
            "team", "inspection.team", show=team_text, parse=parse_team, id="v-team",
            width=40, placeholder="name (id); name (id)")
        self.fields["inspection.at"] = Field(
            "date and time", "inspection.at", show=when_text,
            parse=lambda text: parse_when(text, self._tz()), required=True, id="v-at",
            width=24, placeholder="YYYY-MM-DD HH:MM")
        for fid, path, label, kw in INSPECTION:
            self.fields[path] = Field(label, path, id=fid, **kw)
        order = ["building.name", "building.address", "building.use", "building.year_built",
                 "building.system.x", "building.system.y", "inspection.inspector.name",
                 "inspection.inspector.id", "inspection.team", "inspection.at",
                 "inspection.event", "inspection.weather", "inspection.not_inspected"]
        for path in order:
            if path == "inspection.inspector.name":
                yield Static("Inspection", classes="section")
            yield self.fields[path]
        self.note = Static("", classes="pane-note")
        yield self.note

    def _tz(self) -> tzinfo | None:
        scr = self.survey_screen
        at = scr.survey.inspection.at
        return at.tzinfo

    def focus_first(self) -> None:
        """Cursor in the building's name."""
        name = self.fields["building.name"]
        if isinstance(name, Field):
            name.focus_input()

    def load(self, refill: bool = True) -> None:
        """Show the survey's values (kept as typed unless `refill`)."""
        if not refill:
            return
        scr = self.survey_screen
        survey = scr.survey
        for path, f in self.fields.items():
            f.set_value(_get(survey, path))
            f.show_note("")
        prev = survey.inspection.previous
        set_text(self.note, f"re-inspection: follows survey {str(prev)[:8]}" if prev else "")
