"""Start and stop cleanly: no terminal, one line and status 1; the demo leaves nothing behind."""

from __future__ import annotations

import os
import re
import subprocess
import sys
import time
import uuid
from pathlib import Path

from helpers import program


def test_no_terminal_is_one_line_and_status_1(tmp_path: Path) -> None:
    db = tmp_path / "field.db"
    for args in (["--db", str(db)], ["demo"]):
        out = subprocess.run([sys.executable, "-m", "triage", *args], stdin=subprocess.DEVNULL,
                             capture_output=True, text=True, timeout=60,
                             env={**os.environ, "TRIAGE_HOME": str(tmp_path / "home")})
        assert out.returncode == 1
        lines = out.stderr.strip().splitlines()
        assert len(lines) == 1 and "need a terminal" in lines[0], out.stderr
        assert "\x1b" not in out.stdout + out.stderr  # no escape codes written
    assert not db.exists()  # nothing was created


def test_demo_removes_its_scratch_database(tmp_path: Path) -> None:
    tmux = program("tmux", "tmux")
    scratch = tmp_path / "tmp"
    scratch.mkdir()
    sock = f"triage-test-{uuid.uuid4().hex[:8]}"
    cmd = (f"env TMPDIR={scratch} TRIAGE_HOME={tmp_path / 'home'} TERM=xterm-256color "
           f"{sys.executable} -m triage demo")

    def tm(*args: str) -> subprocess.CompletedProcess[str]:
        return subprocess.run([tmux, "-L", sock, *args], capture_output=True, text=True)

    env = {k: v for k, v in os.environ.items() if not k.startswith("TMUX")}
    subprocess.run([tmux, "-L", sock, "-f", "/dev/null", "new-session", "-d", "-x", "80",
                    "-y", "24", "-s", "t", cmd], check=True, env=env)
    try:
        end = time.monotonic() + 30
        while not re.search(r"\d+ of \d+ surveys", tm("capture-pane", "-p", "-t", "t").stdout):
            assert time.monotonic() < end, "the demo list never showed"
            time.sleep(0.2)
        assert [p.name for p in scratch.iterdir() if p.name.startswith("triage-demo-")]
        tm("send-keys", "-t", "t", "C-q")
        end = time.monotonic() + 30
        while tm("has-session", "-t", "t").returncode == 0:
            assert time.monotonic() < end, "the demo did not quit"
            time.sleep(0.2)
        assert not [p for p in scratch.iterdir() if p.name.startswith("triage-demo-")]
    finally:
        tm("kill-server")
