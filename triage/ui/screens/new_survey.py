"""A new survey: the building, its systems, its storeys, the inspector (remembered)."""

from __future__ import annotations

from dataclasses import dataclass
from typing import ClassVar

from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import VerticalScroll
from textual.widget import Widget
from textual.widgets import Button, Footer, Input, Static

from triage import standards
from triage.ui.app import TriageApp
from triage.ui.choices import NAMINGS, storey_labels
from triage.ui.data import Refused, rule_of, said
from triage.ui.messages import FieldAccepted
from triage.ui.shown import block
from triage.ui.typed import TriageScreen
from triage.ui.widgets.field import Choice, Field, parse_team, team_text, when_text


def when_field(app: TriageApp, label: str, path: str, value: object, fid: str) -> Field:
    """A date and time field; a time typed without offset takes the laptop's (or the test's)."""
    from triage.ui.widgets.field import parse_when

    def parse(text: str) -> str:
        return parse_when(text, app.now().tzinfo)

    return Field(label, path, value, show=when_text, parse=parse, required=True, id=fid,
                 width=24, placeholder="YYYY-MM-DD HH:MM")


def team_field(label: str, path: str, value: object, fid: str) -> Field:
    """The others of the team: 'Ana Rewi (NZ-42); Tom Hale'."""
    return Field(label, path, value, show=team_text, parse=parse_team, id=fid, width=40,
                 placeholder="name (id); name (id)")


def _whole(value: object) -> int:
    """A whole-number field's value (none is 0)."""
    return int(value) if isinstance(value, (int, float)) else 0


@dataclass(frozen=True)
class Collected:
    """What the form holds, checked: the survey to store and what is remembered of it."""

    survey: dict[str, object]
    who: str
    inspector_id: object
    height: object
    team: object
    event: object


def system_options() -> list[tuple[str, str]]:
    """The eight structural systems, each with its one-line description."""
    from triage.standards.vocabulary import words

    return [(f"{words('systems', k)}: {s.description}", k)
            for k, s in standards.load().systems.items()]


class NewSurveyScreen(TriageScreen[str | None]):
    """The form that starts a survey; returns the new survey's id (None when given up)."""

    CSS_PATH = "new_survey.tcss"
    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("ctrl+s", "create", "create survey", priority=True),
        Binding("escape", "cancel", "back"),
    ]

    def compose(self) -> ComposeResult:
        """The form."""
        app = self.app
        typical = app.data.setting("last_storey_height_m") or 3.2
        yield Static("New survey", classes="title")
        with VerticalScroll(id="new-form"):
            yield Static("Building", classes="section")
            yield Field("name", "building.name", required=True, id="f-name", width=40)
            yield Field("address", "building.address", required=True, id="f-address", width=40)
            yield Field("use", "building.use", id="f-use", width=24,
                        placeholder="e.g. clinic")
            yield Field("year built", "building.year_built", kind="int", id="f-year",
                        placeholder="e.g. 1978")
            yield Field("latitude", "building.location.lat", kind="float", unit="deg",
                        id="f-lat")
            yield Field("longitude", "building.location.lon", kind="float", unit="deg",
                        id="f-lon")
            yield Static("Structural system, each direction", classes="section")
            yield Choice("system x", "building.system.x", system_options(), "rc_frame",
                         id="f-sx", width=62)
            yield Choice("system y", "building.system.y", system_options(), "rc_frame",
                         id="f-sy", width=62)
            yield Static("Storeys (each can be changed later)", classes="section")
            yield Field("above ground", "storeys.above", 2, kind="int", required=True,
                        id="f-above")
            yield Field("below ground", "storeys.below", 0, kind="int", id="f-below")
            yield Choice("named", "storeys.naming", list(NAMINGS),
                         app.data.setting("last_storey_naming") or "G", id="f-naming", width=30)
            yield Field("typical height", "storeys.height_m", typical, kind="float", unit="m",
                        required=True, id="f-height")
            yield Static("Inspector", classes="section")
            yield Field("name", "inspection.inspector.name",
                        app.data.setting("last_inspector_name"), required=True,
                        id="f-inspector", width=30)
            yield Field("id", "inspection.inspector.id", app.data.setting("last_inspector_id"),
                        id="f-inspector-id", width=16)
            yield team_field("team", "inspection.team", app.data.setting("last_team"), "f-team")
            yield when_field(app, "date and time", "inspection.at", app.now(), "f-at")
            yield Field("event", "inspection.event", app.data.setting("last_event"),
                        id="f-event", width=40, placeholder="the earthquake or aftershock")
            yield Field("weather", "inspection.weather", id="f-weather", width=30,
                        placeholder="e.g. rain, dusk")
            yield Field("not inspected", "inspection.not_inspected", id="f-not-inspected",
                        width=40, placeholder="what could not be seen, and why")
            yield Static("Nothing is stored until the survey is created (ctrl+s); from then "
                         "on every field is saved as soon as it is accepted.", classes="hint")
            yield Button("create survey", id="create", compact=True)
        yield Static("", id="new-status", classes="hint")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        """Cursor in the first field."""
        self.query_one("#f-name", Field).focus_input()

    def on_field_accepted(self, event: FieldAccepted) -> None:
        """A field passed its own check (stored with the rest on create); on to the next."""
        event.field.show_note("ok")
        if isinstance(event.field, Field):
            event.field.saved_text = event.field.text  # leaving it now asks nothing more

    def enter_pressed(self, widget: Widget) -> bool:
        """Enter in a field moves on to the next one at once (leaving it checks it)."""
        if isinstance(widget, Input) and isinstance(widget.parent, Field):
            self.focus_next()
            return True
        return False

    def on_button_pressed(self, event: Button.Pressed) -> None:
        """The create button."""
        if event.button.id == "create":
            self.action_create()

    def _collect(self) -> Collected | None:
        values: dict[str, object] = {}
        bad = False
        for f in self.query(Field):
            try:
                values[f.id or ""] = f.value()
            except ValueError as err:
                f.show_refused(str(err))
                bad = True
        if bad:
            return None
        above = _whole(values["f-above"])
        below = _whole(values["f-below"])
        height = values["f-height"]
        for fid, v, rule in (("f-above", above, "at least one storey above ground"),
                             ("f-below", below, "0 or more")):
            if v < (1 if fid == "f-above" else 0) or v > 200:
                self.query_one(f"#{fid}", Field).show_refused(
                    rule if v >= 0 else "must not be negative")
                bad = True
        if bad:
            return None
        building: dict[str, object] = {
            "name": values["f-name"], "address": values["f-address"],
            "system": {"x": self.query_one("#f-sx", Choice).value(),
                       "y": self.query_one("#f-sy", Choice).value()},
        }
        if values["f-use"]:
            building["use"] = values["f-use"]
        if values["f-year"] is not None:
            building["year_built"] = values["f-year"]
        if values["f-lat"] is not None or values["f-lon"] is not None:
            building["location"] = {"lat": values["f-lat"], "lon": values["f-lon"]}
        who = str(values["f-inspector"])
        inspector: dict[str, object] = {"name": who}
        if values["f-inspector-id"]:
            inspector["id"] = values["f-inspector-id"]
        naming = str(self.query_one("#f-naming", Choice).value() or "G")
        storeys = [{"label": lab, "height_m": height, "below_grade": lab.startswith("B")}
                   for lab in storey_labels(above, below, naming)]
        inspection: dict[str, object] = {"inspector": inspector, "at": values["f-at"]}
        for key, fid in (("team", "f-team"), ("event", "f-event"), ("weather", "f-weather"),
                         ("not_inspected", "f-not-inspected")):
            if values[fid]:
                inspection[key] = values[fid]
        return Collected({"building": building, "inspection": inspection, "storeys": storeys},
                         who, inspector.get("id"), height, inspection.get("team"),
                         inspection.get("event"))

    def _field_for(self, message: str) -> Field | Choice | None:
        path = message.partition(":")[0]
        if path.startswith("storeys"):
            return self.query_one("#f-height", Field)
        for f in self.query(Field).results():
            if f.path and path.startswith(f.path):
                return f
        for c in self.query(Choice).results():
            if c.path and path.startswith(c.path):
                return c
        if path.startswith("building.location"):
            return self.query_one("#f-lat", Field)
        return None

    def action_create(self) -> None:
        """Store the survey and open it."""
        data = self._collect()
        status = self.query_one("#new-status", Static)
        if data is None:
            status.update("not created: a field breaks its rule (shown beside it)")
            return
        app = self.app
        who = data.who
        try:
            sid = app.data.new_survey(data.survey, who)
        except Refused as err:
            f = self._field_for(str(err))
            if f is not None:
                f.show_refused(rule_of(str(err)))
            status.update(block(f"not created: {said(str(err))}"))
            return
        app.data.remember("last_inspector_name", who)
        app.data.remember("last_inspector_id", data.inspector_id)
        app.data.remember("last_storey_height_m", data.height)
        app.data.remember("last_storey_naming", self.query_one("#f-naming", Choice).value())
        app.data.remember("last_team", data.team)
        app.data.remember("last_event", data.event)
        app.who = who
        self.dismiss(sid)

    def action_cancel(self) -> None:
        """Back to the list; nothing stored."""
        self.dismiss(None)
