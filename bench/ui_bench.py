"""Speed of the field screens, each against its promise.

    python -m bench.ui_bench

- startup_ratio: wall time from a fresh process (command line parsed as `triage demo` parses
  it) to the first screen drawn and taking keys, over the same for a minimal Textual app
  showing one static screen; medians of several runs, side by side. Target <= 1.5.
  startup_rows_ratio: the same, to the demo buildings listed (the scratch database is filled
  and opened behind the first screen), reported beside it.
- keystroke_ms: in a 20-storey survey (4 readings per storey and direction, 10 member groups
  per storey), what accepting a field costs the UI thread: the handler that validates and
  durably saves it and marks it saved. Target < 16 ms (one frame).
- verdict_ms: from accepting the field to the new verdict drawn on screen (assessed in a thread
  worker, stored, drawn). Target <= 100 ms.
"""

from __future__ import annotations

import asyncio
import json
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path
from typing import Any

ROOT = Path(__file__).resolve().parents[1]

MINIMAL = """
import time, sys
t0 = float(sys.argv[1])
from textual.app import App
from textual.widgets import Static
class Minimal(App):
    def compose(self):
        yield Static("one static screen")
    def on_mount(self):
        self.call_after_refresh(self.exit)
Minimal().run(headless=True, size=(80, 24))
print(time.time() - t0)
"""

DEMO = """
import time, sys
t0 = float(sys.argv[1])
from pathlib import Path
from triage.cli import build_parser
args = build_parser().parse_args(["demo"])      # the command line, as `triage demo` parses it
from triage.resources import samples_dir
from triage.ui.app import build_app
app = build_app(Path(sys.argv[2]) / "demo.db", demo_samples=samples_dir())
marks = {}
async def ready(pilot):
    marks["input"] = time.time() - t0             # first screen drawn, taking keys
    table = app.screen.query_one("#surveys")
    while table.row_count == 0:
        await pilot.pause(0.002)
    marks["rows"] = time.time() - t0              # the demo buildings listed
    app.exit()
app.run(headless=True, size=(80, 24), auto_pilot=ready)
print(marks["input"], marks["rows"])
"""


def _run(code: str, *extra: str) -> list[float]:
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    t0 = time.time()
    out = subprocess.run([sys.executable, "-c", code, repr(t0), *extra], capture_output=True,
                         text=True, env=env, check=True)
    return [float(x) for x in out.stdout.strip().splitlines()[-1].split()]


def startup_figures(repeats: int = 5) -> dict[str, float]:
    """Start-up of `triage demo` over a minimal Textual app, medians, side by side.

    startup_ratio: to the first screen drawn and taking keys; startup_rows_ratio: to the demo
    buildings listed in it (the database is filled behind the first screen).
    """
    _run(MINIMAL)  # warm the file cache
    minimal, ready, rows = [], [], []
    for _ in range(repeats):
        minimal.append(_run(MINIMAL)[0])
        with tempfile.TemporaryDirectory() as d:
            a, b = _run(DEMO, d)
        ready.append(a)
        rows.append(b)
    base = statistics.median(minimal)
    return {"startup_ratio": statistics.median(ready) / base,
            "startup_rows_ratio": statistics.median(rows) / base,
            "startup_minimal_s": base}


def startup_ratio(repeats: int = 5) -> float:
    """Median start-up of `triage demo` to its first screen, over a minimal Textual app."""
    return startup_figures(repeats)["startup_ratio"]


def _big_db(folder: Path) -> tuple[Path, str]:
    from bench.generate import big_survey
    from triage.store import Store

    survey = big_survey(storeys=20, groups=10, readings=4)
    db = folder / "big.db"
    with Store.open(db) as st:
        st.add_survey(survey, "bench", "bench")
    return db, str(survey.survey_id)


async def _field_times(db: Path, sid: str, edits: int) -> tuple[list[float], list[float]]:
    from triage.ui.app import build_app
    from triage.ui.messages import FieldAccepted
    from triage.ui.widgets.field import Field

    app = build_app(db, open_survey=sid, blink=False)
    accept: list[float] = []
    verdict: list[float] = []
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        await app.workers.wait_for_complete()
        await pilot.pause()
        scr: Any = app.screen
        pane = scr.query_one("#readings-pane")
        pane.edit(0)
        await pilot.pause()
        f = scr.query_one("#r-offset", Field)
        for i in range(edits):
            value = 3.0 + (i % 2)  # crosses no threshold: the same work each time
            f.input.value = f"{value:g}"
            t0 = time.perf_counter()
            scr.on_field_accepted(FieldAccepted(f, f.path or "", value))
            t1 = time.perf_counter()
            rev = scr.revision
            while scr.assessed_revision < rev:
                await asyncio.sleep(0.0005)
            app.screen._on_timer_update()  # paint the frame now (layout and compositor)
            t2 = time.perf_counter()
            await pilot.pause()
            accept.append((t1 - t0) * 1000)
            verdict.append((t2 - t0) * 1000)
    return accept, verdict


def field_figures(edits: int = 30) -> dict[str, float]:
    """keystroke_ms and verdict_ms (medians) in the 20-storey survey."""
    with tempfile.TemporaryDirectory() as d:
        db, sid = _big_db(Path(d))
        accept, verdict = asyncio.run(_field_times(db, sid, edits))
    return {"keystroke_ms": statistics.median(accept[3:]),
            "verdict_ms": statistics.median(verdict[3:])}


def keystroke_ms(edits: int = 30) -> float:
    """Median UI-thread cost of accepting one field, ms."""
    return field_figures(edits)["keystroke_ms"]


def verdict_ms(edits: int = 30) -> float:
    """Median time from accepting a field to the new verdict on screen, ms."""
    return field_figures(edits)["verdict_ms"]


def main() -> None:
    """Print the three figures as JSON."""
    figures = {**startup_figures(), **field_figures()}
    print(json.dumps(figures))


if __name__ == "__main__":
    main()
