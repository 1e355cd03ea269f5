"""Only `triage.centre` imports psycopg, and the command starts without loading it."""

from __future__ import annotations

import re
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]


def test_psycopg_is_imported_in_the_centre_only():
    found = [p.relative_to(ROOT).as_posix() for p in (ROOT / "triage").rglob("*.py")
             if re.search(r"^\s*(import psycopg|from psycopg)", p.read_text(encoding="utf-8"),
                          re.M)]
    assert found and all(f.startswith("triage/centre/") for f in found), found


def test_the_command_starts_without_psycopg():
    code = ("import sys\nfrom triage.cli import build_parser\nbuild_parser()\n"
            "import triage.store, triage.centre, triage.centre.connect\n"
            "print('psycopg' in sys.modules)")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True, cwd=ROOT)
    assert out.stdout.strip() == "False"
