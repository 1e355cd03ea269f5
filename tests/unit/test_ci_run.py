"""`.ci/run` stops when the programs the tests need (poppler-utils, PostgreSQL) cannot be
installed, rather than going on to a run where their tests would be missing."""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]


@pytest.mark.skipif(sys.platform == "win32", reason="a bash script")
def test_a_failed_apt_install_stops_the_run(tmp_path: Path):
    stubs = tmp_path / "bin"
    stubs.mkdir()
    called = tmp_path / "called"
    for name, rc in (("apt-get", 100), ("python3", 0)):   # apt fails; python3 must not run
        stub = stubs / name
        stub.write_text(f'#!/bin/sh\necho "{name} $*" >> "{called}"\nexit {rc}\n')
        stub.chmod(0o755)
    env = {k: v for k, v in os.environ.items() if k not in ("CI", "PYTHONPATH")}
    env["PATH"] = f"{stubs}:/usr/bin:/bin"
    out = subprocess.run(["bash", str(ROOT / ".ci" / "run")], env=env, capture_output=True,
                         text=True, timeout=60)
    assert out.returncode == 1, out.stderr
    assert "poppler-utils and postgresql" in out.stderr
    log = called.read_text().splitlines()
    assert log and all(line.startswith("apt-get ") for line in log), log   # no install, no tests
