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
- nav_keys_storey: the keys other than typed characters that a pilot script presses to log one
  typical storey through the screens at 80 x 24, from the storey's first tab (the cursor in the
  storey's height) to the hazard's last field: four readings at named spots (two x, two y; the
  first gives the gauge length), three member groups (columns, beams, walls with two signs),
  one falling hazard with its height. Tab, Enter, Space (ticking a sign), ctrl+d (the
  direction) and F-keys count; `chars_storey`, beside it, counts the characters typed (values,
  and the letters typed to find a choice in a pick list). The script then checks the storey as
  stored. Target <= 25.
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


# The storey as an inspector logs it: ("key", name) is a key counted in nav_keys_storey,
# ("type", text) characters typed (a space inside a value is a typed character).
STOREY_SCRIPT: tuple[tuple[str, str], ...] = (
    ("key", "f6"),                                     # readings: the cursor in the offset
    ("type", "12"), ("key", "tab"), ("type", "grid A1"), ("key", "tab"), ("type", "2000"),
    ("key", "enter"),                                  # x, gauge length remembered from here
    ("type", "8"), ("key", "tab"), ("type", "grid D1"), ("key", "enter"),
    ("key", "ctrl+d"),                                 # direction y
    ("type", "5"), ("key", "tab"), ("type", "grid A1"), ("key", "enter"),
    ("type", "7"), ("key", "tab"), ("type", "grid D4"), ("key", "enter"),
    ("key", "f7"),                                     # members: the cursor on the kind
    ("key", "tab"), ("type", "12"), ("key", "enter"),  # 12 columns (the kind offered)
    ("type", "b"), ("key", "tab"), ("type", "8"), ("key", "enter"),    # 8 beams
    ("type", "w"), ("key", "tab"), ("type", "4"), ("key", "tab"),      # 4 walls, and signs:
    ("type", "b"), ("key", "space"), ("type", "m"), ("key", "space"),  # bars exposed, member
    ("key", "enter"),                                                  # shortened; added
    ("key", "f8"),                                     # hazards: the cursor on the kind
    ("type", "fa"), ("key", "tab"), ("type", "6"), ("key", "enter"),   # falling hazard, 6 m
)


def storey_survey() -> dict[str, Any]:
    """A new two-storey building of Kōwhai Bay with nothing logged yet."""
    return {"format": "triage-survey/2",
            "id": "44444444-4444-4444-8444-444444444444",
            "building": {"name": "Wharf Sheds", "address": "9 Wharf Road, Kōwhai Bay",
                         "system": {"x": "rc_frame", "y": "rc_frame"}},
            "inspection": {"inspector": {"name": "Bench Inspector"},
                           "at": "2026-11-29T09:00:00+13:00"},
            "storeys": [{"label": "G", "height_m": 3.2}, {"label": "1", "height_m": 3.2}]}


def _check_storey(survey: Any) -> None:
    """The storey as the script logged it, or AssertionError naming what differs."""
    g = survey.storeys[0]
    got = [(r.dir, r.offset_mm, r.where, r.gauge_mm) for r in g.readings]
    want = [("x", 12.0, "grid A1", 2000.0), ("x", 8.0, "grid D1", 2000.0),
            ("y", 5.0, "grid A1", 2000.0), ("y", 7.0, "grid D4", 2000.0)]
    assert got == want, f"readings: {got}"
    groups = [(m.kind, m.count, tuple(m.signs)) for m in g.members]
    assert groups == [("column", 12, ()), ("beam", 8, ()),
                      ("wall", 4, ("bar_exposed", "vertical_shortening"))], f"groups: {groups}"
    hz = [(h.kind, h.height_above_ground_m) for h in survey.hazards]
    assert hz == [("falling_hazard", 6.0)], f"hazards: {hz}"


async def _log_storey(db: Path, sid: str) -> tuple[int, int]:
    from triage.store import Store
    from triage.ui.app import build_app

    app = build_app(db, open_survey=sid, blink=False)
    keys = chars = 0
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        await app.workers.wait_for_complete()
        await pilot.pause()
        await pilot.press("f5")  # the start: the storey's first tab (not counted)
        await pilot.pause()
        for what, text in STOREY_SCRIPT:
            if what == "key":
                keys += 1
                await pilot.press(text)
            else:
                chars += len(text)
                await pilot.press(*["space" if ch == " " else ch for ch in text])
        await pilot.pause()
        await app.workers.wait_for_complete()
    with Store.open(db) as st:
        _check_storey(st.load_survey(sid))
    return keys, chars


def storey_figures() -> dict[str, float]:
    """nav_keys_storey and chars_storey: one typical storey logged by a pilot script."""
    from triage.model import parse_survey
    from triage.store import Store

    with tempfile.TemporaryDirectory() as d:
        db = Path(d) / "storey.db"
        survey = parse_survey(storey_survey())
        with Store.open(db) as st:
            st.add_survey(survey, "bench", "bench")
        old = os.environ.get("TRIAGE_HOME")
        os.environ["TRIAGE_HOME"] = d  # no settings of the user's (theme, last gauge)
        try:
            keys, chars = asyncio.run(_log_storey(db, str(survey.survey_id)))
        finally:
            if old is None:
                os.environ.pop("TRIAGE_HOME", None)
            else:
                os.environ["TRIAGE_HOME"] = old
    return {"nav_keys_storey": float(keys), "chars_storey": float(chars)}


def nav_keys_storey() -> dict[str, float]:
    """The storey's figures (nav_keys_storey, with chars_storey beside it)."""
    return storey_figures()


def main() -> None:
    """Print the figures as JSON."""
    figures = {**startup_figures(), **field_figures(), **storey_figures()}
    print(json.dumps(figures))


if __name__ == "__main__":
    main()
