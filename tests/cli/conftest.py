"""Fixtures of the command-line tests: a private TRIAGE_HOME, a runner in process and one in a
child process (for real standard input and output bytes), survey files."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

from tests.helpers import Run, cli, triage_home, two_storey_frame, write_json

__all__ = ["ROOT", "Run", "cli", "survey_file", "triage", "triage_home", "write_json"]

ROOT = Path(__file__).resolve().parents[2]


def triage(*argv: str, stdin: bytes = b"") -> subprocess.CompletedProcess[bytes]:
    """`python -m triage ARGS` in a child process, bytes in and out (pipes, not a terminal)."""
    return subprocess.run([sys.executable, "-m", "triage", *argv], input=stdin,
                          capture_output=True, cwd=ROOT, timeout=120)


@pytest.fixture
def survey_file(tmp_path: Path) -> Path:
    """The worked two-storey frame of docs/method.md as a file."""
    return write_json(tmp_path / "frame.json", two_storey_frame())
