"""Readings of a storey: offset over a gauge or a tilt, each one's drift ratio shown at once."""

from __future__ import annotations

from typing import TYPE_CHECKING

from pydantic import ValidationError
from textual.app import ComposeResult
from textual.widgets import Input, Static

from triage.assess.drift import pct
from triage.model import Reading, error_lines
from triage.ui.data import rule_of
from triage.ui.widgets.field import Choice, Field, set_text, show_text
from triage.ui.widgets.pane import ItemPane, values_of

if TYPE_CHECKING:
    from triage.ui.widgets.pane import FormField
from triage.ui.widgets.verdict import storey_drift_text

OFFSET_KEYS = ["dir", "offset_mm", "where", "gauge_mm", "sd_mm", "baseline_mm",
               "baseline_sd_mm"]
TILT_KEYS = ["dir", "tilt_deg", "where", "sd_deg", "baseline_deg", "baseline_sd_deg"]
ALL_KEYS = ["dir", "offset_mm", "tilt_deg", "where", "gauge_mm", "sd_mm", "sd_deg",
            "baseline_mm", "baseline_sd_mm", "baseline_deg", "baseline_sd_deg"]


def reading_text(r: Reading) -> str:
    """How a reading was taken, in a few characters."""
    if r.tilt_deg is not None:
        return f"tilt {r.tilt_deg:g}°"
    return f"{show_text(r.offset_mm)} / {show_text(r.gauge_mm)} mm"


class ReadingsPane(ItemPane[Reading]):
    """The readings of the storey in view."""

    DEFAULT_CSS = """
    ReadingsPane > .drift-line { height: 1; }
    """

    first_key = "offset_mm"

    def focus_first(self) -> None:
        """The cursor in the offset, or the tilt for a tilt reading."""
        self.field("tilt_deg" if self._tilt() else "offset_mm").focus_input()
    noun = "reading"
    columns = (("#", 3), ("dir", 3), ("offset / gauge", 16), ("sd", 7), ("where", 15),
               ("drift", 7))

    def list_path(self) -> str:
        """E.g. storeys[1].readings."""
        return f"storeys[{self.survey_screen.storey_index}].readings"

    def items(self) -> list[Reading]:
        """The storey's readings."""
        st = self.survey_screen.storey
        return list(st.readings) if st is not None else []

    def heading(self) -> str:
        """The storey's drift as assessed."""
        scr = self.survey_screen
        a = scr.assessment
        st = scr.storey
        if st is None:
            return ""
        drift = storey_drift_text(a, st.label) if a is not None else "drift: working it out"
        return f"Readings, storey {st.label} · {drift}"

    def row(self, index: int, item: Reading) -> tuple[str, ...]:
        """#, dir, value, sd, where, drift."""
        sd = item.sd_deg if item.tilt_deg is not None else item.sd_mm
        unit = "°" if item.tilt_deg is not None else ""
        return (str(index + 1), item.dir, reading_text(item),
                "default" if sd is None else f"{sd:g}{unit}", item.where or "",
                pct(item.drift_ratio()))

    def form_widgets(self) -> ComposeResult:
        """Direction, how taken, the values, where."""
        d = Choice("direction", None, [("x", "x"), ("y", "y")], "x", id="r-dir")
        by = Choice("taken as", None, [("offset over a gauge", "offset"),
                                       ("tilt angle", "tilt")], "offset", id="r-by")
        off = Field("offset", None, kind="float", unit="mm", id="r-offset")
        tilt = Field("tilt", None, kind="float", unit="deg", id="r-tilt")
        where = Field("where", None, id="r-where", width=30, placeholder="e.g. grid B2")
        gauge = Field("gauge length", None, kind="float", unit="mm", id="r-gauge")
        sd = Field("uncertainty", None, kind="float", unit="mm", id="r-sd",
                   placeholder="default")
        sd_deg = Field("uncertainty", None, kind="float", unit="deg", id="r-sd-deg",
                       placeholder="default")
        base = Field("as-built", None, kind="float", unit="mm", id="r-base",
                     placeholder="offset there")
        base_sd = Field("as-built ±", None, kind="float", unit="mm", id="r-base-sd",
                        placeholder="default")
        base_deg = Field("as-built", None, kind="float", unit="deg", id="r-base-deg",
                         placeholder="tilt there")
        base_sd_deg = Field("as-built ±", None, kind="float", unit="deg", id="r-base-sd-deg",
                            placeholder="default")
        pairs = ((d, "dir"), (off, "offset_mm"), (tilt, "tilt_deg"), (where, "where"),
                 (gauge, "gauge_mm"), (sd, "sd_mm"), (sd_deg, "sd_deg"), (base, "baseline_mm"),
                 (base_sd, "baseline_sd_mm"), (base_deg, "baseline_deg"),
                 (base_sd_deg, "baseline_sd_deg"))
        for w, k in pairs:
            w.key = k
        by.key = ""
        self.by = by
        yield d
        yield by
        for w, _ in pairs[1:]:
            yield w
        self.drift_line = Static("", classes="pane-note drift-line")
        yield self.drift_line

    def _tilt(self) -> bool:
        return bool(self.by.value() == "tilt")

    def _show_kind(self) -> None:
        tilt = self._tilt()
        for k in ("offset_mm", "gauge_mm", "sd_mm", "baseline_mm", "baseline_sd_mm"):
            self.form[k].display = not tilt
        for k in ("tilt_deg", "sd_deg", "baseline_deg", "baseline_sd_deg"):
            self.form[k].display = tilt
        self.by.select.disabled = self.editing is not None

    def fill(self, item: Reading | None) -> None:
        """A reading's values, or a new one with the last gauge remembered."""
        app = self.app
        if item is None:
            keep_dir = self.form["dir"].value() or "x"
            self.form["dir"].set_value(keep_dir)
            for k in ("offset_mm", "tilt_deg", "where", "baseline_mm", "baseline_sd_mm",
                      "baseline_deg", "baseline_sd_deg"):
                self.form[k].set_value(None)
            gauge = app.data.setting("last_gauge_mm")
            self.form["gauge_mm"].set_value(
                float(gauge) if isinstance(gauge, (int, float, str)) and gauge else None)
            self.form["sd_mm"].set_value(app.data.setting("last_sd_mm"))
            self.form["sd_deg"].set_value(app.data.setting("last_sd_deg"))
        else:
            self.by.set_value("tilt" if item.tilt_deg is not None else "offset")
            for k in ALL_KEYS:
                self.form[k].set_value(getattr(item, k))
        self._show_kind()
        self.preview()

    def toggle_direction(self) -> None:
        """The direction from x to y and back, as a pick (saved at once when editing)."""
        d = self.choice("dir")
        d.select.value = "y" if d.value() == "x" else "x"

    def form_changed(self, widget: FormField) -> None:
        """Offset or tilt picked."""
        self._show_kind()
        self.preview()

    def on_input_changed(self, event: Input.Changed) -> None:
        """The drift ratio as the numbers are typed."""
        self.preview()

    def preview(self) -> None:
        """Show the drift ratio of what is in the form, as it is typed."""
        out = self.drift_line
        try:
            data = values_of(self.form, TILT_KEYS if self._tilt() else OFFSET_KEYS)
        except ValueError as err:
            set_text(out, fixed=True, content=f"drift: — ({err})")
            return
        needed = ["tilt_deg"] if self._tilt() else ["offset_mm", "gauge_mm"]
        if any(k not in data for k in needed):
            set_text(out, fixed=True, content="drift: — (needs " + ("the tilt" if self._tilt()
                                            else "offset and gauge length") + ")")
            return
        try:
            r = Reading.model_validate(data)
        except ValidationError as err:
            set_text(out, fixed=True, content=f"drift: — ({rule_of(error_lines(err)[0])})")
            return
        set_text(out, fixed=True, content=f"drift ratio {pct(r.drift_ratio())} ({r.dir})")

    def build_item(self) -> dict[str, object]:
        """The reading from the form."""
        data = values_of(self.form, TILT_KEYS if self._tilt() else OFFSET_KEYS)
        if self._tilt():
            if "tilt_deg" not in data:
                raise ValueError("tilt_deg: needed for a tilt reading")
        else:
            for k, name in (("offset_mm", "offset"), ("gauge_mm", "gauge length")):
                if k not in data:
                    raise ValueError(f"{k}: the {name} is needed for an offset reading")
        return data

    def after_add(self) -> None:
        """Keep direction, gauge and uncertainty for the next reading; remember them."""
        app = self.app
        for k, setting in (("gauge_mm", "last_gauge_mm"), ("sd_mm", "last_sd_mm"),
                           ("sd_deg", "last_sd_deg")):
            try:
                v = self.form[k].value()
            except ValueError:
                v = None
            if v is not None:
                app.data.remember(setting, v)
        self.fill(None)
