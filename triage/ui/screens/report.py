"""Issue the report: confirm the inspector, choose the key, write the PDF in a worker.

The passphrase is typed into a password field (never echoed) and goes no further than
`load_key` in the worker thread; it is never stored. Without a key file the report is written
unsigned and says so here and on every page.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from pathlib import Path
from typing import ClassVar

from textual import work
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import VerticalScroll
from textual.widgets import Button, Footer, Static
from textual.worker import Worker, WorkerState

from triage.ui.data import Refused, rule_of
from triage.ui.messages import CAUTION_SHORT, UNSIGNED, FieldAccepted
from triage.ui.shown import block, line
from triage.ui.typed import TriageScreen
from triage.ui.verdicts import verdict_of, worker_store
from triage.ui.widgets.field import Field


@dataclass(frozen=True)
class Issued:
    """A report written by the worker."""

    path: Path
    signed: bool
    fingerprint: str | None
    revision: int


def slug(text: str) -> str:
    """A file-name-safe form of a building name."""
    s = re.sub(r"[^\w]+", "-", text.lower(), flags=re.UNICODE).strip("-")
    return s[:40] or "survey"


def write_issued(db_path: Path, survey_id: str, out: Path, key_path: str | None,
                 passphrase: str | None) -> Issued:
    """Load the key, assess the stored survey, write the PDF, record it (worker thread)."""
    from triage.photos import blob_loader
    from triage.report import write_report
    from triage.report.keys import load_key

    key = load_key(Path(key_path).expanduser(), passphrase or None) if key_path else None
    out.parent.mkdir(parents=True, exist_ok=True)
    with worker_store(db_path) as st:
        v = verdict_of(st, survey_id)
        info = write_report(v.survey, v.assessment, out, key=key, revision=v.revision,
                            photos=blob_loader(st.photo_bytes, st.photo_dir(survey_id)))
        st.record_report(survey_id, v.revision, str(info.path), info.fingerprint)
    return Issued(Path(info.path), bool(info.signed), info.fingerprint, v.revision)


class ReportScreen(TriageScreen[bool]):
    """The report form; returns whether a report was written."""

    CSS_PATH = "report.tcss"
    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("ctrl+s", "write", "write report", priority=True),
        Binding("escape", "close", "back"),
        Binding("f4", "close", "back", show=False, priority=True),
    ]

    def __init__(self, survey_id: str) -> None:
        super().__init__()
        self.survey_id = survey_id
        self.issued: Issued | None = None

    def compose(self) -> ComposeResult:
        """The form."""
        app = self.app
        s = app.data.load(self.survey_id)
        rev = app.data.revision(self.survey_id)
        at = s.inspection.at.strftime("%Y%m%d-%H%M")
        default_out = Path(app.report_dir) / f"{slug(s.building.name)}-{at}-r{rev}.pdf"
        row = app.data.row(self.survey_id)
        yield Static(line(f"Issue the report · {s.building.name}"), classes="title")
        with VerticalScroll(id="report-form"):
            if row is not None and row.edited_since_report:
                yield Static(f"This survey was edited since its last report (revision "
                             f"{row.reported_revision}); a new report covers revision {rev}.",
                             classes="hint", id="edited-note")
            yield Static("Inspector (confirm; changes are saved to the survey)",
                         classes="section")
            yield Field("name", "inspection.inspector.name", s.inspection.inspector.name,
                        required=True, id="r-inspector", width=30)
            yield Field("id", "inspection.inspector.id", s.inspection.inspector.id,
                        id="r-inspector-id", width=16)
            yield Static("Signing key (leave empty for an unsigned report)", classes="section")
            yield Field("key file", None, app.data.setting("last_key_path"), id="r-key",
                        width=44, placeholder="path to the inspector's key file")
            yield Field("passphrase", None, id="r-pass", width=30, password=True,
                        placeholder="not shown, not kept")
            yield Static("Report", classes="section")
            yield Field("write to", None, str(default_out), id="r-out", width=56)
            yield Button("write report", id="write", compact=True)
            yield Static("", id="report-result", classes="hint")
            yield Static(f"The report is {CAUTION_SHORT}.", classes="caution")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        """Cursor on the inspector's name."""
        self.query_one("#r-inspector", Field).focus_input()

    def on_field_accepted(self, event: FieldAccepted) -> None:
        """Inspector fields save to the survey; the rest wait for 'write report'."""
        event.stop()
        if not event.path:
            return
        app = self.app
        try:
            app.data.set(self.survey_id, event.path, event.value, app.who)
        except Refused as err:
            event.field.show_refused(rule_of(str(err)))
            return
        event.field.mark_saved()
        if event.path == "inspection.inspector.name":
            app.data.remember("last_inspector_name", event.value)

    def on_button_pressed(self, event: Button.Pressed) -> None:
        """The write button."""
        if event.button.id == "write":
            self.action_write()

    def action_write(self) -> None:
        """Write the report in a worker thread."""
        for fid in ("#r-inspector", "#r-inspector-id"):
            self.query_one(fid, Field).accept()
        key = self.query_one("#r-key", Field).text.strip() or None
        if key and not Path(key).expanduser().is_file():
            self.query_one("#r-key", Field).show_refused("no key file there")
            return
        out_text = self.query_one("#r-out", Field).text.strip()
        if not out_text or not out_text.lower().endswith(".pdf"):
            self.query_one("#r-out", Field).show_refused("a file name ending .pdf")
            return
        passphrase = self.query_one("#r-pass", Field).text
        self.query_one("#report-result", Static).update("writing the report …")
        self.query_one("#write", Button).disabled = True
        app = self.app
        if key:
            app.data.remember("last_key_path", key)
        self.write_worker(Path(out_text).expanduser(), key, passphrase)

    @work(thread=True, exclusive=True, group="report", exit_on_error=False)
    def write_worker(self, out: Path, key: str | None, passphrase: str) -> Issued:
        """The PDF, off the UI thread."""
        app = self.app
        return write_issued(app.db_path, self.survey_id, out, key, passphrase)

    def on_worker_state_changed(self, event: Worker.StateChanged) -> None:
        """Show where the report went, and who signed it (or that nobody did)."""
        if event.worker.group != "report":
            return
        result = self.query_one("#report-result", Static)
        if event.state == WorkerState.SUCCESS:
            info: Issued = event.worker.result  # type: ignore[assignment]
            self.issued = info
            self.query_one("#r-pass", Field).set_value(None)
            if info.signed:
                result.update(block(f"✓ written: {info.path}\nsigned, key fingerprint "
                                    f"{info.fingerprint} · revision {info.revision}"))
            else:
                result.update(block(f"✓ written: {info.path}\n{UNSIGNED} · revision "
                                    f"{info.revision}"))
            self.query_one("#write", Button).disabled = False
        elif event.state == WorkerState.ERROR:
            err = event.worker.error
            msg = str(err).splitlines()[0] if err is not None and str(err) else "failed"
            if "passphrase" in msg:
                self.query_one("#r-pass", Field).show_refused(msg)
            result.update(block(f"not written: {msg}"))
            self.query_one("#write", Button).disabled = False

    def action_close(self) -> None:
        """Back to logging."""
        self.dismiss(self.issued is not None)
