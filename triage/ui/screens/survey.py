"""One survey, logged storey by storey in walking order, with the verdict always in view.

Every accepted field is saved at once through the store (one durable transaction) and marked
saved; then the verdict is recomputed in a thread worker, stored with `save_assessment`, and
drawn when it comes back. The UI thread never assesses.
"""

from __future__ import annotations

import asyncio
from typing import ClassVar

from textual import work
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.widget import Widget
from textual.widgets import Footer, Input, OptionList, Static, TabbedContent, TabPane
from textual.worker import Worker, WorkerState

from triage.assess import Assessment
from triage.model import Storey
from triage.ui.choices import next_label
from triage.ui.data import Refused, rule_of
from triage.ui.messages import FieldAccepted
from triage.ui.shown import block
from triage.ui.typed import TriageScreen
from triage.ui.verdicts import Verdict
from triage.ui.widgets.field import Field, set_text
from triage.ui.widgets.hazards import HazardsPane
from triage.ui.widgets.members import MembersPane
from triage.ui.widgets.pane import FormPane, ItemPane
from triage.ui.widgets.photos import PhotosPane
from triage.ui.widgets.readings import ReadingsPane
from triage.ui.widgets.storey_pane import StoreyPane
from triage.ui.widgets.storeys import StoreyList, StoreyTabs
from triage.ui.widgets.survey_pane import SurveyPane
from triage.ui.widgets.verdict import VerdictLine, verdict_lines

TABS = ("storey", "readings", "members", "hazards", "photos", "survey")


WIDE = 150  # columns from which the full verdict sits beside the form


class SurveyScreen(TriageScreen[None]):
    """The logging screen of one survey."""

    CSS_PATH = "survey.tcss"
    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("ctrl+n", "new", "new", priority=True),
        Binding("ctrl+r", "remove", "remove", priority=True),
        Binding("ctrl+z", "undo", "undo", priority=True),
        Binding("f2", "verdict", "verdict", priority=True),
        Binding("f3", "history", "history", priority=True),
        Binding("f4", "report", "report", priority=True),
        Binding("pageup", "storey(1)", "storey up", priority=True, key_display="PgUp",
                show=False),
        Binding("pagedown", "storey(-1)", "storey down", priority=True, key_display="PgDn",
                show=False),
        Binding("escape", "back", "back"),  # not priority: a pick list open closes first
        Binding("ctrl+b", "add_below", "storey below", priority=True, show=False),
        Binding("ctrl+d", "direction", "readings: direction x or y", priority=True,
                show=False),
        Binding("f5", "tab('storey')", "storey tab", priority=True, show=False),
        Binding("f6", "tab('readings')", "readings tab", priority=True, show=False),
        Binding("f7", "tab('members')", "members tab", priority=True, show=False),
        Binding("f8", "tab('hazards')", "hazards tab", priority=True, show=False),
        Binding("f9", "tab('photos')", "photos tab", priority=True, show=False),
        Binding("f10", "tab('survey')", "building and inspection tab", priority=True,
                show=False),
    ]

    def __init__(self, survey_id: str) -> None:
        super().__init__()
        self.survey_id = survey_id
        app = self.app
        self.data = app.data
        self.survey = self.data.load(survey_id)
        self.revision = self.data.revision(survey_id)
        self.assessment: Assessment | None = self.data.stored_assessment(survey_id)
        self.assessed_revision = -1
        self.storey_index = self._first_storey()
        self.who = app.who

    def _first_storey(self) -> int:
        """The lowest storey above ground: where the walk inside usually starts."""
        for i, st in enumerate(self.survey.storeys):
            if not st.below_grade:
                return i
        return 0

    @property
    def storey(self) -> Storey | None:
        """The storey in view."""
        if 0 <= self.storey_index < len(self.survey.storeys):
            return self.survey.storeys[self.storey_index]
        return None

    # --- layout --------------------------------------------------------------------------

    def compose(self) -> ComposeResult:
        """Title, storeys, tabs, verdict."""
        yield Static("", id="survey-title", classes="title")
        with Horizontal(id="body"):
            with Vertical(id="storey-column"):
                yield StoreyList(id="storeys")
                yield Static("PgUp ↑\nPgDn ↓", id="storey-keys")
            with StoreyTabs(id="tabs", initial="readings"):
                with TabPane("storey [dim]f5[/]", id="storey"):
                    yield StoreyPane(id="storey-pane")
                with TabPane("readings [dim]f6[/]", id="readings"):
                    yield ReadingsPane(id="readings-pane")
                with TabPane("members [dim]f7[/]", id="members"):
                    yield MembersPane(id="members-pane")
                with TabPane("hazards [dim]f8[/]", id="hazards"):
                    yield HazardsPane(id="hazards-pane")
                with TabPane("photos [dim]f9[/]", id="photos"):
                    yield PhotosPane(id="photos-pane")
                with TabPane("survey [dim]f10[/]", id="survey"):
                    yield SurveyPane(id="survey-pane")
            with VerticalScroll(id="side"):
                yield Static("", id="side-verdict")
        yield VerdictLine(id="verdict-line")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        """Fill everything, then work out the verdict."""
        self.fill_storeys()
        self.load_all()
        self.show_title()
        self.query_one(VerdictLine).show(self.assessment, pending=True)
        self._layout_side()
        self.request_verdict()
        self.current_pane().focus_first()

    def on_resize(self) -> None:
        """The full verdict beside the form when the terminal is wide enough."""
        self._layout_side()

    def _layout_side(self) -> None:
        side = self.query_one("#side")
        side.display = self.app.size.width >= WIDE
        if side.display:
            self._draw_side()

    def _draw_side(self) -> None:
        if self.assessment is not None and self.query_one("#side").display:
            self.query_one("#side-verdict", Static).update(
                verdict_lines(self.survey, self.assessment, width=56))

    def show_title(self, note: str = "") -> None:
        """Building, address, revision, report state."""
        b = self.survey.building
        row = self.data.row(self.survey_id)
        report = ""
        if row is not None and row.edited_since_report:
            report = " · edited since its report"
        elif row is not None and row.edited_since_report is False:
            report = " · report issued"
        prev = " · re-inspection" if self.survey.inspection.previous else ""
        set_text(self.query_one("#survey-title", Static),
                 f"{b.name} · {b.address} · rev {self.revision}{report}{prev}"
                 + (f" · {note}" if note else ""), fixed=True)

    def fill_storeys(self) -> None:
        """The storey list, top storey first (as the building stands)."""
        self.query_one(StoreyList).show(self.survey, self.storey_index)

    def load_all(self, keep_forms: bool = False) -> None:
        """Redraw every pane for the storey in view."""
        self.query_one(StoreyPane).load(refill=not keep_forms)
        self.query_one(SurveyPane).load(refill=not keep_forms)
        for pane in self.query(ItemPane).results():
            pane.reload(keep_form=keep_forms)

    # --- storeys -------------------------------------------------------------------------

    def on_option_list_option_highlighted(self, event: OptionList.OptionHighlighted) -> None:
        """Another storey picked in the list (a stale highlight is ignored: `storey_of`)."""
        i = self.query_one(StoreyList).storey_of(event)
        if i is not None and i != self.storey_index:
            self.go_storey(i)

    def flush_focused(self) -> bool:
        """Save what is typed in the focused field before moving away from it.

        Returns False (and shows the rule) when the value breaks a rule: the move waits
        until it is put right.
        """
        w = self.app.focused
        f = w.parent if w is not None else None
        if not isinstance(f, Field) or not f.path or f.text.strip() == f.saved_text.strip():
            return True
        try:
            value = f.value()
            rev = self.data.set(self.survey_id, f.path, value, self.who)
        except ValueError as err:  # the field's own rule (Refused is not a ValueError)
            f.show_refused(str(err))
            return False
        except Refused as err:
            f.show_refused(rule_of(str(err)))
            return False
        f.mark_saved()
        self.after_save(rev)
        return True

    def go_storey(self, i: int) -> None:
        """Show storey i (0 is the lowest); a new item half typed stays in its form."""
        if not self.flush_focused():
            self.notify("not moved: a field breaks its rule (shown beside it)")
            return
        self.storey_index = max(0, min(len(self.survey.storeys) - 1, i))
        self.query_one(StoreyPane).load()
        for pane in self.query(ItemPane).results():
            editing = pane.editing is not None and not isinstance(pane, HazardsPane)
            if editing:
                pane.editing = None
            pane.reload(keep_form=not editing)
            if not editing:
                pane.set_paths()
        self.query_one(StoreyList).follow(self.survey, self.storey_index)

    def action_storey(self, step: int) -> None:
        """Walk up (1) or down (-1) a storey."""
        self.go_storey(self.storey_index + step)

    def action_tab(self, name: str) -> None:
        """Show a tab, the cursor in its form."""
        if not self.flush_focused():
            return
        self.query_one(TabbedContent).active = name
        self.current_pane().focus_first()  # at once: keys typed after the F-key go there

    def action_direction(self) -> None:
        """ctrl+d in the readings tab: the new reading's direction, x or y (the cursor stays)."""
        from textual.actions import SkipAction

        if self.query_one(TabbedContent).active != "readings":
            raise SkipAction()  # elsewhere ctrl+d is the field's own (delete right)
        self.query_one(ReadingsPane).toggle_direction()

    def enter_pressed(self, widget: Widget) -> bool:
        """Enter in a pane, acted on at once (see triage/ui/focus.py)."""
        for node in widget.ancestors_with_self:
            if isinstance(node, ItemPane):
                return bool(node.enter_pressed(widget))
            if isinstance(node, (StoreyPane, SurveyPane)):
                if isinstance(widget, Input):
                    self.focus_next()  # leaving the field saves it
                    return True
                return False
        return False

    # --- saving --------------------------------------------------------------------------

    def on_field_accepted(self, event: FieldAccepted) -> None:
        """Save a field the moment it is accepted; show saved, or the rule."""
        event.stop()
        if not event.path:
            return
        try:
            rev = self.data.set(self.survey_id, event.path, event.value, self.who)
        except Refused as err:
            event.field.show_refused(rule_of(str(err)))
            return
        event.field.mark_saved(value=event.value)
        self.after_save(rev, structural=event.path.endswith(".label") or event.path.startswith(
            ("building.", "inspection.")))
        pane = next((a for a in event.field.ancestors if isinstance(a, ItemPane)), None)
        if pane is not None:
            pane.retry_refused(event.field)
        if event.path.endswith((".count", ".kind", ".crack_mm", ".signs", ".damage_class",
                                ".inspected", ".connection_type", ".severity")):
            set_text(self.query_one(MembersPane).class_line, "class: working it out …",
                     fixed=True)

    def after_save(self, revision: int, structural: bool = False) -> None:
        """A change is in the store: update the title, then the verdict."""
        self.revision = revision
        if structural:
            self.survey = self.data.load(self.survey_id)
            self.fill_storeys()
            self.load_all(keep_forms=True)
        self.show_title("✓ saved")
        self.request_verdict()

    def add_item(self, path: str, item: dict[str, object]) -> int:
        """Add an item (from a pane); Refused passes up to the pane."""
        rev = self.data.add(self.survey_id, path, item, self.who)
        self.survey = self.data.load(self.survey_id)
        self.revision = rev
        for pane in self.query(ItemPane).results():
            pane.reload(keep_form=True)
        self.fill_storeys()
        self.show_title("✓ saved")
        self.request_verdict()
        return rev

    def attach_photo(self, path: str, file: str, caption: str) -> int:
        """Copy a photo file into the store, onto the photo list at `path`; Refused passes up."""
        rev = self.data.attach_photo(self.survey_id, path, file, caption, self.who)
        self.survey = self.data.load(self.survey_id)
        self.revision = rev
        for pane in self.query(ItemPane).results():
            pane.reload(keep_form=True)
        self.query_one(StoreyPane).load(refill=False)
        self.show_title("✓ saved")
        self.request_verdict()
        return rev

    def remove_item(self, path: str) -> int:
        """Remove an item (kept in the log)."""
        rev = self.data.remove(self.survey_id, path, self.who)
        self.survey = self.data.load(self.survey_id)
        self.revision = rev
        self.fill_storeys()
        self.show_title("✓ saved")
        self.request_verdict()
        return rev

    def current_pane(self) -> FormPane:
        """The pane of the tab in view."""
        tab = self.query_one(TabbedContent).active
        return self.query_one(f"#{tab}-pane", FormPane)

    def action_new(self) -> None:
        """A new item in the tab in view (a storey on top in the storey tab)."""
        pane = self.current_pane()
        if isinstance(pane, ItemPane):
            pane.edit(None)
            return
        labels = [s.label for s in self.survey.storeys]
        top = self.survey.storeys[-1]
        item = {"label": next_label(labels), "height_m": top.height_m}
        try:
            self.add_item("storeys", item)
        except Refused as err:
            self.notify(f"storey not added: {err}")
            return
        self.go_storey(len(self.survey.storeys) - 1)

    def action_add_below(self) -> None:
        """A basement storey below the lowest."""
        labels = [s.label for s in self.survey.storeys]
        n = 1
        while f"B{n}" in labels:
            n += 1
        item = {"label": f"B{n}", "height_m": self.survey.storeys[0].height_m,
                "below_grade": True}
        try:
            rev = self.data.add(self.survey_id, "storeys", item, self.who, index=0)
        except Refused as err:
            self.notify(f"storey not added: {err}")
            return
        self.survey = self.data.load(self.survey_id)
        self.after_save(rev)
        self.storey_index = 0
        self.fill_storeys()
        self.go_storey(0)

    def action_remove(self) -> None:
        """Remove the item being edited, or the storey in the storey tab."""
        pane = self.current_pane()
        if isinstance(pane, ItemPane):
            pane.remove_selected()
            return
        if len(self.survey.storeys) == 1:
            self.notify("a survey keeps at least one storey")
            return
        try:
            self.remove_item(f"storeys[{self.storey_index}]")
        except Refused as err:
            self.notify(f"storey not removed: {err}")
            return
        self.go_storey(min(self.storey_index, len(self.survey.storeys) - 1))
        self.notify("storey removed (ctrl+z undoes it)")

    def action_undo(self) -> None:
        """Undo the survey's last change."""
        from triage.ui.screens.history import describe_change

        labels = [st.label for st in self.survey.storeys]  # as the change left them
        try:
            change = self.data.undo(self.survey_id, self.who)
        except Refused as err:
            self.notify(f"cannot undo: {err}")
            return
        if change is None:
            self.notify("nothing to undo")
            return
        self.survey = self.data.load(self.survey_id)
        self.revision = self.data.revision(self.survey_id)
        self.storey_index = min(self.storey_index, len(self.survey.storeys) - 1)
        self.fill_storeys()
        self.load_all()
        self.show_title("undone: " + describe_change(change.op, change.path, change.new, labels))
        self.request_verdict()

    # --- the verdict ---------------------------------------------------------------------

    def request_verdict(self) -> None:
        """Recompute the verdict off the UI thread."""
        line = self.query_one(VerdictLine)
        line.show(self.assessment, pending=True)
        self.verdict_worker()

    @work(exclusive=True, group="verdict", exit_on_error=False)
    async def verdict_worker(self) -> Verdict:
        """Assess in the verdict thread; draw the result here, on the UI thread."""
        app = self.app
        v: Verdict = await asyncio.wrap_future(app.verdicts.submit(self.survey_id))
        self.apply_verdict(v)
        return v

    def apply_verdict(self, v: Verdict) -> None:
        """Draw a fresh verdict (ignored when a newer one is already shown)."""
        if v.revision < self.assessed_revision:
            return
        self.assessed_revision = v.revision
        self.survey = v.survey
        self.assessment = v.assessment
        self.query_one(VerdictLine).show(v.assessment, pending=v.revision < self.revision)
        active = self.current_pane()
        for pane in self.query(ItemPane).results():
            if pane is active:
                pane.reload(keep_form=True)
            else:
                pane.dirty = True
        self.query_one(StoreyPane).load(refill=False)
        self._draw_side()

    def on_tabbed_content_tab_activated(self, event: TabbedContent.TabActivated) -> None:
        """A pane left out of the last redraw catches up when its tab is shown."""
        pane = self.current_pane()
        if isinstance(pane, ItemPane) and pane.dirty:
            pane.reload(keep_form=True)

    def on_worker_state_changed(self, event: Worker.StateChanged) -> None:
        """A verdict that failed says so in the verdict line (never a traceback)."""
        if event.worker.group == "verdict" and event.state == WorkerState.ERROR:
            self.query_one(VerdictLine).update(block(
                f"verdict not computed: {event.worker.error}\n"
                "indicative only: the engineer of record decides"))

    # --- other screens -------------------------------------------------------------------

    def action_back(self) -> None:
        """Back to the survey list (a field that breaks its rule is left unsaved)."""
        if not self.flush_focused():
            self.notify("left unsaved: the value broke its rule")
        self.app.pop_screen()

    def action_verdict(self) -> None:
        """The full verdict."""
        if not self.flush_focused():
            return
        from triage.ui.screens.verdict import VerdictScreen

        if self.assessment is not None:
            self.app.push_screen(VerdictScreen(self.survey, self.assessment))

    def action_history(self) -> None:
        """The change log, with undo."""
        if not self.flush_focused():
            return
        from triage.ui.screens.history import HistoryScreen

        def back(changed: bool | None) -> None:
            if changed:
                self.survey = self.data.load(self.survey_id)
                self.revision = self.data.revision(self.survey_id)
                self.storey_index = min(self.storey_index, len(self.survey.storeys) - 1)
                self.fill_storeys()
                self.load_all()
                self.show_title("undone")
                self.request_verdict()

        self.app.push_screen(HistoryScreen(self.survey_id), back)

    def action_report(self) -> None:
        """Issue the report."""
        if not self.flush_focused():
            return
        from triage.ui.screens.report import ReportScreen

        def back(done: bool | None) -> None:
            self.survey = self.data.load(self.survey_id)
            self.revision = self.data.revision(self.survey_id)
            self.show_title()
            self.load_all(keep_forms=True)

        self.app.push_screen(ReportScreen(self.survey_id), back)
