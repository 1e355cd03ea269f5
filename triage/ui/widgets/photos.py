"""Photos of the storey in view: every one, with what it belongs to; attaching one copies it.

The table lists the photos of the storey itself, of each of its member groups, and of the
hazards on that storey or on none in particular, each with its owner in words. A new photo is
a file on this laptop: attaching it copies the image into the database
(`FieldData.attach_photo`, the store's `attach_photo`: JPEG or PNG by content, at most 20 MB
and 40 megapixels), so it stays with the survey after a restart, a backup or a merge, and the
file itself is no longer needed. A refused file is said in one line beside the field.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

from textual.app import ComposeResult

from triage.model import Hazard, MemberGroup, Photo, Storey
from triage.standards.vocabulary import words
from triage.ui.widgets.field import Choice, Field
from triage.ui.widgets.pane import ItemPane, values_of

if TYPE_CHECKING:
    from triage.ui.widgets.pane import FormField

Owner = Storey | MemberGroup | Hazard  # what a photo can be of


@dataclass(frozen=True)
class Entry:
    """One photo in the list: what it belongs to, where its list is, its place in it."""

    owner: str       # in words, e.g. 'member group 2: column C3'
    list_path: str   # e.g. 'storeys[1].members[1].photos'
    index: int
    photo: Photo


class PhotosPane(ItemPane[Photo]):
    """Every photo of the storey in view; a new one attached to the storey, a group or a hazard."""

    first_key = "path"
    noun = "photo"
    # 57 columns of text and 2 of padding each: 67, what the tab holds at 80 columns beside
    # the storey list with the pane's scroll bar shown (tests/ui/test_photos.py measures it)
    columns = (("#", 2), ("of", 22), ("file", 14), ("caption", 12), ("kept", 7))

    def __init__(self, id: str | None = None) -> None:
        super().__init__(id=id)
        self.target = "storey"
        self.entries: list[Entry] = []

    def targets(self) -> list[tuple[str, str]]:
        """What a new photo can be of: the storey, its member groups, its hazards."""
        return [(owner, key) for key, owner, _ in self._owners()]

    def _owners(self) -> list[tuple[str, str, Owner]]:
        """(target key, owner in words, the item) for the storey in view."""
        scr = self.survey_screen
        st = scr.storey
        if st is None:
            return []
        out: list[tuple[str, str, Owner]] = [("storey", f"storey {st.label}", st)]
        for j, m in enumerate(st.members):
            out.append((f"members[{j}]", f"member group {j + 1}: "
                        f"{words('member_kinds', m.kind)}" + (f" {m.ref}" if m.ref else ""), m))
        for k, h in enumerate(scr.survey.hazards):
            if h.storey in (None, "", st.label):
                out.append((f"hazards[{k}]", f"hazard {k + 1}: {words('hazards', h.kind)}", h))
        return out

    def _list_path(self, target: str) -> str:
        i = self.survey_screen.storey_index
        if target.startswith("hazards["):
            return f"{target}.photos"
        if target.startswith("members["):
            return f"storeys[{i}].{target}.photos"
        return f"storeys[{i}].photos"

    def list_path(self) -> str:
        """The photo list a new photo goes to (the owner picked)."""
        return self._list_path(self.target)

    def item_path(self, index: int) -> str:
        """A listed photo's own path, e.g. 'storeys[1].members[0].photos[2]'."""
        e = self.entries[index]
        return f"{e.list_path}[{e.index}]"

    def items(self) -> list[Photo]:
        """Every photo of the storey in view, in the order of their owners."""
        self.entries = [Entry(owner, self._list_path(key), n, photo)
                        for key, owner, item in self._owners()
                        for n, photo in enumerate(item.photos)]
        return [e.photo for e in self.entries]

    def heading(self) -> str:
        """What the list holds."""
        st = self.survey_screen.storey
        label = st.label if st is not None else ""
        return f"Photos of storey {label}, its member groups and hazards"

    def empty_words(self) -> str:
        """No photos yet, and how to attach one."""
        st = self.survey_screen.storey
        label = st.label if st is not None else ""
        return (f"No photos of storey {label} or its member groups and hazards yet. To attach "
                "one, pick what it shows, type the path of a JPEG or PNG on this laptop and "
                "press Enter: the image is copied into the database.")

    def row(self, index: int, item: Photo) -> tuple[str, ...]:
        """#, of what, file, caption, kept in the database or missing."""
        owner = self.entries[index].owner if index < len(self.entries) else ""
        return (str(index + 1), owner, item.path, item.caption,
                "stored" if item.sha256 else "missing")

    def form_widgets(self) -> ComposeResult:
        """Of what, file, caption."""
        self.of = Choice("photo of", None, [("storey", "storey")], "storey", id="p-of",
                         width=40)
        self.of.key = ""
        yield self.of
        path = Field("file", None, id="p-path", width=40,
                     placeholder="a JPEG or PNG on this laptop")
        cap = Field("caption", None, id="p-caption", width=40)
        path.key = "path"
        cap.key = "caption"
        yield path
        yield cap

    def reload(self, keep_form: bool = False) -> None:
        """The choice of owner follows the storey."""
        opts = self.targets()
        if self.target not in [v for _, v in opts]:
            self.target = "storey"
        self.of.set_options(opts, self.target)
        super().reload(keep_form)

    def set_paths(self) -> None:
        """Editing a photo: its caption saves as accepted; its file stays as stored."""
        super().set_paths()
        self.form["path"].path = None

    def fill(self, item: Photo | None) -> None:
        """A photo's values, or a new one."""
        for k in ("path", "caption"):
            self.form[k].set_value(None if item is None else getattr(item, k))
        editing = self.editing is not None
        self.of.select.disabled = editing
        self.field("path").input.disabled = editing
        if editing and self.editing is not None and self.editing < len(self.entries):
            self.of.show_note(self.entries[self.editing].owner)
        else:
            self.of.show_note("")

    def form_changed(self, widget: FormField) -> None:
        """Another owner picked for the new photo."""
        if widget is self.of:
            self.target = str(self.of.value() or "storey")
            self.of.saved_value = self.target

    def build_item(self) -> dict[str, object]:
        """The file and caption from the form."""
        data = values_of(self.form, ["path", "caption"])
        if "path" not in data:
            raise ValueError("path: the photo's file on this laptop is needed")
        return data

    def add_item(self) -> None:
        """Attach the file: the image is copied into the database with the photo's entry."""
        from triage.ui.data import Refused
        from triage.ui.widgets.field import set_text

        try:
            data = self.build_item()
        except ValueError as err:
            self.show_error(str(err))
            return
        try:
            self.survey_screen.attach_photo(self.list_path(), str(data["path"]),
                                            str(data.get("caption", "")))
        except Refused as err:
            self.form["path"].show_refused(str(err))
            return
        n = len(self.items())
        self.fill(None)
        self.table.move_cursor(row=n - 1, animate=False)
        self.focus_first()
        set_text(self.note, f"✓ saved: photo {n} copied into the database")
