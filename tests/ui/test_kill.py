"""Killed at any moment (SIGKILL), the app loses nothing it showed as saved."""

from __future__ import annotations

import os
import signal
import subprocess
import sys
from pathlib import Path

from conftest import SID
from drive import started

from triage.store import Store

DRIVER = Path(__file__).with_name("kill_driver.py")


async def test_sigkill_after_shown_saved(db: Path, make_app) -> None:
    env = dict(os.environ)
    env["PYTHONPATH"] = str(Path(__file__).resolve().parents[2])
    proc = subprocess.Popen([sys.executable, str(DRIVER), str(db), SID],
                            stdout=subprocess.PIPE, stderr=subprocess.DEVNULL, env=env,
                            text=True)
    try:
        assert proc.stdout is not None
        line = proc.stdout.readline().strip()
        assert line == "SHOWN SAVED", line
        # killed only once the unaccepted typing is on screen (not saved, not shown saved)
        typed, _, status = proc.stdout.readline().strip().partition("|")
        assert typed == "TYPED half typed", typed
        assert not status.startswith("✓ saved"), status
        proc.send_signal(signal.SIGKILL)
        proc.wait(timeout=20)
    finally:
        if proc.poll() is None:
            proc.kill()
    assert proc.returncode == -signal.SIGKILL
    with Store.open(db) as st:
        assert st.integrity() == "ok"
        assert st.load_survey(SID).storeys[0].height_m == 3.9
        assert st.load_survey(SID).storeys[0].notes is None  # never accepted, never saved
        # exactly the one accepted edit survived, logged once; nothing of the half typing
        edits = [(c.op, c.path, c.new) for c in st.change_log(SID) if c.op != "import"]
        assert edits == [("set", "storeys[0].height_m", 3.9)], edits
    app = make_app(db, open_survey=SID)
    async with started(app):
        assert app.screen.query_one("#s-height").text == "3.9"
        assert app.screen.query_one("#s-notes").text == ""
