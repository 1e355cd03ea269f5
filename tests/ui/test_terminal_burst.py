"""A burst of keys through a real terminal (tmux) into `triage`, then the database checked.

The pilot tests post key events to the app; this one goes through a pseudo-terminal and
Textual's own driver, as an inspector's keyboard (or a paste) does. tmux is installed by
`.ci/run`; where it is missing the test fails under CI and is skipped elsewhere, saying so.
"""

from __future__ import annotations

import os
import subprocess
import sys
import time
import uuid
from collections.abc import Callable
from pathlib import Path

from conftest import SID, two_surveys
from helpers import program

from triage.model import parse_survey
from triage.store import Store


def _wait(what: str, check: Callable[[], bool], seconds: float = 30.0,
          shown: Callable[[], str] = str) -> None:
    end = time.monotonic() + seconds
    while time.monotonic() < end:
        if check():
            return
        time.sleep(0.1)
    raise AssertionError(f"timed out waiting for {what}; the terminal shows:\n{shown()}")


def test_keys_typed_ahead_through_a_terminal_are_all_saved(tmp_path: Path) -> None:
    tmux = program("tmux", "tmux")
    db = tmp_path / "field.db"
    with Store.open(db) as st:
        for d in two_surveys():
            st.add_survey(parse_survey(d), "Tess Tester", "test")
        before = len(st.load_survey(SID).storeys[0].readings)
    sock = f"triage-test-{uuid.uuid4().hex[:8]}"
    home = tmp_path / "home"

    def tm(*args: str) -> str:
        return subprocess.run([tmux, "-L", sock, *args], capture_output=True, text=True,
                              check=True).stdout

    def screen() -> str:
        return tm("capture-pane", "-p", "-t", "t")

    cmd = (f"env TRIAGE_HOME={home} TERM=xterm-256color {sys.executable} -m triage "
           f"--db {db}")
    env = {k: v for k, v in os.environ.items() if not k.startswith("TMUX")}
    subprocess.run([tmux, "-L", sock, "-f", "/dev/null", "new-session", "-d", "-x", "80",
                    "-y", "24", "-s", "t", cmd], check=True, env=env)
    try:
        _wait("the survey list", lambda: "Harbour Bakery" in screen())
        # One burst, written to the terminal without a pause: filter, open, two readings
        # (offset, Tab, where, Tab, gauge, Enter each), the second typed before the first is
        # saved.
        tm("send-keys", "-t", "t", "Bakery", "Enter", "5", "Tab", "grid A1", "Tab", "2000",
           "Enter", "7.5", "Tab", "grid A2", "Tab", "2000", "Enter")

        def saved() -> list[tuple[float | None, float | None]]:
            with Store.open(db, refresh=False, check=False) as st:
                rs = st.load_survey(SID).storeys[0].readings[before:]
            return [(r.offset_mm, r.where, r.gauge_mm) for r in rs]

        _wait("both readings saved", lambda: len(saved()) >= 2, shown=screen)
        assert saved() == [(5.0, "grid A1", 2000.0), (7.5, "grid A2", 2000.0)]
        tm("send-keys", "-t", "t", "C-q")
        _wait("triage to quit", lambda: subprocess.run(
            [tmux, "-L", sock, "has-session", "-t", "t"], capture_output=True).returncode != 0)
    finally:
        subprocess.run([tmux, "-L", sock, "kill-server"], capture_output=True)
