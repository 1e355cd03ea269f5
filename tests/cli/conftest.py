"""Fixtures of the command-line tests: a private TRIAGE_HOME, a runner in process and one in a
child process (for real standard input and output bytes), survey files."""

from __future__ import annotations

import json
import subprocess
import sys
from collections.abc import Callable
from pathlib import Path
from typing import Any

import pytest

from tests.helpers import two_storey_frame
from triage.cli import main

ROOT = Path(__file__).resolve().parents[2]


@pytest.fixture(autouse=True)
def triage_home(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> Path:
    """Keys and trusted keys of each test live in its own folder; no passphrase from outside."""
    home = tmp_path / "home"
    home.mkdir()
    monkeypatch.setenv("TRIAGE_HOME", str(home))
    monkeypatch.delenv("TRIAGE_KEY_PASSPHRASE", raising=False)
    return home


Run = Callable[..., tuple[int, str, str]]


@pytest.fixture
def cli(capsys: pytest.CaptureFixture[str]) -> Run:
    """`triage ARGS` in this process: (status, stdout, stderr)."""
    def run(*argv: str) -> tuple[int, str, str]:
        code = main(list(argv))
        got = capsys.readouterr()
        return code, got.out, got.err
    return run


def triage(*argv: str, stdin: bytes = b"") -> subprocess.CompletedProcess[bytes]:
    """`python -m triage ARGS` in a child process, bytes in and out (pipes, not a terminal)."""
    return subprocess.run([sys.executable, "-m", "triage", *argv], input=stdin,
                          capture_output=True, cwd=ROOT, timeout=120)


def write_json(path: Path, data: Any) -> Path:
    path.write_text(json.dumps(data, ensure_ascii=False), encoding="utf-8")
    return path


@pytest.fixture
def survey_file(tmp_path: Path) -> Path:
    """The worked two-storey frame of docs/method.md as a file."""
    return write_json(tmp_path / "frame.json", two_storey_frame())
