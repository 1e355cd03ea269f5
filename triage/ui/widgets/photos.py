"""Photos: a file path and caption on the storey, one of its member groups, or a hazard."""

from __future__ import annotations

from typing import Any

from textual.app import ComposeResult

from triage.standards.vocabulary import words
from triage.ui.widgets.field import Choice, Field
from triage.ui.widgets.pane import ItemPane, values_of

KEYS = ["path", "caption"]


class PhotosPane(ItemPane):
    """Photos of one thing: pick what they are of, then add path and caption."""

    first_key = "path"
    noun = "photo"
    columns = (("#", 3), ("file", 30), ("caption", 30))

    def __init__(self, id: str | None = None) -> None:
        super().__init__(id=id)
        self.target = "storey"

    def targets(self) -> list[tuple[str, str]]:
        """What a photo can be of: the storey, its member groups, the hazards."""
        scr = self.survey_screen
        st = scr.storey
        out = [(f"storey {st.label}" if st is not None else "storey", "storey")]
        if st is not None:
            for j, m in enumerate(st.members):
                out.append((f"member group {j + 1}: {words('member_kinds', m.kind)}"
                            + (f" {m.ref}" if m.ref else ""),
                            f"members[{j}]"))
        for k, h in enumerate(scr.survey.hazards):
            out.append((f"hazard {k + 1}: {words('hazards', h.kind)}", f"hazards[{k}]"))
        return out

    def _owner(self) -> Any:
        scr = self.survey_screen
        if self.target.startswith("hazards["):
            k = int(self.target[8:-1])
            return scr.survey.hazards[k] if k < len(scr.survey.hazards) else None
        st = scr.storey
        if st is None:
            return None
        if self.target.startswith("members["):
            j = int(self.target[8:-1])
            return st.members[j] if j < len(st.members) else None
        return st

    def list_path(self) -> str:
        """The photos list of the thing picked."""
        i = self.survey_screen.storey_index
        if self.target.startswith("hazards["):
            return f"{self.target}.photos"
        if self.target.startswith("members["):
            return f"storeys[{i}].{self.target}.photos"
        return f"storeys[{i}].photos"

    def items(self) -> list[Any]:
        """The photos of the thing picked."""
        owner = self._owner()
        if owner is None:
            self.target = "storey"
            owner = self.survey_screen.storey
        return list(owner.photos) if owner is not None else []

    def heading(self) -> str:
        """Where the paths are relative to."""
        return "Photos (paths relative to the survey file when it is exported)"

    def row(self, index: int, item: Any) -> tuple[str, ...]:
        """#, file, caption."""
        return (str(index + 1), item.path, item.caption)

    def form_widgets(self) -> ComposeResult:
        """Of what, file, caption."""
        self.of = Choice("photo of", None, [("storey", "storey")], "storey", id="p-of",
                         width=40)
        self.of.key = ""
        yield self.of
        path = Field("file", None, id="p-path", width=40, placeholder="img/c3.jpg")
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

    def fill(self, item: Any | None) -> None:
        """A photo's values, or a new one."""
        for k in KEYS:
            self.form[k].set_value(None if item is None else getattr(item, k))
        self.of.select.disabled = self.editing is not None

    def form_changed(self, widget: Any) -> None:
        """Another owner picked: show its photos."""
        if widget is self.of:
            self.target = str(self.of.value() or "storey")
            self.of.saved_value = self.target
            self.reload()

    def build_item(self) -> dict[str, Any]:
        """The photo from the form."""
        data = values_of(self.form, KEYS)
        if "path" not in data:
            raise ValueError("path: the photo's file is needed")
        return data
