"""Member groups of a storey: kind, count, what was seen; class and eta shown at once."""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from typing import TYPE_CHECKING

from textual import events
from textual.app import ComposeResult
from textual.containers import Horizontal, Vertical
from textual.widgets import Label, OptionList, SelectionList, Static

from triage import standards
from triage.assess.result import MemberResult
from triage.model import MemberGroup
from triage.standards import CLASSES, takes_connection_type, takes_inspected, takes_wall_mode
from triage.standards.vocabulary import words
from triage.ui.choices import (
    capacity_hint,
    class_texts,
    connection_type_choices,
    member_kinds,
    severity_choices,
    sign_choices,
    wall_mode_choices,
)
from triage.ui.messages import FieldAccepted
from triage.ui.widgets.field import Choice, Field, Saving, set_text
from triage.ui.widgets.pane import ItemPane, values_of

if TYPE_CHECKING:
    from triage.ui.widgets.pane import FormField
from triage.ui.widgets.search import Searcher, searchable
from triage.ui.widgets.ticks import TickList


@dataclass(frozen=True)
class MemberField:
    """One field of the member-group form, as data: a new field is one more entry in FIELDS.

    `build(pane)` makes the widget (a `Field` or `Choice`; the pane gives the building's
    systems); `default` is a new group's value; `kinds`, when given, shows the field only for
    those member kinds (a connection's type, a wall's mode); `where`, when given, only where
    it says yes for the kind and the building's systems (a FEMA 352 type in a steel moment
    frame); `keep`: a new group keeps the last group's value.
    """

    key: str
    build: Callable[[MembersPane], FormField]
    default: object = None
    kinds: tuple[str, ...] = ()
    keep: bool = False
    where: Callable[[str, tuple[str, ...]], bool] | None = None

    def shown(self, kind: str, systems: tuple[str, ...]) -> bool:
        """Whether the field is shown (and gathered) for a group of this kind here."""
        if self.kinds and kind not in self.kinds:
            return False
        return self.where is None or self.where(kind, systems)


def _kinds(pane: MembersPane) -> Choice:
    kinds = [(words("member_kinds", k), k) for k in member_kinds(pane.systems())]
    return Choice("kind", None, kinds, "column", id="m-kind")


# In the order an inspector logs a group: what, how many, what was seen, then the rest.
FIELDS: tuple[MemberField, ...] = (
    MemberField("kind", _kinds, "column", keep=True),
    MemberField("count", lambda p: Field("count", None, 1, kind="int", id="m-count"), 1),
    MemberField("signs", lambda p: SignChecks(id="m-signs"), ()),
    MemberField("crack_mm", lambda p: Field("widest crack", None, kind="float", unit="mm",
                                            id="m-crack", placeholder="none")),
    MemberField("inspected", lambda p: Field(
        "inspected", None, kind="int", id="m-inspected", placeholder="all of them"),
        kinds=("connection", "wall", "infill"), where=takes_inspected),
    MemberField("connection_type", lambda p: Choice(
        words("fields.member_group", "connection_type"), None, connection_type_choices(), None,
        allow_blank=True, id="m-conn-type"), kinds=("connection",), where=takes_connection_type),
    MemberField("mode", lambda p: Choice(
        words("fields.member_group", "mode"), None, wall_mode_choices("wall", p.systems()),
        None, allow_blank=True, id="m-mode"), kinds=("wall", "infill"), where=takes_wall_mode),
    MemberField("severity", lambda p: Choice(
        words("fields.member_group", "severity"), None, severity_choices(), None,
        allow_blank=True, id="m-severity"), kinds=("wall", "infill"), where=takes_wall_mode),
    MemberField("ref", lambda p: Field("ref", None, id="m-ref", placeholder="e.g. C3")),
    MemberField("ductility", lambda p: Choice(
        "ductility", None, [("ductile", "ductile"), ("brittle (short, shear)", "brittle")],
        "ductile", id="m-ductility"), "ductile"),
    MemberField("dir", lambda p: Choice("acts in", None, [("x", "x"), ("y", "y")], None,
                                        allow_blank=True, id="m-dir")),
    MemberField("weight", lambda p: Field("weight", None, 1, kind="float", id="m-weight",
                                          placeholder="1: share of the storey"), 1.0),
    MemberField("crack_sd_mm", lambda p: Field("crack uncert.", None, kind="float", unit="mm",
                                               id="m-crack-sd", placeholder="default")),
    MemberField("override_reason", lambda p: Field("override why", None, id="m-reason",
                                                   width=34,
                                                   placeholder="reason, before the class")),
    MemberField("damage_class", lambda p: Choice("class by hand", None,
                                                 [(c, c) for c in CLASSES], None,
                                                 allow_blank=True, id="m-class")),
)
KEYS = [f.key for f in FIELDS]


class SignList(TickList):
    """A check list that ticks the highlighted sign at once, and finds a sign by its letters.

    Textual's list ticks what is highlighted when its own message comes back, so a Down typed
    right after Space moved the highlight first and the wrong sign was ticked. A letter typed
    moves to the next sign whose words begin with it (triage/ui/widgets/search.py).
    """

    def __init__(self, *, compact: bool = False) -> None:
        super().__init__(compact=compact)
        self.searcher = Searcher()

    def check_consume_key(self, key: str, character: str | None) -> bool:
        """Letters search the list (typed in order, never a binding)."""
        return searchable(character)

    async def _on_key(self, event: events.Key) -> None:
        if not searchable(event.character):
            self.searcher.reset()
            return
        event.stop()
        event.prevent_default()
        texts = [str(self.get_option_at_index(i).prompt) for i in range(self.option_count)]
        i = self.searcher.next_index(texts, self.highlighted, event.character or "")
        if i is not None:
            self.highlighted = i

    def action_select(self) -> None:
        """Space or Enter: tick or untick the highlighted sign now."""
        i = self.highlighted
        if i is not None and not self.get_option_at_index(i).disabled:
            self.toggle(self.get_option_at_index(i))

    def _on_option_list_option_selected(self, event: OptionList.OptionSelected) -> None:
        event.stop()  # ticked already, in action_select


class SignChecks(Saving, Horizontal):
    """The signs check list for a member kind (from the forms of the storey's systems)."""

    DEFAULT_CSS = """
    SignChecks { height: auto; width: 1fr; }
    SignChecks > Label { width: 15; }
    SignChecks > Vertical { width: 1fr; height: auto; }
    SignChecks SelectionList { width: 1fr; height: auto; max-height: 10; }
    SignChecks .sign-note { height: auto; color: $text-muted; }
    SignChecks .fstatus { height: auto; width: 1fr; color: $text-muted; }
    SignChecks .fstatus.refused { color: $accent; text-style: bold; }
    MembersPane > .class-line { height: 2; }
    """

    def __init__(self, id: str | None = None) -> None:
        super().__init__(id=id)
        self.path: str | None = None
        self.saved_value: list[str] = []
        self.checks: SelectionList[str] = SignList(compact=True)
        self.status = Static("", classes="fstatus")
        self.sign_note = Static("", classes="sign-note")
        self._quiet = 0

    def compose(self) -> ComposeResult:
        """Label; the list, what the highlighted sign implies, the status."""
        yield Label("signs seen")
        with Vertical():
            yield self.checks
            yield self.sign_note
            yield self.status

    def set_choices(self, choices: list[tuple[str, str]], selected: list[str]) -> None:
        """Offer these signs in words with their whole hint, ticking the ones given."""
        self.saved_value = list(selected)
        self._quiet += 1
        self.checks.clear_options()
        keys = [k for k, _ in choices]
        extra = [(s, "not on this kind's form") for s in selected if s not in keys]
        for key, hint in choices + extra:
            self.checks.add_option((f"{words('signs', key)}: {hint}", key, key in selected))
        self.show_sign()
        self.call_after_refresh(self._unquiet)

    def show_sign(self) -> None:
        """Under the list: the class the highlighted sign implies, and on what basis."""
        i = self.checks.highlighted
        if i is None or not self.checks.option_count:
            set_text(self.sign_note, "Space ticks the highlighted sign")
            return
        key = str(self.checks.get_option_at_index(i).value)
        sign = standards.load().signs.get(key)
        if sign is None:
            set_text(self.sign_note, "")
            return
        set_text(self.sign_note, f"{words('signs', key)} implies class {sign.damage_class} "
                 f"({sign.basis}) · Space ticks it")

    def on_selection_list_selection_highlighted(
            self, event: SelectionList.SelectionHighlighted[str]) -> None:
        """Another sign highlighted: say what it implies."""
        event.stop()
        self.show_sign()

    def _unquiet(self) -> None:
        self._quiet = max(0, self._quiet - 1)

    def value(self) -> list[str]:
        """The ticked signs, in list order."""
        return [str(v) for v in self.checks.selected]

    def set_value(self, value: object) -> None:
        """Tick the given signs (kept choices)."""
        self.saved_value = [str(v) for v in value] if isinstance(value, (list, tuple)) else []

    def mark_saved(self, note: str = "", value: object = ...) -> None:
        """The store took these signs (a sign ticked since is saved by its own message)."""
        self.saved_value = self.value() if not isinstance(value, (list, tuple)) else [
            str(v) for v in value]
        self.show_saved(note)

    def on_selection_list_selected_changed(
            self, event: SelectionList.SelectedChanged[str]) -> None:
        """Ticking a sign asks to save the list."""
        event.stop()
        if self._quiet:
            return
        self.clear_refusal()
        v = self.value()
        if sorted(v) == sorted(self.saved_value):
            return
        self.post_message(FieldAccepted(self, self.path or "", v))


class MembersPane(ItemPane[MemberGroup]):
    """The member groups of the storey in view."""

    first_key = "kind"  # a letter picks the kind; Tab goes on to the count
    noun = "member group"
    columns = (("#", 3), ("mark", 5), ("kind", 11), ("count", 5), ("crack", 5), ("signs", 5),
               ("class", 5), ("from", 11))

    def list_path(self) -> str:
        """E.g. storeys[1].members."""
        return f"storeys[{self.survey_screen.storey_index}].members"

    def items(self) -> list[MemberGroup]:
        """The storey's member groups."""
        st = self.survey_screen.storey
        return list(st.members) if st is not None else []

    def systems(self) -> tuple[str, ...]:
        """The building's systems (both directions)."""
        s = self.survey_screen.survey
        return (s.building.system.x, s.building.system.y)

    def result(self, index: int) -> MemberResult | None:
        """The assessed class and eta of a group."""
        scr = self.survey_screen
        a, st = scr.assessment, scr.storey
        if a is None or st is None:
            return None
        try:
            rows = a.storey(st.label).members
        except KeyError:
            return None
        return next((m for m in rows if m.index == index), None)

    def heading(self) -> str:
        """What to count, from the form."""
        st = self.survey_screen.storey
        if st is None:
            return ""
        total = sum(m.count for m in st.members)
        return (f"Member groups, storey {st.label} · {total} members in {len(st.members)} "
                "groups")

    def row(self, index: int, item: MemberGroup) -> tuple[str, ...]:
        """One group, with its assessed class and eta."""
        res = self.result(index)
        cls = "—" if res is None else (res.damage_class or "none")
        frm = "" if res is None or res.class_from is None else words("class_from",
                                                                     res.class_from)
        return (str(index + 1), item.ref or "", words("member_kinds", item.kind),
                str(item.count), "" if not item.crack_mm else f"{item.crack_mm:g}",
                str(len(item.signs)) if item.signs else "", cls, frm)

    def form_widgets(self) -> ComposeResult:
        """The fields of FIELDS in order, then the class line.

        The line saying what the capacity picks mean comes right after the last of them.
        """
        self.capacity_line = Static("", classes="pane-note capacity-line")
        for spec in FIELDS:
            widget = spec.build(self)
            widget.key = spec.key
            if isinstance(widget, SignChecks):
                self.signs = widget
            yield widget
            if spec.key == "severity":   # what the capacity picks mean, right under them
                yield self.capacity_line
        self.class_line = Static("", classes="pane-note class-line")
        yield self.class_line

    def shown_for(self, kind: str) -> None:
        """Show the fields that apply to a member kind in this building.

        With them the kind's own list of modes (a wall's or an infill panel's) and what the
        capacity fields mean.
        """
        systems = self.systems()
        for spec in FIELDS:
            if spec.kinds or spec.where is not None:
                self.form[spec.key].display = spec.shown(kind, systems)
        mode = self.choice("mode")
        if mode.display and getattr(self, "_modes_kind", "wall") != kind:
            self._modes_kind = kind
            keep = mode.value()
            options = wall_mode_choices(kind, systems)
            mode.set_options(options, keep if keep in {v for _, v in options} else None)
        self.show_capacity()

    def show_capacity(self) -> None:
        """Under the class line, what the picked FEMA 352 type or FEMA 306 mode and severity mean.

        Shown only where the group takes them.
        """
        kind = str(self.form["kind"].value() or "column")
        fields = [k for k in ("connection_type", "mode", "severity") if self.form[k].display]
        self.capacity_line.display = bool(fields)
        if fields:
            picked = [self.form[k].value() for k in ("connection_type", "mode", "severity")]
            conn, mode, severity = (None if v is None else str(v) for v in picked)
            set_text(self.capacity_line, capacity_hint(kind, conn, mode, severity))

    def fill(self, item: MemberGroup | None) -> None:
        """A group's values, or a new group (the kind kept from the last one)."""
        if item is None:
            for spec in FIELDS:
                if spec.key != "signs" and not spec.keep:
                    self.form[spec.key].set_value(spec.default)
            kind = str(self.form["kind"].value() or "column")
            self.form["kind"].set_value(kind)
            selected: list[str] = []
        else:
            kind, selected = item.kind, list(item.signs)
            self.shown_for(kind)   # the kind's own mode list, before its mode is shown
            for spec in FIELDS:
                if spec.key != "signs":
                    self.form[spec.key].set_value(getattr(item, spec.key, None))
        self._signs_kind = kind
        self.signs.set_choices(sign_choices(self.systems(), kind), selected)
        self.shown_for(kind)
        self.show_class()

    def show_class(self) -> None:
        """The assessed class and eta of the group in the form, and what it looks like."""
        if self.editing is None:
            set_text(self.class_line, "class and eta are shown once the group is added", fixed=True)
            return
        res = self.result(self.editing)
        if res is None:
            set_text(self.class_line, "class: working it out …", fixed=True)
            return
        cls = res.damage_class or "none (undamaged)"
        eta = "—" if res.eta is None else f"{res.eta:g}"
        look = class_texts(self.systems()).get(res.damage_class or "", "")
        origin = f" ({words('class_from', res.class_from)})" if res.class_from else ""
        set_text(self.class_line, f"class {cls}{origin} · eta {eta}"
                 + (f" · {look}" if look else ""), fixed=True)

    def reload(self, keep_form: bool = False) -> None:
        """Table and class line."""
        super().reload(keep_form)
        self.show_class()

    def on_mount(self) -> None:
        """A kind picked by a typed letter offers its signs at once (see `kind_picked`).

        (Textual runs ItemPane.on_mount too: handlers run down the MRO.)
        """
        self.choice("kind").select.on_pick = self.kind_picked

    def kind_picked(self, picked: object) -> None:
        """Another kind, picked: its signs and fields, before the next key is taken.

        Keys typed ahead (Tab, a letter finding a sign, Space) must meet the new kind's sign
        list, not the old one rebuilt under them later.
        """
        kind = str(picked or "column")
        if kind == getattr(self, "_signs_kind", None):
            return
        self._signs_kind = kind
        self.signs.set_choices(sign_choices(self.systems(), kind), self.signs.value())
        self.shown_for(kind)

    def form_changed(self, widget: FormField) -> None:
        """A new kind offers its own signs and fields; a capacity pick says what it means."""
        if widget is self.form["kind"]:
            self.kind_picked(widget.value())
        self.show_capacity()

    def on_field_accepted(self, event: FieldAccepted) -> None:
        """Kind changed in edit mode: offer its signs too (the save goes on up)."""
        if self.editing is not None and event.field is self.form["kind"]:
            self.kind_picked(event.value)
        if self.editing is not None:
            self.show_capacity()
        if self.editing is None and event.field is self.signs:
            event.stop()
            event.prevent_default()  # gathered with the new group, not added on its own
        # (Textual then calls ItemPane.on_field_accepted itself: handlers run down the MRO)

    def build_item(self) -> dict[str, object]:
        """The group from the form."""
        kind = str(self.form["kind"].value() or "column")
        systems = self.systems()
        data = values_of(self.form, [f.key for f in FIELDS if f.key != "signs"
                                     and f.shown(kind, systems)])
        if "count" not in data:
            raise ValueError("count: how many members the group holds is needed")
        if data.get("weight") == 1:
            del data["weight"]  # the default: left out of the survey
        signs = self.signs.value()
        if signs:
            data["signs"] = signs
        return data
